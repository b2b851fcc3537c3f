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
	"math/big"
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
	Ratio   // a plain number with no unit
	Decibel // a level in dB; the unit may be left out
)

var unitNames = [...]string{"ohm", "F", "H", "V", "A", "W", "Hz", "m", "C", "fraction", "ratio", "dB"}

func (u Unit) String() string {
	if u >= 0 && int(u) < len(unitNames) {
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
	case Decibel:
		return "a level in decibels (8dB, 10)"
	}
	return "a value"
}

// unitSpellings are the unit words accepted after the number, per field.
var unitSpellings = map[Unit][]string{
	Ohm:      {"\u03a9", "\u2126", "ohm", "ohms", "Ohm", "Ohms"}, // Greek capital omega, ohm sign
	Farad:    {"F"},
	Henry:    {"H"},
	Volt:     {"V"},
	Ampere:   {"A"},
	Watt:     {"W"},
	Hertz:    {"Hz"},
	Metre:    {"m"},
	Celsius:  {"C", "°C", "K"}, // K is kelvin, converted to °C
	Fraction: {"%"},
	Decibel:  {"dB"},
}

// prefixes are the SI prefixes of FORMAT.md §1, with both micro signs
// (U+00B5 micro sign, U+03BC Greek small mu).
var prefixes = map[string]int{
	"p": -12, "n": -9, "u": -6, "\u00b5": -6, "\u03bc": -6, "m": -3, "k": 3, "M": 6, "G": 9,
}

// takesPrefix reports whether a field of unit u accepts SI prefixes. A
// temperature, a fraction and a plain number do not.
func takesPrefix(u Unit) bool {
	return u != Celsius && u != Fraction && u != Ratio && u != Decibel
}

// takesCode reports whether a field of unit u accepts a letter-and-digit code
// (4k7, 2u2, 10M1). A length does not: in 9m5 the m could be the unit.
func takesCode(u Unit) bool {
	return takesPrefix(u) && u != Metre
}

// absoluteZero is 0 K in °C (the kelvin–Celsius offset fixed by the SI).
var absoluteZero = big.NewRat(-27315, 100)

// Error is a parse failure; the loader attaches the position.
type Error struct {
	Input string
	Msg   string
	err   error // a sentinel such as ErrNeedsUnit, for errors.Is
}

func (e *Error) Error() string { return e.Msg }

// Unwrap gives the sentinel the failure wraps, if any (ErrNeedsUnit).
func (e *Error) Unwrap() error { return e.err }

func fail(s string, u Unit, why string) error {
	if why != "" {
		why = ": " + why
	}
	return &Error{Input: s, Msg: fmt.Sprintf("cannot read %q as %s%s", s, u.describe(), why)}
}

// ErrNeedsUnit is wrapped when a temperature or length is written without its unit.
var ErrNeedsUnit = errors.New("needs its unit")

// Parse reads a quantity string for a field of unit u and returns it in SI base
// units (°C for temperatures, a fraction for Fraction). Every value it accepts
// is finite. It does not judge the sign or the range (callers decide whether
// zero, negative or a tolerance of 100 % is allowed); the one exception is a
// temperature below absolute zero, which no field can hold.
func Parse(s string, u Unit) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, fail(s, u, "empty")
	}
	n, ok := leadingNumber(t)
	if !ok {
		return 0, fail(s, u, "no number")
	}
	rest := n.rest
	// IEC 60062 letter-and-digit code: a letter stands in for the decimal point.
	if !n.point && !n.hasExp && rest != "" {
		if v, ok, err := parseCode(s, n.mant, rest, u); ok || err != nil {
			return v, err
		}
	}
	if n.digits == 0 {
		return 0, fail(s, u, "no number")
	}
	rest = strings.TrimLeft(rest, " ")
	pexp, unit, err := suffix(s, rest, u)
	if err != nil {
		return 0, err
	}
	return finish(s, u, n.mant, n.exp+pexp, unit)
}

