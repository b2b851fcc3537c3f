package check

import (
	"fmt"
	"testing"
	"time"

	"github.com/BurntSushi/toml"

	"headroom/checker/corners"
	"headroom/checker/corpus"
	"headroom/checker/ruleset"
	"headroom/rules"
)

// BenchmarkCheckFolder checks 200 generated circuit files per iteration and
// reports files per second and how many times slower that is than merely
// decoding the same TOML.
func BenchmarkCheckFolder(b *testing.B) {
	files := corpus.Preamps(200)
	all := rules.All()
	for _, mode := range []string{"nominal", "worst"} {
		b.Run(mode, func(b *testing.B) {
			set, err := (&ruleset.Loader{Rules: all}).Load("default")
			if err != nil {
				b.Fatal(err)
			}
			set.Corners = mode
			start := time.Now()
			for range 5 {
				for _, f := range files {
					var m map[string]any
					toml.Decode(string(f), &m)
				}
			}
			decode := time.Since(start) / 5
			var checked time.Duration
			for b.Loop() {
				t0 := time.Now()
				r := NewRunner(Options{Rules: all, Set: set, Worst: corners.Worst, Today: "2026-12-02"})
				for i, f := range files {
					if res := r.File(fmt.Sprintf("gen%03d.toml", i), f); res.Err != nil {
						b.Fatal(res.Err)
					}
				}
				checked += time.Since(t0)
			}
			per := checked / time.Duration(b.N)
			b.ReportMetric(float64(len(files))/per.Seconds(), "files/s")
			b.ReportMetric(per.Seconds()/decode.Seconds(), "x-decode")
		})
	}
}

// BenchmarkFixCheck measures what the whole-circuit check of every fix
// costs: the same 40 generated files checked with it and without it in one
// run, reported as a ratio (x-unchecked) and as fixes checked per file.
func BenchmarkFixCheck(b *testing.B) {
	files := corpus.Preamps(40)
	all := rules.All()
	for _, mode := range []string{"nominal", "worst"} {
		b.Run(mode, func(b *testing.B) {
			set, err := (&ruleset.Loader{Rules: all}).Load("default")
			if err != nil {
				b.Fatal(err)
			}
			set.Corners = mode
			run := func(skip bool) (time.Duration, int) {
				t0 := time.Now()
				r := NewRunner(Options{Rules: all, Set: set, Worst: corners.Worst, Today: "2026-12-02", NoFixCheck: skip})
				fixes := 0
				for i, f := range files {
					res := r.File(fmt.Sprintf("gen%03d.toml", i), f)
					if res.Err != nil {
						b.Fatal(res.Err)
					}
					for _, g := range res.Findings {
						if g.Fix != "" {
							fixes++
						}
					}
				}
				return time.Since(t0), fixes
			}
			var with, without time.Duration
			fixes := 0
			for b.Loop() {
				d, n := run(false)
				with += d
				fixes = n
				d, _ = run(true)
				without += d
			}
			b.ReportMetric(with.Seconds()/without.Seconds(), "x-unchecked")
			b.ReportMetric(float64(fixes)/float64(len(files)), "fixes/file")
		})
	}
}
