// Package quantity reads and writes the values a builder types: SI prefixes,
// units checked against the field, IEC 60062 letter-and-digit codes (4k7, 2R2,
// R47, 4n7), temperatures and tolerances (FORMAT.md §1).
//
// Parsing never goes through a float multiplication: the decimal digits and the
// prefix exponent are joined into one decimal string and converted once, so a
// value printed by Format or Code and read back is bit-for-bit the same value.
package quantity

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Unit is the physical kind a field expects.
type Unit int

// The units of FORMAT.md §1.
const (
	Ohm Unit = iota
	Farad
	Henry
	Volt
	Ampere
	Watt
	Hertz
	Metre
	Celsius // a temperature, stored in °C; written with C, °C or K
	Fraction
	Ratio // a plain number with no unit
)

var unitNames = [...]string{"ohm", "F", "H", "V", "A", "W", "Hz", "m", "C", "fraction", "ratio"}

func (u Unit) String() string {
	if int(u) < len(unitNames) {
		return unitNames[u]
	}
	return "?"
}

// describe names the unit for an error message.
func (u Unit) describe() string {
	switch u {
	case Ohm:
		return "a resistance in ohms (4k7, 470, 2R2, 10 ohm)"
	case Farad:
		return "a capacitance in farads (100n, 4n7, 22pF)"
	case Henry:
		return "an inductance in henries (22u, 1.5uH)"
	case Volt:
		return "a voltage (12V, 13.8 V)"
	case Ampere:
		return "a current (10mA, 0.2A)"
	case Watt:
		return "a power (0.25W, 625mW)"
	case Hertz:
		return "a frequency (10.1MHz)"
	case Metre:
		return "a length with its unit (9.5mm)"
	case Celsius:
		return "a temperature with its unit (25C, 25°C, 298.15K)"
	case Fraction:
		return "a percentage or fraction (5%, 0.05)"
	case Ratio:
		return "a plain number"
	}
	return "a value"
}

// unitSpellings are the unit words accepted after the number, per field.
var unitSpellings = map[Unit][]string{
	Ohm:     {"Ω", "Ω", "ohm", "ohms", "Ohm", "Ohms"},
	Farad:   {"F"},
	Henry:   {"H"},
	Volt:    {"V"},
	Ampere:  {"A"},
	Watt:    {"W"},
	Hertz:   {"Hz"},
	Metre:   {"m"},
	Celsius: {"C", "°C"},
}

var prefixes = map[string]int{
	"p": -12, "n": -9, "u": -6, "µ": -6, "μ": -6, "m": -3, "k": 3, "M": 6, "G": 9,
}

// Error is a parse failure; the loader attaches the position.
type Error struct {
	Input string
	Msg   string
}

func (e *Error) Error() string { return e.Msg }

func fail(s string, u Unit, why string) error {
	if why != "" {
		why = ": " + why
	}
	return &Error{Input: s, Msg: fmt.Sprintf("cannot read %q as %s%s", s, u.describe(), why)}
}

// ErrNeedsUnit is wrapped when a temperature or length is written without its unit.
var ErrNeedsUnit = errors.New("needs its unit")

// Parse reads a quantity string for a field of unit u and returns it in SI base
// units (°C for temperatures, a fraction for Fraction). It does not judge the
// sign: callers decide whether zero or negative is allowed.
func Parse(s string, u Unit) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, fail(s, u, "empty")
	}
	mant, exp, rest, ok := leadingNumber(t)
	if !ok {
		return 0, fail(s, u, "no number")
	}
	hadPoint := strings.ContainsAny(mant, ".eE")
	// IEC 60062 letter-and-digit code: a letter stands in for the decimal point.
	if !hadPoint && rest != "" {
		if v, ok, err := parseCode(s, mant, rest, u); ok || err != nil {
			return v, err
		}
	}
	if mant == "" {
		return 0, fail(s, u, "no number")
	}
	rest = strings.TrimLeft(rest, " ")
	pexp, err := suffix(s, rest, u)
	if err != nil {
		return 0, err
	}
	return finish(s, u, mant, exp+pexp, rest)
}

