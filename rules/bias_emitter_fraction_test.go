package rules_test

import (
	"math"
	"testing"

	"headroom/checker/quantity"
	"headroom/rules"
)

// fedStage writes an 80 m IF stage whose base is fed by one resistor R1 from
// vcc (a current-fed base, where the emitter resistor sets the emitter
// voltage), R3 in the emitter, R4 to the collector.
func fedStage(r1, r3 string) string {
	return `[circuit]
name = "80 m IF stage"
band = ["3.5MHz", "3.8MHz"]

[supplies.vcc]
volts = "12V"

[parts.R1]
kind = "resistor"
value = "` + r1 + `"
nets = ["vcc", "base"]

[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "` + r3 + `"
nets = ["emit", "gnd"]

[parts.R4]
kind = "resistor"
value = "680"
nets = ["vcc", "coll"]
`
}

// The window 5 % .. 25 % brackets the common-practice figure, about a tenth of
// the supply across the emitter resistor (common practice, no published
// source), in both shipped sets.
func TestEmitterFractionThresholds(t *testing.T) {
	for _, set := range []string{"default", "strict"} {
		p := shippedParams(t, set, "bias.emitter-fraction")
		if p["min_fraction"] != 0.05 || p["max_fraction"] != 0.25 {
			t.Errorf("%s: window %g .. %g, want 0.05 .. 0.25", set, p["min_fraction"], p["max_fraction"])
		}
		if !(p["min_fraction"] < 0.1 && 0.1 < p["max_fraction"]) {
			t.Errorf("%s: the window must hold a tenth", set)
		}
	}
}

// The metric against the closed form of a current-fed base (Thevenin source
// = vcc behind R1), both bounds reported, and a fix whose value, by the
// closed form, puts the emitter near a tenth.
func TestEmitterFractionClosedFormAndFix(t *testing.T) {
	fs := judgeRule(t, rules.BiasEmitterFraction, fedStage("270k", "22"), nil, false)
	lo, hi := biasItem(t, fs, "Q1", "min"), biasItem(t, fs, "Q1", "max")
	s := dividerStage(12, 270e3, 22, nominalHFE, 0.70, 0.010, 25)
	want := s.VE / 12
	if !within(lo.Measured, want, 0.005) || lo.Measured != hi.Measured {
		t.Errorf("fraction %g / %g, closed form %g", lo.Measured, hi.Measured, want)
	}
	if lo.Comparison != ">=" || lo.Limit != 0.05 || hi.Comparison != "<=" || hi.Limit != 0.25 || lo.Unit != "fraction" {
		t.Errorf("bounds: %+v %+v", lo, hi)
	}
	if len(lo.Changes) != 1 || lo.Changes[0].Part != "R3" || hi.Fix != "" {
		t.Fatalf("want the min bound fixed by R3, the max bound passing: %q %+v / %q", lo.Fix, lo.Changes, hi.Fix)
	}
	r3, err := quantity.Parse(lo.Changes[0].To, quantity.Ohm)
	if err != nil || !isE24(r3) {
		t.Fatalf("R3 = %q is not E24", lo.Changes[0].To)
	}
	got := dividerStage(12, 270e3, r3, nominalHFE, 0.70, 0.010, 25).VE / 12
	if math.Abs(got-0.1) > 0.01 {
		t.Errorf("R3 = %g puts %g of the supply across the emitter, want about a tenth", r3, got)
	}
}

// An emitter follower (collector on the supply) is not a common-emitter
// stage and is not judged; a divider-held base gets advice, not changes,
// since the emitter resistor alone cannot move the emitter voltage there.
func TestEmitterFractionScope(t *testing.T) {
	follower := `[circuit]
name = "20 m follower"
band = ["14MHz", "14.35MHz"]

[supplies.vcc]
volts = "12V"

[parts.R1]
kind = "resistor"
value = "10k"
nets = ["vcc", "base"]

[parts.R2]
kind = "resistor"
value = "10k"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "vcc", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "1k"
nets = ["emit", "gnd"]
`
	if fs := judgeRule(t, rules.BiasEmitterFraction, follower, nil, false); len(fs) != 0 {
		t.Errorf("a follower must not be judged: %+v", fs)
	}
	held := ceStage("20 m preamp, base low", "12V", "2N3904", "100k", "10k", "100", "1k", "")
	f := biasItem(t, judgeRule(t, rules.BiasEmitterFraction, held, nil, false), "Q1", "min")
	s := divider(12, 100e3, 10e3, 100, nominalHFE, 0.70, 0.010, 25)
	if !within(f.Measured, s.VE/12, 0.005) {
		t.Errorf("fraction %g, closed form %g", f.Measured, s.VE/12)
	}
	// A tenth of 12 V at the present emitter current: 1.2 V / IE.
	re := quantity.Approx(1.2/(s.IC+s.IB), quantity.Ohm)
	if len(f.Changes) != 0 || !contains(f.Fix, "base", re) {
		t.Errorf("want advice naming %s: %q %+v", re, f.Fix, f.Changes)
	}
}

// A PNP on a negative rail reads as its NPN mirror: a positive fraction.
func TestEmitterFractionPNP(t *testing.T) {
	src := `[circuit]
name = "160 m PNP stage on a negative rail"
band = ["1.8MHz", "2MHz"]

[supplies.vneg]
volts = "-12V"

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
	f := biasItem(t, judgeRule(t, rules.BiasEmitterFraction, src, nil, false), "Q1", "min")
	s := divider(12, 47e3, 10e3, 470, nominalHFE, 0.70, 0.010, 25)
	if !within(f.Measured, s.VE/12, 0.005) || f.Measured <= 0 {
		t.Errorf("fraction %g, mirrored closed form %g", f.Measured, s.VE/12)
	}
}
