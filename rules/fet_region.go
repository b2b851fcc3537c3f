package rules

import (
	"fmt"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// FETRegion keeps every field-effect transistor conducting, in saturation
// with room to swing, and a JFET's gate junction reverse-biased.
var FETRegion = &engine.Rule{
	ID: "fet.region",
	Doc: engine.Doc{
		Title: "every FET must conduct in saturation with margin, its gate junction not forward-biased",
		Why: "A FET amplifies as a voltage-controlled current source only in saturation (VDS above VGS − VP); nearer the " +
			"triode edge its gain collapses and the drain swing clips. A JFET's gate is a diode: biased forward it draws " +
			"current, loads the input and no longer controls the channel.",
		Formula: "three bounds, one item each (the finding reports the one violated): cut off: ID >= min_id (unit A); " +
			"saturation margin: VDS − (VGS − VP) >= min_margin (unit V; n-channel signs, a p-channel part mirrored; a dual " +
			"gate: the smaller of its two halves' margins); gate: max(VGS, VGD) <= max_gate_bias (unit V; JFETs only)",
		Source: "the regions of the square-law model (Shockley; D. De, Basic Electronics, 2010, ch. 7; docs/fet.md); the 1 V margin and the " +
			"0 V gate limit are common practice, no published source",
		Fix: "Cut off or too close to the triode edge: lower the source resistor (more current) or the drain resistance, or " +
			"raise the supply. Gate forward: return the gate to the source side (gate resistor to gnd with the source " +
			"above it) so VGS stays at or below 0 V.",
		Params: []engine.Param{
			{Name: "min_id", Unit: quantity.Ampere, Help: "drain current below which a FET counts as cut off"},
			{Name: "min_margin", Unit: quantity.Volt, Help: "least VDS above the saturation edge VGS − VP"},
			{Name: "max_gate_bias", Unit: quantity.Volt, Help: "largest forward voltage on a JFET's gate junction"},
		},
	},
	Run: runFETRegion,
}

func runFETRegion(p *engine.Pass) error {
	op := p.A.OP
	if op == nil {
		return nil
	}
	minID, minMargin, maxGate := p.Param("min_id"), p.Param("min_margin"), p.Param("max_gate_bias")
	for part := range fets(p) {
		q := op.FETs[part.Ref]
		if q == nil {
			continue
		}
		p.Report(engine.Finding{Part: part.Ref, Bound: "cutoff",
			HasMetric: true, Measured: q.ID, Limit: minID, Comparison: ">=", Unit: "A",
			MessageLater: func() string {
				return fmt.Sprintf("%s is cut off: ID %s, needs at least %s", part.Ref,
					quantity.Approx(q.ID, quantity.Ampere), quantity.Approx(minID, quantity.Ampere))
			},
			Fix: "lower the source resistor, or bring the gate closer to the source voltage, until drain current flows"})
		p.Report(engine.Finding{Part: part.Ref, Bound: "saturation",
			HasMetric: true, Measured: q.SatMargin, Limit: minMargin, Comparison: ">=", Unit: "V",
			MessageLater: func() string {
				return fmt.Sprintf("%s sits %s above the edge of saturation (VDS %s, VGS %s, |VP| %s), needs at least %s",
					part.Ref, quantity.Approx(q.SatMargin, quantity.Volt), quantity.Approx(q.VDS, quantity.Volt),
					quantity.Approx(q.VGS, quantity.Volt), quantity.Approx(q.VP, quantity.Volt), quantity.Approx(minMargin, quantity.Volt))
			},
			Fix: "lower the drain resistance or the drain current (a larger source resistor), or raise the supply, so that VDS clears VGS − VP by the margin"})
		if part.Kind != circuit.DualGateMOSFET {
			gate := max(q.VGS, q.VGS-q.VDS)
			p.Report(engine.Finding{Part: part.Ref, Bound: "gate",
				HasMetric: true, Measured: gate, Limit: maxGate, Comparison: "<=", Unit: "V",
				MessageLater: func() string {
					return fmt.Sprintf("%s's gate junction is forward-biased by %s, at most %s", part.Ref,
						quantity.Approx(gate, quantity.Volt), quantity.Approx(maxGate, quantity.Volt))
				},
				Fix: "return the gate towards the source's return rail (a gate resistor to gnd with the source resistor above it) so that VGS stays at or below 0 V"})
		}
	}
	return nil
}
