package rules

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/eseries"
	"headroom/checker/filter"
	"headroom/checker/quantity"
)

// TankTuning checks that every tank in an amplifier resonates inside the
// band with the loading it actually sees.
var TankTuning = &engine.Rule{
	ID:              "tank.tuning",
	NeedsTransistor: true,                      // a filter's tanks are judged through filter.passband
	FixMoves:        []string{engine.MoveGain}, // retuning a tank restores the band gain by design
	Doc: engine.Doc{
		Title: "a tank must resonate inside the band, with its loading",
		Why: "A tuned circuit passes its band only near resonance: a collector tank a fraction of a megahertz off " +
			"costs gain at one band edge, and one tuned to another band leaves the stage with a fraction of the gain " +
			"it was designed for, with nothing else to show for it. The loading (the transistor, the transformer's " +
			"load, the bias parts) pulls the resonance and lowers the Q, so the tank is judged in the circuit, not alone.",
		Formula: "in a circuit with a transistor (a filter's resonators are judged by filter.passband), for each tank " +
			"(an inductor of role tuning, or a transformer winding, with a capacitor across it; a rail " +
			"counts as gnd): the frequency where |Z| between its nets, the whole circuit in place, is greatest, searched " +
			"within a factor 1.5 of 1/(2π√(LC)), else from a quarter to four times it; it must be >= the band's lowest frequency − slack × BW (bound " +
			"\"low\") and <= its highest + slack × BW (bound \"high\"), BW the tank's loaded 3 dB bandwidth (0 when its " +
			"3 dB points are not found); unit Hz. Loaded Q = f_res ÷ BW.",
		Source: "f0 = 1/(2π√(LC)) and Q = f0/BW (C. Bowick, RF Circuit Design, 2nd ed., ch. 2, eq. 2-1 and p.26–27); " +
			"judging in the circuit with its loading and at every corner, and the slack (a single tuned circuit a quarter " +
			"of its bandwidth off is down 10·log10(1 + 0.5²) = 0.97 dB at the nearer band edge): common practice, no published source",
		Fix: "The capacitance that brings the nominal resonance (its loading kept) to the band's geometric centre, " +
			"as a preferred value of the tank's largest capacitor, or the whole turns that do; when the tolerances still " +
			"carry a corner out of the band, the capacitance range needed there and a fixed capacitor with a common " +
			"trimmer range that covers it (a tank with a trimmer is set on the bench: waive the rule for it with that " +
			"reason). The parts are ranked by how far their tolerance moves the resonance.",
		Params: []engine.Param{
			{Name: "slack", Unit: quantity.Ratio, Help: "how far outside the band the resonance may lie, in loaded 3 dB bandwidths"},
		},
	},
	Run: runTankTuning,
}

func runTankTuning(p *engine.Pass) error {
	if p.A.AC == nil {
		return nil
	}
	c := p.Circuit
	slack := p.Param("slack")
	for _, t := range filter.Tanks(c, p.A.Topo) {
		res, err := filter.Resonate(p.A.AC, t)
		if err != nil || !(res.Hz > 0) {
			continue
		}
		lo, hi := c.Band[0]-slack*res.BandwidthHz, c.Band[1]+slack*res.BandwidthHz
		t, res := t, res
		for _, b := range []struct {
			bound, cmp string
			limit      float64
			side       string
		}{{"low", ">=", lo, "below"}, {"high", "<=", hi, "above"}} {
			f := engine.Finding{Part: t.Key(), Pos: t.Pos, Bound: b.bound, AtHz: res.Hz,
				HasMetric: true, Measured: res.Hz, Limit: b.limit, Comparison: b.cmp, Unit: "Hz"}
			side := b.side
			f.MessageLater = func() string { return tankMessage(t, res, side, b.limit) }
			if engine.Fails(res.Hz, b.limit, b.cmp) {
				rank := sync.OnceValue(func() string { return tankRanking(p, t) }) // costly: once for every form
				f.FixLater = func() (string, []engine.Change) { return tankAdvice(p, t, res, rank), nil }
				f.FixForms = func() []engine.FixForm { return tankForms(p, t, rank) }
			}
			p.Report(f)
		}
	}
	return nil
}

