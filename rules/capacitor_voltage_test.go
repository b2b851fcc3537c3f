package rules_test

import (
	"testing"

	"headroom/rules"
)

// The shipped thresholds: 50 % of the rated voltage by default and 40 %
// strict, as strict as or stricter than published reliability derating
// guidance (NASA EEE-INST-002 ceramic capacitors 60 %, values from memory, not
// confirmed; REFERENCES.md §5.3).
func TestCapacitorVoltageThresholdsMatchSources(t *testing.T) {
	const eee = 0.6
	if v := shippedParams(t, "default", "capacitor.voltage")["max_load"]; v != 0.5 || v > eee {
		t.Errorf("default max_load %g, want 0.5", v)
	}
	if v := shippedParams(t, "strict", "capacitor.voltage")["max_load"]; v != 0.4 {
		t.Errorf("strict max_load %g, want 0.4", v)
	}
}

// Closed form: a capacitor from a divider's midpoint to gnd holds
// 12·R2/(R1 + R2); only rated capacitors are judged.
func TestCapacitorVoltageClosedForm(t *testing.T) {
	src := `
[circuit]
name = "20 m bias filter"
band = ["14MHz", "14.35MHz"]
[supplies.vcc]
volts = "12V"
[parts.R1]
kind = "resistor"
value = "2k2"
nets = ["vcc", "mid"]
[parts.R2]
kind = "resistor"
value = "10k"
nets = ["mid", "gnd"]
[parts.C1]
kind = "capacitor"
value = "100n"
nets = ["mid", "gnd"]
rating = "16V"
[parts.C2]
kind = "capacitor"
value = "100n"
nets = ["vcc", "gnd"]
`
	fs := judgeRule(t, rules.CapacitorVoltage, src, nil, false)
	f := marginFinding(t, fs, "C1")
	want := 12 * 10000.0 / 12200 / 16 // 9.836 V on 16 V: 61.5 %
	if !within(f.Measured, want, 0.005) || f.Absolute != f.Measured {
		t.Errorf("load %g, closed form %g", f.Measured, want)
	}
	// 9.836/0.5 = 19.7 V: the next standard rating is 25 V.
	if len(f.Changes) != 1 || f.Changes[0].Key != "rating" || f.Changes[0].To != "25V" {
		t.Errorf("fix %q %+v", f.Fix, f.Changes)
	}
	for _, g := range fs {
		if g.Part == "C2" {
			t.Errorf("an unrated capacitor was judged: %+v", g)
		}
	}
}
