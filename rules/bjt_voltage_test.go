package rules_test

import (
	"fmt"
	"strings"
	"testing"

	"headroom/rules"
)

// The shipped thresholds: 75 % of VCEO by default (equal to NASA
// EEE-INST-002's small-signal transistor voltage figure, values from memory,
// not confirmed; REFERENCES.md §5.3), 60 % strict, and an inductively fed
// collector peaking at twice the supply: a choke or winding carries no DC
// voltage on average, so the collector swings symmetrically about the supply,
// up to about 2 × VCC at full swing (the textbook choke-fed amplifier; from
// memory, no page cited).
func TestBJTVoltageThresholdsMatchSources(t *testing.T) {
	def := shippedParams(t, "default", "bjt.voltage")
	if def["max_load"] != 0.75 || def["inductive_swing"] != 2 {
		t.Errorf("default %v, want max_load 0.75, inductive_swing 2", def)
	}
	if v := shippedParams(t, "strict", "bjt.voltage")["max_load"]; v != 0.6 {
		t.Errorf("strict max_load %g, want 0.6", v)
	}
}

// stageSrc is a common-emitter stage on vcc whose collector is fed by feed:
// an inductor, a transformer winding or a resistor.
func stageSrc(name, vcc, device, feed string) string {
	return fmt.Sprintf(`
[circuit]
name = %q
band = ["14MHz", "14.35MHz"]
[supplies.vcc]
volts = %q
[parts.R1]
kind = "resistor"
value = "6k8"
nets = ["vcc", "base"]
[parts.R2]
kind = "resistor"
value = "1k5"
nets = ["base", "gnd"]
[parts.Q1]
kind = "npn"
device = %q
nets = { collector = "coll", base = "base", emitter = "emit" }
[parts.R3]
kind = "resistor"
value = "120"
nets = ["emit", "gnd"]
%s
`, name, vcc, device, feed)
}

const (
	chokeFeed = `[parts.L1]
kind = "inductor"
value = "22u"
nets = ["vcc", "coll"]`
	resistorFeed = `[parts.R4]
kind = "resistor"
value = "330"
nets = ["vcc", "coll"]`
	windingFeed = `[parts.T1]
kind = "transformer"
al = "360nH"
windings.primary = { turns = 10, nets = ["vcc", "coll"] }
windings.secondary = { turns = 3, nets = ["out", "gnd"] }
[parts.R5]
kind = "resistor"
value = "50"
nets = ["out", "gnd"]`
)

// Closed forms: a resistive feed peaks at the supply span, an inductor or a
// winding in the feed at inductive_swing times it; the escalation uses the
// DC span alone.
func TestBJTVoltageClosedForm(t *testing.T) {
	for _, c := range []struct {
		name, vcc, device, feed string
		load, absolute          float64
	}{
		{"resistor-fed 2N3904", "12V", "2N3904", resistorFeed, 12.0 / 40, 12.0 / 40},
		{"choke-fed 2N3904", "12V", "2N3904", chokeFeed, 24.0 / 40, 12.0 / 40},
		{"transformer-fed 2N3904", "12V", "2N3904", windingFeed, 24.0 / 40, 12.0 / 40},
		{"choke-fed 2N5179", "13.8V", "2N5179", chokeFeed, 27.6 / 12, 13.8 / 12},
	} {
		f := marginFinding(t, judgeRule(t, rules.BJTVoltage, stageSrc(c.name, c.vcc, c.device, c.feed), nil, false), "Q1")
		if !within(f.Measured, c.load, 1e-9) || !within(f.Absolute, c.absolute, 1e-9) {
			t.Errorf("%s: load %g (abs %g), want %g (abs %g)", c.name, f.Measured, f.Absolute, c.load, c.absolute)
		}
		if (c.absolute > 1) != strings.Contains(f.Message, "may break down") {
			t.Errorf("%s: message %q", c.name, f.Message)
		}
	}
}

// A PNP's span runs from its return rail (the supply its emitter resistor
// reaches) to its feed rail (gnd, through its collector load).
func TestBJTVoltagePNP(t *testing.T) {
	src := `
[circuit]
name = "160 m PNP stage"
band = ["1.8MHz", "2MHz"]
[supplies.vcc]
volts = "12V"
[parts.R1]
kind = "resistor"
value = "4k7"
nets = ["vcc", "b1"]
[parts.R2]
kind = "resistor"
value = "10k"
nets = ["b1", "gnd"]
[parts.Q1]
kind = "pnp"
device = "2N3906"
nets = { collector = "c1", base = "b1", emitter = "e1" }
[parts.R3]
kind = "resistor"
value = "1k"
nets = ["vcc", "e1"]
[parts.L4]
kind = "inductor"
value = "100u"
nets = ["c1", "gnd"]
`
	f := marginFinding(t, judgeRule(t, rules.BJTVoltage, src, nil, false), "Q1")
	if !within(f.Measured, 24.0/40, 1e-9) || !strings.Contains(f.Message, "from gnd to vcc") {
		t.Errorf("PNP choke to gnd: %g, %q", f.Measured, f.Message)
	}
}

// The span follows the supply at the case judged: with a range to 16 V the
// worst case is 2 × 16/40.
func TestBJTVoltageWorstCaseSupply(t *testing.T) {
	src := strings.Replace(stageSrc("80 m preamp on a station supply", "13.8V", "2N3904", chokeFeed),
		`volts = "13.8V"`, `volts = "13.8V"`+"\n"+`range = ["12V", "16V"]`, 1)
	f := marginFinding(t, judgeRule(t, rules.BJTVoltage, src, nil, true), "Q1")
	if !within(f.Measured, 32.0/40, 1e-9) || f.Corner["vcc"] != 16 || len(f.Corner) != 1 {
		t.Errorf("worst %g at %v, want 0.8 at vcc 16 V alone", f.Measured, f.Corner)
	}
	if len(f.Changes) != 0 {
		// At 14 MHz the BC547B (the one shipped NPN with VCEO > 42.7 V) has too
		// little ft (100 MHz < 10 × 14.35 MHz), so the fix is advice.
		t.Errorf("want advice, got %+v", f.Changes)
	}
	if !strings.Contains(f.Fix, "VCEO of at least 42.7 V") {
		t.Errorf("fix %q", f.Fix)
	}
}
