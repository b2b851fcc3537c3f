// Package eseries holds the IEC 60063 preferred number series (E3 … E192)
// and places any positive value among them, across decades. The
// values.preferred rule uses it to say whether a resistor or capacitor value
// can be bought, and which buyable values lie either side.
//
// E3 to E24 are literal tables: eight of the E24 values (2.7 … 4.7, 8.2) are
// not the rounded geometric series. E48 and E96 are round(10^(i/n), 2); E192
// is the same with its one exception, 9.20 at i = 185 (REFERENCES.md §1).
//
// A series value in decade k is the decimal mantissa × 10^k converted once by
// strconv, never a float product, so RoundUp(4700, E24) is 4700 exactly. In
// the subnormal range (below about 1e-308) series values are only the nearest
// floats, many of them equal.
package eseries

import (
	"fmt"
	"math"
	"strconv"
)

// Series is an IEC 60063 series; its value is the number of members per decade.
type Series int

// The series of IEC 60063.
const (
	E3   Series = 3
	E6   Series = 6
	E12  Series = 12
	E24  Series = 24
	E48  Series = 48
	E96  Series = 96
	E192 Series = 192
)

// all lists the series from coarsest to finest.
var all = []Series{E3, E6, E12, E24, E48, E96, E192}

func (s Series) String() string {
	if _, ok := tables[s]; ok {
		return "E" + strconv.Itoa(int(s))
	}
	return fmt.Sprintf("Series(%d)", int(s))
}

// table holds one decade as integer mantissas: member i of decade k is
// m[i] × 10^(k−scale), so E24's 47 with scale 1 is 4.7 × 10^k.
type table struct {
	m     []int
	scale int
}

// tables are IEC 60063:2015 Table 1 (E3–E24, two significant figures) and
// Table 2 (E48–E192, three), as reproduced in REFERENCES.md §1.
var tables = map[Series]table{
	E3:   {[]int{10, 22, 47}, 1},
	E6:   {[]int{10, 15, 22, 33, 47, 68}, 1},
	E12:  {[]int{10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82}, 1},
	E24:  {[]int{10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91}, 1},
	E48:  {geometric(48), 2},
	E96:  {geometric(96), 2},
	E192: {e192(), 2},
}

// geometric gives round(10^(i/n), 2) × 100 for i = 0 … n−1.
func geometric(n int) []int {
	m := make([]int, n)
	for i := range m {
		m[i] = int(math.Round(math.Pow(10, float64(i)/float64(n)) * 100))
	}
	return m
}

// e192 is the geometric series with the exception IEC 60063 prints: 9.20
// where the formula gives 9.19 (i = 185).
func e192() []int {
	m := geometric(192)
	m[185] = 920
	return m
}

func tableOf(s Series) table {
	t, ok := tables[s]
	if !ok {
		panic(fmt.Sprintf("eseries: %v is not an IEC 60063 series", s))
	}
	return t
}

// Values gives one decade of s, the mantissas from 1.0 up to 9.1 (E24) or
// 9.88 (E192), in ascending order. The slice is the caller's. It panics if s
// is not one of the series above.
func Values(s Series) []float64 {
	t := tableOf(s)
	out := make([]float64, len(t.m))
	for i := range t.m {
		out[i] = t.value(i)
	}
	return out
}

// ForTolerance gives the series a part of tolerance tol (a fraction: 0.05 for
// 5 %) is normally sold in: ≤ 1 % E96, ≤ 2 % E48, ≤ 5 % E24, ≤ 10 % E12,
// else E6 (RULES.md values.preferred; the conventional pairing of
// REFERENCES.md §1). A NaN tolerance gives E6.
func ForTolerance(tol float64) Series {
	switch {
	case tol <= 0.01:
		return E96
	case tol <= 0.02:
		return E48
	case tol <= 0.05:
		return E24
	case tol <= 0.10:
		return E12
	}
	return E6
}

// value gives member idx counted from 1.0 × 10^0: idx = k·n + i is member i
// of decade k. Past the float range it is +Inf or 0.
func (t table) value(idx int) float64 {
	n := len(t.m)
	k := idx / n
	if idx%n < 0 {
		k--
	}
	i := idx - k*n
	return scaled(t.m[i], k-t.scale)
}