func tankMessage(t filter.Tank, res filter.Resonance, side string, limit float64) string {
	q := "no 3 dB points within the search"
	if res.Found {
		q = fmt.Sprintf("loaded Q %s, 3 dB bandwidth %s", quantity.Approx(res.LoadedQ, quantity.Ratio),
			hz(res.BandwidthHz))
	}
	return fmt.Sprintf("tank %s with %s resonates at %s with the loading it sees (%s), %s the %s it must reach",
		t.Key(), strings.Join(t.Caps, ", "), hz(res.Hz), q, side, hz(limit))
}

// hz writes a frequency to four figures.
func hz(f float64) string { return quantity.Approx(quantity.Round(f, 4), quantity.Hertz) }

// tankAt is a tank's inductance and capacitance in the case judged, and the
// loading's share: the capacitance that, with them, puts the resonance where
// it was found (negative when the loading is inductive).
type tankAt struct {
	l, c, extra float64
	big         *circuit.Part // the tank's largest capacitor, in the case
	others      float64       // the other tank capacitors' sum, in the case
}

func measureTank(c *circuit.Circuit, t filter.Tank, res filter.Resonance) (tankAt, bool) {
	var a tankAt
	part := c.Part(t.Ref)
	if part == nil {
		return a, false
	}
	a.l = part.Inductance()
	if t.Winding != "" {
		for _, w := range part.Windings {
			if w.Name == t.Winding {
				a.l = part.AL * w.Turns * w.Turns
			}
		}
	}
	for _, ref := range t.Caps {
		cp := c.Part(ref)
		if cp == nil {
			return a, false
		}
		a.c += cp.Value
		if a.big == nil || cp.Value > a.big.Value {
			a.big = cp
		}
	}
	a.others = a.c - a.big.Value
	w := 2 * math.Pi * res.Hz
	a.extra = 1/(w*w*a.l) - a.c
	return a, a.l > 0 && a.c > 0
}

// tankForms are the concrete fixes, in nominal values: the largest
// capacitor's preferred value, then the whole turns, that centre the
// nominal tank (its loading kept) at the band's geometric centre. The
// tolerances may still carry a corner out of the band: the whole-circuit
// check then refuses the form and the advice (a trimmer) stands.
func tankForms(p *engine.Pass, t filter.Tank, rank func() string) []engine.FixForm {
	nom := p.Nominal
	if nom == nil || nom.AC == nil {
		return nil
	}
	res, err := filter.Resonate(nom.AC, t)
	if err != nil || !(res.Hz > 0) {
		return nil
	}
	c := p.NominalCircuit
	a, ok := measureTank(c, t, res)
	if !ok {
		return nil
	}
	fc := c.BandCentre()
	wc := 2 * math.Pi * fc
	ranking := rank()
	var forms []engine.FixForm
	if need := 1/(wc*wc*a.l) - a.extra - a.others; need > 0 {
		v := eseries.Nearest(need, eseries.ForTolerance(a.big.Tolerance))
		if v != a.big.Value {
			forms = append(forms, engine.FixForm{
				Text: fmt.Sprintf("%s = %s (%s) brings the nominal resonance of %s to about %s%s", a.big.Ref,
					quantity.Approx(v, quantity.Farad), eseries.ForTolerance(a.big.Tolerance), t.Key(), hz(fc), ranking),
				Changes: []engine.Change{{Part: a.big.Ref, Key: "value", To: quantity.Code(v, quantity.Farad)}}})
		}
	}
	part := c.Part(t.Ref)
	turns, key := 0.0, t.Ref
	if part != nil && part.Kind == circuit.Inductor && part.Turns > 0 {
		turns = part.Turns
	} else if part != nil && t.Winding != "" {
		for _, w := range part.Windings {
			if w.Name == t.Winding {
				turns = w.Turns
			}
		}
		key = t.Key()
	}
	if ctot := a.c + a.extra; turns > 0 && ctot > 0 {
		n := math.Round(turns * math.Sqrt(1/(wc*wc*ctot)/a.l))
		if n >= 1 && n != turns {
			forms = append(forms, engine.FixForm{
				Text:    fmt.Sprintf("%s with %g turns (now %g) brings the nominal resonance to about %s%s", key, n, turns, hz(fc), ranking),
				Changes: []engine.Change{{Part: key, Key: "turns", To: strconv.FormatFloat(n, 'f', -1, 64)}}})
		}
	}
	return forms
}

