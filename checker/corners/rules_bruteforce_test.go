package corners

import (
	"math"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/ruleset"
	"headroom/checker/topology"
	"headroom/rules"
)

// TestCatalogueMatchesBruteForce drives every rule of the catalogue through
// the search on the shipped example circuits and compares each judged item
// with a brute-force walk over every vertex of the box (FORMAT.md §6: the
// reference result is the worst vertex). Items whose metric is not monotonic
// in every parameter may legitimately differ; they are listed, with why, in
// nonMonotonic, and for them the search must still never report a case better
// than nominal.
func TestCatalogueMatchesBruteForce(t *testing.T) {
	if testing.Short() {
		t.Skip("brute force over every vertex")
	}
	cfg := defaultConfig(t)
	for _, name := range []string{"preamp-30m.toml", "buffer-20m.toml", "pnp-160m.toml", "cg-preamp-6m.toml", "dualgate-if-10m7.toml", "cs-tank-40m.toml"} {
		t.Run(name, func(t *testing.T) {
			c, err := circuit.Load("../../testdata/circuits/"+name, circuit.Options{})
			if err != nil {
				t.Fatal(err)
			}
			if n := len(Box(c)); n > 12 {
				// Keep the brute force to 2^12 vertices: freeze the last parameters.
				freeze(c, n-12)
			}
			topo := topology.Analyze(c)
			nominal := analysis.Run(c, topo)
			got, err := Worst(c, topo, nominal, cfg)
			if err != nil {
				t.Fatal(err)
			}
			want := bruteForce(t, c, cfg)
			nom, _ := engine.Evaluate(nominal, nominal, cfg)
			nomBy := map[engine.Key]engine.Finding{}
			for _, f := range nom {
				nomBy[engine.KeyOf(&f)] = f
			}
			for _, f := range got {
				k := engine.KeyOf(&f)
				w, ok := want[k]
				if !ok || !f.HasMetric {
					continue
				}
				if n, ok := nomBy[k]; ok && engine.Worse(&n, &f) {
					t.Errorf("%s %s: the search reports a case better than nominal", f.Rule, f.Part)
				}
				if closeTo(f, w) {
					continue
				}
				if why, ok := nonMonotonic[f.Rule]; ok {
					t.Logf("%s %s %s: search %g, brute force %g (not monotonic: %s)", f.Rule, f.Part, f.Bound, f.Measured, w.Measured, why)
					continue
				}
				t.Errorf("%s %s %s: search %g (limit %g) at %s; brute force %g (limit %g)", f.Rule, f.Part, f.Bound,
					f.Measured, f.Limit, f.CornerText, w.Measured, w.Limit)
			}
		})
	}
}

// nonMonotonic names the rules whose metric can peak inside the box.
var nonMonotonic = map[string]string{
	"match.input":             "return loss peaks where the input impedance passes through the source impedance",
	"winding.reactance":       "the loaded winding is chosen afresh in each case",
	"stability.oscillation":   "the least-damped pole is chosen afresh in each case, and which pole it is switches inside the box",
	"stability.unconditional": "the least μ over the sweep moves in frequency as values move",
	"decoupling.reactance":    "judged only where the net is not already stiff",
}

// closeTo compares two judgements of one item within 1 %: the measured values,
// or for a metric that sits near zero (bias.drift at a mild corner), the
// adverse ratios measured ÷ limit.
func closeTo(a, b engine.Finding) bool {
	if math.Abs(a.Measured-b.Measured) <= 0.01*math.Max(math.Abs(a.Measured), math.Abs(b.Measured)) {
		return true
	}
	ra, rb := a.Measured/a.Limit, b.Measured/b.Limit
	return math.Abs(ra-rb) <= 0.01
}

// freeze sets the tolerance of the last n toleranced parts to zero.
func freeze(c *circuit.Circuit, n int) {
	for i := len(c.Parts) - 1; i >= 0 && n > 0; i-- {
		p := c.Parts[i]
		if p.Tolerance > 0 && (p.Kind == circuit.Resistor || p.Kind == circuit.Capacitor) {
			p.Tolerance = 0
			n--
		}
	}
}

// defaultConfig is the shipped default rule set over every rule.
func defaultConfig(t *testing.T) *engine.Config {
	all := rules.All()
	set, err := (&ruleset.Loader{Rules: all}).Load("default")
	if err != nil {
		t.Fatal(err)
	}
	return set.Config(all)
}
