package quantity

// The straightforward formatting this package had before it wrote digits
// into buffers, kept as the reference the faster code must match byte for
// byte.

import (
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// Format writes v for messages, in engineering notation with a prefix and the
// unit's symbol: 4700 Ω → "4.7 kohm", 1.01e7 Hz → "10.1 MHz", 0.05 → "5 %".
// Resistances below one ohm are written as plain decimals ("0.47 ohm").
// The digits are the shortest that read back as v, and Parse(refFormat(v, u), u)
// == v for every finite v (for temperatures, every v at or above absolute zero).
func refFormat(v float64, u Unit) string {
	switch u {
	case Celsius:
		return refTrimNum(v) + " °C"
	case Fraction:
		return refPercent(v) + " %"
	case Ratio:
		return refTrimNum(v)
	}
	if u == Ohm && math.Abs(v) < 1 && v != 0 {
		return refSubOhm(v) + " " + u.String()
	}
	m, p, ok := refEngineering(v)
	if !ok {
		return refTrimNum(v) + " " + u.String()
	}
	return m + " " + p + u.String()
}

// Code writes v as it would be typed into a circuit file for a field of unit
// u: resistances and capacitances as IEC 60062 codes without the unit
// (4k7, 910, 2R2, R47, 4n7, 22n), other quantities with prefix and unit (0.5W,
// 22uH, 63V). Values beyond the prefixes (below 0.001 p, from 1000 G, below
// 1 mΩ) are written with an exponent. Parse(refCode(v, u), u) == v for every
// finite v (for temperatures, every v at or above absolute zero).
func refCode(v float64, u Unit) string {
	switch u {
	case Celsius:
		return refTrimNum(v) + "C"
	case Fraction:
		return refPercent(v) + "%"
	case Ratio:
		return refTrimNum(v)
	}
	var m, p string
	if u == Ohm && math.Abs(v) < 1 && v != 0 {
		m = refSubOhm(v) // R47, not 470m
		if strings.ContainsAny(m, "e") {
			return m
		}
	} else {
		var ok bool
		m, p, ok = refEngineering(v)
		if !ok {
			if u == Ohm {
				return refTrimNum(v)
			}
			return refTrimNum(v) + u.String()
		}
	}
	if p == "\u00b5" {
		p = "u"
	}
	if u != Ohm && u != Farad {
		return m + p + u.String()
	}
	letter := p
	if letter == "" {
		if u == Farad {
			return m + "F"
		}
		letter = "R"
	}
	whole, frac, hasPoint := strings.Cut(m, ".")
	if !hasPoint {
		if letter == "R" {
			return m
		}
		return m + letter
	}
	if whole == "0" || whole == "-0" {
		whole = whole[:len(whole)-1] // "0.47" → R47
	}
	return whole + letter + frac
}

// subOhm writes a resistance below one ohm as a plain decimal ("0.47"), or
// with an exponent below a milliohm, where a decimal would be mostly zeros.
func refSubOhm(v float64) string {
	if math.Abs(v) < 1e-3 {
		return refTrimNum(v)
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// engineering splits v into a mantissa string in [1, 1000) and a prefix,
// shifting the decimal point in the digit string so that no rounding happens.
// ok is false for NaN, Inf and magnitudes outside [0.001 p, 1000 G).
func refEngineering(v float64) (mant, prefix string, ok bool) {
	if v == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return refTrimNum(v), "", v == 0
	}
	sign, digits, exp := refDecimal(v)
	e3 := int(math.Floor(float64(exp)/3)) * 3
	if e3 < -12 && exp >= -15 {
		e3 = -12 // 0.68 pF, p68: the smallest prefix takes mantissas down to 0.001
	}
	if e3 < -12 || e3 > 9 {
		return "", "", false
	}
	prefix = map[int]string{-12: "p", -9: "n", -6: "\u00b5", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}[e3]
	return sign + refPlacePoint(digits, exp-e3+1), prefix, true
}

// decimal gives the shortest decimal digits of v that read back as v, with
// v = sign 0.d1d2d3… × 10^(exp+1), i.e. exp is the exponent of the first digit.
func refDecimal(v float64) (sign, digits string, exp int) {
	s := strconv.FormatFloat(math.Abs(v), 'e', -1, 64) // d.ddde±x
	if math.Signbit(v) {
		sign = "-"
	}
	mant, expStr, _ := strings.Cut(s, "e")
	exp, _ = strconv.Atoi(expStr)
	return sign, strings.Replace(mant, ".", "", 1), exp
}

// percent writes the fraction v in percent by moving the decimal point two
// places, so that no multiplication rounds it (0.07 → "7", not "7.000000000000001").
func refPercent(v float64) string {
	if v == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return refTrimNum(v)
	}
	sign, digits, exp := refDecimal(v)
	exp += 2
	if exp < -4 || exp >= 21 {
		m := digits[:1]
		if len(digits) > 1 {
			m += "." + digits[1:]
		}
		return sign + m + "e" + strconv.Itoa(exp)
	}
	return sign + refPlacePoint(digits, exp+1)
}

// placePoint puts the decimal point after the first n digits, padding with zeros.
func refPlacePoint(digits string, n int) string {
	switch {
	case n <= 0:
		return "0." + strings.Repeat("0", -n) + digits
	case n >= len(digits):
		return digits + strings.Repeat("0", n-len(digits))
	}
	return digits[:n] + "." + digits[n:]
}

func refTrimNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func refRound(v float64, n int) float64 {
	r, err := strconv.ParseFloat(strconv.FormatFloat(v, 'g', n, 64), 64)
	if err != nil {
		return v
	}
	return r
}

func refApprox(v float64, u Unit) string {
	if u == Hertz {
		return refFormat(refRound(v, 6), u)
	}
	return refFormat(refRound(v, 3), u)
}

// formatSamples are values across every prefix and branch: random bit
// patterns, short decimals (which round-trip exactly), values that round
// up into the next decade or prefix, and the edges of the plain-decimal and
// exponent forms.
func formatSamples() []float64 {
	rng := rand.New(rand.NewPCG(3, 5))
	var vs []float64
	for e := -330; e <= 310; e++ {
		for _, m := range []float64{1, 0.9995, 0.99999951, 0.999, 4.7, 9.995, 9.9999996, 1.0005, 2.2, 3.3333333} {
			v, _ := strconv.ParseFloat(strconv.FormatFloat(m, 'g', -1, 64)+"e"+strconv.Itoa(e), 64)
			vs = append(vs, v, -v, math.Nextafter(v, 0), math.Nextafter(v, math.Inf(1)))
		}
	}
	for range 8000 {
		vs = append(vs, math.Float64frombits(rng.Uint64()))
		vs = append(vs, math.Exp(rng.NormFloat64()*20))
		digits := strconv.Itoa(1 + rng.IntN(999999))
		v, _ := strconv.ParseFloat(digits+"e"+strconv.Itoa(rng.IntN(60)-30), 64)
		vs = append(vs, v, -v)
	}
	return append(vs, 0, math.Copysign(0, -1), math.Inf(1), math.Inf(-1), math.NaN(),
		math.MaxFloat64, math.SmallestNonzeroFloat64, 1e-3, 1e-4, 1, 1e6, 1e21)
}

func TestFormatMatchesReference(t *testing.T) {
	units := []Unit{Ohm, Farad, Henry, Volt, Ampere, Watt, Hertz, Metre, Celsius, Fraction, Ratio}
	bad := 0
	for _, v := range formatSamples() {
		for _, u := range units {
			if math.IsInf(v, 0) || math.IsNaN(v) {
				// The reference printed Inf and NaN; FORMAT.md §6 forbids
				// them, so Format writes the finite stand-in instead.
				for _, got := range []string{Format(v, u), Approx(v, u)} {
					if strings.Contains(got, "Inf") || strings.Contains(got, "NaN") {
						t.Errorf("Format or Approx of %v prints %q", v, got)
					}
				}
				if got, want := Format(v, u), refFormat(Finite(v), u); got != want {
					t.Errorf("Format(%v, %v) = %q, want the finite stand-in %q", v, u, got, want)
				}
				continue
			}
			shown := v
			if v == 0 {
				shown = 0 // messages never print -0 (the reference did)
			}
			if got, want := Format(v, u), refFormat(shown, u); got != want {
				t.Errorf("Format(%v, %v) = %q, reference %q", v, u, got, want)
				bad++
			}
			if got, want := Approx(v, u), refApprox(shown, u); got != want {
				t.Errorf("Approx(%v, %v) = %q, reference %q", v, u, got, want)
				bad++
			}
			if got, want := Code(v, u), refCode(v, u); got != want {
				t.Errorf("Code(%v, %v) = %q, reference %q", v, u, got, want)
				bad++
			}
			if bad > 20 {
				t.Fatal("too many differences")
			}
		}
		for _, n := range []int{1, 3, 6, 17} {
			if got, want := Round(v, n), refRound(v, n); math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
				t.Errorf("Round(%v, %d) = %v, reference %v", v, n, got, want)
			}
		}
	}
}

func BenchmarkApprox(b *testing.B) {
	vs := []float64{0.06436782245, 4700.4, 1.0124969135755427e7, 0.47, 0.173, 25}
	us := []Unit{Volt, Ohm, Hertz, Ohm, Fraction, Celsius}
	for b.Loop() {
		for i, v := range vs {
			_ = Approx(v, us[i])
		}
	}
}
