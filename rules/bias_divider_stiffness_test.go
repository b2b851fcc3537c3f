package rules_test

import (
	"math"
	"strings"
	"testing"

	"headroom/checker/quantity"
	"headroom/rules"
)

// iecE24 is IEC 60063's E24 decade as REFERENCES.md §1 prints it, typed here
// again so that the check of a fix's values shares nothing with the code.
var iecE24 = []float64{1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1}

// isE24 reports whether v is an E24 value in some decade.
func isE24(v float64) bool {
	m := v / math.Pow(10, math.Floor(math.Log10(v)))
	for _, e := range iecE24 {
		if math.Abs(m-e) < 1e-9 {
			return true
		}
	}
	return false
}

// The thresholds: a divider carrying ten times the base current (twenty in
// strict) — common practice, no published source: REFERENCES.md §10 finds
// "10 times the base current" only in forums (weak) and Bowick's worked RF
// divider at 7.5x.
func TestDividerStiffnessThresholds(t *testing.T) {
	if v := shippedParams(t, "default", "bias.divider-stiffness")["min_ratio"]; v != 10 {
		t.Errorf("default min_ratio %g, want 10", v)
	}
	if v := shippedParams(t, "strict", "bias.divider-stiffness")["min_ratio"]; v != 20 {
		t.Errorf("strict min_ratio %g, want 20", v)
	}
	if !strings.Contains(rules.BiasDividerStiffness.Doc.Source, "common practice") {
		t.Errorf("source %q must say common practice", rules.BiasDividerStiffness.Doc.Source)
	}
}

// The metric against the Thevenin closed form for a 40 m preamp
// (2N3904: vbe 0.70 V at 10 mA, hFE 100..300, REFERENCES.md §6).
func TestDividerStiffnessClosedForm(t *testing.T) {
	src := ceStage("40 m preamp", "12V", "2N3904", "100k", "22k", "470", "1k", "")
	f := biasItem(t, judgeRule(t, rules.BiasDividerStiffness, src, nil, false), "R2", "")
	s := divider(12, 100e3, 22e3, 470, nominalHFE, 0.70, 0.010, 25)
	want := s.VB / 22e3 / s.IB
	if !within(f.Measured, want, 0.005) {
		t.Errorf("ratio %g, closed form %g", f.Measured, want)
	}
	if f.Limit != 10 || f.Comparison != ">=" || f.Unit != "ratio" || f.Measured >= 10 {
		t.Errorf("want a failing >= 10 ratio item: %+v", f)
	}
	if !contains(f.Message, "R2", "Q1", "5.74x", "10x") {
		t.Errorf("message %q", f.Message)
	}
}

// A fix's two values are E24, keep the base within 2 % and carry at least
// min_ratio × IB: checked by the closed form, not by the rule's own solver.
func TestDividerStiffnessFixHolds(t *testing.T) {
	src := ceStage("40 m preamp", "12V", "2N3904", "100k", "22k", "470", "1k", "")
	f := biasItem(t, judgeRule(t, rules.BiasDividerStiffness, src, nil, false), "R2", "")
	if len(f.Changes) != 2 {
		t.Fatalf("want changes to R1 and R2: %q %+v", f.Fix, f.Changes)
	}
	vals := map[string]float64{}
	for _, c := range f.Changes {
		v, err := quantity.Parse(c.To, quantity.Ohm)
		if err != nil || c.Key != "value" || !isE24(v) {
			t.Fatalf("change %+v is not an E24 value (%v)", c, err)
		}
		vals[c.Part] = v
	}
	before := divider(12, 100e3, 22e3, 470, nominalHFE, 0.70, 0.010, 25)
	after := divider(12, vals["R1"], vals["R2"], 470, nominalHFE, 0.70, 0.010, 25)
	if r := after.VB / vals["R2"] / after.IB; r < 10 {
		t.Errorf("R1 %g, R2 %g carry %gx the base current, want >= 10", vals["R1"], vals["R2"], r)
	}
	if d := math.Abs(after.VB/before.VB - 1); d > 0.02 {
		t.Errorf("base moves by %.2f %%, RULES.md allows 2 %%", d*100)
	}
	again := biasItem(t, judgeRule(t, rules.BiasDividerStiffness, biasApply(t, src, f), nil, false), "R2", "")
	if again.Measured < 10 {
		t.Errorf("the fixed circuit still fails: %s", again.Message)
	}
}

