package rules

import (
	"fmt"
	"math"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// SafetyVoltage cautions when a circuit's rails span more than the safety
// extra-low voltage ceiling.
var SafetyVoltage = &engine.Rule{
	ID:       "safety.voltage",
	FromFile: true, // the supplies' voltages as written: judged even when the wiring is broken
	Doc: engine.Doc{
		Title: "rails spanning more than the safety extra-low voltage call for hazardous-voltage practice",
		Why: "60 V DC is where equipment safety standards stop treating a DC circuit as safety extra-low " +
			"voltage; above it, insulation, enclosure, creepage and the rules of the place it is built and used " +
			"apply. This checker cannot judge those, so it says when they start to matter.",
		Formula: "the largest span between the EMFs of any two rails (gnd at 0 V included; each supply at the " +
			"case judged, so within its range in the worst case), <= max_volts; unit V. The finding names the " +
			"supply with the largest nominal |EMF|.",
		Source: "IEC 60950-1 (withdrawn, replaced by IEC 62368-1), SELV circuit: at most 60 V DC in normal " +
			"operation (seen in a public summary of the standard); the same 60 V DC is the limit of the lowest " +
			"energy class, ES1, of IEC 62368-1:2018 (from memory, not checked against the standard)",
		Fix: "Advice: no value change makes a circuit safe. Bring every rail within max_volts of every other, or " +
			"treat the circuit as hazardous: follow local codes and licensed practice.",
		Params: []engine.Param{
			{Name: "max_volts", Unit: quantity.Volt, Help: "largest span between rail EMFs"},
		},
	},
	Run: runSafetyVoltage,
}

// safetyCaution is what a failing finding's message carries.
const safetyCaution = "treat the circuit as hazardous, follow local codes and licensed practice"

func runSafetyVoltage(p *engine.Pass) error {
	c := p.Circuit
	if len(c.Supplies) == 0 {
		return nil
	}
	lo, hi := 0.0, 0.0 // gnd
	for _, s := range c.Supplies {
		lo, hi = math.Min(lo, s.Volts), math.Max(hi, s.Volts)
	}
	// The supply named is chosen at nominal, so that every corner judges the
	// same item.
	var top *circuit.Supply
	for _, s := range p.NominalCircuit.Supplies {
		if top == nil || math.Abs(s.Volts) > math.Abs(top.Volts) {
			top = s
		}
	}
	volts := c.Supply(top.Net).Volts
	span := hi - lo
	limit := p.Param("max_volts")
	net := top.Net
	f := engine.Finding{Part: top.Net,
		HasMetric: true, Measured: span, Limit: limit, Comparison: "<=", Unit: "V",
		MessageLater: func() string {
			msg := fmt.Sprintf("the rails span %s (%s at %s), the limit for safety extra-low voltage is %s",
				quantity.Approx(span, quantity.Volt), net, quantity.Approx(volts, quantity.Volt),
				quantity.Approx(limit, quantity.Volt))
			if engine.Fails(span, limit, "<=") {
				msg += ": " + safetyCaution
			}
			return msg
		}}
	if engine.Fails(span, limit, "<=") {
		f.Fix = fmt.Sprintf("no value change makes this safe: bring every rail within %s of every other, or %s",
			quantity.Approx(limit, quantity.Volt), safetyCaution)
	}
	p.Report(f)
	return nil
}
