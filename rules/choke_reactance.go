package rules

import (
	"fmt"
	"math"
	"strconv"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/topology"
)

// ChokeReactance checks that a collector feed choke does not shunt the
// signal it feeds.
var ChokeReactance = &engine.Rule{
	ID:              "choke.reactance",
	NeedsTransistor: true,
	FixMoves:        []string{engine.MoveGain}, // its fix restores the gain the part costs
	Doc: engine.Doc{
		Title: "a collector feed choke must not shunt the signal",
		Why: "The choke sits across the collector load for the signal. At ten times the impedance it shunts it lowers " +
			"the node's impedance by about 0.5 %; at a few times it costs gain at the bottom of the band and makes the " +
			"collector load reactive.",
		Formula: "ωL ÷ circuit_impedance >= min_ratio, at f_low, DC resistance ignored; L at the case judged (value × (1 − tolerance), " +
			"or AL at its minimum × N² for an inductor wound on a core, in the worst case); circuit_impedance = |Z| across the " +
			"choke at f_low with it removed. A choke on a FET's drain (or source) is judged the same way: the drain counts as a collector (docs/fet.md).",
		Source: "common practice, no published source (the arithmetic: a shunt reactance of ten times a node's impedance " +
			"lowers it by 0.5 %)",
		Fix: "The minimum inductance, rounded up to E12, as a nominal value that meets the ratio at the case judged; " +
			"for an inductor given by turns, the minimum whole number of turns at the case's AL.",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "reactance ÷ circuit impedance, at least"},
		},
	},
	Run: func(p *engine.Pass) error {
		if p.A.AC == nil {
			return nil
		}
		minRatio := p.Param("min_ratio")
		w := omegaLow(p.Circuit)
		for _, part := range p.Circuit.Parts {
			if part.Kind != circuit.Inductor || p.A.Topo.Roles[part.Ref] != topology.Choke {
				continue
			}
			ac := p.A.AC.Parts[part.Ref]
			if ac == nil {
				continue
			}
			z := ac.CircuitImpedance
			l := part.Inductance()
			if !(z > 0) || math.IsInf(z, 0) || !(l > 0) {
				continue
			}
			x := w * l
			ratio := x / z
			fLow := p.Circuit.Band[0]
			f := engine.Finding{Part: part.Ref,
				HasMetric: true, Measured: ratio, Limit: minRatio, Comparison: ">=", Unit: "ratio",
				MessageLater: func() string {
					return fmt.Sprintf("%s has %s of reactance at %s, %sx the %s it shunts, needs at least %sx",
						part.Ref, quantity.Approx(x, quantity.Ohm), quantity.Approx(fLow, quantity.Hertz),
						quantity.Format(quantity.Round(ratio, 3), quantity.Ratio), quantity.Approx(z, quantity.Ohm),
						quantity.Format(minRatio, quantity.Ratio))
				}}
			if engine.Fails(ratio, minRatio, ">=") {
				f.Fix, f.Changes = chokeFix(p, part, minRatio*z/w, z)
			}
			p.Report(f)
		}
		return nil
	},
}

// chokeFix gives the inductance (or turns) that reaches need henries at the
// case judged, expressed in nominal values.
func chokeFix(p *engine.Pass, part *circuit.Part, need, z float64) (string, []engine.Change) {
	w := omegaLow(p.Circuit)
	f := quantity.Approx(p.Circuit.Band[0], quantity.Hertz)
	if part.Turns > 0 {
		// Turns do not vary; the case's AL (its minimum in the worst case) does.
		n := int(math.Ceil(math.Sqrt(need/part.AL) * (1 - 1e-12)))
		if float64(n) <= part.Turns {
			n = int(part.Turns) + 1
		}
		x := w * part.AL * float64(n*n)
		corner := ""
		if nom := p.NominalCircuit.Part(part.Ref); nom != nil && nom.AL != part.AL {
			corner = fmt.Sprintf(" with AL at %s", quantity.Approx(part.AL, quantity.Henry))
		}
		return fmt.Sprintf("%s needs %s: %d turns give %s at %s%s, %sx the %s it shunts",
				part.Ref, quantity.Approx(need, quantity.Henry), n, quantity.Approx(x, quantity.Ohm), f, corner,
				quantity.Format(quantity.Round(x/z, 3), quantity.Ratio), quantity.Approx(z, quantity.Ohm)),
			[]engine.Change{{Part: part.Ref, Key: "turns", To: strconv.Itoa(n)}}
	}
	ratio := 1.0
	if nom := p.NominalCircuit.Part(part.Ref); nom != nil && nom.Value > 0 {
		ratio = part.Value / nom.Value
	}
	v := roundUpE12(need / ratio * reactanceMargin)
	if v == 0 {
		return fmt.Sprintf("%s needs %s; no E12 value fits", part.Ref, quantity.Approx(need/ratio, quantity.Henry)), nil
	}
	x := w * v * ratio
	corner := ""
	if ratio != 1 {
		corner = fmt.Sprintf(" at its %+.3g %% corner", (ratio-1)*100)
	}
	return fmt.Sprintf("%s = %s (E12) gives %s at %s%s, %sx the %s it shunts",
			part.Ref, quantity.Approx(v, quantity.Henry), quantity.Approx(x, quantity.Ohm), f, corner,
			quantity.Format(quantity.Round(x/z, 3), quantity.Ratio), quantity.Approx(z, quantity.Ohm)),
		[]engine.Change{{Part: part.Ref, Key: "value", To: quantity.Code(v, quantity.Henry)}}
}
