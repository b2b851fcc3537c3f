package rules

import (
	"fmt"
	"headroom/checker/filter"
	"math"
	"strconv"
	"strings"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// WindingReactance checks that a broadband transformer's magnetising
// reactance stays large against what it works into at the bottom of the band.
var WindingReactance = &engine.Rule{
	ID:              "winding.reactance",
	NeedsTransistor: true,
	FixMoves:        []string{engine.MoveGain}, // its fix restores the gain the part costs
	Doc: engine.Doc{
		Title: "a transformer's loaded winding must have ample reactance at the lowest band frequency",
		Why: "The magnetising inductance shunts the signal path. With the winding's reactance four times the impedance it " +
			"works into, a matched transformer is within 3 % of an ideal one (return loss 18 dB, 0.07 dB lost); at twice, it " +
			"is 11 % off and the return loss falls to 12 dB.",
		Formula: "per transformer without a capacitor across any winding (a tuned transformer's winding is resonated, " +
			"and tank.tuning judges it), the loaded winding is the one with the smallest termination ÷ turns² (chosen afresh in each case); " +
			"ω·AL·N² ÷ termination >= min_ratio at f_low, leakage and resistance ignored, AL at its minimum in the worst case; " +
			"termination = |Z| between the winding's nets at f_low with the whole transformer removed. A winding in a FET's drain is judged the same way (docs/fet.md).",
		Source: "D. G. Fern, \"The Four Times the Impedance Rule for Broadband RF Transformer Windings: Where Does it Originate?\" " +
			"(GoldSpire Design): reactance at least four times the impedance the winding connects to; such a transformer " +
			"works within 3 % of an ideal one",
		Fix: "The minimum turns on the loaded winding at the case's AL, and the other windings in the same ratio: all windings " +
			"become the smallest whole multiple of their whole-number turns ratio that is enough.",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "loaded winding's reactance ÷ termination, at least"},
		},
	},
	Run: func(p *engine.Pass) error {
		if p.A.AC == nil {
			return nil
		}
		minRatio := p.Param("min_ratio")
		w := omegaLow(p.Circuit)
		tuned := map[string]bool{} // a winding with a capacitor across it resonates: tank.tuning judges it
		for _, t := range filter.Tanks(p.Circuit, p.A.Topo) {
			tuned[t.Ref] = true
		}
		for _, part := range p.Circuit.Parts {
			if part.Kind != circuit.Transformer || !(part.AL > 0) || tuned[part.Ref] {
				continue
			}
			i, term := loadedWinding(p, part)
			if i < 0 {
				continue
			}
			wd := part.Windings[i]
			x := w * part.AL * wd.Turns * wd.Turns
			ratio := x / term
			fLow := p.Circuit.Band[0]
			f := engine.Finding{Part: part.Ref,
				HasMetric: true, Measured: ratio, Limit: minRatio, Comparison: ">=", Unit: "ratio",
				MessageLater: func() string {
					return fmt.Sprintf("%s %s (%s turns, the loaded winding) has %s of reactance at %s, %sx the %s it works into, needs at least %sx",
						part.Ref, wd.Name, quantity.Format(wd.Turns, quantity.Ratio), quantity.Approx(x, quantity.Ohm),
						quantity.Approx(fLow, quantity.Hertz), quantity.Format(quantity.Round(ratio, 3), quantity.Ratio),
						quantity.Approx(term, quantity.Ohm), quantity.Format(minRatio, quantity.Ratio))
				}}
			if engine.Fails(ratio, minRatio, ">=") {
				f.Fix, f.Changes = windingFix(p, part, i, term, minRatio)
			}
			p.Report(f)
		}
		return nil
	},
}

// loadedWinding picks the winding with the smallest termination ÷ turns²:
// referred to one turn, the terminations are in parallel across the
// magnetising inductance, and the smallest is the one that loads it. A
// winding with no termination (both nets at AC ground, or one net) is
// skipped: nothing is across it. It returns −1 when no winding qualifies.
func loadedWinding(p *engine.Pass, part *circuit.Part) (int, float64) {
	ws := p.A.AC.Windings[part.Ref]
	best, bestTerm, bestRef := -1, 0.0, math.Inf(1)
	for i, wd := range part.Windings {
		a := ws[wd.Name]
		if a == nil || !(wd.Turns > 0) || !(a.Termination > 0) || math.IsInf(a.Termination, 0) {
			continue
		}
		if r := a.Termination / (wd.Turns * wd.Turns); r < bestRef {
			best, bestTerm, bestRef = i, a.Termination, r
		}
	}
	return best, bestTerm
}

// windingFix gives every winding new turns, in the same ratio, so that the
// loaded winding i reaches minRatio at the case's AL. Turns do not vary
// between cases; AL does, so no nominal scaling is needed.
func windingFix(p *engine.Pass, part *circuit.Part, i int, term, minRatio float64) (string, []engine.Change) {
	w := omegaLow(p.Circuit)
	need := math.Sqrt(minRatio * term / (w * part.AL))
	turns := make([]float64, len(part.Windings))
	for j, wd := range part.Windings {
		turns[j] = wd.Turns
	}
	out, exact := roundTurnsUp(turns, i, need)
	var list []string
	var changes []engine.Change
	for j, wd := range part.Windings {
		list = append(list, fmt.Sprintf("%s %d", wd.Name, out[j]))
		changes = append(changes, engine.Change{Part: part.Ref + "." + wd.Name, Key: "turns", To: strconv.Itoa(out[j])})
	}
	n := float64(out[i])
	x := w * part.AL * n * n
	var b strings.Builder
	shown := quantity.Round(need, 4)
	at := "at least"
	if shown <= turns[i] { // fails by a hair: "at least 2" would read as a pass
		at = "just over"
	}
	fmt.Fprintf(&b, "%s %s needs %s %s turns", part.Ref, part.Windings[i].Name, at, quantity.Format(shown, quantity.Ratio))
	if nom := p.NominalCircuit.Part(part.Ref); nom != nil && nom.AL != part.AL {
		fmt.Fprintf(&b, " with AL at %s", quantity.Approx(part.AL, quantity.Henry))
	}
	fmt.Fprintf(&b, "; wind %s turns (%s), which gives %s, %sx", strings.Join(list, ", "),
		map[bool]string{true: "the turns ratio kept exactly", false: "each rounded up to a whole turn, so the ratio moves slightly"}[exact],
		quantity.Approx(x, quantity.Ohm), quantity.Format(quantity.Round(x/term, 3), quantity.Ratio))
	return b.String(), changes
}
