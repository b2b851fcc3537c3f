package rules

import (
	"fmt"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BJTCurrent keeps each transistor's collector current well below its
// absolute maximum.
var BJTCurrent = &engine.Rule{
	ID: "bjt.current",
	Doc: engine.Doc{
		Title: "collector current must stay well below the transistor's ic_max",
		Why: "ic_max is an absolute limit: near it the current gain falls, bond wires and junctions are stressed, and a " +
			"small rise in supply or hFE can take the part past it.",
		Formula: "IC ÷ ic_max <= max_load (unit fraction). A load above 1 (past the absolute rating) is always an error.",
		Source: "common practice, as strict as or stricter than published reliability derating guidance (e.g. NASA " +
			"EEE-INST-002, values from memory, not confirmed)",
		Fix: "change device to the library transistor of the same polarity that meets the rule with the least change in its " +
			"other figures; where none does, the largest collector current that meets it",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Fraction, Help: "largest IC ÷ ic_max"},
		},
	},
	Run: runBJTCurrent,
}

func runBJTCurrent(p *engine.Pass) error {
	op := p.A.OP
	if op == nil {
		return nil
	}
	maxLoad := p.Param("max_load")
	msgs := bjtFigs(p, 1)
	for part := range bjts(p) {
		q, b := op.BJTs[part.Ref], part.BJT
		if q == nil || b == nil || !(b.ICMax > 0) {
			continue
		}
		load := q.IC / b.ICMax
		f := engine.Finding{Part: part.Ref, HasMetric: true, Measured: load, Limit: maxLoad,
			Comparison: "<=", Unit: "fraction", Absolute: load,
			Messenger: msgs.Add(figs{part: part, v: [6]float64{q.IC, load, b.ICMax, maxLoad}, say: func(m *figs) string {
				ic, load, icMax, maxLoad := m.v[0], m.v[1], m.v[2], m.v[3]
				return fmt.Sprintf("%s carries %s, %s of its %s ic_max, at most %s%s", m.part.Ref,
					quantity.Approx(ic, quantity.Ampere), pct(load), quantity.Approx(icMax, quantity.Ampere),
					pct(maxLoad), runsHot(load))
			}})}
		if engine.Fails(load, maxLoad, "<=") {
			laterWithForms(&f, func(forms *[]engine.FixForm) (string, []engine.Change) { return currentFix(p, part, q, maxLoad, forms) })
		}
		p.Report(f)
	}
	return nil
}

func currentFix(p *engine.Pass, part *circuit.Part, q *dc.BJT, maxLoad float64, forms *[]engine.FixForm) (string, []engine.Change) {
	ch, blocked := swapDevice(p, part, []string{"ic_max"}, maxLoad, "<=", func(b *circuit.BJTParams, q *dc.BJT) float64 {
		return q.IC / b.ICMax
	})
	if ch != nil {
		return deviceFix(p, part, ch, func(ch *deviceChoice) string {
			return fmt.Sprintf("(ic_max %s) brings the load to %s", quantity.Approx(ch.Params.ICMax, quantity.Ampere), pct(ch.Metric))
		}, forms)
	}
	return noDevice(part, blocked) + fmt.Sprintf("hold %s's collector current to %s",
		part.Ref, icAdvice(p, part.Ref, q.IC, maxLoad*part.BJT.ICMax)), nil
}
