package rules_test

import (
	"math"
	"strings"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/corners"
	"headroom/checker/engine"
	"headroom/checker/ruleset"
	"headroom/rules"
)

// Helpers for the margin rules' unit tests (resistor.power, bjt.*,
// capacitor.voltage): load a circuit written inline, run one rule over it
// with a shipped rule set's parameters (some overridden), and return what
// the rule judged, passing or failing.

// marginParams returns a shipped rule set's parameters for rule id.
func marginParams(t testing.TB, set, id string) map[string]float64 {
	t.Helper()
	s, err := (&ruleset.Loader{Rules: rules.All()}).Load(set)
	if err != nil {
		t.Fatalf("rule set %s: %v", set, err)
	}
	out := map[string]float64{}
	for k, v := range s.Params[id] {
		out[k] = v
	}
	return out
}

// marginJudge runs rule over the circuit src (TOML) with the default rule
// set's parameters, overridden by over; worst selects the worst-case search.
func marginJudge(t testing.TB, rule *engine.Rule, src string, over map[string]float64, worst bool) []engine.Finding {
	t.Helper()
	c, err := circuit.LoadBytes("test.toml", []byte(src), circuit.Options{})
	if err != nil {
		t.Fatalf("circuit: %v", err)
	}
	params := marginParams(t, "default", rule.ID)
	for k, v := range over {
		params[k] = v
	}
	cfg := &engine.Config{Rules: []*engine.Rule{rule}, Severity: map[string]engine.Severity{rule.ID: engine.Warning},
		Params: map[string]map[string]float64{rule.ID: params}, Corners: "nominal"}
	cs := analysis.Run(c, nil)
	var fs []engine.Finding
	if worst {
		cfg.Corners = "worst"
		fs, err = corners.Worst(c, cs.Topo, cs, cfg)
	} else {
		fs, err = engine.Evaluate(cs, nil, cfg)
	}
	if err != nil {
		t.Fatalf("%s: %v", rule.ID, err)
	}
	for i := range fs {
		fs[i].ResolveFix()
	}
	for _, f := range fs {
		for _, v := range []float64{f.Measured, f.Limit, f.Absolute} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Errorf("%s %s: a non-finite number in %+v", rule.ID, f.Part, f)
			}
		}
	}
	return fs
}

// marginFinding returns the one finding about part, failing the test when
// there is none or more than one.
func marginFinding(t testing.TB, fs []engine.Finding, part string) engine.Finding {
	t.Helper()
	var got []engine.Finding
	for _, f := range fs {
		if f.Part == part {
			got = append(got, f)
		}
	}
	if len(got) != 1 {
		t.Fatalf("want one finding about %s, got %d: %+v", part, len(got), fs)
	}
	return got[0]
}

// near reports whether got lies within rel (a fraction) of want.
func near(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)
}

// thermalVoltage is k·T/q with the exact SI constants (REFERENCES.md §3),
// written here again so that the hand models below share nothing with the
// code under test.
func thermalVoltage(tempC float64) float64 {
	return 1.380649e-23 * (tempC + 273.15) / 1.602176634e-19
}

// followerPoint is an independent solution of FORMAT.md §6's model for one
// NPN whose base is held at vb by an ideal source and whose emitter returns
// to gnd through re, collector well above its base (VBC reverse-biased, so
// its Ebers–Moll terms are a few IS and are dropped). IS = ic_ref/e^(VBEref/VT)
// with VBEref = vbe − 2 mV/°C·(T − 25); IB = IC/βF; vb = VBE + (IC + IB)·re.
// Solved by bisection on IC.
func followerPoint(vb, re, vbe, icRef, beta, tempC float64) (ic, ib, vbeOut float64) {
	vt := thermalVoltage(tempC)
	is := icRef / math.Exp((vbe-0.002*(tempC-25))/vt)
	lo, hi := 0.0, vb/re
	for i := 0; i < 200; i++ {
		ic = (lo + hi) / 2
		v := vt*math.Log(ic/is+1) + ic*(1+1/beta)*re
		if v > vb {
			hi = ic
		} else {
			lo = ic
		}
	}
	return ic, ic / beta, vt * math.Log(ic/is+1)
}

func hasAll(s string, subs ...string) bool {
	for _, x := range subs {
		if !strings.Contains(s, x) {
			return false
		}
	}
	return true
}

// Every rule of the group documents itself fully (explain prints these): a
// lowercase title without a period, why, the formula, a source, the fix,
// and help for each parameter.
func TestMarginRuleDocs(t *testing.T) {
	for _, r := range []*engine.Rule{rules.ResistorPower, rules.BJTDissipation, rules.BJTCurrent, rules.BJTVoltage,
		rules.CapacitorVoltage, rules.BJTFtHeadroom} {
		d := r.Doc
		if d.Title == "" || strings.ToLower(d.Title[:1]) != d.Title[:1] || strings.HasSuffix(d.Title, ".") {
			t.Errorf("%s: title %q", r.ID, d.Title)
		}
		if d.Why == "" || d.Formula == "" || d.Source == "" || d.Fix == "" || r.Run == nil {
			t.Errorf("%s: incomplete doc", r.ID)
		}
		if !strings.Contains(d.Source, "common practice") && !strings.Contains(d.Source, "IEC") {
			t.Errorf("%s: source %q names neither a standard nor common practice", r.ID, d.Source)
		}
		for _, p := range d.Params {
			if p.Help == "" {
				t.Errorf("%s: parameter %s has no help", r.ID, p.Name)
			}
		}
	}
}
