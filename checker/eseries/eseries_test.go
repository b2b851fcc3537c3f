package eseries

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"headroom/checker/quantity"
)

// The lists of IEC 60063 as reproduced in REFERENCES.md §1 (table "series /
// values (one decade)"; sources there: qsl.net g4usp, itwissen.info; E96
// checked value by value against round(10^(i/96), 2)).
var literal = map[Series]string{
	E3:  "1.0 2.2 4.7",
	E6:  "1.0 1.5 2.2 3.3 4.7 6.8",
	E12: "1.0 1.2 1.5 1.8 2.2 2.7 3.3 3.9 4.7 5.6 6.8 8.2",
	E24: "1.0 1.1 1.2 1.3 1.5 1.6 1.8 2.0 2.2 2.4 2.7 3.0 3.3 3.6 3.9 4.3 4.7 5.1 5.6 6.2 6.8 7.5 8.2 9.1",
	E48: "1.00 1.05 1.10 1.15 1.21 1.27 1.33 1.40 1.47 1.54 1.62 1.69 1.78 1.87 1.96 2.05 " +
		"2.15 2.26 2.37 2.49 2.61 2.74 2.87 3.01 3.16 3.32 3.48 3.65 3.83 4.02 4.22 4.42 " +
		"4.64 4.87 5.11 5.36 5.62 5.90 6.19 6.49 6.81 7.15 7.50 7.87 8.25 8.66 9.09 9.53",
	E96: "1.00 1.02 1.05 1.07 1.10 1.13 1.15 1.18 1.21 1.24 1.27 1.30 1.33 1.37 1.40 1.43 " +
		"1.47 1.50 1.54 1.58 1.62 1.65 1.69 1.74 1.78 1.82 1.87 1.91 1.96 2.00 2.05 2.10 " +
		"2.15 2.21 2.26 2.32 2.37 2.43 2.49 2.55 2.61 2.67 2.74 2.80 2.87 2.94 3.01 3.09 " +
		"3.16 3.24 3.32 3.40 3.48 3.57 3.65 3.74 3.83 3.92 4.02 4.12 4.22 4.32 4.42 4.53 " +
		"4.64 4.75 4.87 4.99 5.11 5.23 5.36 5.49 5.62 5.76 5.90 6.04 6.19 6.34 6.49 6.65 " +
		"6.81 6.98 7.15 7.32 7.50 7.68 7.87 8.06 8.25 8.45 8.66 8.87 9.09 9.31 9.53 9.76",
	// REFERENCES.md §1 gives E192 only as a formula with one exception. This
	// list is the E192 row of the Chinese Wikipedia article "E系列數字" (seen
	// in the mirror github.com/MASangys/wikipedia.zh, Page/E系列數字.md); it
	// also matches the compiler's memory of IEC 60063 Table 2.
	E192: "1.00 1.01 1.02 1.04 1.05 1.06 1.07 1.09 1.10 1.11 1.13 1.14 1.15 1.17 1.18 1.20 " +
		"1.21 1.23 1.24 1.26 1.27 1.29 1.30 1.32 1.33 1.35 1.37 1.38 1.40 1.42 1.43 1.45 " +
		"1.47 1.49 1.50 1.52 1.54 1.56 1.58 1.60 1.62 1.64 1.65 1.67 1.69 1.72 1.74 1.76 " +
		"1.78 1.80 1.82 1.84 1.87 1.89 1.91 1.93 1.96 1.98 2.00 2.03 2.05 2.08 2.10 2.13 " +
		"2.15 2.18 2.21 2.23 2.26 2.29 2.32 2.34 2.37 2.40 2.43 2.46 2.49 2.52 2.55 2.58 " +
		"2.61 2.64 2.67 2.71 2.74 2.77 2.80 2.84 2.87 2.91 2.94 2.98 3.01 3.05 3.09 3.12 " +
		"3.16 3.20 3.24 3.28 3.32 3.36 3.40 3.44 3.48 3.52 3.57 3.61 3.65 3.70 3.74 3.79 " +
		"3.83 3.88 3.92 3.97 4.02 4.07 4.12 4.17 4.22 4.27 4.32 4.37 4.42 4.48 4.53 4.59 " +
		"4.64 4.70 4.75 4.81 4.87 4.93 4.99 5.05 5.11 5.17 5.23 5.30 5.36 5.42 5.49 5.56 " +
		"5.62 5.69 5.76 5.83 5.90 5.97 6.04 6.12 6.19 6.26 6.34 6.42 6.49 6.57 6.65 6.73 " +
		"6.81 6.90 6.98 7.06 7.15 7.23 7.32 7.41 7.50 7.59 7.68 7.77 7.87 7.96 8.06 8.16 " +
		"8.25 8.35 8.45 8.56 8.66 8.76 8.87 8.98 9.09 9.20 9.31 9.42 9.53 9.65 9.76 9.88",
}

