package rules

import (
	"fmt"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// CapacitorVoltage keeps each rated capacitor's DC voltage well below its
// working voltage.
var CapacitorVoltage = &engine.Rule{
	ID: "capacitor.voltage",
	Doc: engine.Doc{
		Title: "a capacitor's DC voltage must stay well below its rated working voltage",
		Why: "Near its rated voltage a capacitor's dielectric is stressed: leakage rises, high-permittivity ceramics lose much " +
			"of their capacitance, and past the rating the dielectric can break down and short the net it sits on.",
		Formula: "|DC voltage across| ÷ rating <= max_load (unit fraction), only for capacitors with a rating. A load above 1 " +
			"(past the absolute rating) is always an error.",
		Source: "common practice, as strict as or stricter than published reliability derating guidance (e.g. NASA " +
			"EEE-INST-002, values from memory, not confirmed)",
		Fix: "the next standard rating (16, 25, 50, 63, 100, 200, 500 V) that meets max_load; above 500 V the fix says so and " +
			"gives the exact rating needed",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Fraction, Help: "largest DC voltage ÷ rating"},
		},
	},
	Run: runCapacitorVoltage,
}

func runCapacitorVoltage(p *engine.Pass) error {
	op := p.A.OP
	if op == nil {
		return nil
	}
	maxLoad := p.Param("max_load")
	for _, part := range p.Circuit.Parts {
		if part.Kind != circuit.Capacitor || !(part.Rating > 0) {
			continue
		}
		st := op.Parts[part.Ref]
		if st == nil {
			continue
		}
		load := st.Voltage / part.Rating
		msg := func() string {
			msg := fmt.Sprintf("%s holds %s DC, %s of its %s rating, at most %s", part.Ref,
				quantity.Approx(st.Voltage, quantity.Volt), pct(load), quantity.Approx(part.Rating, quantity.Volt), pct(maxLoad))
			if load > 1 {
				msg += "; past its absolute rating, it may break down"
			}
			return msg
		}
		f := engine.Finding{Part: part.Ref, HasMetric: true, Measured: load, Limit: maxLoad,
			Comparison: "<=", Unit: "fraction", Absolute: load, MessageLater: msg}
		if engine.Fails(load, maxLoad, "<=") {
			need := st.Voltage / maxLoad
			if r, ok := nextStandard(need, capacitorRatings); ok {
				f.Fix = fmt.Sprintf("%s rating = %s (next standard rating) brings the load to %s",
					part.Ref, ratingText(r, "V"), pct(st.Voltage/r))
				f.Changes = []engine.Change{{Part: part.Ref, Key: "rating", To: ratingCode(r, "V")}}
			} else {
				f.Fix = fmt.Sprintf("no standard rating up to 500 V is enough: %s needs a working voltage of at least %s",
					part.Ref, quantity.Approx(roundUp3(need), quantity.Volt))
			}
		}
		p.Report(f)
	}
	return nil
}
