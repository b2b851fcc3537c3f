package rules_test

import (
	"math"
	"strings"
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/rules"
)

// swingStage is a 40 m common-emitter stage (the circuit of
// testdata/rules/signal.swing-clean.txtar) with the emitter resistor re
// unbypassed.
func swingStage(re, level string) string {
	lv := ""
	if level != "" {
		lv = `max_level = "` + level + `"`
	}
	return `[circuit]
name = "test fixture"
band = ["7MHz", "7.2MHz"]
` + lv + `
[supplies.vcc]
volts = "12V"

[ports.in]
net = "rf_in"
direction = "in"

[ports.out]
net = "rf_out"
direction = "out"

[parts.C1]
kind = "capacitor"
value = "100n"
nets = ["rf_in", "base"]

[parts.R1]
kind = "resistor"
value = "10k"
nets = ["vcc", "base"]

[parts.R2]
kind = "resistor"
value = "2k2"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.RE]
kind = "resistor"
value = "` + re + `"
nets = ["emit", "gnd"]

[parts.RC]
kind = "resistor"
value = "470"
nets = ["vcc", "coll"]

[parts.C2]
kind = "capacitor"
value = "100n"
nets = ["coll", "rf_out"]
`
}

// The class-A cut-off limit by hand: with the base following the in net
// and the base current ignored, the emitter current swings IC when the base
// swings VT·(1 + gm·RE); that peak across the 50 ohm port is the level
// (standard small-signal analysis, common practice). The operating point
// comes from checker/dc.
func TestSignalSwingCutOffByHand(t *testing.T) {
	for _, re := range []string{"470", "220"} {
		src := swingStage(re, "-10dBm")
		c, err := circuit.LoadBytes("t.toml", []byte(src), circuit.Options{})
		if err != nil {
			t.Fatal(err)
		}
		op, err := dc.Solve(c)
		if err != nil {
			t.Fatal(err)
		}
		q := op.BJTs["Q1"]
		v := op.VT + q.ICf*c.Part("RE").Value
		want := 10 * math.Log10(v*v/100/1e-3)
		f := biasItem(t, judgeRule(t, rules.SignalSwing, src, nil, false), "Q1", "")
		if math.Abs(f.Measured-want) > 0.2 || f.Limit != -10 || f.Comparison != ">=" {
			t.Errorf("RE %s: %.3f dBm against %g, want %.3f by hand", re, f.Measured, f.Limit, want)
		}
	}
}

// Without max_level nothing is judged.
func TestSignalSwingNeedsALevel(t *testing.T) {
	if fs := judgeRule(t, rules.SignalSwing, swingStage("470", ""), nil, false); len(fs) != 0 {
		t.Errorf("judged without max_level: %+v", fs)
	}
}

// A bypassed emitter: the junction takes the whole drive and cuts off at
// about VT peak, −21.8 dBm; the advice says more current alone does not help.
func TestSignalSwingBypassedAdvice(t *testing.T) {
	src := swingStage("470", "-10dBm") + `
[parts.CE]
kind = "capacitor"
value = "1u"
nets = ["emit", "gnd"]
role = "bypass"
`
	f := biasItem(t, judgeRule(t, rules.SignalSwing, src, nil, false), "Q1", "")
	if math.Abs(f.Measured+21.8) > 0.3 || !strings.Contains(f.Fix, "does not help") {
		t.Errorf("%.2f dBm, fix %q", f.Measured, f.Fix)
	}
}

// min_vce 0.3 V (as bias.region) and 1 V strict: common practice, no
// published source.
func TestSignalSwingThresholds(t *testing.T) {
	d, s := shippedParams(t, "default", "signal.swing")["min_vce"], shippedParams(t, "strict", "signal.swing")["min_vce"]
	if d != 0.3 || s != 1 {
		t.Errorf("min_vce %g [%g], want 0.3 [1]", d, s)
	}
}

// A level of 100 mW or more carries the RF-power caution.
func TestSignalSwingCaution(t *testing.T) {
	f := biasItem(t, judgeRule(t, rules.SignalSwing, swingStage("470", "+23dBm"), nil, false), "Q1", "")
	if !strings.Contains(f.Message, "RF power") {
		t.Errorf("message %q has no RF-power caution", f.Message)
	}
	g := biasItem(t, judgeRule(t, rules.SignalSwing, swingStage("470", "+3dBm"), nil, false), "Q1", "")
	if strings.Contains(g.Message, "RF power") {
		t.Errorf("message %q cautions at +3 dBm", g.Message)
	}
}
