package check

import (
	"flag"
	"fmt"
	"math"
	"testing"
	"time"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/corners"
	"headroom/checker/corpus"
	"headroom/checker/engine"
	"headroom/checker/ruleset"
	"headroom/checker/topology"
	"headroom/rules"
)

var planFiles = flag.Int("plan.files", 12, "corpus files TestPlanKeepsFindings checks (225: the whole corpus of BenchmarkCorpus)")

// TestPlanKeepsFindings checks the worst-case search's cases, analysed with
// the nominal case's plan (built once, Newton warm from the nominal point:
// analysis.Case.Vary), against the same search analysing every case from
// scratch (analysis.Run): every finding, its case, message and fix must be
// the same, and its figure and limit to the bit. Files of the generated corpus
// (checker/corpus.Mixed), every fix checked on the whole circuit.
func TestPlanKeepsFindings(t *testing.T) {
	files := corpus.Mixed(225)[:*planFiles]
	all := rules.All()
	set, err := (&ruleset.Loader{Rules: all}).Load("default")
	if err != nil {
		t.Fatal(err)
	}
	set.Corners = "worst"
	// cold hands the search a nominal case without a plan, so that every
	// case is analysis.Run's.
	cold := func(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, cfg *engine.Config) ([]engine.Finding, error) {
		bare := &analysis.Case{Circuit: nominal.Circuit, Topo: nominal.Topo, OP: nominal.OP, OPErr: nominal.OPErr, AC: nominal.AC, ACErr: nominal.ACErr}
		return corners.Worst(c, topo, bare, cfg)
	}
	planned := NewRunner(Options{Rules: all, Set: set, Worst: corners.Worst, Today: "2026-12-02"})
	scratch := NewRunner(Options{Rules: all, Set: set, Worst: cold, Today: "2026-12-02"})
	worst := 0.0
	defer func() { t.Logf("largest relative difference of a figure or limit: %.3g", worst) }()
	for i, f := range files {
		name := fmt.Sprintf("gen%03d.toml", i)
		got, want := planned.File(name, f), scratch.File(name, f)
		if (got.Err == nil) != (want.Err == nil) {
			t.Fatalf("%s: error %v, from scratch %v", name, got.Err, want.Err)
		}
		if len(got.Findings) != len(want.Findings) {
			t.Errorf("%s: %d findings, from scratch %d", name, len(got.Findings), len(want.Findings))
			continue
		}
		for j := range got.Findings {
			g, w := &got.Findings[j], &want.Findings[j]
			if a, b := findingText(*g), findingText(*w); a != b || !near(g.Measured, w.Measured) || !near(g.Limit, w.Limit) {
				t.Errorf("%s finding %d:\n got %s (%v, %v)\nwant %s (%v, %v)", name, j, a, g.Measured, g.Limit, b, w.Measured, w.Limit)
			}
			worst = max(worst, rel(g.Measured, w.Measured), rel(g.Limit, w.Limit))
		}
	}
}

func findingText(f engine.Finding) string {
	return fmt.Sprintf("%s %s %s | %s | %s | %s | %v | %s", f.Rule, f.Part, f.Severity, f.Message, f.CornerText, f.Fix, f.Changes, f.Bound)
}

func rel(a, b float64) float64 {
	if a == b {
		return 0
	}
	return math.Abs(a-b) / math.Max(math.Abs(a), math.Abs(b))
}

func near(a, b float64) bool { return a == b }

// BenchmarkPlanWarm measures what Newton's warm start (analysis.WarmStart)
// would save: the worst-case check of the corpus of BenchmarkCorpus, every
// fix checked, with the plan's cold start and with its warm start, the two
// taking turns file by file so that a shared machine's load falls on both;
// warm-x-cold is the ratio of their times. (The warm start is off because it
// moves figures in their last bits; see analysis.WarmStart.)
func BenchmarkPlanWarm(b *testing.B) {
	files := corpus.Mixed(225)
	all := rules.All()
	set, err := (&ruleset.Loader{Rules: all}).Load("default")
	if err != nil {
		b.Fatal(err)
	}
	set.Corners = "worst"
	defer func(was bool) { analysis.WarmStart = was }(analysis.WarmStart)
	var spent [2]time.Duration
	for b.Loop() {
		r := NewRunner(Options{Rules: all, Set: set, Worst: corners.Worst, Today: "2026-12-02"})
		for i, f := range files {
			for k, warm := range []bool{false, true} {
				analysis.WarmStart = warm
				t0 := time.Now()
				if res := r.File(fmt.Sprintf("gen%03d.toml", i), f); res.Err != nil {
					b.Fatal(res.Err)
				}
				spent[k] += time.Since(t0)
			}
		}
	}
	b.ReportMetric(spent[1].Seconds()/spent[0].Seconds(), "warm-x-cold")
	b.ReportMetric(spent[0].Seconds()/float64(b.N)/float64(len(files))*1e3, "cold-ms/file")
}
