package rules

import (
	"fmt"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BJTDissipation keeps each transistor's dissipation well inside its pd,
// derated for the ambient as its datasheet derates it.
var BJTDissipation = &engine.Rule{
	ID: "bjt.dissipation",
	Doc: engine.Doc{
		Title: "transistor dissipation must stay well inside its derated pd",
		Why: "A transistor's pd is the dissipation that brings its junction to tj_max at 25 °C ambient; above 25 °C less is " +
			"allowed. Run near that limit it runs hot, its bias drifts with the heat (VBE falls 2 mV per °C), and its life " +
			"shortens.",
		Formula: "(VCE·IC + VBE·IB) ÷ (pd × derating) <= max_load (unit fraction); derating is 1 up to 25 °C ambient and falls " +
			"linearly to 0 at tj_max. An ambient at or beyond tj_max leaves no rating: always an error, without a metric. " +
			"A load above 1 (past the absolute rating) is always an error.",
		Source: "the derating is the datasheets' own (pd at 25 °C, linear to zero at tj_max: 5.0 mW/°C for a 625 mW, 150 °C " +
			"part); the 50 % load is common practice, as strict as or stricter than published reliability derating guidance " +
			"(e.g. NASA EEE-INST-002, values from memory, not confirmed)",
		Fix: "change device to the library transistor of the same polarity that meets the rule with the least change in its " +
			"other figures; where none does, the largest collector current, or the smallest pd, that meets it",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Fraction, Help: "largest dissipation ÷ derated pd"},
		},
	},
	Run: runBJTDissipation,
}

func runBJTDissipation(p *engine.Pass) error {
	op := p.A.OP
	if op == nil {
		return nil
	}
	maxLoad := p.Param("max_load")
	ambient := p.Circuit.Ambient.Nominal
	msgs := bjtFigs(p, 1)
	for part := range bjts(p) {
		q, b := op.BJTs[part.Ref], part.BJT
		if q == nil || b == nil || !(b.PD > 0) {
			continue
		}
		der := bjtDerating(b, ambient)
		if der <= 0 {
			zeroRating(p, part.Ref, "dissipation", ambient, b.TjMax,
				fmt.Sprintf("keep the ambient below %s (the transistor's tj_max), or use a transistor rated for a higher junction temperature",
					temp(b.TjMax)))
			continue
		}
		load := q.Power / (b.PD * der)
		msg := msgs.Add(figs{part: part, v: [6]float64{q.Power, load, b.PD, der, ambient, maxLoad}, say: func(m *figs) string {
			power, load, pd, der, ambient, maxLoad := m.v[0], m.v[1], m.v[2], m.v[3], m.v[4], m.v[5]
			msg := fmt.Sprintf("%s dissipates %s, %s of its %s pd", m.part.Ref, quantity.Approx(power, quantity.Watt),
				pct(load), quantity.Approx(pd, quantity.Watt))
			if der < 1 {
				msg += fmt.Sprintf(" derated to %s at %s", quantity.Approx(pd*der, quantity.Watt), temp(ambient))
			} else {
				msg += " at " + temp(ambient)
			}
			return msg + fmt.Sprintf(", at most %s", pct(maxLoad)) + runsHot(load)
		}})
		f := engine.Finding{Part: part.Ref, HasMetric: true, Measured: load, Limit: maxLoad,
			Comparison: "<=", Unit: "fraction", Absolute: load, Messenger: msg}
		if engine.Fails(load, maxLoad, "<=") {
			laterWithForms(&f, func(forms *[]engine.FixForm) (string, []engine.Change) {
				return dissipationFix(p, part, q, der, maxLoad, forms)
			})
		}
		p.Report(f)
	}
	return nil
}

func dissipationFix(p *engine.Pass, part *circuit.Part, q *dc.BJT, der, maxLoad float64, forms *[]engine.FixForm) (string, []engine.Change) {
	ambient := p.Circuit.Ambient.Nominal
	ch, blocked := swapDevice(p, part, []string{"pd"}, maxLoad, "<=", func(b *circuit.BJTParams, q *dc.BJT) float64 {
		return q.Power / (b.PD * bjtDerating(b, ambient))
	})
	if ch != nil {
		return deviceFix(p, part, ch, func(ch *deviceChoice) string {
			return fmt.Sprintf("(pd %s, tj_max %s) brings the load to %s at %s",
				quantity.Approx(ch.Params.PD, quantity.Watt), temp(ch.Params.TjMax), pct(ch.Metric), temp(ambient))
		}, forms)
	}
	b := part.BJT
	// Holding VCE, P ≈ IC·(VCE + VBE/hFE): the current that meets the rule at
	// this case, expressed at nominal in proportion.
	allowed := maxLoad * b.PD * der / (q.VCE + q.VBE/q.HFE)
	pdNeed := roundUp3(q.Power / (maxLoad * der))
	return noDevice(part, blocked) + fmt.Sprintf("hold %s's collector current to %s at its present VCE, "+
		"or use a transistor with pd of at least %s at 25 °C and tj_max %s", part.Ref,
		icAdvice(p, part.Ref, q.IC, allowed), quantity.Approx(pdNeed, quantity.Watt), temp(b.TjMax)), nil
}
