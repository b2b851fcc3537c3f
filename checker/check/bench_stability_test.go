package check

import (
	"os"
	"slices"
	"testing"
	"time"

	"headroom/checker/corners"
	"headroom/checker/engine"
	"headroom/checker/ruleset"
	"headroom/rules"
)

// BenchmarkStabilityCost checks the README's example (testdata/circuits/
// preamp-30m.toml) in the worst case with every rule and with every rule but
// the two stability rules, in one run, and reports the ratio: what the
// stability check adds to a worst-case check.
func BenchmarkStabilityCost(b *testing.B) {
	with, bare := ruleCost(b, "stability.oscillation", "stability.unconditional")
	b.ReportMetric(float64(with)/float64(bare), "x-without-stability")
	b.ReportMetric(float64(with-bare)/float64(b.N)/1e6, "ms-added")
}

// BenchmarkNoiseCost is the same for noise.figure (docs/noise.md): what the
// noise analysis at every corner adds to a worst-case check.
func BenchmarkNoiseCost(b *testing.B) {
	with, bare := ruleCost(b, "noise.figure")
	b.ReportMetric(float64(with)/float64(bare), "x-without-noise")
	b.ReportMetric(float64(with-bare)/float64(b.N)/1e6, "ms-added")
}

// ruleCost times the worst-case check of the README's example with every
// rule and with every rule but those named, alternately in one run.
func ruleCost(b *testing.B, leaveOut ...string) (with, bare time.Duration) {
	src, err := os.ReadFile("../../testdata/circuits/preamp-30m.toml")
	if err != nil {
		b.Fatal(err)
	}
	all := rules.All()
	var without []*engine.Rule
	for _, r := range all {
		if !slices.Contains(leaveOut, r.ID) {
			without = append(without, r)
		}
	}
	time1 := func(b *testing.B, list []*engine.Rule) time.Duration {
		set, err := (&ruleset.Loader{Rules: all}).Load("default")
		if err != nil {
			b.Fatal(err)
		}
		set.Corners = "worst"
		t0 := time.Now()
		res := NewRunner(Options{Rules: list, Set: set, Worst: corners.Worst, Today: "2026-12-02"}).File("preamp-30m.toml", src)
		if res.Err != nil {
			b.Fatal(res.Err)
		}
		return time.Since(t0)
	}
	for b.Loop() {
		bare += time1(b, without)
		with += time1(b, all)
	}
	return with, bare
}
