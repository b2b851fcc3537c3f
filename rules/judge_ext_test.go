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

// Helpers shared by the rules' unit tests: load a circuit written inline,
// run one rule over it with a shipped rule set's parameters (some
// overridden), and return every item it judged, passing or failing, with
// fixes resolved.

// shippedParams returns a shipped rule set's parameters for rule id.
func shippedParams(t testing.TB, set, id string) map[string]float64 {
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

// judgeRule runs rule over the circuit src (TOML) with the default rule
// set's parameters, overridden by over; worst selects the worst-case search.
func judgeRule(t testing.TB, rule *engine.Rule, src string, over map[string]float64, worst bool) []engine.Finding {
	t.Helper()
	c, err := circuit.LoadBytes("test.toml", []byte(src), circuit.Options{})
	if err != nil {
		t.Fatalf("circuit: %v", err)
	}
	params := shippedParams(t, "default", rule.ID)
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
		for _, v := range []float64{fs[i].Measured, fs[i].Limit, fs[i].Absolute} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Errorf("%s %s: a non-finite number in %+v", rule.ID, fs[i].Part, fs[i])
			}
		}
	}
	return fs
}

// within reports whether got lies within rel (a fraction) of want.
func within(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)
}

// contains reports whether s holds every one of subs.
func contains(s string, subs ...string) bool {
	for _, x := range subs {
		if !strings.Contains(s, x) {
			return false
		}
	}
	return true
}

// thermalVoltage is k·T/q with the exact SI 2019 constants (REFERENCES.md
// §3), written here again so that the hand models share nothing with the
// code under test.
func thermalVoltage(tempC float64) float64 {
	return 1.380649e-23 * (tempC + 273.15) / 1.602176634e-19
}
