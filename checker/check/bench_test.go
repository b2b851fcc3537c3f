package check

import (
	"fmt"
	"runtime"
	"testing"
	"time"

	"github.com/BurntSushi/toml"

	"headroom/checker/corners"
	"headroom/checker/corpus"
	"headroom/checker/ruleset"
	"headroom/rules"
)

// BenchmarkCorpus decodes and checks the same 225 generated files of every
// configuration (checker/corpus.Mixed) in one run, with every rule of the
// default set, and reports what checking costs against merely decoding the
// TOML: nominal-x-decode and worst-x-decode (corners = "worst", stability
// included, every offered fix checked on the whole circuit as check does),
// worst-nofixcheck-x-decode (the same without the fix check, which searches
// the worst case of each fixed file again), and the time and allocations of
// one file's worst-case check. Run it on one core (-cpu 1); DEVELOPERS.md
// has the goals and the figures.
func BenchmarkCorpus(b *testing.B) {
	files := corpus.Mixed(225)
	all := rules.All()
	runner := func(mode string, noFixCheck bool) *Runner {
		set, err := (&ruleset.Loader{Rules: all}).Load("default")
		if err != nil {
			b.Fatal(err)
		}
		set.Corners = mode
		return NewRunner(Options{Rules: all, Set: set, Worst: corners.Worst, Today: "2026-12-02", NoFixCheck: noFixCheck})
	}
	// Decoding and each kind of check take turns file by file, so that all
	// of them see the same load on a shared machine.
	const decodes = 20 // decoding is quick: repeat it for a steady time
	var decode, nominal, worst, bare time.Duration
	var mallocs uint64
	var ms runtime.MemStats
	for b.Loop() {
		nom, wst, nofix := runner("nominal", false), runner("worst", false), runner("worst", true)
		for i, f := range files {
			name := fmt.Sprintf("gen%03d.toml", i)
			t0 := time.Now()
			for range decodes {
				var m map[string]any
				if _, err := toml.Decode(string(f), &m); err != nil {
					b.Fatal(err)
				}
			}
			t1 := time.Now()
			decode += t1.Sub(t0) / decodes
			if res := nom.File(name, f); res.Err != nil {
				b.Fatalf("%v\n%s", res.Err, f)
			}
			t2 := time.Now()
			nominal += t2.Sub(t1)
			if res := nofix.File(name, f); res.Err != nil {
				b.Fatal(res.Err)
			}
			t3 := time.Now()
			bare += t3.Sub(t2)
			runtime.ReadMemStats(&ms)
			before := ms.Mallocs
			t3 = time.Now()
			if res := wst.File(name, f); res.Err != nil {
				b.Fatal(res.Err)
			}
			worst += time.Since(t3)
			runtime.ReadMemStats(&ms)
			mallocs += ms.Mallocs - before
		}
	}
	b.ReportMetric(nominal.Seconds()/decode.Seconds(), "nominal-x-decode")
	b.ReportMetric(worst.Seconds()/decode.Seconds(), "worst-x-decode")
	b.ReportMetric(bare.Seconds()/decode.Seconds(), "worst-nofixcheck-x-decode")
	b.ReportMetric(worst.Seconds()/float64(b.N)/float64(len(files))*1e3, "worst-ms/file")
	b.ReportMetric(float64(mallocs)/float64(b.N)/float64(len(files)), "worst-allocs/file")
}

// BenchmarkFixCheck measures what the whole-circuit check of every fix
// costs: the same 40 generated files checked with it and without it in one
// run, reported as a ratio (x-unchecked) and as fixes checked per file;
// reload-x-unchecked is the same check without its shortcuts (loading every
// fixed file from its edited text and judging every rule, as before
// edit.Model). The allocation counts (allocs-x-unchecked,
// reload-allocs-x-unchecked) hold steady on a busy machine where the times do
// not. Use a multiple of 3 for -benchtime: the three runs take turns in every
// order.
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
			var ms runtime.MemStats
			run := func(skip, reload bool) (time.Duration, int, uint64) {
				runtime.ReadMemStats(&ms)
				m0 := ms.Mallocs
				t0 := time.Now()
				r := NewRunner(Options{Rules: all, Set: set, Worst: corners.Worst, Today: "2026-12-02", NoFixCheck: skip})
				r.reloadFixes = reload
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
				d := time.Since(t0)
				runtime.ReadMemStats(&ms)
				return d, fixes, ms.Mallocs - m0
			}
			// The three take turns in every order: a run after another
			// finds the analyses' memos (the poles') filled.
			var with, reloading, without time.Duration
			var aWith, aReloading, aWithout uint64
			fixes, turn := 0, 0
			for b.Loop() {
				for k := range 3 {
					switch (turn + k) % 3 {
					case 0:
						d, n, a := run(false, false)
						with, fixes, aWith = with+d, n, aWith+a
					case 1:
						d, _, a := run(false, true)
						reloading, aReloading = reloading+d, aReloading+a
					case 2:
						d, _, a := run(true, false)
						without, aWithout = without+d, aWithout+a
					}
				}
				turn++
			}
			b.ReportMetric(with.Seconds()/without.Seconds(), "x-unchecked")
			b.ReportMetric(reloading.Seconds()/without.Seconds(), "reload-x-unchecked")
			b.ReportMetric(float64(aWith)/float64(aWithout), "allocs-x-unchecked")
			b.ReportMetric(float64(aReloading)/float64(aWithout), "reload-allocs-x-unchecked")
			b.ReportMetric(float64(fixes)/float64(len(files)), "fixes/file")
		})
	}
}
