package rules

import (
	"fmt"

	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/topology"
)

// DecouplingReactance checks that a decoupled net is held at AC ground.
var DecouplingReactance = &engine.Rule{
	ID:              "decoupling.reactance",
	NeedsTransistor: true,
	FixMoves:        []string{engine.MoveGain}, // its fix restores the gain the part costs
	Doc: engine.Doc{
		Title: "a decoupling capacitor must hold its net at AC ground",
		Why: "A supply or bias net that is not really at AC ground couples stages together and feeds signal back, " +
			"which costs gain or makes the amplifier oscillate. A net that is already stiff (a capacitor straight across " +
			"a supply with a low source impedance) needs no help and is not judged.",
		Formula: "X = 1/(2π·f_low·C) (C as for coupling.reactance); X <= max_fraction × circuit_impedance, circuit_impedance = |Z| " +
			"across the capacitor at f_low with it removed; not judged where circuit_impedance < min_ohms. " +
			"Decoupling capacitors that share both nets are one group. A FET's decoupled drain feed is judged the same way: the drain counts as a collector (docs/fet.md).",
		Source: "common practice, no published source for the exact figures (a good AC ground has a reactance of at most a " +
			"tenth of the resistance it shunts, as in e.g. Malvino and Bates, Electronic Principles; cited from memory)",
		Fix: "The minimum capacitance, rounded up to E12, as a nominal value that meets the limit at the case judged; " +
			"for a group the first part takes the change and the others stay.",
		Params: []engine.Param{
			{Name: "max_fraction", Unit: quantity.Ratio, Help: "largest reactance ÷ circuit impedance"},
			{Name: "min_ohms", Unit: quantity.Ohm, Help: "circuit impedance below which the net needs no help"},
		},
	},
	Run: func(p *engine.Pass) error {
		frac, minOhms := p.Param("max_fraction"), p.Param("min_ohms")
		judgeCapacitorGroups(p, topology.Decoupling, func(z float64) (float64, capWhy, bool) {
			return frac * z, capWhy{frac: frac, z: z, say: func(w *capWhy) string {
				return fmt.Sprintf("%s × the %s the net sees without it", quantity.Format(w.frac, quantity.Ratio),
					quantity.Approx(w.z, quantity.Ohm))
			}}, z >= minOhms
		})
		return nil
	},
}