// pow10 holds the powers of ten that are exact in float64.
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// scaled is m·10^e correctly rounded, as the decimal string "me" would read.
// Within the exact powers of ten one multiplication (exact: the product is
// an integer below 2^53) or one division (IEEE division rounds correctly)
// gives it without formatting a string; beyond them it parses the string.
func scaled(m, e int) float64 {
	switch {
	case e >= 0 && e < len(pow10):
		if x := float64(m) * pow10[e]; x < 1<<53 {
			return x
		}
	case e < 0 && -e < len(pow10):
		return float64(m) / pow10[-e]
	}
	v, _ := strconv.ParseFloat(strconv.Itoa(m)+"e"+strconv.Itoa(e), 64)
	return v
}

// guess is an index near v: members lie close to 10^(idx/n). It goes through
// Log2, which is exact for subnormals, where math.Log10 on amd64 is decades off
// (Log10(5e-324) gives -307.95, not -323.3).
func (t table) guess(v float64) int {
	return int(math.Floor(math.Log2(v) * (math.Ln2 / math.Ln10) * float64(len(t.m))))
}

// up gives the smallest index whose value is ≥ v (> v when strict).
func (t table) up(v float64, strict bool) int {
	ok := func(x float64) bool { return x > v || !strict && x == v }
	idx := t.guess(v)
	for !ok(t.value(idx)) {
		idx++
	}
	for ok(t.value(idx - 1)) {
		idx--
	}
	return idx
}

// down gives the largest index whose value is ≤ v (< v when strict).
func (t table) down(v float64, strict bool) int {
	ok := func(x float64) bool { return x < v || !strict && x == v }
	idx := t.guess(v)
	for !ok(t.value(idx)) {
		idx--
	}
	for ok(t.value(idx + 1)) {
		idx++
	}
	return idx
}

// valid reports whether v is a value these functions accept: positive and finite.
func valid(v float64) bool { return v > 0 && !math.IsInf(v, 1) }

// RoundUp gives the smallest value of s that is ≥ v, in any decade
// (RoundUp(9.5e3, E24) = 10e3). It is +Inf when v lies above the largest
// series value a float64 holds, and NaN unless v is positive and finite.
func RoundUp(v float64, s Series) float64 {
	t := tableOf(s)
	if !valid(v) {
		return math.NaN()
	}
	return t.value(t.up(v, false))
}

// RoundDown gives the largest value of s that is ≤ v, in any decade
// (RoundDown(9.5e3, E24) = 9.1e3). It is NaN unless v is positive and finite.
func RoundDown(v float64, s Series) float64 {
	t := tableOf(s)
	if !valid(v) {
		return math.NaN()
	}
	return t.value(t.down(v, false))
}

// Neighbours gives the values of s either side of v, strictly: lo is the
// largest below v and hi the smallest above it, whether or not v itself is in
// the series (Neighbours(4700, E24) = 4300, 5100). These are the two choices a
// fix offers. hi is +Inf past the largest float series value; both are NaN
// unless v is positive and finite.
func Neighbours(v float64, s Series) (lo, hi float64) {
	t := tableOf(s)
	if !valid(v) {
		return math.NaN(), math.NaN()
	}
	return t.value(t.down(v, true)), t.value(t.up(v, true))
}

// Nearest gives the value n of s with the smallest relative distance
// |v−n|/n, the measure Deviation reports; a tie goes to the larger value.
// It is NaN unless v is positive and finite.
func Nearest(v float64, s Series) float64 {
	t := tableOf(s)
	if !valid(v) {
		return math.NaN()
	}
	lo := t.value(t.down(v, false))
	if lo == v {
		return v
	}
	hi := t.value(t.up(v, false))
	if math.IsInf(hi, 1) || lo > 0 && (v-lo)/lo < (hi-v)/hi {
		return lo
	}
	return hi
}

// Deviation gives |v−n|/n for n = Nearest(v, s): 0 when v is a series value,
// 0.0213 for 4.6 kΩ in E24 (nearest 4.7 kΩ). It is NaN unless v is positive
// and finite.
func Deviation(v float64, s Series) float64 {
	n := Nearest(v, s)
	return math.Abs(v-n) / n
}

// DeviationCoarse gives the smallest Deviation of v over the series for
// tolerance tol and every coarser series, because a close-tolerance part is
// also sold in the coarse values: a 1 % part of 4.7 kΩ is preferred (E24)
// though 4.7 is not in E96 (RULES.md values.preferred).
func DeviationCoarse(v, tol float64) float64 {
	finest := ForTolerance(tol)
	best := math.Inf(1)
	for _, s := range all {
		if s > finest {
			break
		}
		d := Deviation(v, s)
		if math.IsNaN(d) {
			return d
		}
		best = min(best, d)
	}
	return best
}
