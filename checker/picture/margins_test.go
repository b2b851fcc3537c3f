package picture

import (
	"math"
	"strings"
	"testing"
)

// TestRatio: where an item sits on the margin axis and which side of 1
// fails, from the definition "measured must be cmp limit" (FORMAT.md §4:
// comparison reads "measured must be comparison limit"); the cases are
// worked by hand.
func TestRatio(t *testing.T) {
	for _, c := range []struct {
		name            string
		measured, limit float64
		cmp             string
		failing         bool
		x               float64
		side            int
		off             bool
	}{
		{"at least 10, measured 5: half the limit, fails left", 5, 10, ">=", true, 0.5, -1, false},
		{"at most 0.5, measured 0.6: 1.2, fails right", 0.6, 0.5, "<=", true, 1.2, +1, false},
		{"at most 0.5, measured 0.25: passes left", 0.25, 0.5, "<=", false, 0.5, +1, false},
		{"at least -10 dB, measured -5 dB: ratio 0.5 passes, failing side turned right", -5, -10, ">=", false, 0.5, +1, false},
		{"at most -20 dB, measured -10 dB: ratio 0.5 fails, failing side left", -10, -20, "<=", true, 0.5, -1, false},
		{"at most 0, measured 0: limit 0 passes, left edge", 0, 0, "<=", false, MarginLo, +1, true},
		{"at most 0, measured 1: limit 0 fails, right edge", 1, 0, "<=", true, MarginHi, +1, true},
		{"at least 10, measured -1: below zero, left edge (fails)", -1, 10, ">=", true, MarginLo, -1, true},
		{"at most 1, measured 50: off the scale right", 50, 1, "<=", true, MarginHi, +1, true},
	} {
		x, side, off := Ratio(c.measured, c.limit, c.cmp, c.failing)
		if x != c.x || side != c.side || off != c.off {
			t.Errorf("%s: got x %g side %d off %v, want %g %d %v", c.name, x, side, off, c.x, c.side, c.off)
		}
	}
}

// TestRenderRefusesNonFinite: a NaN that reaches a coordinate makes the
// drawing fail instead of writing an SVG no viewer can place.
func TestRenderRefusesNonFinite(t *testing.T) {
	var b strings.Builder
	err := WriteBias(&b, "t", []Transistor{{Ref: "Q1", VCE: 5, IC: 0.01, ICMax: 0.2, VCEO: 40, PD: 0.5,
		HasSpread: true, VCESpread: [2]float64{4, math.NaN()}, ICSpread: [2]float64{0.009, 0.011}}})
	if err == nil && strings.Contains(b.String(), "NaN") {
		t.Fatal("an SVG with a NaN coordinate was written")
	}
	b.Reset()
	if err := WriteBias(&b, "t", []Transistor{{Ref: "Q1", VCE: 5, IC: 0.01, ICMax: 0.2, VCEO: 40, PD: 0.5}}); err != nil {
		t.Fatalf("a finite drawing failed: %v", err)
	}
}

// luma is ITU-R BT.601's Y' = 0.299 R' + 0.587 G' + 0.114 B', the grey a
// colour prints as.
func luma(r, g, b uint8) float64 { return 0.299*float64(r) + 0.587*float64(g) + 0.114*float64(b) }

// TestSeveritiesInGreyscale: the three severities' fills, a passing bar's
// outline and white stay apart in greyscale (at least 40 of 255 between any
// two), so a black-and-white print still tells error from warning from
// info.
func TestSeveritiesInGreyscale(t *testing.T) {
	names := []string{"error", "warning", "info", "pass", "white"}
	var ys []float64
	for _, n := range names[:3] {
		c := SeverityColour(n)
		ys = append(ys, luma(c.R, c.G, c.B))
	}
	ys = append(ys, luma(passColour.R, passColour.G, passColour.B), 255)
	for i := range ys {
		for j := i + 1; j < len(ys); j++ {
			if i == 3 || j == 3 { // the passing bar is an outline, not a fill: only white must differ from it
				if j != 4 {
					continue
				}
			}
			if math.Abs(ys[i]-ys[j]) < 40 {
				t.Errorf("%s (%.0f) and %s (%.0f) print as nearly the same grey", names[i], ys[i], names[j], ys[j])
			}
		}
	}
}
