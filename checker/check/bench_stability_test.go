package check

import (
	"os"
	"path/filepath"
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
	ruleCost(b, "../../testdata/circuits/preamp-30m.toml", "x-without-stability", "stability.oscillation", "stability.unconditional")
}

// ruleCost times a worst-case check of the circuit at path with every rule
// and with every rule but those named, in one run, and reports the ratio
// (under metric) and the milliseconds the named rules add.
func ruleCost(b *testing.B, path, metric string, ids ...string) {
	src, err := os.ReadFile(path)
	if err != nil {
		b.Fatal(err)
	}
	all := rules.All()
	var without []*engine.Rule
	for _, r := range all {
		if !slices.Contains(ids, r.ID) {
			without = append(without, r)
		}
	}
	name := filepath.Base(path)
	time1 := func(b *testing.B, list []*engine.Rule) time.Duration {
		set, err := (&ruleset.Loader{Rules: all}).Load("default")
		if err != nil {
			b.Fatal(err)
		}
		set.Corners = "worst"
		t0 := time.Now()
		res := NewRunner(Options{Rules: list, Set: set, Worst: corners.Worst, Today: "2026-12-02"}).File(name, src)
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
	b.ReportMetric(float64(with)/float64(bare), metric)
	b.ReportMetric(float64(with-bare)/float64(b.N)/1e6, "ms-added")
}