// A PNP on a negative rail is the NPN's mirror image: the emitter returns to
// gnd, the lower leg is the resistor from the base to gnd, and the ratio is
// the NPN's. At the worst corner (hFE 100, vneg −13.2 V, R1 −5 %, R2 +5 %,
// R3 −5 %) it is the closed form's figure there.
func TestDividerStiffnessPNPNegativeRail(t *testing.T) {
	src := `[circuit]
name = "160 m PNP stage on a negative rail"
band = ["1.8MHz", "2MHz"]

[supplies.vneg]
volts = "-12V"
range = ["-13.2V", "-10.8V"]

[parts.R1]
kind = "resistor"
value = "47k"
nets = ["vneg", "base"]

[parts.R2]
kind = "resistor"
value = "10k"
nets = ["base", "gnd"]

[parts.Q1]
kind = "pnp"
device = "2N3906"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "470"
nets = ["emit", "gnd"]

[parts.R4]
kind = "resistor"
value = "1k5"
nets = ["vneg", "coll"]
`
	nom := biasItem(t, judgeRule(t, rules.BiasDividerStiffness, src, nil, false), "R2", "")
	s := divider(12, 47e3, 10e3, 470, nominalHFE, 0.70, 0.010, 25)
	if want := s.VB / 10e3 / s.IB; !within(nom.Measured, want, 0.005) {
		t.Errorf("nominal ratio %g, mirrored closed form %g", nom.Measured, want)
	}
	worst := biasItem(t, judgeRule(t, rules.BiasDividerStiffness, src, nil, true), "R2", "")
	w := divider(13.2, 47e3*0.95, 10e3*1.05, 470*0.95, 100, 0.70, 0.010, 25)
	if want := w.VB / (10e3 * 1.05) / w.IB; !within(worst.Measured, want, 0.005) {
		t.Errorf("worst ratio %g at %v, closed form %g", worst.Measured, worst.Corner, want)
	}
	if len(worst.Changes) != 2 {
		t.Errorf("want a two-value fix at the corner: %q", worst.Fix)
	}
}

// No lower leg (collector feedback) is not judged; two lower-leg resistors
// are judged together, named, and get advice instead of changes.
func TestDividerStiffnessLegs(t *testing.T) {
	feedback := `[circuit]
name = "20 m collector-feedback stage"
band = ["14MHz", "14.35MHz"]

[supplies.vcc]
volts = "12V"

[parts.R1]
kind = "resistor"
value = "220k"
nets = ["coll", "base"]

[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "coll", base = "base", emitter = "gnd" }

[parts.R4]
kind = "resistor"
value = "2k2"
nets = ["vcc", "coll"]
`
	if fs := judgeRule(t, rules.BiasDividerStiffness, feedback, nil, false); len(fs) != 0 {
		t.Errorf("a base with no lower leg must not be judged: %+v", fs)
	}
	twin := ceStage("40 m preamp, split lower leg", "12V", "2N3904", "100k", "47k", "470", "1k", `
[parts.R5]
kind = "resistor"
value = "47k"
nets = ["base", "gnd"]
`)
	f := biasItem(t, judgeRule(t, rules.BiasDividerStiffness, twin, nil, false), "R2", "")
	// 47k || 47k = 23.5k: the current through both is VB/23.5k.
	s := divider(12, 100e3, 23.5e3, 470, nominalHFE, 0.70, 0.010, 25)
	if want := s.VB / 23.5e3 / s.IB; !within(f.Measured, want, 0.005) {
		t.Errorf("two-resistor leg: ratio %g, closed form %g", f.Measured, want)
	}
	if !contains(f.Message, "R2, R5") || len(f.Changes) != 0 || f.Fix == "" {
		t.Errorf("want advice naming both resistors: %q / %q %+v", f.Message, f.Fix, f.Changes)
	}
}

// A divider fed from an RC-decoupled rail (R5 from the supply, C5 to gnd)
// has its upper leg on that rail, not on a supply: the fix still changes both
// legs, and applying it removes the finding.
func TestDividerStiffnessDecoupledRail(t *testing.T) {
	src := `[circuit]
name = "40 m preamp on a decoupled rail"
band = ["7MHz", "7.2MHz"]

[supplies.vcc]
volts = "12V"

[parts.R5]
kind = "resistor"
value = "220"
nets = ["vcc", "rail"]

[parts.C5]
kind = "capacitor"
value = "100n"
nets = ["rail", "gnd"]

[parts.R1]
kind = "resistor"
value = "100k"
nets = ["rail", "base"]

[parts.R2]
kind = "resistor"
value = "22k"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "470"
nets = ["emit", "gnd"]

[parts.R4]
kind = "resistor"
value = "1k"
nets = ["rail", "coll"]
`
	f := biasItem(t, judgeRule(t, rules.BiasDividerStiffness, src, nil, false), "R2", "")
	if len(f.Changes) != 2 || f.Changes[0].Part != "R1" || f.Changes[1].Part != "R2" {
		t.Fatalf("want R1 and R2 changed: %q %+v", f.Fix, f.Changes)
	}
	again := biasItem(t, judgeRule(t, rules.BiasDividerStiffness, biasApply(t, src, f), nil, false), "R2", "")
	if again.Failing() {
		t.Errorf("the fix leaves %s", again.Message)
	}
}
