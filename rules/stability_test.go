package rules_test

import (
	"regexp"
	"strconv"
	"strings"
	"testing"

	"headroom/checker/engine"
	"headroom/rules"
)

// colpittsSrc is the common-base Colpitts stage of the golden archives
// (testdata/rules/stability.oscillation-fires.txtar: tank 5.279 MHz, loop
// gain about 2.5 with RL 4k7), with room for extra parts.
func colpittsSrc(extra string) string {
	return `[circuit]
name = "colpitts"
band = ["5MHz", "5.5MHz"]
ambient = "25C"

[supplies.vcc]
volts = "12V"

[parts]
R1 = { kind = "resistor", value = "10k", nets = ["vcc", "base"] }
R2 = { kind = "resistor", value = "4k7", nets = ["base", "gnd"] }
CB = { kind = "capacitor", value = "100n", nets = ["base", "gnd"] }
Q1 = { kind = "npn", device = "2N3904", nets = { collector = "coll", base = "BASEPIN", emitter = "emit" } }
RE = { kind = "resistor", value = "6k8", nets = ["emit", "gnd"] }
L1 = { kind = "inductor", value = "1u", resistance = "0.5", nets = ["coll", "vcc"] }
RL = { kind = "resistor", value = "4k7", nets = ["coll", "vcc"] }
C1 = { kind = "capacitor", value = "1n", nets = ["coll", "emit"] }
C2 = { kind = "capacitor", value = "10n", nets = ["emit", "gnd"] }
` + extra
}

// followerSrc is an emitter follower with a 1 nF emitter load fed from a
// 1 µH source inductance (the capacitive-load parasitic, REFERENCES-2 §1.3):
// one port only.
func followerOscSrc(extra string) string {
	return `[circuit]
name = "follower"
band = ["7MHz", "7.3MHz"]
ambient = "25C"

[supplies.vcc]
volts = "12V"

[ports.in]
net = "src"
direction = "in"
impedance = "50"

[parts]
CC = { kind = "capacitor", value = "100n", nets = ["src", "x"] }
L1 = { kind = "inductor", value = "1u", nets = ["x", "base"] }
R1 = { kind = "resistor", value = "10k", nets = ["vcc", "base"] }
R2 = { kind = "resistor", value = "10k", nets = ["base", "gnd"] }
Q1 = { kind = "npn", device = "2N3904", nets = { collector = "vcc", base = "BASEPIN", emitter = "emit" } }
RE = { kind = "resistor", value = "470", nets = ["emit", "gnd"] }
CE = { kind = "capacitor", value = "1n", nets = ["emit", "gnd"] }
` + extra
}

var (
	stopperRe = regexp.MustCompile(`a ([0-9.]+) (k?)ohm base stopper`)
	swampRe   = regexp.MustCompile(`a ([0-9.]+) (k?)ohm swamping resistor across Q1's collector load \S+ \(between nets (\S+) and (\S+)\)`)
)

func failingOne(t *testing.T, fs []engine.Finding) *engine.Finding {
	t.Helper()
	for i := range fs {
		if fs[i].Failing() {
			return &fs[i]
		}
	}
	return nil
}

// withAdvice builds the circuit text the advice describes: a stopper as a
// resistor from the base net to a new pin net, a swamping resistor between
// two nets.
func withStopper(src func(string) string, v string) string {
	return strings.Replace(src(`RX = { kind = "resistor", value = "`+v+`", nets = ["base", "pin"] }`), "BASEPIN", "pin", 1)
}

func withSwampR(src func(string) string, v, a, b string) string {
	return strings.Replace(src(`RX = { kind = "resistor", value = "`+v+`", nets = ["`+a+`", "`+b+`"] }`), "BASEPIN", "base", 1)
}

func half(v string) string {
	f, err := strconv.ParseFloat(v, 64)
	if err != nil {
		panic(err)
	}
	return strconv.FormatFloat(f/2, 'g', -1, 64)
}

