package rules_test

import (
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"headroom/checker/engine"
	"headroom/rules"
)

// stabStage returns a filler for a circuit template of testdata/stability
// (shared with checker/poles): the net Q1's base pin is on, and extra parts.
func stabStage(t *testing.T, name string) func(base, extra string) string {
	b, err := os.ReadFile("../testdata/stability/" + name + ".toml.in")
	if err != nil {
		t.Fatal(err)
	}
	return func(base, extra string) string {
		return strings.NewReplacer("{{BASE}}", base, "{{EXTRA}}", extra, "{{FEEDBACK}}", "emit", "{{RLOAD}}", "4k7").Replace(string(b))
	}
}

var (
	stopperRe = regexp.MustCompile(`an? ([0-9.]+) (k?)ohm base stopper`)
	swampRe   = regexp.MustCompile(`an? ([0-9.]+) (k?)ohm swamping resistor across Q1's collector load \S+ \(between nets (\S+) and (\S+)\)`)
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
func withStopper(src func(string, string) string, v string) string {
	return src("pin", `RX = { kind = "resistor", value = "`+v+`", nets = ["base", "pin"] }`)
}

func withSwampR(src func(string, string) string, v, a, b string) string {
	return src("base", `RX = { kind = "resistor", value = "`+v+`", nets = ["`+a+`", "`+b+`"] }`)
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
// swamping resistor). The library gives the 2N3904 an rb, so no finding
// carries the no-rb note. A fact of the trade (REFERENCES-2 §1.5): resistance in
// series with the base, or a resistor across the collector load, damps it.
func TestOscillationFixesHold(t *testing.T) {
	for _, c := range []struct {
		name string
		src  func(string, string) string
	}{{"colpitts", stabStage(t, "colpitts")}, {"follower", stabStage(t, "follower")}} {
		base := c.src("base", "")
		f := failingOne(t, judgeRule(t, rules.StabilityOscillation, base, nil, false))
		if f == nil {
			t.Fatalf("%s: no growing pole", c.name)
		}
		if f.AtHz <= 0 || !strings.Contains(f.Message, "dB/µs") || strings.Contains(f.Message, "no rb") {
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
	ce := stabStage(t, "ce-inductive")
	base := ce("base", "")
	f := failingOne(t, judgeRule(t, rules.StabilityUnconditional, base, nil, false))
	if f == nil || f.Unit != "ohm" || f.Part != "in" || f.Measured >= 0 || f.Limit != 0 || f.AtHz <= 0 {
		t.Fatalf("finding %+v", f)
	}
	t.Log(f.Message, f.Fix)
	applied := 0
	if m := stopperRe.FindStringSubmatch(f.Fix); m != nil {
		applied++
		if g := failingOne(t, judgeRule(t, rules.StabilityUnconditional, withStopper(ce, m[1]+m[2]), nil, false)); g != nil {
			t.Errorf("stopper %s%s leaves %s", m[1], m[2], g.Message)
		}
	}
	if m := swampRe.FindStringSubmatch(f.Fix); m != nil {
		applied++
		if g := failingOne(t, judgeRule(t, rules.StabilityUnconditional, withSwampR(ce, m[1]+m[2], m[3], m[4]), nil, false)); g != nil {
			t.Errorf("swamp %s%s leaves %s", m[1], m[2], g.Message)
		}
	}
	if applied == 0 {
		t.Errorf("no fix offered: %s", f.Fix)
	}

	f = failingOne(t, judgeRule(t, rules.StabilityUnconditional, stabStage(t, "follower")("base", ""), nil, false))
	if f == nil || f.Measured >= 0 || !strings.HasPrefix(f.Fix, "No base stopper") {
		t.Errorf("follower: %+v", f)
	}
}