// finish converts the decimal digits once and applies the field's conversion.
// unit is the unit word after the prefix ("" when none was written).
func finish(s string, u Unit, mant string, exp int, unit string) (float64, error) {
	switch u {
	case Celsius:
		if unit == "" {
			return 0, &Error{Input: s, err: ErrNeedsUnit,
				Msg: fmt.Sprintf("temperature %q %v: write 25C, 25°C or 298.15K", s, ErrNeedsUnit)}
		}
	case Metre:
		if unit == "" {
			return 0, &Error{Input: s, err: ErrNeedsUnit,
				Msg: fmt.Sprintf("length %q %v: write 9.5mm", s, ErrNeedsUnit)}
		}
	case Fraction:
		if unit == "%" {
			exp -= 2 // shift the decimal point, no division
		}
	}
	dec := mant + "e" + strconv.Itoa(exp)
	v, err := strconv.ParseFloat(dec, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, fail(s, u, "out of range")
	}
	if v == 0 && strings.ContainsAny(mant, "123456789") {
		return 0, fail(s, u, "too small to represent")
	}
	if u == Celsius && unit == "K" {
		if v < 0 {
			return 0, fail(s, u, "below absolute zero")
		}
		if v != 0 {
			// 298.15K is 25 °C exactly: subtract in decimal, round once.
			r, ok := new(big.Rat).SetString(dec)
			if !ok {
				return 0, fail(s, u, "no number")
			}
			v, _ = r.Add(r, absoluteZero).Float64()
		} else {
			v, _ = absoluteZero.Float64()
		}
	}
	if u == Celsius && v < -273.15 {
		return 0, fail(s, u, "below absolute zero (-273.15 °C)")
	}
	return v, nil
}

// number is the leading numeric part of a quantity string.
type number struct {
	mant   string // sign, digits and decimal point, without the exponent
	exp    int    // the written exponent (4.7e3 → 3)
	rest   string // what follows the number
	digits int    // how many digits the mantissa has
	point  bool   // the mantissa has a decimal point
	hasExp bool   // an exponent was written
}

// leadingNumber splits "4.7e3kΩ" into mantissa "4.7", exponent 3 and rest "kΩ".
// An exponent is taken only when digits follow the e. ok is false for a
// mantissa with a decimal point but no digit ("." or "-.").
func leadingNumber(t string) (n number, ok bool) {
	i := 0
	if i < len(t) && (t[i] == '+' || t[i] == '-') {
		i++
	}
	for i < len(t) && t[i] >= '0' && t[i] <= '9' {
		i++
		n.digits++
	}
	if i < len(t) && t[i] == '.' {
		n.point = true
		i++
		for i < len(t) && t[i] >= '0' && t[i] <= '9' {
			i++
			n.digits++
		}
	}
	n.mant = t[:i]
	if n.digits == 0 {
		// A code like R47 or p68 starts with its letter.
		n.rest = t[i:]
		return n, !n.point
	}
	if i < len(t) && (t[i] == 'e' || t[i] == 'E') {
		j := i + 1
		neg := false
		if j < len(t) && (t[j] == '+' || t[j] == '-') {
			neg = t[j] == '-'
			j++
		}
		k := j
		for k < len(t) && t[k] >= '0' && t[k] <= '9' {
			k++
		}
		if k > j {
			n.exp = expValue(t[j:k], neg)
			n.hasExp = true
			i = k
		}
	}
	n.rest = t[i:]
	return n, true
}

// expValue reads exponent digits, clamping absurd exponents to ±99999 so that
// the conversion reports them as out of range instead of overflowing an int.
func expValue(digits string, neg bool) int {
	digits = strings.TrimLeft(digits, "0")
	e := 99999
	if len(digits) <= 5 {
		e, _ = strconv.Atoi("0" + digits)
	}
	if neg {
		return -e
	}
	return e
}