// trimmers are common trimmer-capacitor ranges, F (common practice, no
// published source; makers' ranges vary).
var trimmers = [][2]float64{{2e-12, 10e-12}, {4e-12, 20e-12}, {5e-12, 30e-12}, {10e-12, 60e-12}, {20e-12, 120e-12}}

// tankAdvice is the fix without changes: the capacitance that centres the
// tank, and the fixed capacitor and trimmer that hold it in tune across the
// inductor's and capacitors' tolerances.
func tankAdvice(p *engine.Pass, t filter.Tank, res filter.Resonance, rank func() string) string {
	a, ok := measureTank(p.Circuit, t, res)
	if !ok {
		return "Retune the tank to the band centre" + rank()
	}
	fc := p.Circuit.BandCentre()
	wc := 2 * math.Pi * fc
	need := 1/(wc*wc*a.l) - a.extra - a.others
	if !(need > 0) {
		return fmt.Sprintf("%s cannot be brought to %s with capacitance alone (the loading already holds %s); "+
			"reduce the inductance%s", t.Key(), hz(fc), quantity.Approx(a.extra, quantity.Farad), rank())
	}
	// The spread the trimmer must cover: the inductor at either end of its
	// tolerance and the fixed capacitor at either end of its own.
	tl := inductorTolerance(p.NominalCircuit, t.Ref)
	tc := 0.0
	if np := p.NominalCircuit.Part(a.big.Ref); np != nil {
		tc = np.Tolerance
	}
	lNom := a.l / tankShift(p, t.Ref)
	needLo := 1/(wc*wc*lNom*(1+tl)) - a.extra - a.others
	needHi := 1/(wc*wc*lNom*(1-tl)) - a.extra - a.others
	text := fmt.Sprintf("%s needs %s in %s to resonate at the band centre %s in the case judged; across the "+
		"inductor's ±%s and the capacitor's ±%s it needs %s to %s", t.Key(), quantity.Approx(need, quantity.Farad), a.big.Ref,
		hz(fc), quantity.Approx(tl, quantity.Fraction), quantity.Approx(tc, quantity.Fraction),
		quantity.Approx(needLo, quantity.Farad), quantity.Approx(needHi, quantity.Farad))
	for _, tr := range trimmers {
		fixed := eseries.RoundDown((needLo-tr[0])/(1+tc), eseries.ForTolerance(tc))
		if !(fixed > 0) {
			continue
		}
		if needLo-fixed*(1+tc) >= tr[0] && needHi-fixed*(1-tc) <= tr[1] {
			text += fmt.Sprintf(": a fixed %s with a %s–%s trimmer across it covers that, set on the bench",
				quantity.Approx(fixed, quantity.Farad), quantity.Approx(tr[0], quantity.Farad), quantity.Approx(tr[1], quantity.Farad))
			break
		}
	}
	return text + rank()
}

// inductorTolerance is the spread of a tank inductor's inductance: AL's for
// a wound part, the value's otherwise.
func inductorTolerance(c *circuit.Circuit, ref string) float64 {
	part := c.Part(ref)
	switch {
	case part == nil:
		return 0
	case part.Kind == circuit.Transformer || part.Turns > 0:
		return part.ALTolerance
	}
	return part.Tolerance
}

// tankShift is the case's inductance over nominal for the tank's inductor.
func tankShift(p *engine.Pass, ref string) float64 {
	cp, np := p.Circuit.Part(ref), p.NominalCircuit.Part(ref)
	if cp == nil || np == nil {
		return 1
	}
	if cp.Kind == circuit.Transformer || cp.Turns > 0 {
		if np.AL > 0 {
			return cp.AL / np.AL
		}
		return 1
	}
	if np.Value > 0 {
		return cp.Value / np.Value
	}
	return 1
}

// tankRanking ranks the parts by how far their tolerance moves the tank's
// loaded resonance, in the case judged.
func tankRanking(p *engine.Pass, t filter.Tank) string {
	ms := spread(p, func(cs *analysis.Case) (float64, bool) {
		if cs.AC == nil {
			return 0, false
		}
		for _, u := range filter.Tanks(cs.Circuit, cs.Topo) {
			if u.Key() == t.Key() {
				r, err := filter.Resonate(cs.AC, u)
				return r.Hz, err == nil && r.Hz > 0
			}
		}
		return 0, false
	})
	if s := spreadText(ms, quantity.Hertz, 3); s != "" {
		return ". " + s + ": the first is the one to make adjustable"
	}
	return ""
}
