package rules_test

import (
	"fmt"
	"strings"
	"testing"

	"headroom/rules"
)

// The shipped thresholds against what they encode: the IEC 60115-1 curve of
// leaded metal-film and thick-film chip resistors (full rating to a rated
// ambient of 70 °C, zero at the 155 °C upper category temperature;
// REFERENCES.md §4), and a load as strict as or stricter than published
// reliability derating guidance (NASA EEE-INST-002 film resistors 60 %,
// values from memory, not confirmed; REFERENCES.md §5.3).
func TestResistorPowerThresholdsMatchSources(t *testing.T) {
	def := shippedParams(t, "default", "resistor.power")
	strict := shippedParams(t, "strict", "resistor.power")
	if def["knee"] != 70 || def["zero"] != 155 {
		t.Errorf("curve %g → %g °C, want IEC 60115-1's 70 → 155 °C", def["knee"], def["zero"])
	}
	if def["default_rating"] != 0.25 {
		t.Errorf("default_rating %g W, want the common 1/4 W part (RULES.md)", def["default_rating"])
	}
	const eee = 0.6 // film resistors, EEE-INST-002 [M]
	if def["max_load"] != 0.5 || def["max_load"] > eee {
		t.Errorf("default max_load %g, want 0.5, no looser than %g", def["max_load"], eee)
	}
	if strict["max_load"] != 0.4 {
		t.Errorf("strict max_load %g, want 0.4", strict["max_load"])
	}
}

// A resistor straight across an ideal supply dissipates V²/R exactly, so the
// metric has a closed form: V²/R ÷ (rating × derating), with the derating of
// the IEC 60115-1 line (REFERENCES.md §4: 0.25 W is 0.2059 W at 85 °C and
// 0.1618 W at 100 °C).
func TestResistorPowerClosedForm(t *testing.T) {
	for _, c := range []struct {
		ambient, derated float64
	}{{25, 0.25}, {85, 0.2059}, {100, 0.1618}, {125, 0.0882}} {
		src := fmt.Sprintf(`
[circuit]
name = "15 m preamp bleeder at %g C"
band = ["21MHz", "21.45MHz"]
ambient = "%gC"
[supplies.vcc]
volts = "12V"
[parts.C9]
kind = "capacitor"
value = "10u"
nets = ["vcc", "gnd"]
[parts.R9]
kind = "resistor"
value = "1k5"
nets = ["vcc", "gnd"]
rating = "0.25W"
`, c.ambient, c.ambient)
		f := marginFinding(t, judgeRule(t, rules.ResistorPower, src, nil, false), "R9")
		want := 12.0 * 12 / 1500 / c.derated
		if !f.HasMetric || !within(f.Measured, want, 0.005) {
			t.Errorf("%g °C: load %g, closed form %g", c.ambient, f.Measured, want)
		}
		if f.Absolute != f.Measured || f.Limit != 0.5 || f.Comparison != "<=" || f.Unit != "fraction" {
			t.Errorf("%g °C: finding %+v", c.ambient, f)
		}
	}
}

// Past the absolute rating the finding must carry Absolute > 1 (the engine
// then makes it an error), say the part may run hot, and name the next
// standard rating; beyond 10 W it names the exact rating and changes nothing.
func TestResistorPowerOverloadAndFix(t *testing.T) {
	src := func(ohms, rating string) string {
		return `
[circuit]
name = "6 m transverter sequencer load"
band = ["50MHz", "54MHz"]
[supplies.vcc]
volts = "12V"
[parts.R9]
kind = "resistor"
value = "` + ohms + `"
nets = ["vcc", "gnd"]
rating = "` + rating + `"
`
	}
	// 12²/100 = 1.44 W on 1 W: 144 %; needs 2.88 W → 3 W (48 %).
	f := marginFinding(t, judgeRule(t, rules.ResistorPower, src("100", "1W"), nil, false), "R9")
	if !within(f.Absolute, 1.44, 0.005) || !strings.Contains(f.Message, "may run hot") {
		t.Errorf("overload: %+v", f)
	}
	if len(f.Changes) != 1 || f.Changes[0].Key != "rating" || f.Changes[0].To != "3W" {
		t.Errorf("fix %q %+v, want rating 3W", f.Fix, f.Changes)
	}
	// 12²/10 = 14.4 W: 28.8 W needed, beyond the standard ratings.
	f = marginFinding(t, judgeRule(t, rules.ResistorPower, src("10", "5W"), nil, false), "R9")
	if len(f.Changes) != 0 || !contains(f.Fix, "no standard rating", "28.8 W") {
		t.Errorf("beyond 10 W: fix %q %+v", f.Fix, f.Changes)
	}
	// 12²/4700 = 30.6 mW on 0.25 W: 12 %, passes, and no fix is computed.
	f = marginFinding(t, judgeRule(t, rules.ResistorPower, src("4k7", "0.25W"), nil, false), "R9")
	if !within(f.Measured, 144.0/4700/0.25, 0.005) || f.Fix != "" || f.Absolute > 1 {
		t.Errorf("passing: %+v", f)
	}
}