func words(s Series) []string { return strings.Fields(literal[s]) }

// lit converts a decimal literal the way the Go compiler does: rounded once.
func lit(t testing.TB, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

func TestValuesMatchIEC60063(t *testing.T) {
	for _, s := range all {
		want := words(s)
		if len(want) != int(s) {
			t.Fatalf("test list for %v has %d values", s, len(want))
		}
		got := Values(s)
		if len(got) != len(want) {
			t.Fatalf("Values(%v) has %d values, want %d", s, len(got), len(want))
		}
		for i, w := range want {
			if got[i] != lit(t, w) {
				t.Errorf("Values(%v)[%d] = %v, want %s (REFERENCES.md §1)", s, i, got[i], w)
			}
		}
	}
}

// TestNotGeometric: the values of REFERENCES.md §1 "Values that differ from
// the rounded geometric series": the series holds the standard value, not the
// rounded 10^(i/n).
func TestNotGeometric(t *testing.T) {
	for _, c := range []struct {
		s                 Series
		i                 int
		standard, rounded string
	}{
		{E24, 10, "2.7", "2.6"}, {E24, 11, "3.0", "2.9"}, {E24, 12, "3.3", "3.2"},
		{E24, 13, "3.6", "3.5"}, {E24, 14, "3.9", "3.8"}, {E24, 15, "4.3", "4.2"},
		{E24, 16, "4.7", "4.6"}, {E24, 22, "8.2", "8.3"},
		{E12, 5, "2.7", "2.6"}, {E12, 6, "3.3", "3.2"}, {E12, 7, "3.9", "3.8"},
		{E12, 8, "4.7", "4.6"}, {E12, 11, "8.2", "8.3"},
		{E6, 3, "3.3", "3.2"}, {E6, 4, "4.7", "4.6"},
		{E192, 185, "9.20", "9.19"},
	} {
		got := Values(c.s)[c.i]
		if got != lit(t, c.standard) || got == lit(t, c.rounded) {
			t.Errorf("Values(%v)[%d] = %v, want the standard %s, not the rounded %s", c.s, c.i, got, c.standard, c.rounded)
		}
	}
}

// TestSubsets: E3 ⊂ E6 ⊂ E12 ⊂ E24 and E48 ⊂ E96 ⊂ E192, each the
// every-other member of the next (REFERENCES.md §1, [S qsl.net g4usp; C]).
func TestSubsets(t *testing.T) {
	for _, p := range [][2]Series{{E3, E6}, {E6, E12}, {E12, E24}, {E48, E96}, {E96, E192}} {
		coarse, fine := Values(p[0]), Values(p[1])
		for i, v := range coarse {
			if fine[2*i] != v {
				t.Errorf("%v[%d] = %v, but %v[%d] = %v", p[0], i, v, p[1], 2*i, fine[2*i])
			}
		}
	}
}

func TestString(t *testing.T) {
	for s, want := range map[Series]string{E3: "E3", E24: "E24", E192: "E192", Series(7): "Series(7)"} {
		if got := s.String(); got != want {
			t.Errorf("Series(%d).String() = %q, want %q", int(s), got, want)
		}
	}
}

// TestForTolerance: RULES.md values.preferred: ≤ 1 % E96, ≤ 2 % E48, ≤ 5 %
// E24, ≤ 10 % E12, else E6; the tolerances are read as a circuit file writes
// them, so the boundaries are the parsed values.
func TestForTolerance(t *testing.T) {
	for _, c := range []struct {
		tol  string
		want Series
	}{
		{"0.1%", E96}, {"1%", E96}, {"0.01", E96}, {"1.1%", E48}, {"2%", E48}, {"2.5%", E24},
		{"5%", E24}, {"0.05", E24}, {"5.1%", E12}, {"10%", E12}, {"20%", E6}, {"50%", E6},
	} {
		tol, err := quantity.Parse(c.tol, quantity.Fraction)
		if err != nil {
			t.Fatal(err)
		}
		if got := ForTolerance(tol); got != c.want {
			t.Errorf("ForTolerance(%s) = %v, want %v", c.tol, got, c.want)
		}
	}
	if got := ForTolerance(math.NaN()); got != E6 {
		t.Errorf("ForTolerance(NaN) = %v, want E6", got)
	}
}

// TestRounding: decade scaling and decade edges. Expected values are decimal
// literals built from the IEC 60063 lists above; equality is bit for bit.
func TestRounding(t *testing.T) {
	for _, c := range []struct {
		v        float64
		s        Series
		up, down float64
	}{
		{4700, E24, 4700, 4700},             // 4k7 is exact, not 4699.999…
		{4.3e3, E24, 4.3e3, 4.3e3},          // E24 member 4.3
		{9.1e-12, E24, 9.1e-12, 9.1e-12},    // 9p1
		{1e6, E24, 1e6, 1e6},                // 1M
		{9.5e3, E24, 10e3, 9.1e3},           // across the decade edge
		{0.95, E12, 1.0, 0.82},              // below one
		{1.0000001e3, E6, 1.5e3, 1e3},       // just above a decade
		{0.9999999e3, E6, 1e3, 680},         // just below a decade
		{4.6e3, E24, 4.7e3, 4.3e3},          // 4.6 is the rounded geometric value, not E24
		{2.2e-9, E12, 2.2e-9, 2.2e-9},       // 2n2
		{4.65e3, E96, 4.75e3, 4.64e3},       // E96 neighbours 4.64, 4.75
		{9.19e6, E192, 9.2e6, 9.09e6},       // the E192 exception
		{4.6e-300, E24, 4.7e-300, 4.3e-300}, // tiny
		{1.5e300, E6, 1.5e300, 1.5e300},     // huge
		{9.2e307, E24, 1e308, 9.1e307},      // near the top of the float range
		{math.MaxFloat64, E192, math.Inf(1), 1.78e308},
		{1.7e308, E3, math.Inf(1), 1e308},   // 2.2e308 does not fit a float64
		{2.5e-308, E12, 2.7e-308, 2.2e-308}, // the smallest normal floats
	} {
		if got := RoundUp(c.v, c.s); got != c.up {
			t.Errorf("RoundUp(%v, %v) = %v, want %v", c.v, c.s, got, c.up)
		}
		if got := RoundDown(c.v, c.s); got != c.down {
			t.Errorf("RoundDown(%v, %v) = %v, want %v", c.v, c.s, got, c.down)
		}
	}
}

func TestNeighbours(t *testing.T) {
	for _, c := range []struct {
		v      float64
		s      Series
		lo, hi float64
	}{
		{4700, E24, 4300, 5100}, // a series value: both strict neighbours
		{4600, E24, 4300, 4700},
		{1000, E12, 820, 1200}, // across the decade edge
		{9.5e3, E24, 9.1e3, 10e3},
		{1e-12, E6, 0.68e-12, 1.5e-12},
		{4.75e3, E96, 4.64e3, 4.87e3},
	} {
		lo, hi := Neighbours(c.v, c.s)
		if lo != c.lo || hi != c.hi {
			t.Errorf("Neighbours(%v, %v) = %v, %v, want %v, %v", c.v, c.s, lo, hi, c.lo, c.hi)
		}
	}
}

// TestNearest: the nearest value by relative distance |v−n|/n.
func TestNearest(t *testing.T) {
	for _, c := range []struct {
		v, want float64
		s       Series
	}{
		{4700, 4700, E24},
		{4600, 4700, E24},    // 100/4700 < 300/4300
		{9.5e3, 9.1e3, E24},  // 400/9100 = 0.044 < 500/10000 = 0.05
		{9.6e3, 10e3, E24},   // 400/10000 = 0.04 < 500/9100
		{0.99, 1.0, E12},     // across the decade edge downwards
		{4.7e3, 4.75e3, E96}, // 50/4750 < 60/4640
		{1e300, 1e300, E3},
		{math.MaxFloat64, 1.78e308, E192}, // the next one up, 1.80e308, is past the float range
	} {
		if got := Nearest(c.v, c.s); got != c.want {
			t.Errorf("Nearest(%v, %v) = %v, want %v", c.v, c.s, got, c.want)
		}
	}
}

// TestDeviation: the values.preferred metric (RULES.md): relative distance to
// the nearest series value, and over the coarser series too.
func TestDeviation(t *testing.T) {
	for _, c := range []struct {
		name string
		got  float64
		want float64
	}{
		{"Deviation(4700, E24)", Deviation(4700, E24), 0},
		{"Deviation(4700, E96)", Deviation(4700, E96), 50.0 / 4750},   // nearest E96 value 4.75 k
		{"Deviation(4600, E24)", Deviation(4600, E24), 100.0 / 4700},  // nearest 4.7 k
		{"Deviation(2.0e-9, E12)", Deviation(2.0e-9, E12), 0.2 / 2.2}, // 2n0 is E24, not E12
		// RULES.md values.preferred: "a 1 % part of value 4k7 is fine".
		{"DeviationCoarse(4700, 1%)", DeviationCoarse(4700, 0.01), 0},
		{"DeviationCoarse(4750, 1%)", DeviationCoarse(4750, 0.01), 0},
		{"DeviationCoarse(4750, 5%)", DeviationCoarse(4750, 0.05), 50.0 / 4700}, // 4.75 is E96 only
		{"DeviationCoarse(1.5e3, 5%)", DeviationCoarse(1.5e3, 0.05), 0},
		{"DeviationCoarse(1.2e3, 20%)", DeviationCoarse(1.2e3, 0.2), 0.2 / 1.0}, // E6: 1.0 and 1.5
	} {
		if math.Abs(c.got-c.want) > 1e-15 {
			t.Errorf("%s = %v, want %v", c.name, c.got, c.want)
		}
	}
}

// TestBadValues: only positive finite values lie among the series.
func TestBadValues(t *testing.T) {
	for _, v := range []float64{0, -4700, math.NaN(), math.Inf(1), math.Inf(-1)} {
		lo, hi := Neighbours(v, E24)
		for name, got := range map[string]float64{
			"RoundUp": RoundUp(v, E24), "RoundDown": RoundDown(v, E24), "Nearest": Nearest(v, E24),
			"Deviation": Deviation(v, E24), "DeviationCoarse": DeviationCoarse(v, 0.05), "lo": lo, "hi": hi,
		} {
			if !math.IsNaN(got) {
				t.Errorf("%s(%v) = %v, want NaN", name, v, got)
			}
		}
	}
}

func TestUnknownSeriesPanics(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("Values(Series(7)) did not panic")
		}
	}()
	Values(Series(7))
}