// codeLetter maps the decimal-point letters of IEC 60062 to their exponent,
// for the field's unit: the SI prefix letters, R (one) and K (kilo) only in
// resistances.
func codeLetter(r rune, u Unit) (int, bool) {
	if !takesCode(u) {
		return 0, false
	}
	switch r {
	case 'R':
		return 0, u == Ohm
	case 'K':
		return 3, u == Ohm
	}
	e, ok := prefixes[string(r)]
	return e, ok
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
	return false
}

// suffix reads "[PREFIX][UNIT]" and returns the prefix exponent and the unit
// word ("" when none was written).
func suffix(s, rest string, u Unit) (int, string, error) {
	if rest == "" || isUnitWord(rest, u) {
		return 0, rest, nil
	}
	if !takesPrefix(u) {
		return 0, "", fail(s, u, unitMismatch(rest, u))
	}
	r, size := utf8.DecodeRuneInString(rest)
	e, ok := prefixes[string(r)]
	if !ok && r == 'K' && u == Ohm {
		e, ok = 3, true
	}
	if !ok {
		return 0, "", fail(s, u, unitMismatch(rest, u))
	}
	tail := rest[size:]
	if tail == "" || isUnitWord(tail, u) {
		return e, tail, nil
	}
	return 0, "", fail(s, u, unitMismatch(tail, u))
}

// unitOrder fixes the order in which unitMismatch tries the unit words, so
// that the message is the same on every run.
var unitOrder = []Unit{Ohm, Farad, Henry, Volt, Ampere, Watt, Hertz, Celsius, Metre, Fraction, Decibel}

// unitMismatch explains why w is not accepted: it names another field's unit
// when w is that unit, with or without a prefix ("kV" on a resistance).
func unitMismatch(w string, u Unit) string {
	for _, other := range unitOrder {
		if other == u {
			continue
		}
		for _, n := range unitSpellings[other] {
			p, hasUnit := strings.CutSuffix(w, n)
			if _, isPrefix := prefixes[p]; hasUnit && (p == "" || isPrefix && takesPrefix(other)) {
				return fmt.Sprintf("unit %s does not fit this field", n)
			}
		}
	}
	return fmt.Sprintf("unknown unit or prefix %q", w)
}

// Format writes v for messages, in engineering notation with a prefix and the
// unit's symbol: 4700 Ω → "4.7 kohm", 1.01e7 Hz → "10.1 MHz", 0.05 → "5 %".
// Resistances below one ohm are written as plain decimals ("0.47 ohm").
// The digits are the shortest that read back as v, and Parse(Format(v, u), u)
// == v for every finite v (for temperatures, every v at or above absolute zero).
func Format(v float64, u Unit) string {
	var buf [64]byte
	return string(appendFormat(buf[:0], v, u, -1))
}

// appendFormat appends Format(v, u) to dst when prec < 0; with prec ≥ 0 it
// appends Format of v rounded to prec+1 significant figures (see Approx, which
// makes sure that the rounded value's shortest digits are the rounded digits).
func appendFormat(dst []byte, v float64, u Unit, prec int) []byte {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		// Nothing prints Inf or NaN (FORMAT.md §6): the largest finite value
		// stands in, as in the JSON documents.
		v = Finite(v)
	}
	if v == 0 {
		return appendSpecial(dst, 0, u) // +0: no output prints -0
	}
	var dbuf [32]byte
	d := digitsOf(dbuf[:0], v, prec)
	switch u {
	case Celsius:
		return append(appendG(dst, d), " °C"...)
	case Fraction:
		return append(appendPercent(dst, d), " %"...)
	case Ratio:
		return appendG(dst, d)
	case Decibel:
		return append(appendG(dst, d), " dB"...)
	}
	if u == Ohm && d.exp < 0 { // |v| < 1
		return append(append(appendSubOhm(dst, d), ' '), u.String()...)
	}
	dst, ok := appendEngineering(dst, d, u)
	if !ok {
		dst = append(appendG(dst, d), ' ')
	}
	return append(dst, u.String()...)
}