// finish converts the decimal digits once and applies the field's conversion.
func finish(s string, u Unit, mant string, exp int, rest string) (float64, error) {
	v, err := strconv.ParseFloat(mant+"e"+strconv.Itoa(exp), 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, fail(s, u, "out of range")
	}
	switch u {
	case Celsius:
		switch {
		case rest == "":
			return 0, &Error{Input: s, Msg: fmt.Sprintf("temperature %q %v: write 25C, 25°C or 298.15K", s, ErrNeedsUnit)}
		case rest == "K":
			v -= 273.15
		}
	case Metre:
		if rest == "" {
			return 0, &Error{Input: s, Msg: fmt.Sprintf("length %q %v: write 9.5mm", s, ErrNeedsUnit)}
		}
	case Fraction:
		if strings.HasSuffix(rest, "%") {
			v, _ = strconv.ParseFloat(mant+"e"+strconv.Itoa(exp-2), 64)
		}
	}
	return v, nil
}

// leadingNumber splits "4.7e3kΩ" into mantissa "4.7", exponent 3 and rest "kΩ".
// An exponent is taken only when digits follow the e.
func leadingNumber(t string) (mant string, exp int, rest string, ok bool) {
	i := 0
	if i < len(t) && (t[i] == '+' || t[i] == '-') {
		i++
	}
	digits := 0
	for i < len(t) && t[i] >= '0' && t[i] <= '9' {
		i++
		digits++
	}
	if i < len(t) && t[i] == '.' {
		i++
		for i < len(t) && t[i] >= '0' && t[i] <= '9' {
			i++
			digits++
		}
	}
	mant = t[:i]
	if digits == 0 {
		// A code like R47 or p68 starts with its letter.
		if mant == "" || mant == "+" || mant == "-" {
			return mant, 0, t[i:], true
		}
		return "", 0, "", false
	}
	if i < len(t) && (t[i] == 'e' || t[i] == 'E') {
		j := i + 1
		if j < len(t) && (t[j] == '+' || t[j] == '-') {
			j++
		}
		k := j
		for k < len(t) && t[k] >= '0' && t[k] <= '9' {
			k++
		}
		if k > j && k-j <= 4 {
			e, _ := strconv.Atoi(t[i+1 : k])
			return mant, e, t[k:], true
		}
	}
	return mant, 0, t[i:], true
}

// codeLetters maps the decimal-point letters of IEC 60062 to their exponent,
// for the field's unit. R means 1 and K kilo only for resistances.
func codeLetter(r rune, u Unit) (int, bool) {
	switch r {
	case 'R':
		return 0, u == Ohm
	case 'K':
		return 3, u == Ohm
	case 'k':
		return 3, u != Celsius && u != Metre
	case 'M', 'G':
		return map[rune]int{'M': 6, 'G': 9}[r], u != Celsius && u != Metre
	case 'p', 'n', 'u', 'µ', 'μ':
		return map[rune]int{'p': -12, 'n': -9, 'u': -6, 'µ': -6, 'μ': -6}[r], u != Celsius && u != Metre
	case 'm':
		return -3, u != Celsius && u != Metre
	}
	return 0, false
}

// parseCode reads "4k7", "R47", "p68", "470R", "4n7F": integer digits, one
// letter in place of the decimal point, fraction digits, then an optional unit.
// ok is false when rest is not a code, so that Parse reads it as a suffix.
func parseCode(s, intPart, rest string, u Unit) (float64, bool, error) {
	r, size := utf8.DecodeRuneInString(rest)
	e, isLetter := codeLetter(r, u)
	if !isLetter {
		return 0, false, nil
	}
	after := rest[size:]
	j := 0
	for j < len(after) && after[j] >= '0' && after[j] <= '9' {
		j++
	}
	frac, unit := after[:j], strings.TrimLeft(after[j:], " ")
	sign := ""
	if strings.HasPrefix(intPart, "-") || strings.HasPrefix(intPart, "+") {
		sign, intPart = intPart[:1], intPart[1:]
	}
	if j == 0 {
		// No digits after the letter: a plain prefix (4k, 10p) or 470R.
		if r != 'R' || intPart == "" {
			return 0, false, nil
		}
	}
	if intPart == "" && frac == "" {
		return 0, false, nil
	}
	if intPart == "" {
		intPart = "0"
	}
	if unit != "" && !isUnitWord(unit, u) {
		return 0, true, fail(s, u, unitMismatch(unit, u))
	}
	v, err := finish(s, u, sign+intPart+"."+frac+"0", e, unit)
	return v, true, err
}