// inSeries reports whether x is m × 10^k for a mantissa m of the literal list
// of s, converted once from its decimal form.
func inSeries(t testing.TB, x float64, s Series) bool {
	e := int(math.Floor(math.Log10(x)))
	for k := e - 1; k <= e+1; k++ {
		for _, m := range words(s) {
			if lit(t, m+"e"+strconv.Itoa(k)) == x {
				return true
			}
		}
	}
	return false
}

// FuzzRound: for any positive finite v, RoundDown ≤ v ≤ RoundUp, both are
// series values (RoundUp is +Inf only past the float range), the strict
// neighbours bracket v, and nothing is NaN.
func FuzzRound(f *testing.F) {
	for _, v := range []float64{4700, 9.5e3, 1, 0.99999, 1e-300, math.MaxFloat64, math.SmallestNonzeroFloat64} {
		f.Add(math.Float64bits(v), uint8(3))
	}
	f.Fuzz(func(t *testing.T, bits uint64, sel uint8) {
		v := math.Float64frombits(bits)
		if !(v > 0) || math.IsInf(v, 1) {
			return
		}
		s := all[int(sel)%len(all)]
		up, down := RoundUp(v, s), RoundDown(v, s)
		lo, hi := Neighbours(v, s)
		n, d := Nearest(v, s), Deviation(v, s)
		for _, x := range []float64{up, down, lo, hi, n, d} {
			if math.IsNaN(x) {
				t.Fatalf("%v, %v: NaN among up %v down %v lo %v hi %v nearest %v deviation %v", v, s, up, down, lo, hi, n, d)
			}
		}
		if !(down <= v && v <= up && lo < v && v < hi && lo <= down && up <= hi) {
			t.Fatalf("%v, %v: order broken: lo %v down %v up %v hi %v", v, s, lo, down, up, hi)
		}
		if n != up && n != down || d < 0 {
			t.Fatalf("%v, %v: nearest %v deviation %v, bounds %v %v", v, s, n, d, down, up)
		}
		if v < 2.3e-308 {
			return // subnormal: series values are only the nearest floats
		}
		if !inSeries(t, down, s) {
			t.Fatalf("RoundDown(%v, %v) = %v, not in the series", v, s, down)
		}
		if math.IsInf(up, 1) {
			if top := RoundDown(math.MaxFloat64, s); v <= top {
				t.Fatalf("RoundUp(%v, %v) = +Inf below the largest value %v", v, s, top)
			}
		} else if !inSeries(t, up, s) {
			t.Fatalf("RoundUp(%v, %v) = %v, not in the series", v, s, up)
		}
	})
}

func BenchmarkRoundUp(b *testing.B) {
	for b.Loop() {
		RoundUp(4.6e3, E24)
		RoundUp(9.19e6, E192)
	}
}

func BenchmarkDeviationCoarse(b *testing.B) {
	for b.Loop() {
		DeviationCoarse(4.6e3, 0.01)
	}
}

// TestScaledReadsAsTheDecimal: a member is the float64 the decimal string
// "me" reads as (strconv's correctly rounded parse is the reference), over
// every series and decades from 1e-330 to 1e310.
func TestScaledReadsAsTheDecimal(t *testing.T) {
	for _, s := range []Series{E3, E6, E12, E24, E48, E96, E192} {
		for _, m := range tableOf(s).m {
			for e := -330; e <= 310; e++ {
				want, _ := strconv.ParseFloat(strconv.Itoa(m)+"e"+strconv.Itoa(e), 64)
				if got := scaled(m, e); got != want {
					t.Fatalf("%s: %de%d = %v, want %v", s, m, e, got, want)
				}
			}
		}
	}
}

// BenchmarkNearest times a lookup (values.preferred makes one per series per
// part).
func BenchmarkNearest(b *testing.B) {
	for b.Loop() {
		Nearest(4.75e-9, E96)
	}
}
