package check

import (
	"os"
	"testing"
	"time"

	"headroom/checker/corners"
	"headroom/checker/engine"
	"headroom/checker/ruleset"
	"headroom/rules"
)

// BenchmarkTankTuningCost checks the shipped 40 m JFET stage with a tuned
// drain transformer (testdata/circuits/cs-tank-40m.toml) in the worst case
// with every rule and with every rule but tank.tuning, in one run, and
// reports the ratio: what judging the tank's loaded resonance (and checking
// its fixes on the whole circuit) adds to a worst-case check.
func BenchmarkTankTuningCost(b *testing.B) {
	src, err := os.ReadFile("../../testdata/circuits/cs-tank-40m.toml")
	if err != nil {
		b.Fatal(err)
	}
	all := rules.All()
	var without []*engine.Rule
	for _, r := range all {
		if r.ID != "tank.tuning" {
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
		res := NewRunner(Options{Rules: list, Set: set, Worst: corners.Worst, Today: "2026-12-02"}).File("cs-tank-40m.toml", src)
		if res.Err != nil {
			b.Fatal(res.Err)
		}
		return time.Since(t0)
	}
	var with, bare time.Duration
	for b.Loop() {
		bare += time1(b, without)
		with += time1(b, all)
	}
	b.ReportMetric(float64(with)/float64(bare), "x-without-tank")
	b.ReportMetric(float64(with-bare)/float64(b.N)/1e6, "ms-added")
}
