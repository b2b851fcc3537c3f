package picture

import (
	"math"
	"os"
	"slices"
	"strings"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/topology"
)

// TestFilterRange: the filter picture's range is the one docs/pictures.md
// gives: half the band's low edge to twice its high edge without rejection
// frequencies, widened to a fifth below and a quarter above them with
// them; the band's three points and each rejection frequency are drawn
// points, and no point is NaN or above 0 dB (a network of passive parts
// gives no power gain: fact of the trade, no published source).
func TestFilterRange(t *testing.T) {
	b, err := os.ReadFile("../../testdata/circuits/bpf-40m.toml")
	if err != nil {
		t.Fatal(err)
	}
	with := string(b)
	without := strings.Replace(with, `reject = [{ freq = "3.6MHz", min_db = 40 }, { freq = "14.2MHz", min_db = 40 }]`+"\n", "", 1)
	if without == with {
		t.Fatal("the example's reject line is not where the test expects it")
	}
	for _, run := range []struct {
		src    string
		lo, hi float64
		at     []float64
	}{
		{without, 3.5e6, 14.4e6, []float64{7e6, math.Sqrt(7e6 * 7.2e6), 7.2e6}},
		{with, 3.6e6 / 1.25, 14.2e6 * 1.25, []float64{3.6e6, 7e6, 7.2e6, 14.2e6}},
	} {
		c, err := circuit.LoadBytes("bpf.toml", []byte(run.src), circuit.Options{})
		if err != nil {
			t.Fatal(err)
		}
		topo := topology.Analyze(c)
		r, err := FilterResponseOf(c, topo, analysis.Run(c, topo), false)
		if err != nil {
			t.Fatal(err)
		}
		n := len(r.Freq)
		step := r.Freq[1] / r.Freq[0]
		if !(r.Freq[0] <= run.lo && r.Freq[0]*step > run.lo) || !(r.Freq[n-1] >= run.hi && r.Freq[n-1]/step < run.hi) {
			t.Errorf("drawn from %g to %g Hz, want the grid's points just outside %g to %g Hz", r.Freq[0], r.Freq[n-1], run.lo, run.hi)
		}
		for _, f := range run.at {
			if !slices.Contains(r.Freq, f) {
				t.Errorf("%g Hz is not a drawn point", f)
			}
		}
		for i := range r.Freq {
			if !finite(r.Gain[i]) || !finite(r.Return[i]) || r.Gain[i] > 0 {
				t.Errorf("at %g Hz: gain %g dB, return loss %g dB", r.Freq[i], r.Gain[i], r.Return[i])
			}
		}
		if r.Mu != nil || r.Voltage != nil || len(r.Rejects) != strings.Count(run.src, "min_db") {
			t.Errorf("μ %v, voltage gain %v, %d rejects", r.Mu != nil, r.Voltage != nil, len(r.Rejects))
		}
	}
}
