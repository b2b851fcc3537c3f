package rules

import (
	"fmt"

	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/topology"
)

// BypassReactance judges an emitter bypass against what the emitter really
// sees, which is far less than the emitter resistor.
var BypassReactance = &engine.Rule{
	ID:              "bypass.reactance",
	NeedsTransistor: true,
	FixMoves:        []string{engine.MoveGain}, // its fix restores the gain the part costs
	Doc: engine.Doc{
		Title: "an emitter bypass must short the emitter at the lowest band frequency",
		Why: "Looking into the emitter the circuit shows only re + (source resistance)/β, a few ohms. The bypass reactance " +
			"adds to that in quadrature and the stage's gain falls with the total: half of it costs about 1 dB, a quarter about 0.3 dB. " +
			"The textbook tenth of the emitter resistor can be tens of times too small a capacitor.",
		Formula: "X = 1/(2π·f_low·C) (C as for coupling.reactance: nominal, or value × (1 − tolerance) in the worst case); " +
			"X <= max_fraction × circuit_impedance, circuit_impedance = |Z| from the bypassed net to ground at f_low with the bypass removed. " +
			"Bypass capacitors that share both nets are one group. Judged on the emitter of a common-emitter stage and on the " +
			"base of a common-base stage (a grounded-base preamp, a cascode's upper device), where the capacitor holds the base " +
			"at AC ground and its reactance, divided by β + 1, adds to what the emitter sees; not on the emitter of a follower " +
			"or a common-base stage, where the emitter carries the signal. A FET's source bypass is judged the same way: the source counts as an emitter, and the impedance looking into it is about 1/gm (docs/fet.md).",
		Source: "common practice, no published source for the fraction; the impedance looking into the emitter, " +
			"(R_th + rπ)/(1 + β), is the hybrid-π result (the textbook bypass rule, a tenth of the resistance the capacitor " +
			"sees, is in e.g. Malvino and Bates, Electronic Principles; cited from memory)",
		Fix: "The minimum capacitance, rounded up to E12, as a nominal value that meets the limit at the case judged; " +
			"for a group the first part takes the change and the others stay.",
		Params: []engine.Param{
			{Name: "max_fraction", Unit: quantity.Ratio, Help: "largest reactance ÷ circuit impedance"},
		},
	},
	Run: func(p *engine.Pass) error {
		frac := p.Param("max_fraction")
		judgeCapacitorGroupsBy(p, topology.Bypass, func(g *capGroup, z float64) (float64, capWhy, bool) {
			what, ok := bypassed(p, g)
			if !ok {
				return 0, capWhy{}, false
			}
			return frac * z, capWhy{frac: frac, z: z, what: what, say: func(w *capWhy) string {
				return fmt.Sprintf("%s × the %s the %s sees", quantity.Format(w.frac, quantity.Ratio),
					quantity.Approx(w.z, quantity.Ohm), w.what)
			}}, true
		})
		return nil
	},
}

// bypassed says what a bypass group holds at AC ground, "emitter" or
// "base", and whether the rule judges it: a base held for a common-base
// stage, or an emitter of a common-emitter stage. A capacitor on the emitter
// of a follower or a grounded-base stage (where the emitter carries the
// signal) is no emitter bypass, and is not judged as one.
func bypassed(p *engine.Pass, g *capGroup) (string, bool) {
	nonCE := false
	for _, q := range p.A.Topo.BJTs {
		for _, ref := range q.BaseBypass {
			for _, part := range g.Parts {
				if part.Ref == ref {
					return "base", true
				}
			}
		}
		if q.Emitter == g.A || q.Emitter == g.B {
			if q.CommonEmitter {
				return "emitter", true
			}
			nonCE = true
		}
	}
	return "emitter", !nonCE
}
