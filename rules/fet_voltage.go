package rules

import (
	"fmt"

	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// FETVoltage keeps the drain's peak voltage well below the FET's vds_max.
var FETVoltage = &engine.Rule{
	ID: "fet.voltage",
	Doc: engine.Doc{
		Title: "the drain's peak voltage must stay well below the FET's vds_max",
		Why: "At cut-off the drain rises to its feed rail, and a drain fed through a choke, tank or winding swings to about " +
			"twice the supply on signal peaks. Past its rating the gate–drain junction (or a MOSFET's channel) breaks down.",
		Formula: "peak ÷ vds_max <= max_load (unit fraction); peak = |EMF(feed rail) − EMF(return rail)|, × inductive_swing " +
			"when a DC path from the drain to a rail, not passing through the FET's own gate or source nets, contains an " +
			"inductor or winding (the same topology as bjt.voltage's). The DC span alone ÷ vds_max above 1 is always an error.",
		Source: "the same as bjt.voltage's: an inductively fed output swings to about twice the supply (standard result, " +
			"from memory); the 75 % load is common practice",
		Fix: "advice: a lower supply, or a FET with at least the vds_max named",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Ratio, Help: "largest peak drain voltage ÷ vds_max"},
			{Name: "inductive_swing", Unit: quantity.Ratio, Help: "peak ÷ supply span for an inductively fed drain"},
		},
	},
	Run: runFETVoltage,
}

func runFETVoltage(p *engine.Pass) error {
	if p.A.OP == nil {
		return nil
	}
	maxLoad, swing := p.Param("max_load"), p.Param("inductive_swing")
	for part := range fets(p) {
		tb, f := p.A.Topo.BJTs[part.Ref], part.FET
		span, ok := dcSpan(p, tb)
		if !ok || !(f.VDSMax > 0) {
			continue
		}
		peak := span
		if tb.InductiveFeed {
			peak = span * swing
		}
		load, absolute := peak/f.VDSMax, span/f.VDSMax
		msg := func() string {
			how := fmt.Sprintf("the %s span from %s to %s", quantity.Approx(span, quantity.Volt), tb.FeedRail, tb.ReturnRail)
			if tb.InductiveFeed {
				how = fmt.Sprintf("%s× %s, fed through %s", quantity.Approx(swing, quantity.Ratio), how, tb.FeedInductor)
			}
			m := fmt.Sprintf("%s's drain can reach %s (%s), %s of its %s vds_max, at most %s", part.Ref,
				quantity.Approx(peak, quantity.Volt), how, pct(load), quantity.Approx(f.VDSMax, quantity.Volt), pct(maxLoad))
			if absolute > 1 {
				m += "; the DC span alone is past vds_max: the FET may break down" + fetSafety
			}
			return m
		}
		fd := engine.Finding{Part: part.Ref, HasMetric: true, Measured: load, Limit: maxLoad,
			Comparison: "<=", Unit: "fraction", Absolute: absolute, MessageLater: msg}
		if engine.Fails(load, maxLoad, "<=") {
			fd.Fix = fmt.Sprintf("use a FET rated for at least %s drain-source, or lower the supply to %s", quantity.Approx(peak/maxLoad, quantity.Volt),
				quantity.Approx(roundDown3(span*maxLoad/load), quantity.Volt))
		}
		p.Report(fd)
	}
	return nil
}
