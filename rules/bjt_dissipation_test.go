package rules_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"headroom/checker/library"
	"headroom/rules"
)

// The shipped thresholds: 50 % of the derated pd by default (equal to NASA
// EEE-INST-002's small-signal transistor figure, values from memory, not
// confirmed; REFERENCES.md §5.3) and 40 % strict.
func TestBJTDissipationThresholdsMatchSources(t *testing.T) {
	if v := shippedParams(t, "default", "bjt.dissipation")["max_load"]; v != 0.5 {
		t.Errorf("default max_load %g, want 0.5", v)
	}
	if v := shippedParams(t, "strict", "bjt.dissipation")["max_load"]; v != 0.4 {
		t.Errorf("strict max_load %g, want 0.4", v)
	}
}

// followerSrc is a 2N3904 emitter follower whose base is held at vb by its
// own supply and whose collector sits on a 12 V rail.
func followerSrc(name, device, vb, re, ambient, extra string) string {
	return fmt.Sprintf(`
[circuit]
name = %q
band = ["14MHz", "14.35MHz"]
ambient = %q
[supplies.vcc]
volts = "12V"
[supplies.vbias]
volts = %q
[parts.Q1]
kind = "npn"
device = %q
nets = { collector = "vcc", base = "vbias", emitter = "emit" }%s
[parts.R3]
kind = "resistor"
value = %q
nets = ["emit", "gnd"]
`, name, ambient, vb, device, extra, re)
}

// The metric against an independent solution of FORMAT.md §6's model for an
// emitter follower, at 60 °C where the 2N3904's 625 mW is derated to
// 450.0 mW (REFERENCES.md §6.4).
func TestBJTDissipationClosedForm(t *testing.T) {
	src := followerSrc("20 m buffer at 60 C", "2N3904", "2V", "68", "60C", "")
	f := marginFinding(t, judgeRule(t, rules.BJTDissipation, src, nil, false), "Q1")
	// 2N3904 (shipped library): vbe 0.70 V at 10 mA, hFE √(100·300).
	ic, ib, vbe := followerPoint(2, 68, 0.70, 0.010, math.Sqrt(100*300), 60)
	vce := 12 - (ic+ib)*68
	want := (vce*ic + vbe*ib) / 0.450
	if !within(f.Measured, want, 0.005) || f.Absolute != f.Measured {
		t.Errorf("load %g, independent %g", f.Measured, want)
	}
	if !strings.Contains(f.Message, "450 mW at 60 °C") {
		t.Errorf("message should show the derated pd: %s", f.Message)
	}
}

// At tj_max the pd derates to zero: no metric, always an error.
func TestBJTDissipationZeroPoint(t *testing.T) {
	f := marginFinding(t, judgeRule(t, rules.BJTDissipation,
		followerSrc("40 m buffer in the oven", "2N3904", "2V", "680", "150C", ""), nil, false), "Q1")
	if f.HasMetric || f.Absolute != 2 || !strings.Contains(f.Message, "rating is zero at 150 °C") {
		t.Errorf("%+v", f)
	}
}

// A failing stage gets a device of the same polarity from the library, and
// that device meets the rule here; a PNP with no better PNP in the library
// gets advice instead, and so does a part whose pd is written inline.
func TestBJTDissipationFixes(t *testing.T) {
	// 2N5179 (200 mW) follower: IE ≈ (2 − 0.78)/56 ≈ 22 mA, VCE ≈ 10.8 V:
	// about 240 mW, past its pd.
	src := followerSrc("20 m buffer, hot 2N5179", "2N5179", "2V", "56", "25C", "")
	f := marginFinding(t, judgeRule(t, rules.BJTDissipation, src, nil, false), "Q1")
	if f.Measured <= 1 || f.Absolute <= 1 || !strings.Contains(f.Message, "may run hot") {
		t.Fatalf("want an overload past the absolute rating: %+v", f)
	}
	if len(f.Changes) != 1 || f.Changes[0].Key != "device" {
		t.Fatalf("want a device change: %q %+v", f.Fix, f.Changes)
	}
	dev := f.Changes[0].To
	tr := library.Shipped().Transistors[dev]
	if tr == nil || tr.Polarity != "npn" {
		t.Fatalf("proposed %q is not a shipped NPN", dev)
	}
	g := marginFinding(t, judgeRule(t, rules.BJTDissipation,
		followerSrc("20 m buffer, fixed", dev, "2V", "56", "25C", ""), nil, false), "Q1")
	if g.Measured > 0.5 {
		t.Errorf("with %s the load is still %g", dev, g.Measured)
	}

	// The same overload with the pd written inline (180 mW): no device can
	// help. (An inline figure equal to the library's reads as the library's.)
	f = marginFinding(t, judgeRule(t, rules.BJTDissipation,
		followerSrc("20 m buffer, inline pd", "2N5179", "2V", "56", "25C", "\npd = \"180mW\""), nil, false), "Q1")
	if len(f.Changes) != 0 || !contains(f.Fix, "pd is written inline", "collector current", "pd of at least") {
		t.Errorf("inline pd: %q %+v", f.Fix, f.Changes)
	}

	// A PNP follower (2N3906, the only shipped PNP) at 85 °C: 325 mW left.
	pnp := `
[circuit]
name = "160 m PNP buffer, hot box"
band = ["1.8MHz", "2MHz"]
ambient = "85C"
[supplies.vcc]
volts = "12V"
[supplies.vbias]
volts = "10V"
[parts.Q1]
kind = "pnp"
device = "2N3906"
nets = { collector = "gnd", base = "vbias", emitter = "emit" }
[parts.R3]
kind = "resistor"
value = "100"
nets = ["vcc", "emit"]
`
	f = marginFinding(t, judgeRule(t, rules.BJTDissipation, pnp, nil, false), "Q1")
	// IE ≈ (12 − 10.64)/100 ≈ 13.6 mA at VCE ≈ 10.6 V: about 145 mW of 325 mW.
	if f.Measured < 0.4 || f.Measured > 0.5 {
		t.Fatalf("PNP load %g, want about 0.45", f.Measured)
	}
	f = marginFinding(t, judgeRule(t, rules.BJTDissipation, pnp, map[string]float64{"max_load": 0.3}, false), "Q1")
	if len(f.Changes) != 0 || !strings.Contains(f.Fix, "no library pnp transistor") {
		t.Errorf("PNP: %q %+v", f.Fix, f.Changes)
	}
}

// The device swap solves the circuit again for every candidate and hFE: this
// measures one worst-case judgement of a failing stage with its fix.
func BenchmarkBJTDissipationWorstWithFix(b *testing.B) {
	src := followerSrc("20 m buffer, hot 2N5179", "2N5179", "2V", "56", "25C", "")
	for i := 0; i < b.N; i++ {
		judgeRule(b, rules.BJTDissipation, src, nil, true)
	}
}
