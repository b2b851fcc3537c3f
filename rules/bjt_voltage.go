package rules

import (
	"fmt"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BJTVoltage keeps the collector's peak voltage well below VCEO.
var BJTVoltage = &engine.Rule{
	ID: "bjt.voltage",
	Doc: engine.Doc{
		Title: "the collector's peak voltage must stay well below the transistor's vceo",
		Why: "At cut-off the collector rises to its feed rail, and a collector fed through a choke or winding swings to about " +
			"twice the supply on signal peaks. Past VCEO the collector–emitter junction breaks down: the current is then set " +
			"by the circuit alone, and the part heats and fails.",
		Formula: "peak ÷ vceo <= max_load (unit fraction); peak = |EMF(feed rail) − EMF(return rail)|, × inductive_swing when a " +
			"DC path from the collector to a rail, not passing through the transistor's own base or emitter nets, contains " +
			"an inductor or winding. The DC span alone ÷ vceo above 1 (past the absolute rating) is always an error.",
		Source: "the swing of an inductively fed collector to about twice the supply is the standard result for a choke or " +
			"transformer load (an inductor holds no DC voltage on average; from memory, no page cited); the 75 % load is " +
			"common practice, as strict as or " +
			"stricter than published reliability derating guidance (e.g. NASA EEE-INST-002, values from memory, not confirmed)",
		Fix: "change device to the library transistor of the same polarity that meets the rule with the least change in its " +
			"other figures; where none does, the minimum VCEO (or a lower supply)",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Fraction, Help: "largest peak collector voltage ÷ vceo"},
			{Name: "inductive_swing", Unit: quantity.Ratio, Help: "peak ÷ supply span for an inductively fed collector"},
		},
	},
	Run: runBJTVoltage,
}

func runBJTVoltage(p *engine.Pass) error {
	if p.A.OP == nil {
		return nil
	}
	maxLoad, swing := p.Param("max_load"), p.Param("inductive_swing")
	msgs := bjtFigs(p, 1)
	for part := range bjts(p) {
		tb, b := p.A.Topo.BJTs[part.Ref], part.BJT
		span, ok := dcSpan(p, tb)
		if !ok || b == nil || !(b.VCEO > 0) {
			continue
		}
		peak := span
		if tb.InductiveFeed {
			peak = span * swing
		}
		load, absolute := peak/b.VCEO, span/b.VCEO
		msg := msgs.Add(figs{part: part, tb: tb, v: [6]float64{span, swing, peak, load, b.VCEO, maxLoad}, say: func(m *figs) string {
			span, swing, peak, load, vceo, maxLoad := m.v[0], m.v[1], m.v[2], m.v[3], m.v[4], m.v[5]
			tb := m.tb
			how := fmt.Sprintf("the %s span from %s to %s", quantity.Approx(span, quantity.Volt), tb.FeedRail, tb.ReturnRail)
			if tb.InductiveFeed {
				how = fmt.Sprintf("%s× %s, fed through %s", quantity.Approx(swing, quantity.Ratio), how, tb.FeedInductor)
			}
			msg := fmt.Sprintf("%s's collector can reach %s (%s), %s of its %s VCEO, at most %s", m.part.Ref,
				quantity.Approx(peak, quantity.Volt), how, pct(load), quantity.Approx(vceo, quantity.Volt), pct(maxLoad))
			if span/vceo > 1 {
				msg += "; the DC span alone is past VCEO: the transistor may break down and run hot"
			}
			return msg
		}})
		f := engine.Finding{Part: part.Ref, HasMetric: true, Measured: load, Limit: maxLoad,
			Comparison: "<=", Unit: "fraction", Absolute: absolute, Messenger: msg}
		if engine.Fails(load, maxLoad, "<=") {
			laterWithForms(&f, func(forms *[]engine.FixForm) (string, []engine.Change) {
				return voltageFix(p, part, peak, maxLoad, forms)
			})
		}
		p.Report(f)
	}
	return nil
}

func voltageFix(p *engine.Pass, part *circuit.Part, peak, maxLoad float64, forms *[]engine.FixForm) (string, []engine.Change) {
	ch, blocked := swapDevice(p, part, []string{"vceo"}, maxLoad, "<=", func(b *circuit.BJTParams, _ *dc.BJT) float64 {
		return peak / b.VCEO
	})
	if ch != nil {
		return deviceFix(p, part, ch, func(ch *deviceChoice) string {
			return fmt.Sprintf("(VCEO %s) brings the load to %s", quantity.Approx(ch.Params.VCEO, quantity.Volt), pct(ch.Metric))
		}, forms)
	}
	return noDevice(part, blocked) + fmt.Sprintf("use a transistor with VCEO of at least %s, or lower the supply",
		quantity.Approx(roundUp3(peak/maxLoad), quantity.Volt)), nil
}
