package rules

import (
	"fmt"

	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BiasRegion is the first safety net: every transistor must sit in its
// forward-active region, and the circuit must have an operating point at all.
var BiasRegion = &engine.Rule{
	ID: "bias.region",
	Doc: engine.Doc{
		Title: "every transistor must be biased in its forward-active region",
		Why: "A stage that is cut off passes nothing and one that is saturated clips everything; " +
			"every other bias and margin figure is meaningless until the operating point is in the active region. " +
			"When no operating point can be found at all (no convergence, a singular network) the reason is reported here, " +
			"and so is a band analysis that cannot be computed: the rules judged at band frequencies would otherwise pass without a word.",
		Formula: "cut off: IC < min_ic (tested first; measured IC, >=, unit A); saturated: VCE < min_vce (measured VCE, >=, unit V)",
		Source:  "the definition of the forward-active region in the Ebers–Moll model (J. J. Ebers and J. L. Moll, \"Large-signal behavior of junction transistors\", Proc. IRE 42(12), 1954, from memory; the model is in docs/model.md)",
		Fix: "Cut off: raise the base voltage (upper divider leg smaller, or lower leg larger) or lower the emitter resistance. " +
			"Saturated: lower the collector-feed resistance, raise the emitter resistance, or lower the base voltage.",
		Params: []engine.Param{
			{Name: "min_ic", Unit: quantity.Ampere, Help: "collector current below which a transistor counts as cut off"},
			{Name: "min_vce", Unit: quantity.Volt, Help: "collector–emitter voltage below which a transistor counts as saturated"},
		},
	},
	Run: runBiasRegion,
}

func runBiasRegion(p *engine.Pass) error {
	cs := p.A
	if cs.OPErr != nil {
		part := ""
		if f, ok := cs.OPErr.(*dc.Failure); ok {
			if f.Cause == dc.Connectivity && len(p.A.Topo.Problems) > 0 {
				return nil // a wiring fault: net.connectivity reports it (docs/model.md)
			}
			part = f.Part
		}
		p.Report(engine.Finding{Part: part,
			Message: "no DC operating point: " + cs.OPErr.Error(),
			Fix:     "check the wiring the reason names; a network without a solution usually has a short, a loop of ideal windings or a transistor with no bias path"})
		return nil
	}
	if cs.ACErr != nil {
		// Every rule judged at band frequencies (the reactance rules,
		// match.input) has nothing to judge: a check must not pass on that.
		p.Report(engine.Finding{
			Message: "no band analysis, so the reactance and match rules were not judged: " + cs.ACErr.Error(),
			Fix:     "look for a part value far outside its usual range or a network that has no solution at the frequency named"})
	}
	minIC, minVCE := p.Param("min_ic"), p.Param("min_vce")
	msgs := bjtFigs(p, 2)
	for part := range bjts(p) {
		q := cs.OP.BJTs[part.Ref]
		if q == nil {
			continue
		}
		if q.Reversed() {
			// One diagnosis, the same as report's: it conducts backwards,
			// which is what swapped collector and emitter pins do.
			vce, ic := -q.VCEf, -q.ICf
			p.Report(engine.Finding{Part: part.Ref, Bound: "cutoff",
				MessageLater: func() string {
					return fmt.Sprintf("%s conducts in reverse: its emitter sits %s above its collector and %s flows out of "+
						"the collector; the collector and emitter pins may be swapped", part.Ref,
						quantity.Approx(vce, quantity.Volt), quantity.Approx(ic, quantity.Ampere))
				},
				Fix: "check the transistor's pins against its nets: if collector and emitter are exchanged, swap them in nets " +
					"(or on the board)"})
			continue
		}
		// The forward-sense figures keep a reverse-conducting transistor
		// counted as cut off, as its Region says.
		p.Report(engine.Finding{Part: part.Ref, Bound: "cutoff",
			HasMetric: true, Measured: q.ICf, Limit: minIC, Comparison: ">=", Unit: "A",
			Messenger: msgs.Add(figs{part: part, v: [6]float64{q.ICf, minIC}, say: func(m *figs) string {
				return fmt.Sprintf("%s is cut off: IC %s, needs at least %s", m.part.Ref,
					quantity.Approx(m.v[0], quantity.Ampere), quantity.Approx(m.v[1], quantity.Ampere))
			}}),
			Fix: "raise the base voltage (a smaller upper divider leg or a larger lower leg) or lower the emitter resistance until the collector current flows"})
		p.Report(engine.Finding{Part: part.Ref, Bound: "saturated",
			HasMetric: true, Measured: q.VCEf, Limit: minVCE, Comparison: ">=", Unit: "V",
			Messenger: msgs.Add(figs{part: part, v: [6]float64{q.VCEf, minVCE}, say: func(m *figs) string {
				return fmt.Sprintf("%s is saturated: VCE %s, needs at least %s", m.part.Ref,
					quantity.Approx(m.v[0], quantity.Volt), quantity.Approx(m.v[1], quantity.Volt))
			}}),
			Fix: "lower the collector-feed resistance or the base voltage, or raise the emitter resistance, so that VCE sits near half the supply"})
	}
	return nil
}