func isUnitWord(w string, u Unit) bool {
	for _, x := range unitSpellings[u] {
		if w == x {
			return true
		}
	}
	return u == Celsius && w == "K" || u == Fraction && w == "%"
}

// suffix reads "[PREFIX][UNIT]" and returns the prefix exponent.
func suffix(s, rest string, u Unit) (int, error) {
	if rest == "" || isUnitWord(rest, u) {
		return 0, nil
	}
	if u == Celsius || u == Fraction || u == Ratio {
		return 0, fail(s, u, unitMismatch(rest, u))
	}
	r, size := utf8.DecodeRuneInString(rest)
	p := string(r)
	e, ok := prefixes[p]
	if !ok && p == "K" && u == Ohm {
		e, ok = 3, true
	}
	if !ok {
		return 0, fail(s, u, unitMismatch(rest, u))
	}
	tail := rest[size:]
	if tail == "" || isUnitWord(tail, u) {
		return e, nil
	}
	return 0, fail(s, u, unitMismatch(tail, u))
}

// unitOrder fixes the order in which unitMismatch tries the unit words, so
// that the message is the same on every run.
var unitOrder = []Unit{Ohm, Farad, Henry, Volt, Ampere, Watt, Hertz, Celsius, Metre}

func unitMismatch(w string, u Unit) string {
	for _, other := range unitOrder {
		if other == u {
			continue
		}
		for _, n := range unitSpellings[other] {
			if w == n || len(w) > len(n) && strings.HasSuffix(w, n) {
				return fmt.Sprintf("unit %s does not fit this field", n)
			}
		}
	}
	return fmt.Sprintf("unknown unit or prefix %q", w)
}

// Format writes v in engineering notation with a prefix and the unit's symbol,
// for messages: 4700 Ω → "4.7 kohm", 1.01e7 Hz → "10.1 MHz". The digits are
// the shortest that read back as v.
func Format(v float64, u Unit) string {
	switch u {
	case Celsius:
		return trimNum(v) + " °C"
	case Fraction:
		return trimNum(v*100) + " %"
	case Ratio:
		return trimNum(v)
	}
	m, p := engineering(v)
	return m + " " + p + u.String()
}

// Code writes v as it would be typed into a circuit file for a field of unit
// u: resistances and capacitances as IEC 60062 codes without the unit
// (4k7, 910, 2R2, R47, 4n7, 22n), other quantities with prefix and unit (0.5W,
// 22uH, 63V). Parse(Code(v, u), u) == v for every finite v.
func Code(v float64, u Unit) string {
	switch u {
	case Celsius:
		return trimNum(v) + "C"
	case Fraction:
		return trimNum(v*100) + "%"
	case Ratio:
		return trimNum(v)
	}
	m, p := engineering(v)
	if u == Ohm && p != "" && prefixes[p] < 0 {
		m, p = strconv.FormatFloat(v, 'f', -1, 64), "" // R47, not 470m
	}
	if p == "µ" {
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

// engineering splits v into a mantissa string in [1, 1000) and a prefix,
// shifting the decimal point in the digit string so that no rounding happens.
func engineering(v float64) (string, string) {
	if v == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return trimNum(v), ""
	}
	s := strconv.FormatFloat(math.Abs(v), 'e', -1, 64) // d.ddde±x
	sign := ""
	if v < 0 {
		sign = "-"
	}
	mant, expStr, _ := strings.Cut(s, "e")
	exp, _ := strconv.Atoi(expStr)
	digits := strings.Replace(mant, ".", "", 1)
	e3 := int(math.Floor(float64(exp) / 3))
	e3 *= 3
	if e3 < -12 {
		e3 = -12
	}
	if e3 > 9 {
		e3 = 9
	}
	prefix := map[int]string{-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}[e3]
	return sign + placePoint(digits, exp-e3+1), prefix
}

// placePoint puts the decimal point after the first n digits, padding with zeros.
func placePoint(digits string, n int) string {
	switch {
	case n <= 0:
		return "0." + strings.Repeat("0", -n) + digits
	case n >= len(digits):
		return digits + strings.Repeat("0", n-len(digits))
	}
	return digits[:n] + "." + digits[n:]
}

func trimNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
