package sweep

import (
	"path/filepath"
	"testing"
	"time"

	"headroom/checker/ac"
	"headroom/checker/analysis"
	"headroom/checker/circuit"
)

// BenchmarkSweep times one whole sweep of shipped example circuits, as the
// report draws it (Run) and as the stability rules judge it (Stability), and
// reports its cost per frequency: ns-per-freq and allocs-per-freq (the
// allocations of one sweep over its number of points).
func BenchmarkSweep(b *testing.B) {
	for _, v := range []struct {
		name string
		run  func(*circuit.Circuit, *ac.Result) (*Result, error)
	}{{"run", Run}, {"stability", Stability}} {
		benchSweep(b, v.name, v.run)
	}
}

func benchSweep(b *testing.B, kind string, run func(*circuit.Circuit, *ac.Result) (*Result, error)) {
	for _, name := range []string{"preamp-30m", "two-stage-40m", "cs-tank-40m"} {
		c, err := circuit.Load(filepath.Join("../../testdata/circuits", name+".toml"), circuit.Options{})
		if err != nil {
			b.Fatal(err)
		}
		cs := analysis.Run(c, nil)
		if cs.AC == nil {
			b.Fatalf("%s: no small-signal analysis", name)
		}
		points := len(Grid(c))
		b.Run(kind+"/"+name, func(b *testing.B) {
			allocs := testing.AllocsPerRun(3, func() {
				if _, err := run(c, cs.AC); err != nil {
					b.Fatal(err)
				}
			})
			t0 := time.Now()
			for b.Loop() {
				if _, err := run(c, cs.AC); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(time.Since(t0).Nanoseconds())/float64(b.N*points), "ns-per-freq")
			b.ReportMetric(allocs/float64(points), "allocs-per-freq")
			b.ReportMetric(float64(points), "freqs")
		})
	}
}