// appendSpecial is Format for 0, ±Inf and NaN, which have no digits to place.
func appendSpecial(dst []byte, v float64, u Unit) []byte {
	dst = strconv.AppendFloat(dst, v, 'g', -1, 64)
	switch u {
	case Celsius:
		return append(dst, " °C"...)
	case Fraction:
		return append(dst, " %"...)
	case Ratio:
		return dst
	case Decibel:
		return append(dst, " dB"...)
	}
	dst = append(dst, ' ')
	return append(dst, u.String()...)
}

// dec is a finite non-zero value as decimal digits: ±0.d1d2… × 10^(exp+1),
// i.e. exp is the exponent of the first digit; digits has no trailing zero.
type dec struct {
	neg    bool
	digits []byte
	exp    int
}

// digitsOf gives v's shortest decimal digits that read back as v (prec < 0)
// or v's digits rounded to prec+1 significant figures, trailing zeros
// dropped; v is finite and not zero. The digits are appended to buf.
func digitsOf(buf []byte, v float64, prec int) dec {
	var sbuf [32]byte
	s := strconv.AppendFloat(sbuf[:0], math.Abs(v), 'e', prec, 64) // d.ddde±xx
	d := dec{neg: math.Signbit(v)}
	i := 0
	for ; s[i] != 'e'; i++ {
		if s[i] != '.' {
			buf = append(buf, s[i])
		}
	}
	for len(buf) > 1 && buf[len(buf)-1] == '0' {
		buf = buf[:len(buf)-1]
	}
	d.digits = buf
	neg := s[i+1] == '-'
	for _, c := range s[i+2:] {
		d.exp = d.exp*10 + int(c-'0')
	}
	if neg {
		d.exp = -d.exp
	}
	return d
}

func appendSign(dst []byte, d dec) []byte {
	if d.neg {
		return append(dst, '-')
	}
	return dst
}

// appendG writes d as strconv's shortest 'g' format does: plain below an
// exponent of 6 and from −4, else d.ddde±xx.
func appendG(dst []byte, d dec) []byte {
	dst = appendSign(dst, d)
	if d.exp < -4 || d.exp >= 6 {
		dst = append(dst, d.digits[0])
		if len(d.digits) > 1 {
			dst = append(append(dst, '.'), d.digits[1:]...)
		}
		dst = append(dst, 'e')
		e := d.exp
		if e < 0 {
			dst, e = append(dst, '-'), -e
		} else {
			dst = append(dst, '+')
		}
		if e < 10 {
			dst = append(dst, '0')
		}
		return strconv.AppendInt(dst, int64(e), 10)
	}
	return appendPoint(dst, d.digits, d.exp+1)
}

// appendSubOhm writes a resistance below one ohm as a plain decimal ("0.47"),
// or with an exponent below a milliohm, where a decimal would be mostly zeros.
func appendSubOhm(dst []byte, d dec) []byte {
	if d.exp < -3 { // |v| < 1e-3
		return appendG(dst, d)
	}
	return appendPoint(appendSign(dst, d), d.digits, d.exp+1)
}

// subOhm is appendSubOhm for v (0 < |v| < 1) as a string.
func subOhm(v float64) string {
	var buf, dbuf [32]byte
	return string(appendSubOhm(buf[:0], digitsOf(dbuf[:0], v, -1)))
}

// prefixNames are the SI prefixes by (exponent + 12) / 3.
var prefixNames = [...]string{"p", "n", "\u00b5", "m", "", "k", "M", "G"}

// appendEngineering appends d's mantissa in [1, 1000), a space and the
// prefix, shifting the decimal point in the digit string so that no rounding
// happens. ok is false for magnitudes outside [0.001 p, 1000 G), and then
// nothing is appended.
func appendEngineering(dst []byte, d dec, u Unit) ([]byte, bool) {
	e3, ok := prefixExp(d.exp)
	if !ok {
		return dst, false
	}
	dst = appendPoint(appendSign(dst, d), d.digits, d.exp-e3+1)
	dst = append(dst, ' ')
	return append(dst, prefixNames[(e3+12)/3]...), true
}

