package check

import (
	"fmt"
	"math/rand"
	"testing"
	"time"

	"github.com/BurntSushi/toml"

	"headroom/checker/corners"
	"headroom/checker/ruleset"
	"headroom/rules"
)

// generated returns n circuit files: a divider-biased 2N3904 stage with a
// toroid output transformer, its values drawn from the E12 series with a
// fixed seed (invented demo values, for timing only).
func generated(n int) [][]byte {
	rng := rand.New(rand.NewSource(1))
	e12 := []float64{1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2}
	pick := func(decade float64) string { return fmt.Sprintf("%g", e12[rng.Intn(len(e12))]*decade) }
	out := make([][]byte, n)
	for i := range out {
		out[i] = []byte(fmt.Sprintf(`[circuit]
name = "generated preamp %d"
band = ["7MHz", "7.3MHz"]
ambient = ["0C", "45C"]

[supplies.vcc]
volts = "12V"
range = ["11V", "13.8V"]

[ports.in]
net = "rf_in"
direction = "in"

[ports.out]
net = "rf_out"
direction = "out"

[parts.C1]
kind = "capacitor"
value = "%sn"
nets = ["rf_in", "base"]

[parts.R1]
kind = "resistor"
value = "%s"
nets = ["vcc", "base"]

[parts.R2]
kind = "resistor"
value = "%s"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "%s"
nets = ["emit", "gnd"]

[parts.C2]
kind = "capacitor"
value = "%sn"
nets = ["emit", "gnd"]

[parts.T1]
kind = "transformer"
core = "toroid-9.5x4.75x3.25-mu800"
windings.primary = { turns = %d, nets = ["vcc", "coll"] }
windings.secondary = { turns = %d, nets = ["rf_out", "gnd"] }

[parts.C3]
kind = "capacitor"
value = "100n"
nets = ["vcc", "gnd"]
`, i, pick(10), pick(1e4), pick(1e3), pick(100), pick(100), 6+rng.Intn(6), 3+rng.Intn(3)))
	}
	return out
}

// BenchmarkCheckFolder checks 200 generated circuit files per iteration and
// reports files per second and how many times slower that is than merely
// decoding the same TOML.
func BenchmarkCheckFolder(b *testing.B) {
	files := generated(200)
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
	files := generated(40)
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
