package rules

import (
	"fmt"

	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// FETDissipation keeps each FET's dissipation well inside its derated pd.
var FETDissipation = &engine.Rule{
	ID: "fet.dissipation",
	Doc: engine.Doc{
		Title: "a FET's dissipation must stay well inside its derated pd",
		Why: "A small-signal FET in a TO-92 or SOT package is rated a few hundred milliwatts at 25 °C; a common-gate JFET " +
			"stage run at 20–40 mA from 12 V is already near it. Run hot, its IDSS and gm fall with temperature, the bias " +
			"drifts and the part's life shortens.",
		Formula: "(VDS·ID + VGS·IG) ÷ (pd × derating) <= max_load (unit fraction); derating is 1 up to 25 °C ambient and " +
			"falls linearly to 0 at tj_max. An ambient at or beyond tj_max leaves no rating: always an error, without a " +
			"metric. A load above 1 is always an error.",
		Source: "the derating is the datasheets' own (pd at 25 °C, linear to zero at tj_max); the 50 % load is common " +
			"practice, the same as bjt.dissipation's",
		Fix: "advice: the drain current that meets the rule at this VDS (raise the source resistor), or a part with a larger pd",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Ratio, Help: "largest dissipation ÷ derated pd"},
		},
	},
	Run: runFETDissipation,
}

func runFETDissipation(p *engine.Pass) error {
	op := p.A.OP
	if op == nil {
		return nil
	}
	maxLoad := p.Param("max_load")
	ambient := p.Circuit.Ambient.Nominal
	for part := range fets(p) {
		q, f := op.FETs[part.Ref], part.FET
		if q == nil || !(f.PD > 0) {
			continue
		}
		der := derating(ambient, 25, f.TjMax)
		if der <= 0 {
			zeroRating(p, part.Ref, "dissipation", ambient, f.TjMax,
				fmt.Sprintf("keep the ambient below %s (the FET's tj_max)", temp(f.TjMax)))
			continue
		}
		load := q.Power / (f.PD * der)
		msg := func() string {
			m := fmt.Sprintf("%s dissipates %s (VDS %s at ID %s), %s of its %s pd", part.Ref, quantity.Approx(q.Power, quantity.Watt),
				quantity.Approx(q.VDS, quantity.Volt), quantity.Approx(q.ID, quantity.Ampere), pct(load), quantity.Approx(f.PD, quantity.Watt))
			if der < 1 {
				m += fmt.Sprintf(" derated to %s at %s", quantity.Approx(f.PD*der, quantity.Watt), temp(ambient))
			}
			m += fmt.Sprintf(", at most %s", pct(maxLoad))
			if load > 1 {
				m += runsHot(load) + fetSafety
			}
			return m
		}
		fd := engine.Finding{Part: part.Ref, HasMetric: true, Measured: load, Limit: maxLoad,
			Comparison: "<=", Unit: "fraction", Absolute: load, MessageLater: msg}
		if engine.Fails(load, maxLoad, "<=") {
			allowed := maxLoad * f.PD * der
			fd.Fix = fmt.Sprintf("keep %s's drain current at or below %s at this VDS (a larger source resistor), or use a FET rated for more than %s",
				part.Ref, quantity.Approx(roundDown3(allowed/max(q.VDS, 1e-3)), quantity.Ampere),
				quantity.Approx(q.Power/(maxLoad*der), quantity.Watt))
		}
		p.Report(fd)
	}
	return nil
}