// prefixExp is the prefix exponent (a multiple of 3) for a first digit at
// 10^exp.
func prefixExp(exp int) (int, bool) {
	e3 := int(math.Floor(float64(exp)/3)) * 3
	if e3 < -12 && exp >= -15 {
		e3 = -12 // 0.68 pF, p68: the smallest prefix takes mantissas down to 0.001
	}
	return e3, e3 >= -12 && e3 <= 9
}

// Code writes v as it would be typed into a circuit file for a field of unit
// u: resistances and capacitances as IEC 60062 codes without the unit
// (4k7, 910, 2R2, R47, 4n7, 22n), other quantities with prefix and unit (0.5W,
// 22uH, 63V). Values beyond the prefixes (below 0.001 p, from 1000 G, below
// 1 mΩ) are written with an exponent. Parse(Code(v, u), u) == v for every
// finite v (for temperatures, every v at or above absolute zero).
func Code(v float64, u Unit) string {
	switch u {
	case Celsius:
		return trimNum(v) + "C"
	case Fraction:
		return percent(v) + "%"
	case Ratio:
		return trimNum(v)
	case Decibel:
		return trimNum(v) + "dB"
	}
	var m, p string
	if u == Ohm && math.Abs(v) < 1 && v != 0 {
		m = subOhm(v) // R47, not 470m
		if strings.ContainsAny(m, "e") {
			return m
		}
	} else {
		var ok bool
		m, p, ok = engineering(v)
		if !ok {
			if u == Ohm {
				return trimNum(v)
			}
			return trimNum(v) + u.String()
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

// engineering splits v into a mantissa string in [1, 1000) and a prefix,
// shifting the decimal point in the digit string so that no rounding happens.
// ok is false for NaN, Inf and magnitudes outside [0.001 p, 1000 G).
func engineering(v float64) (mant, prefix string, ok bool) {
	if v == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return trimNum(v), "", v == 0
	}
	var dbuf, buf [32]byte
	d := digitsOf(dbuf[:0], v, -1)
	e3, ok := prefixExp(d.exp)
	if !ok {
		return "", "", false
	}
	return string(appendPoint(appendSign(buf[:0], d), d.digits, d.exp-e3+1)), prefixNames[(e3+12)/3], true
}

// percent writes the fraction v in percent by moving the decimal point two
// places, so that no multiplication rounds it (0.07 → "7", not "7.000000000000001").
func percent(v float64) string {
	if v == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return trimNum(v)
	}
	var dbuf, buf [32]byte
	return string(appendPercent(buf[:0], digitsOf(dbuf[:0], v, -1)))
}

func appendPercent(dst []byte, d dec) []byte {
	dst = appendSign(dst, d)
	exp := d.exp + 2
	if exp < -4 || exp >= 21 {
		dst = append(dst, d.digits[0])
		if len(d.digits) > 1 {
			dst = append(append(dst, '.'), d.digits[1:]...)
		}
		dst = append(dst, 'e')
		return strconv.AppendInt(dst, int64(exp), 10)
	}
	return appendPoint(dst, d.digits, exp+1)
}

// appendPoint puts the decimal point after the first n digits, padding with zeros.
func appendPoint(dst, digits []byte, n int) []byte {
	switch {
	case n <= 0:
		dst = append(dst, "0."...)
		for ; n < 0; n++ {
			dst = append(dst, '0')
		}
		return append(dst, digits...)
	case n >= len(digits):
		dst = append(dst, digits...)
		for n -= len(digits); n > 0; n-- {
			dst = append(dst, '0')
		}
		return dst
	}
	dst = append(dst, digits[:n]...)
	dst = append(dst, '.')
	return append(dst, digits[n:]...)
}

func trimNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
