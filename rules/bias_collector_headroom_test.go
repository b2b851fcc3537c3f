package rules_test

import (
	"strings"
	"testing"

	"headroom/checker/quantity"
	"headroom/rules"
)

// The thresholds: 1 V (2 V strict) between collector and emitter. Common
// practice, no published source. The one fact they must respect is the
// saturation line itself: bias.region calls a stage saturated below 0.3 V,
// a small-signal transistor's VCE(sat) (0.2–0.3 V for the 2N3904 at 10 mA,
// from memory), so the headroom floor must sit well above it.
func TestCollectorHeadroomThresholds(t *testing.T) {
	def := shippedParams(t, "default", "bias.collector-headroom")["min_volts"]
	strict := shippedParams(t, "strict", "bias.collector-headroom")["min_volts"]
	sat := shippedParams(t, "default", "bias.region")["min_vce"]
	if def != 1 || strict != 2 {
		t.Errorf("min_volts %g [%g], want 1 [2]", def, strict)
	}
	if def < 3*sat {
		t.Errorf("headroom floor %g V is not well clear of the saturation line %g V", def, sat)
	}
}

// VCE against the closed form VCE = Vcc − IC·R4 − IE·R3 for a 20 m buffer on
// 9 V (2N3904, REFERENCES.md §6), and the fix re-checked by the same closed
// form: IC does not depend on the collector resistor while the stage is
// active, so lowering R4 by ΔV/IC restores the headroom.
func TestCollectorHeadroomClosedFormAndFix(t *testing.T) {
	src := ceStage("20 m buffer", "9V", "2N3904", "22k", "10k", "330", "1k1", "")
	f := biasItem(t, judgeRule(t, rules.BiasCollectorHeadroom, src, nil, false), "Q1", "")
	s := divider(9, 22e3, 10e3, 330, nominalHFE, 0.70, 0.010, 25)
	want := 9 - s.IC*1100 - s.VE
	if !within(f.Measured, want, 0.005) || f.Measured >= 1 || f.Unit != "V" || f.Comparison != ">=" {
		t.Errorf("VCE %g, closed form %g: %+v", f.Measured, want, f)
	}
	if len(f.Changes) != 1 || f.Changes[0].Part != "R4" {
		t.Fatalf("want a change of R4: %q %+v", f.Fix, f.Changes)
	}
	r4, err := quantity.Parse(f.Changes[0].To, quantity.Ohm)
	if err != nil || !isE24(r4) {
		t.Fatalf("R4 = %q is not an E24 value", f.Changes[0].To)
	}
	if vce := 9 - s.IC*r4 - s.VE; vce < 1 {
		t.Errorf("R4 = %g leaves VCE %g V by the closed form", r4, vce)
	}
	if r4 != 1000 {
		t.Errorf("the nearest E24 value that clears 1 V is 1k (VCE 1.38 V), got %g", r4)
	}
}

// With a choke feed the collector sits at the supply and no resistor change
// helps: advice, no changes, naming the missing volts.
func TestCollectorHeadroomChokeAdvice(t *testing.T) {
	src := `[circuit]
name = "20 m stage on 5 V, choke feed"
band = ["14MHz", "14.35MHz"]

[supplies.vcc]
volts = "5V"

[parts.R1]
kind = "resistor"
value = "330"
nets = ["vcc", "base"]

[parts.R2]
kind = "resistor"
value = "10k"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "1k"
nets = ["emit", "gnd"]

[parts.L1]
kind = "inductor"
value = "22u"
nets = ["vcc", "coll"]
`
	f := biasItem(t, judgeRule(t, rules.BiasCollectorHeadroom, src, nil, false), "Q1", "")
	s := divider(5, 330, 10e3, 1000, nominalHFE, 0.70, 0.010, 25)
	if want := 5 - s.VE; !within(f.Measured, want, 0.005) {
		t.Errorf("VCE %g, closed form %g", f.Measured, want)
	}
	if len(f.Changes) != 0 || !contains(f.Fix, "short", "base voltage") {
		t.Errorf("want advice: %q %+v", f.Fix, f.Changes)
	}
}

// A collector fed through a small resistor from a rail behind a heavy
// decoupling resistor: no value of the collector resistor restores 1 V, so
// the fix raises the emitter resistor. By the closed form
// VCE = 12 − IC·(R5 + R4) − IE·R3, R3 = 240 leaves 1.19 V where 220 leaves 0.40 V.
func TestCollectorHeadroomEmitterFix(t *testing.T) {
	src := strings.Replace(ceStage("20 m stage behind a heavy rail resistor", "12V", "2N3904", "10k", "2k2", "220", "100", `
[parts.R5]
kind = "resistor"
value = "1k5"
nets = ["vcc", "rail"]

[parts.C5]
kind = "capacitor"
value = "100n"
nets = ["rail", "gnd"]
`), `nets = ["vcc", "coll"]`, `nets = ["rail", "coll"]`, 1)
	f := biasItem(t, judgeRule(t, rules.BiasCollectorHeadroom, src, nil, false), "Q1", "")
	s := divider(12, 10e3, 2.2e3, 220, nominalHFE, 0.70, 0.010, 25)
	if want := 12 - s.IC*1600 - s.VE; !within(f.Measured, want, 0.005) {
		t.Errorf("VCE %g, closed form %g", f.Measured, want)
	}
	if len(f.Changes) != 1 || f.Changes[0].Part != "R3" || f.Changes[0].To != "240" {
		t.Fatalf("want R3 = 240: %q %+v", f.Fix, f.Changes)
	}
	s2 := divider(12, 10e3, 2.2e3, 240, nominalHFE, 0.70, 0.010, 25)
	if vce := 12 - s2.IC*1600 - s2.VE; vce < 1 {
		t.Errorf("R3 = 240 leaves %g V by the closed form", vce)
	}
}
