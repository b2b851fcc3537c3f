package rules_test

import (
	"math"
	"os"
	"strings"
	"testing"

	"headroom/rules"
)

// padFixture is a test fixture: a resistive T pad between 50 ohm ports.
func padFixture(band, env string) string {
	return `[circuit]
name = "test fixture"
band = ` + band + `
` + env + `
[ports.in]
net = "a"
direction = "in"

[ports.out]
net = "b"
direction = "out"

[parts.R1]
kind = "resistor"
value = "16"
nets = ["a", "m"]

[parts.R2]
kind = "resistor"
value = "68"
nets = ["m", "gnd"]

[parts.R3]
kind = "resistor"
value = "16"
nets = ["m", "b"]
`
}

// The same pad in each environment at 28–29.7 MHz: the rise is
// 10·log10((fa + F − 1)/fa) with fa from ITU-R P.372's medians at the band top
// (REFERENCES-2 §2.4 parameters), F = 1 + (L − 1)·T/T0 for the pad's loss
// 3.8438 at 298.15 K (the noise factor of a passive two-port; hand
// calculation in testdata/rules/noise.figure-fires.txtar).
func TestNoiseFigureEnvironments(t *testing.T) {
	f := 1 + 2.8438*298.15/290
	for env, c := range map[string][2]float64{"city": {76.8, 27.7}, "residential": {72.5, 27.7}, "rural": {67.2, 27.7}, "quiet-rural": {53.6, 28.6}} {
		fam := math.Max(c[0]-c[1]*math.Log10(29.7), 52-23*math.Log10(29.7))
		fa := math.Pow(10, fam/10)
		want := 10 * math.Log10((fa+f-1)/fa)
		got := biasItem(t, judgeRule(t, rules.NoiseFigure, padFixture(`["28MHz", "29.7MHz"]`, `environment = "`+env+`"`), nil, false), "", "")
		if math.Abs(got.Measured-want) > 1e-4 || got.AtHz != 29.7e6 {
			t.Errorf("%s: rise %.5f dB at %g Hz, want %.5f at 29.7 MHz", env, got.Measured, got.AtHz, want)
		}
	}
	// No environment given: residential.
	a := biasItem(t, judgeRule(t, rules.NoiseFigure, padFixture(`["28MHz", "29.7MHz"]`, ""), nil, false), "", "")
	b := biasItem(t, judgeRule(t, rules.NoiseFigure, padFixture(`["28MHz", "29.7MHz"]`, `environment = "residential"`), nil, false), "", "")
	if a.Measured != b.Measured {
		t.Errorf("default environment rises %g dB, residential %g", a.Measured, b.Measured)
	}
}

// Outside the P.372 curves (0.3–250 MHz) the rule does not judge.
func TestNoiseFigureOutsideCurves(t *testing.T) {
	if fs := judgeRule(t, rules.NoiseFigure, padFixture(`["430MHz", "440MHz"]`, ""), nil, false); len(fs) != 0 {
		t.Errorf("judged at 430 MHz: %+v", fs)
	}
}

// The HF preamp of testdata/circuits: its NF is that of a terminated input
// (above 3 dB: R5 56 ohm across the 50 ohm source alone gives 1 + 50/56) and
// below 10 dB (a 2N3904 at 11 mA, common practice, no published source), so
// 40 m–30 m residential noise (Fam 44.6 dB) hides it.
func TestNoiseFigureQuietOnHF(t *testing.T) {
	src, err := os.ReadFile("../testdata/circuits/preamp-30m.toml")
	if err != nil {
		t.Fatal(err)
	}
	f := biasItem(t, judgeRule(t, rules.NoiseFigure, string(src), nil, false), "", "")
	if f.Measured <= 0 || f.Measured > 10*math.Log10(1+9/math.Pow(10, 4.461)) {
		t.Errorf("rise %g dB, want above 0 and at most that of NF 10 dB", f.Measured)
	}
	msg := f.Message
	t.Log(msg)
	if !strings.Contains(msg, "residential") || !strings.Contains(msg, "R5") {
		t.Errorf("message %q should name the environment and the termination R5", msg)
	}
}

// 1 dB (0.5 dB strict): common practice, no published source.
func TestNoiseFigureThresholds(t *testing.T) {
	d, s := shippedParams(t, "default", "noise.figure")["max_rise_db"], shippedParams(t, "strict", "noise.figure")["max_rise_db"]
	if d != 1 || s != 0.5 {
		t.Errorf("max_rise_db %g [%g], want 1 [0.5]", d, s)
	}
}