// A resistor with no rating is judged against default_rating, and the
// message says so.
func TestResistorPowerDefaultRating(t *testing.T) {
	src := `
[circuit]
name = "30 m preamp dropper"
band = ["10.1MHz", "10.15MHz"]
[supplies.vcc]
volts = "12V"
[parts.R1]
kind = "resistor"
value = "680"
nets = ["vcc", "gnd"]
`
	f := marginFinding(t, judgeRule(t, rules.ResistorPower, src, nil, false), "R1")
	// 144/680 = 0.2118 W on the default 0.25 W: 84.7 %.
	if !within(f.Measured, 144.0/680/0.25, 0.005) || !strings.Contains(f.Message, "default_rating") {
		t.Errorf("%+v", f)
	}
	f = marginFinding(t, judgeRule(t, rules.ResistorPower, src, map[string]float64{"default_rating": 1}, false), "R1")
	if !within(f.Measured, 144.0/680/1, 0.005) {
		t.Errorf("default_rating 1 W: load %g", f.Measured)
	}
}

// A potentiometer's sections are rated by their share of the track: a
// rheostat at setting 0.9 carries all its current in the 10 % a–wiper
// section. Closed form: I = 12/(100 + 470), P = I²·100, rating 0.25 W·0.1.
func TestResistorPowerPotentiometerSection(t *testing.T) {
	src := `
[circuit]
name = "80 m preamp supply trimmer"
band = ["3.5MHz", "3.8MHz"]
[supplies.vcc]
volts = "12V"
[parts.RV1]
kind = "potentiometer"
value = "1k"
nets = { a = "vcc", wiper = "vstage", b = "vstage" }
setting = 0.9
rating = "0.25W"
[parts.R6]
kind = "resistor"
value = "470"
nets = ["vstage", "gnd"]
rating = "2W"
`
	f := marginFinding(t, judgeRule(t, rules.ResistorPower, src, nil, false), "RV1")
	i := 12.0 / 570
	want := i * i * 100 / (0.25 * 0.1)
	if !within(f.Measured, want, 0.005) || !strings.Contains(f.Message, "a–wiper") {
		t.Errorf("load %g, closed form %g: %s", f.Measured, want, f.Message)
	}
	// The whole-part view would see 44 mW of 250 mW (18 %) and pass: the
	// section share is what makes it fail.
	if f.Measured < 1 {
		t.Errorf("the 10 %% section should be overloaded, got %g", f.Measured)
	}
}

// At or beyond the zero point of the curve there is no rating left: the
// finding has no metric and Absolute 2, so it is always an error (FORMAT.md §6).
func TestResistorPowerZeroPoint(t *testing.T) {
	for _, amb := range []string{"155C", "170C"} {
		src := `
[circuit]
name = "2 m preamp in the oven"
band = ["144MHz", "146MHz"]
ambient = "` + amb + `"
[supplies.vcc]
volts = "12V"
[parts.R1]
kind = "resistor"
value = "2k2"
nets = ["vcc", "gnd"]
rating = "0.25W"
`
		f := marginFinding(t, judgeRule(t, rules.ResistorPower, src, nil, false), "R1")
		if f.HasMetric || f.Absolute != 2 || !strings.Contains(f.Message, "rating is zero") {
			t.Errorf("%s: %+v", amb, f)
		}
	}
}

// With an ambient range the worst case is the hot end: nominal passes, the
// corner (13.8 V, R -5 %, 85 °C) fails. Closed form 13.8²/1425 ÷ (0.25·70/85).
func TestResistorPowerWorstCaseAmbient(t *testing.T) {
	src := `
[circuit]
name = "15 m mast-head preamp bleeder"
band = ["21MHz", "21.45MHz"]
ambient = ["-10C", "85C"]
[supplies.vcc]
volts = "12V"
range = ["11V", "13.8V"]
[parts.R5]
kind = "resistor"
value = "1k5"
nets = ["vcc", "gnd"]
rating = "0.25W"
`
	nom := marginFinding(t, judgeRule(t, rules.ResistorPower, src, nil, false), "R5")
	if !within(nom.Measured, 144.0/1500/0.25, 0.005) {
		t.Errorf("nominal %g", nom.Measured)
	}
	w := marginFinding(t, judgeRule(t, rules.ResistorPower, src, nil, true), "R5")
	want := 13.8 * 13.8 / 1425 / (0.25 * 70 / 85)
	if !within(w.Measured, want, 0.005) || w.Corner["ambient"] != 85 || w.Corner["vcc"] != 13.8 {
		t.Errorf("worst %g at %v, want %g at 85 °C, 13.8 V", w.Measured, w.Corner, want)
	}
}
