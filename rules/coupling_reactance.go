package rules

import (
	"fmt"
	"math"

	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/topology"
)

// CouplingReactance keeps series capacitors from eating signal at the bottom
// of the band.
var CouplingReactance = &engine.Rule{
	ID:              "coupling.reactance",
	NeedsTransistor: true,
	FixMoves:        []string{engine.MoveGain}, // its fix restores the gain the part costs
	Doc: engine.Doc{
		Title: "a coupling capacitor must pass the lowest band frequency",
		Why: "A series capacitor forms a high-pass with the impedance it works into. At a tenth of that impedance it costs " +
			"0.04 dB and shifts the phase by under 6 degrees; much more and the low end of the band loses gain and the " +
			"match moves. A fixed ceiling catches a capacitor that works into a high impedance but is still far too small for HF.",
		Formula: "X = 1/(2π·f_low·C) with C the capacitance at the case judged (nominal value; value × (1 − tolerance) in the worst case); " +
			"X <= min(max_ohms, max_fraction × circuit_impedance), circuit_impedance = |Z| across the capacitor at f_low with it removed. " +
			"Capacitors of this role that share both nets are one group: C is their sum and they are all removed.",
		Source: "common practice: a reactance of at most a tenth of the total resistance in series at the lowest frequency is the " +
			"usual textbook statement (e.g. A. Malvino and D. Bates, Electronic Principles, \"good coupling\"; cited from memory); " +
			"the fixed ceiling is common practice, no published source",
		Fix: "The minimum capacitance, rounded up to E12, as a nominal value that still meets the limit at the case judged " +
			"(its −tolerance corner in the worst case). For a group the first part in file order takes the change and the others stay.",
		Params: []engine.Param{
			{Name: "max_ohms", Unit: quantity.Ohm, Help: "reactance ceiling"},
			{Name: "max_fraction", Unit: quantity.Ratio, Help: "largest reactance ÷ circuit impedance"},
		},
	},
	Run: func(p *engine.Pass) error {
		maxOhms, frac := p.Param("max_ohms"), p.Param("max_fraction")
		judgeCapacitorGroups(p, topology.Coupling, func(z float64) (float64, capWhy, bool) {
			byFraction := frac * z
			if maxOhms < byFraction {
				return maxOhms, capWhy{ceiling: maxOhms, z: z, say: func(w *capWhy) string {
					return fmt.Sprintf("the %s ceiling; it works into %s", quantity.Approx(w.ceiling, quantity.Ohm),
						quantity.Approx(w.z, quantity.Ohm))
				}}, true
			}
			return byFraction, capWhy{frac: frac, z: z, say: func(w *capWhy) string {
				return fmt.Sprintf("%s × the %s it works into", quantity.Format(w.frac, quantity.Ratio),
					quantity.Approx(w.z, quantity.Ohm))
			}}, !math.IsInf(byFraction, 0)
		})
		return nil
	},
}
