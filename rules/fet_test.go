package rules_test

import (
	"fmt"
	"math"
	"testing"

	"headroom/checker/engine"
	"headroom/rules"
)

// fetStage is a self-biased n-channel JFET: RD from a VDD rail, RS from the
// source to gnd, gate on gnd, figures inline.
func fetStage(vdd, rd, rs, idss, vp, extra, ambient string) string {
	return fmt.Sprintf(`
[circuit]
name = "JFET stage"
band = ["7MHz", "7.2MHz"]
ambient = %q
[supplies.vdd]
volts = %q
[parts.RD]
kind = "resistor"
value = %q
nets = ["vdd", "drain"]
[parts.RS]
kind = "resistor"
value = %q
nets = ["src", "gnd"]
[parts.Q1]
kind = "njfet"
nets = { drain = "drain", gate = "gnd", source = "src" }
idss = %s
vp = %s
vds_max = "30V"
pd = "350mW"
tj_max = "150C"
ciss = "10pF"
crss = "2pF"%s
`, ambient, vdd, rd, rs, idss, vp, extra)
}

// selfBias is the textbook root of VGS = −ID·RS, ID = IDSS(1 − VGS/VP)²
// (REFERENCES-2.md §5.1), vp a magnitude.
func selfBias(idss, vp, rs float64) float64 {
	a := -rs / vp
	qa, qb, qc := idss*a*a, 2*idss*a-1, idss
	return (-qb - math.Sqrt(qb*qb-4*qa*qc)) / (2 * qa)
}

func bound(t *testing.T, fs []engine.Finding, b string) engine.Finding {
	t.Helper()
	for _, f := range fs {
		if f.Bound == b {
			return f
		}
	}
	t.Fatalf("no finding with bound %q in %+v", b, fs)
	return engine.Finding{}
}

// The saturation margin against the closed form VDS − (VGS − VP) for the
// self-biased stage of TBC 2102 Ex 6.15 (REFERENCES-2.md §5.2: IDSS 16 mA,
// VP −4 V, RS 500 Ω, ID 4 mA, VGS −2 V) at several drain resistors, every
// one still saturated.
func TestFETRegionClosedForm(t *testing.T) {
	for _, rd := range []float64{500, 1500, 2500, 3400} {
		src := fetStage("18V", fmt.Sprint(rd), "500", `["16mA", "16mA"]`, `["-4V", "-4V"]`, "", "25C")
		fs := judgeRule(t, rules.FETRegion, src, nil, false)
		want := (18 - 4e-3*(rd+500)) - (-2 + 4)
		if f := bound(t, fs, "saturation"); math.Abs(f.Measured-want) > 1e-6 {
			t.Errorf("RD %g: margin %g, closed form %g", rd, f.Measured, want)
		}
		if f := bound(t, fs, "gate"); math.Abs(f.Measured-(-2)) > 1e-6 {
			t.Errorf("RD %g: gate bias %g, want VGS = -2 V", rd, f.Measured)
		}
	}
}

// The dissipation's derating is the datasheets' own: linear from pd at 25 °C
// to zero at tj_max, so at 87.5 °C a 150 °C part keeps half its 350 mW.
// P = VDS·ID = 14 V × 4 mA (the clean vector). The 50 % load is the same
// figure as bjt.dissipation's (common practice).
func TestFETDissipationDerating(t *testing.T) {
	if v := shippedParams(t, "default", "fet.dissipation")["max_load"]; v != 0.5 {
		t.Errorf("default max_load %g, want 0.5", v)
	}
	src := fetStage("18V", "500", "500", `["16mA", "16mA"]`, `["-4V", "-4V"]`, "", "87.5C")
	f := marginFinding(t, judgeRule(t, rules.FETDissipation, src, nil, false), "Q1")
	if want := 0.056 / 0.175; !within(f.Measured, want, 1e-6) {
		t.Errorf("load %g, want %g", f.Measured, want)
	}
}

// fT = gm/(2π·ciss) with gm = (2·IDSS/|VP|)·√(ID/IDSS) (REFERENCES-2.md
// §5.1), for a self-biased stage off the clean vector (RS 1 kΩ).
func TestFETFtClosedForm(t *testing.T) {
	src := fetStage("18V", "1k", "1k", `["16mA", "16mA"]`, `["-4V", "-4V"]`, "", "25C")
	f := marginFinding(t, judgeRule(t, rules.FETFtHeadroom, src, nil, false), "Q1")
	id := selfBias(16e-3, 4, 1e3)
	gm := 2 * 16e-3 / 4 * math.Sqrt(id/16e-3)
	if want := gm / (2 * math.Pi * 10e-12) / 7.2e6; !within(f.Measured, want, 1e-6) {
		t.Errorf("fT ratio %g, closed form %g", f.Measured, want)
	}
}

// A fixed-bias stage (source on gnd, no resistor) carries the whole IDSS
// spread: with IDSS 24–60 mA (the J310's, REFERENCES-2.md §5.3) its current
// ranges over IDSS itself, √(24/60) = 0.632 and √(60/24) = 1.581 of the
// nominal √(24·60); a source resistor narrows it (self bias, closed form).
func TestFETBiasSpreadFixedAndSelfBias(t *testing.T) {
	fixed := fetStage("12V", "100", "1", `["24mA", "60mA"]`, `["-2V", "-6.5V"]`, "", "25C")
	fs := judgeRule(t, rules.FETBiasSpread, fixed, map[string]float64{"min_ratio": 0.7, "max_ratio": 1.4}, true)
	// RS 1 Ω (±5 %) barely moves the current: compare to the self-bias root.
	nom := selfBias(math.Sqrt(24*60)*1e-3, math.Sqrt(13), 1)
	if f := bound(t, fs, "min"); !within(f.Measured, selfBias(24e-3, 2, 1.05)/nom, 1e-6) || math.Abs(f.Measured-math.Sqrt(0.4)) > 0.01 {
		t.Errorf("low end %g, want about %g", f.Measured, math.Sqrt(0.4))
	}
	self := fetStage("12V", "100", "330", `["24mA", "60mA"]`, `["-2V", "-6.5V"]`, "", "25C")
	fs = judgeRule(t, rules.FETBiasSpread, self, nil, true)
	nom = selfBias(math.Sqrt(24*60)*1e-3, math.Sqrt(13), 330)
	if f := bound(t, fs, "min"); !within(f.Measured, selfBias(24e-3, 2, 346.5)/nom, 1e-6) {
		t.Errorf("self-biased low end %g, closed form %g", f.Measured, selfBias(24e-3, 2, 346.5)/nom)
	}
	if f := bound(t, fs, "max"); !within(f.Measured, selfBias(60e-3, 6.5, 313.5)/nom, 1e-6) {
		t.Errorf("self-biased high end %g, closed form %g", f.Measured, selfBias(60e-3, 6.5, 313.5)/nom)
	}
}