// TestOscillationFixesHold: the advice for a growing pole, applied by hand
// (the edit package cannot add a part), removes the growing pole, and so
// does the weaker value the margin asks for (half the stopper, twice the
// swamping resistor). A fact of the trade (REFERENCES-2 §1.5): resistance in
// series with the base, or a resistor across the collector load, damps it.
func TestOscillationFixesHold(t *testing.T) {
	for _, c := range []struct {
		name string
		src  func(string) string
	}{{"colpitts", colpittsSrc}, {"follower", followerOscSrc}} {
		base := strings.Replace(c.src(""), "BASEPIN", "base", 1)
		f := failingOne(t, judgeRule(t, rules.StabilityOscillation, base, nil, false))
		if f == nil {
			t.Fatalf("%s: no growing pole", c.name)
		}
		if f.AtHz <= 0 || !strings.Contains(f.Message, "dB/µs") || !strings.Contains(f.Message, "no rb") {
			t.Errorf("%s: finding %+v", c.name, f)
		}
		tried := 0
		if m := stopperRe.FindStringSubmatch(f.Fix); m != nil {
			tried++
			for _, v := range []string{m[1] + m[2], half(m[1]) + m[2]} {
				if g := failingOne(t, judgeRule(t, rules.StabilityOscillation, withStopper(c.src, v), nil, false)); g != nil {
					t.Errorf("%s: stopper %s leaves %s", c.name, v, g.Message)
				}
			}
		}
		if m := swampRe.FindStringSubmatch(f.Fix); m != nil {
			tried++
			v := m[1] + m[2]
			if g := failingOne(t, judgeRule(t, rules.StabilityOscillation, withSwampR(c.src, v, m[3], m[4]), nil, false)); g != nil {
				t.Errorf("%s: swamp %s leaves %s", c.name, v, g.Message)
			}
		}
		if tried == 0 {
			t.Errorf("%s: no fix offered: %s", c.name, f.Fix)
		}
		t.Logf("%s: %s", c.name, f.Fix)
	}
}

// TestUnconditionalOnePort: with an in port only, μ has no meaning and the
// rule judges Re Z looking into the port over the sweep. The CE stage with
// an inductive collector load shows a negative input resistance; the offered
// fix, applied by hand, makes Re Z ≥ 0 over the whole sweep. The follower
// with a capacitive emitter load shows one too, too large (kilohms a decade
// below fT, −ωT/(ω²·CE)) for any base stopper up to 1 kΩ, and its collector
// sits on the supply: the rule says no stopper or swamping resistor helps.
func TestUnconditionalOnePort(t *testing.T) {
	base := strings.Replace(ceInductiveSrc(""), "BASEPIN", "base", 1)
	f := failingOne(t, judgeRule(t, rules.StabilityUnconditional, base, nil, false))
	if f == nil || f.Unit != "ohm" || f.Part != "in" || f.Measured >= 0 || f.Limit != 0 || f.AtHz <= 0 {
		t.Fatalf("finding %+v", f)
	}
	t.Log(f.Message, f.Fix)
	applied := 0
	if m := stopperRe.FindStringSubmatch(f.Fix); m != nil {
		applied++
		if g := failingOne(t, judgeRule(t, rules.StabilityUnconditional, withStopper(ceInductiveSrc, m[1]+m[2]), nil, false)); g != nil {
			t.Errorf("stopper %s%s leaves %s", m[1], m[2], g.Message)
		}
	}
	if m := swampRe.FindStringSubmatch(f.Fix); m != nil {
		applied++
		if g := failingOne(t, judgeRule(t, rules.StabilityUnconditional, withSwampR(ceInductiveSrc, m[1]+m[2], m[3], m[4]), nil, false)); g != nil {
			t.Errorf("swamp %s%s leaves %s", m[1], m[2], g.Message)
		}
	}
	if applied == 0 {
		t.Errorf("no fix offered: %s", f.Fix)
	}

	f = failingOne(t, judgeRule(t, rules.StabilityUnconditional, strings.Replace(followerOscSrc(""), "BASEPIN", "base", 1), nil, false))
	if f == nil || f.Measured >= 0 || !strings.HasPrefix(f.Fix, "No base stopper") {
		t.Errorf("follower: %+v", f)
	}
}

// ceInductiveSrc is a common-emitter stage with an inductive collector
// load and an in port only: the collector–base capacitance feeds the
// inductive load back as a negative input resistance (REFERENCES-2 §1.3:
// 2N3904 at 10 mA with 1 µH at 14 MHz gives −23.6 Ω at the base with rb 0,
// and a 47 Ω stopper turns it positive).
func ceInductiveSrc(extra string) string {
	return `[circuit]
name = "ce, inductive load"
band = ["14MHz", "14.35MHz"]
ambient = "25C"

[supplies.vcc]
volts = "12V"

[ports.in]
net = "src"
direction = "in"
impedance = "50"

[parts]
C1 = { kind = "capacitor", value = "100n", nets = ["src", "base"] }
R1 = { kind = "resistor", value = "10k", nets = ["vcc", "base"] }
R2 = { kind = "resistor", value = "2k2", nets = ["base", "gnd"] }
Q1 = { kind = "npn", device = "2N3904", nets = { collector = "coll", base = "BASEPIN", emitter = "emit" } }
RE = { kind = "resistor", value = "120", nets = ["emit", "gnd"] }
CE = { kind = "capacitor", value = "100n", nets = ["emit", "gnd"] }
L1 = { kind = "inductor", value = "1u", resistance = "0.2", nets = ["coll", "vcc"] }
` + extra
}
