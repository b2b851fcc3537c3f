package rules

import (
	"fmt"
	"math"

	"headroom/checker/analysis"
	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/sweep"
)

// StabilityUnconditional checks that no passive source or load can make the
// stage oscillate, from a decade below the band to twice the fastest fT.
var StabilityUnconditional = &engine.Rule{
	ID:              "stability.unconditional",
	NeedsTransistor: true,
	Doc: engine.Doc{
		Title: "no passive source or load may make the stage oscillate",
		Why: "The in and out ports' impedances are nominal: an antenna, a filter or a cable presents other " +
			"impedances, above all outside the band, where filters reflect nearly everything. A stage that is " +
			"stable only with its nominal terminations oscillates with some real ones.",
		Formula: "over the wide sweep (PerDecade = 40 points a decade from a tenth of the lowest band frequency to " +
			"twice the highest transistor ft, plus the band's three points), with S referred to the in port's " +
			"and the out port's own impedances: μ = (1 − |S11|²)/(|S22 − Δ·S11*| + |S12·S21|), Δ = S11·S22 − " +
			"S12·S21; the least μ >= min_mu; unit ratio. A circuit without both an in and an out port gets the " +
			"one-port form: the least Re Z looking into its port (the other terminations in place) >= 0 ohm. " +
			"The finding's at_hz is where the least value is; the message names the range where it fails. See " +
			"docs/stability.md.",
		Source: "μ: M. L. Edwards and J. H. Sinsky, necessary and sufficient for unconditional stability with " +
			"μ > 1 alone, and larger μ means more margin (IEEE Trans. Microwave Theory Tech. 40(12), 1992, 2303–2311); min_mu 1 is the criterion, 1.1 in the " +
			"strict set is common practice, no published source",
		Fix: "The smallest E12 base stopper (1 ohm–1 kohm) or the largest E12 swamping resistor (10 kohm–10 ohm, " +
			"across the collector load) with which the least μ over the sweep reaches min_mu at the case judged " +
			"(Re Z ≥ 0 in the one-port form), re-checked by sweeping the case again, with its cost in gain at the " +
			"band's centre. Advice only: both need a new part.",
		Params: []engine.Param{
			{Name: "min_mu", Unit: quantity.Ratio, Help: "least Edwards–Sinsky μ over the sweep"},
		},
	},
	Run:  runStabilityUnconditional,
	Wide: true,
}

func runStabilityUnconditional(p *engine.Pass) error {
	if p.A.AC == nil || !hasBJT(p) {
		return nil // a passive circuit cannot oscillate
	}
	sw, ok := sweepOf(p.A)
	if !ok || (!sw.TwoPort && sw.OnePort == "") || len(sw.Points) == 0 {
		return nil
	}
	minMu := p.Param("min_mu")
	c := p.Circuit
	var f engine.Finding
	if sw.TwoPort {
		f = engine.Finding{HasMetric: true, Measured: sw.MuMin, Limit: minMu, Comparison: ">=", Unit: "ratio", AtHz: sw.MuMinHz}
		lo, hi := failRange(sw, func(pt sweep.Point) bool { return pt.Mu < minMu })
		f.MessageLater = func() string {
			at := sw.Points[0]
			for _, pt := range sw.Points {
				if pt.Frequency == sw.MuMinHz {
					at = pt
				}
			}
			msg := fmt.Sprintf("the least μ between %s and %s is %s at %s (K %s, |Δ| %s), needs at least %s",
				quantity.Approx(sw.Points[0].Frequency, quantity.Hertz), quantity.Approx(sw.Points[len(sw.Points)-1].Frequency, quantity.Hertz),
				quantity.Approx(sw.MuMin, quantity.Ratio), quantity.Approx(sw.MuMinHz, quantity.Hertz),
				quantity.Approx(at.K, quantity.Ratio), quantity.Approx(at.Delta, quantity.Ratio), quantity.Approx(minMu, quantity.Ratio))
			if lo > 0 {
				msg += fmt.Sprintf("; μ is below %s %s: some passive source or load there makes the stage oscillate",
					quantity.Approx(minMu, quantity.Ratio), rangeText(lo, hi))
				msg += noRBNote(c)
			}
			return msg
		}
	} else {
		port := c.InPort()
		if sw.OnePort == "out" {
			port = c.OutPort()
		}
		f = engine.Finding{Part: port.Name, HasMetric: true, Measured: sw.ReMin, Limit: 0, Comparison: ">=", Unit: "ohm", AtHz: sw.ReMinHz}
		lo, hi := failRange(sw, func(pt sweep.Point) bool { return real(pt.PortZ) < 0 })
		f.MessageLater = func() string {
			msg := fmt.Sprintf("one port only (%s): the least resistance looking into it over the sweep is %s at %s",
				port.Name, quantity.Approx(sw.ReMin, quantity.Ohm), quantity.Approx(sw.ReMinHz, quantity.Hertz))
			if lo > 0 {
				msg += fmt.Sprintf("; it is negative %s: a reactive termination there makes the stage oscillate",
					rangeText(lo, hi))
				msg += noRBNote(c)
			}
			return msg
		}
	}
	if engine.Fails(f.Measured, f.Limit, f.Comparison) {
		// What a fix must make of the sweep, made only for a failing item.
		judge := stableJudge(func(cs *analysis.Case) bool { return sweepHolds(cs, false, 0) })
		if sw.TwoPort {
			judge = func(cs *analysis.Case) bool { return sweepHolds(cs, true, minMu) }
		}
		f.FixLater = func() (string, []engine.Change) {
			same := func(r float64, _ bool) float64 { return r }
			return stabilityFix(p, transistorsBy(c, nil), judge, same), nil
		}
	}
	p.Report(f)
	return nil
}

// failRange is the lowest and highest swept frequency where bad holds (0, 0
// when nowhere).
func failRange(sw *sweep.Result, bad func(sweep.Point) bool) (float64, float64) {
	lo, hi := 0.0, 0.0
	for _, pt := range sw.Points {
		if bad(pt) {
			if lo == 0 {
				lo = pt.Frequency
			}
			hi = math.Max(hi, pt.Frequency)
		}
	}
	return lo, hi
}

// rangeText is "from 32.4 MHz to 102 MHz", or "at 34.3 MHz" for one point.
func rangeText(lo, hi float64) string {
	if lo == hi {
		return "at " + quantity.Approx(lo, quantity.Hertz)
	}
	return "from " + quantity.Approx(lo, quantity.Hertz) + " to " + quantity.Approx(hi, quantity.Hertz)
}
