package quantity

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// check parses each case and compares bit for bit: Parse rounds a decimal once,
// as the Go compiler does for the literal in want, so both give the same float.
type parseCase struct {
	in   string
	u    Unit
	want float64
	src  string // where the expected value comes from
}

func runParse(t *testing.T, cases []parseCase) {
	t.Helper()
	for _, c := range cases {
		got, err := Parse(c.in, c.u)
		if err != nil {
			t.Errorf("Parse(%q, %v): %v (source: %s)", c.in, c.u, err, c.src)
			continue
		}
		if math.Float64bits(got) != math.Float64bits(c.want) {
			t.Errorf("Parse(%q, %v) = %v, want %v (source: %s)", c.in, c.u, got, c.want, c.src)
		}
	}
}

// rejectCase is an input that must fail; msg is a fragment the message must hold.
type rejectCase struct {
	in  string
	u   Unit
	msg string
	why string
}

func runReject(t *testing.T, cases []rejectCase) {
	t.Helper()
	for _, c := range cases {
		got, err := Parse(c.in, c.u)
		if err == nil {
			t.Errorf("Parse(%q, %v) = %v, want an error (%s)", c.in, c.u, got, c.why)
			continue
		}
		var qe *Error
		if !errors.As(err, &qe) || qe.Input != c.in {
			t.Errorf("Parse(%q, %v): error %T %v does not carry the input", c.in, c.u, err, err)
		}
		if !strings.Contains(err.Error(), c.msg) {
			t.Errorf("Parse(%q, %v): message %q lacks %q (%s)", c.in, c.u, err, c.msg, c.why)
		}
	}
}

// TestIEC60062Examples reads the letter-and-digit examples of IEC 60062 as
// reproduced in REFERENCES.md §2, "Examples (test vectors)". src is that
// table's provenance column.
func TestIEC60062Examples(t *testing.T) {
	runParse(t, []parseCase{
		{"R47", Ohm, 0.47, "REFERENCES §2 [S wikipedia table]"},
		{"4R7", Ohm, 4.7, "REFERENCES §2 [S]"},
		{"2R2", Ohm, 2.2, "REFERENCES §2 [C by the rule]"},
		{"470R", Ohm, 470, "REFERENCES §2 [S]"},
		{"4K7", Ohm, 4.7e3, "REFERENCES §2 [S]"},
		{"4k7", Ohm, 4.7e3, "REFERENCES §2 [S] (4k7 is in FORMAT.md)"},
		{"47K3", Ohm, 47.3e3, "REFERENCES §2 [S]"},
		{"4M7", Ohm, 4.7e6, "REFERENCES §2 [S]"},
		{"2M2", Ohm, 2.2e6, "REFERENCES §2 [S probsee]"},
		{"R10", Ohm, 0.1, "REFERENCES §2 [S probsee]"},
		{"R300", Ohm, 0.3, "REFERENCES §2 [S probsee]"},
		{"1K0", Ohm, 1e3, "REFERENCES §2 [S probsee]"},
		{"4n7", Farad, 4.7e-9, "REFERENCES §2 [S probsee]"},
		{"10p", Farad, 10e-12, "REFERENCES §2 [S probsee]"},
		{"1\u00b50", Farad, 1e-6, "REFERENCES §2 [S probsee], micro sign U+00B5"},
		{"1\u03bc0", Farad, 1e-6, "REFERENCES §2 [S probsee], Greek mu U+03BC"},
		{"2n2", Farad, 2.2e-9, "REFERENCES §2 [S eestudenthelp]"},
		{"100n", Farad, 100e-9, "REFERENCES §2 [C by the rule]"},
		{"p68", Farad, 0.68e-12, "REFERENCES §2 [C by the rule]"},
		// FORMAT.md §1's own examples of the code, with and without the unit.
		{"1M5", Ohm, 1.5e6, "FORMAT.md §1"},
		{"2u2", Farad, 2.2e-6, "FORMAT.md §1"},
		{"2u2", Henry, 2.2e-6, "FORMAT.md §1"},
		{"4k7Ω", Ohm, 4.7e3, "FORMAT.md §1"},
		{"4n7F", Farad, 4.7e-9, "FORMAT.md §1"},
		{"4k7 ohm", Ohm, 4.7e3, "FORMAT.md §1: a space before the unit"},
		{"-4k7", Ohm, -4.7e3, "FORMAT.md §1: NUMBER takes a sign; Parse leaves the sign to callers"},
		{"-R47", Ohm, -0.47, "FORMAT.md §1: NUMBER takes a sign"},
	})
}

// TestSIPrefixes checks every prefix of FORMAT.md §1 against its power of ten
// (SI Brochure, 9th ed., BIPM 2019, Table 7: pico 1e-12 … giga 1e9; from memory).
func TestSIPrefixes(t *testing.T) {
	runParse(t, []parseCase{
		{"22pF", Farad, 22e-12, "SI prefix p = 1e-12"},
		{"22p", Farad, 22e-12, "SI prefix p, unit omitted"},
		{"4.7nF", Farad, 4.7e-9, "SI prefix n = 1e-9"},
		{"22uH", Henry, 22e-6, "u for micro: FORMAT.md §1"},
		{"22\u00b5H", Henry, 22e-6, "micro sign U+00B5 = 1e-6"},
		{"22\u03bcH", Henry, 22e-6, "Greek mu U+03BC = 1e-6"},
		{"625mW", Watt, 625e-3, "SI prefix m = 1e-3"},
		{"10mA", Ampere, 10e-3, "SI prefix m = 1e-3"},
		{"1.5kV", Volt, 1.5e3, "SI prefix k = 1e3"},
		{"10.1MHz", Hertz, 10.1e6, "SI prefix M = 1e6 (FORMAT.md §2 band)"},
		{"1.2GHz", Hertz, 1.2e9, "SI prefix G = 1e9"},
		{"470m", Ohm, 0.47, "m is milli, not mega: FORMAT.md §1 (case matters)"},
		{"4.7M", Ohm, 4.7e6, "M is mega: FORMAT.md §1 (case matters)"},
		{"4.7K", Ohm, 4.7e3, "K is kilo in a resistance: FORMAT.md §1"},
		{"360nH", Henry, 360e-9, "FORMAT.md §3 AL value"},
		{"300MHz", Hertz, 300e6, "FORMAT.md §3 ft"},
	})
}

// TestUnits checks every unit word of FORMAT.md §1 on its own field.
func TestUnits(t *testing.T) {
	runParse(t, []parseCase{
		{"10\u03a9", Ohm, 10, "FORMAT.md §1: Greek capital omega U+03A9"},
		{"10\u2126", Ohm, 10, "FORMAT.md §1: ohm sign U+2126"},
		{"4.7k\u03a9", Ohm, 4.7e3, "FORMAT.md §1: U+03A9 after a prefix"},
		{"4.7k\u2126", Ohm, 4.7e3, "FORMAT.md §1: U+2126 after a prefix"},
		{"10ohm", Ohm, 10, "FORMAT.md §1: ohm"},
		{"10ohms", Ohm, 10, "FORMAT.md §1: ohms"},
		{"10 ohms", Ohm, 10, "FORMAT.md §1: space before the unit"},
		{"4.7 kohm", Ohm, 4.7e3, "FORMAT.md §1"},
		{"470", Ohm, 470, "FORMAT.md §1: a bare number is in base units"},
		{"10nF", Farad, 10e-9, "FORMAT.md §1: F"},
		{"1F", Farad, 1, "FORMAT.md §1: F"},
		{"1.5uH", Henry, 1.5e-6, "FORMAT.md §1: H"},
		{"12V", Volt, 12, "FORMAT.md §1: V"},
		{"13.8 V", Volt, 13.8, "FORMAT.md §1: V with a space"},
		{"-12V", Volt, -12, "FORMAT.md §1: a negative rail"},
		{"0.2A", Ampere, 0.2, "FORMAT.md §1: A"},
		{"0.25W", Watt, 0.25, "FORMAT.md §1: W"},
		{"10.15MHz", Hertz, 10.15e6, "FORMAT.md §1: Hz"},
		{"9.5mm", Metre, 9.5e-3, "FORMAT.md §1: 9.5mm is millimetres"},
		{"5m", Metre, 5, "FORMAT.md §1: a bare m on a length is metres"},
		{"4.75 mm", Metre, 4.75e-3, "FORMAT.md §3 core id, with a space"},
		{"25C", Celsius, 25, "FORMAT.md §1: C"},
		{"25°C", Celsius, 25, "FORMAT.md §1: °C"},
		{"25 °C", Celsius, 25, "FORMAT.md §1: °C with a space"},
		{"-40C", Celsius, -40, "FORMAT.md §1: a negative temperature"},
		{"150C", Celsius, 150, "FORMAT.md §3 tj_max"},
		{"298.15K", Celsius, 25, "FORMAT.md §1; T/K = t/°C + 273.15 (REFERENCES §3)"},
		{"233.15K", Celsius, -40, "REFERENCES §3 VT table: -40 °C = 233.15 K"},
		{"273.15 K", Celsius, 0, "REFERENCES §3 VT table: 0 °C = 273.15 K"},
		{"300K", Celsius, 26.85, "REFERENCES §3 VT table: 300 K = 26.85 °C"},
		{"0K", Celsius, -273.15, "absolute zero, SI Brochure (kelvin definition)"},
		{"5%", Fraction, 0.05, "FORMAT.md §1: tolerance 5%"},
		{"0.05", Fraction, 0.05, "FORMAT.md §1: tolerance as a bare fraction"},
		{"1%", Fraction, 0.01, "FORMAT.md §1"},
		{"7%", Fraction, 0.07, "7 % is 0.07: the decimal point moves, no division"},
		{"10 %", Fraction, 0.1, "FORMAT.md §1: space before the unit"},
		{"0.98", Ratio, 0.98, "FORMAT.md §2 coupling"},
		{"100", Ratio, 100, "FORMAT.md §3 hfe"},
	})
}

// TestNumbers checks the NUMBER grammar of FORMAT.md §1: "decimal with
// optional sign and exponent: 2.2, -12, 1e-6, .47".
func TestNumbers(t *testing.T) {
	runParse(t, []parseCase{
		{"2.2", Ohm, 2.2, "FORMAT.md §1"},
		{"-12", Volt, -12, "FORMAT.md §1"},
		{"1e-6", Farad, 1e-6, "FORMAT.md §1"},
		{".47", Ohm, 0.47, "FORMAT.md §1"},
		{"+5V", Volt, 5, "FORMAT.md §1: optional sign"},
		{"4.7e3", Ohm, 4.7e3, "exponent"},
		{"4.7E3", Ohm, 4.7e3, "upper-case exponent"},
		{"2.2e-9F", Farad, 2.2e-9, "exponent then unit"},
		{"1e+3 ohm", Ohm, 1e3, "signed exponent"},
		{"1.5e3k", Ohm, 1.5e6, "exponent and prefix multiply: 1.5e3 k = 1.5e6"},
		{"47.", Ohm, 47, "a trailing point"},
		{"  4k7  ", Ohm, 4.7e3, "surrounding space is ignored"},
		{"0", Ohm, 0, "zero parses; callers reject it for part values (FORMAT.md §1)"},
		{"1e-00006", Farad, 1e-6, "leading zeros in the exponent"},
		{"0e99999", Ohm, 0, "zero times any power of ten is zero"},
		{"0.30000000000000004", Ohm, 0.30000000000000004, "17 significant digits are kept"},
	})
}

// TestRejects checks inputs that FORMAT.md §1 makes input errors.
func TestRejects(t *testing.T) {
	runReject(t, []rejectCase{
		// A unit that does not fit the field.
		{"10V", Ohm, "unit V does not fit", "FORMAT.md §1: unit must fit the field"},
		{"10 ohm", Volt, "unit ohm does not fit", "FORMAT.md §1"},
		{"10\u2126", Farad, "unit \u2126 does not fit", "FORMAT.md §1"},
		{"10F", Henry, "unit F does not fit", "FORMAT.md §1"},
		{"10H", Hertz, "unit H does not fit", "FORMAT.md §1"},
		{"10Hz", Henry, "unit Hz does not fit", "FORMAT.md §1"},
		{"10mA", Watt, "unit A does not fit", "FORMAT.md §1"},
		{"2W", Ampere, "unit W does not fit", "FORMAT.md §1"},
		{"25C", Volt, "unit C does not fit", "FORMAT.md §1"},
		{"12V", Celsius, "unit V does not fit", "FORMAT.md §1"},
		{"5%", Ohm, "unit % does not fit", "FORMAT.md §1"},
		{"5%", Ratio, "unit % does not fit", "FORMAT.md §1"},
		{"9.5mm", Farad, "unit m does not fit", "FORMAT.md §1"},
		{"10nF", Metre, "unit F does not fit", "FORMAT.md §1"},
		{"10 mm", Celsius, "unit m does not fit", "FORMAT.md §1"},
		{"5 kV", Fraction, "unit V does not fit", "FORMAT.md §1"},
		{"4n7F", Ohm, "unit F does not fit", "a code carries only its own field's unit"},
		{"10 ohmz", Ohm, "unknown unit", "a misspelt unit"},
		{"25c", Celsius, "unknown unit", "FORMAT.md §1: case matters"},
		// K is kilo only in resistances, kelvin only in temperatures.
		{"4K7", Farad, "K7", "FORMAT.md §1: K is kilo only in resistances"},
		{"4.7KV", Volt, "unknown unit", "FORMAT.md §1: K is kilo only in resistances"},
		{"1KHz", Hertz, "unknown unit", "FORMAT.md §1: K is kilo only in resistances"},
		{"298.15K", Volt, "unit K does not fit", "FORMAT.md §1: K is kelvin only in temperatures"},
		{"4K7", Celsius, "", "FORMAT.md §1: no code in a temperature"},
		// R is the decimal point only in resistances.
		{"2R2", Farad, "", "FORMAT.md §1: R only in resistances"},
		{"2R2", Henry, "", "FORMAT.md §1"},
		{"2R2", Volt, "", "FORMAT.md §1"},
		{"470R", Farad, "", "FORMAT.md §1"},
		{"4.7R", Ohm, "", "R is the decimal point; it cannot follow one"},
		// No code and no prefix where the field takes none.
		{"5k5%", Fraction, "", "a tolerance takes no prefix or code"},
		{"2k2", Ratio, "", "a plain number takes no prefix or code"},
		{"1k", Ratio, "", "a plain number takes no prefix"},
		{"25mC", Celsius, "", "a temperature takes no prefix"},
		{"9m5", Metre, "", "no code in a length: the m could be the unit"},
		// Temperatures and lengths need their unit.
		{"25", Celsius, "needs its unit", "FORMAT.md §1: a bare temperature is an input error"},
		{"9.5", Metre, "needs its unit", "FORMAT.md §1: a bare length is an input error"},
		// Below absolute zero.
		{"-274C", Celsius, "absolute zero", "below -273.15 °C (SI)"},
		{"-1K", Celsius, "absolute zero", "a negative kelvin temperature"},
		// Junk.
		{"", Ohm, "empty", "nothing"},
		{"   ", Ohm, "empty", "only space"},
		{"inf", Ohm, "no number", "Go's ParseFloat would accept it"},
		{"Inf", Volt, "no number", "Go's ParseFloat would accept it"},
		{"+Inf", Volt, "no number", "Go's ParseFloat would accept it"},
		{"NaN", Ohm, "no number", "Go's ParseFloat would accept it"},
		{"nan", Fraction, "no number", "Go's ParseFloat would accept it"},
		{"infinity", Hertz, "no number", "Go's ParseFloat would accept it"},
		{"1e999", Ohm, "out of range", "overflows a float64"},
		{"1e308k", Ohm, "out of range", "overflows once the prefix is applied"},
		{"1e-999", Farad, "too small", "would silently become zero"},
		{"1e9999999999", Ohm, "out of range", "an exponent too long for an int"},
		{"0x10", Ohm, "", "hexadecimal"},
		{"1_000", Ohm, "", "digit separators"},
		{"1,5k", Ohm, "", "a decimal comma"},
		{"k", Ohm, "no number", "a prefix alone"},
		{"R", Ohm, "no number", "the decimal-point letter alone"},
		{"p", Farad, "no number", "a prefix alone"},
		{"Ω", Ohm, "no number", "a unit alone"},
		{"4k7k", Ohm, "", "two decimal-point letters"},
		{"4.7k7", Ohm, "", "a point and a decimal-point letter"},
		{"4k7.5", Ohm, "", "a point after the code"},
		{"4R7R", Ohm, "", "two R letters"},
		{"4k7 k\u03a9", Ohm, "", "a code followed by a prefix"},
		{"1e3k7", Ohm, "", "an exponent and a decimal-point letter"},
		{"4 k7", Ohm, "", "a code split by a space"},
		{"4kk", Ohm, "", "two prefixes"},
		{".", Ohm, "no number", "a point alone"},
		{"-", Volt, "no number", "a sign alone"},
		{"+", Volt, "no number", "a sign alone"},
		{"--5", Volt, "no number", "two signs"},
		{"e5", Ohm, "no number", "an exponent without a mantissa"},
		{"5e", Ohm, "", "an exponent without digits"},
		{"1..2", Ohm, "", "two points"},
		{"4.7.1", Ohm, "", "two points"},
		{"\xff", Ohm, "no number", "invalid UTF-8"},
		{"4k\xff", Ohm, "", "invalid UTF-8 after a code letter"},
	})
}

func TestNeedsUnitIsWrapped(t *testing.T) {
	for _, c := range []struct {
		in string
		u  Unit
	}{{"25", Celsius}, {"9.5", Metre}} {
		_, err := Parse(c.in, c.u)
		if !errors.Is(err, ErrNeedsUnit) {
			t.Errorf("Parse(%q, %v) = %v, want an error wrapping ErrNeedsUnit", c.in, c.u, err)
		}
	}
	if _, err := Parse("25V", Celsius); errors.Is(err, ErrNeedsUnit) {
		t.Errorf("a wrong unit must not report a missing one: %v", err)
	}
}

// TestFormat checks the message form: engineering prefixes, the shortest
// digits, and plain decimals below one ohm (common practice, no published
// source: "0.47 ohm" reads better than "470 mohm").
func TestFormat(t *testing.T) {
	for _, c := range []struct {
		v    float64
		u    Unit
		want string
	}{
		{4700, Ohm, "4.7 kohm"},
		{0.47, Ohm, "0.47 ohm"},
		{0.1, Ohm, "0.1 ohm"},
		{0.001, Ohm, "0.001 ohm"},
		{2.2, Ohm, "2.2 ohm"},
		{1e6, Ohm, "1 Mohm"},
		{1.01e7, Hertz, "10.1 MHz"},
		{4.7e-9, Farad, "4.7 nF"},
		{0.68e-12, Farad, "0.68 pF"},
		{22e-6, Henry, "22 µH"},
		{0.625, Watt, "625 mW"},
		{12, Volt, "12 V"},
		{9.5e-3, Metre, "9.5 mm"},
		{25, Celsius, "25 °C"},
		{0.05, Fraction, "5 %"},
		{0.07, Fraction, "7 %"},
		{0.98, Ratio, "0.98"},
		{1e15, Ohm, "1e+15 ohm"},
	} {
		if got := Format(c.v, c.u); got != c.want {
			t.Errorf("Format(%v, %v) = %q, want %q", c.v, c.u, got, c.want)
		}
	}
}

// TestCode checks that Code writes the IEC 60062 form for resistances and
// capacitances (REFERENCES §2 examples) and prefix plus unit elsewhere.
func TestCode(t *testing.T) {
	for _, c := range []struct {
		v    float64
		u    Unit
		want string
		src  string
	}{
		{4.7e3, Ohm, "4k7", "REFERENCES §2: 4k7"},
		{0.47, Ohm, "R47", "REFERENCES §2: R47"},
		{2.2, Ohm, "2R2", "REFERENCES §2: 2R2"},
		{4.7e6, Ohm, "4M7", "REFERENCES §2: 4M7"},
		{47.3e3, Ohm, "47k3", "REFERENCES §2: 47K3, lower-case k per FORMAT.md"},
		{0.1, Ohm, "R1", "REFERENCES §2: R10 without the tolerance zero"},
		{470, Ohm, "470", "a bare number is ohms (FORMAT.md §1)"},
		{4.7e-9, Farad, "4n7", "REFERENCES §2: 4n7"},
		{2.2e-9, Farad, "2n2", "REFERENCES §2: 2n2"},
		{100e-9, Farad, "100n", "REFERENCES §2: 100n"},
		{10e-12, Farad, "10p", "REFERENCES §2: 10p"},
		{0.68e-12, Farad, "p68", "REFERENCES §2: p68"},
		{1e-6, Farad, "1u", "REFERENCES §2: 1µ0, u for µ (FORMAT.md §1)"},
		{22e-6, Henry, "22uH", "FORMAT.md §1"},
		{0.5, Watt, "500mW", "FORMAT.md §1"},
		{63, Volt, "63V", "FORMAT.md §1"},
		{10.1e6, Hertz, "10.1MHz", "FORMAT.md §2"},
		{9.5e-3, Metre, "9.5mm", "FORMAT.md §1"},
		{25, Celsius, "25C", "FORMAT.md §1"},
		{0.05, Fraction, "5%", "FORMAT.md §1"},
		{0.07, Fraction, "7%", "0.07*100 would print 7.000000000000001"},
	} {
		if got := Code(c.v, c.u); got != c.want {
			t.Errorf("Code(%v, %v) = %q, want %q (%s)", c.v, c.u, got, c.want, c.src)
		}
	}
}

// TestRoundTripEdges walks magnitudes from the smallest subnormal to the
// largest float through Code and Format for every unit.
func TestRoundTripEdges(t *testing.T) {
	values := []float64{
		math.SmallestNonzeroFloat64, 1e-300, 1e-15, 0.99e-15, 1e-13, 0.68e-12, 1e-12,
		0.00047, 0.001, 0.47, 0.1 + 0.2, 1, 2.2, 4700.000000000001, 999.9999999999999,
		1e9, 999e9, 1e12, 1e300, math.MaxFloat64,
	}
	for u := Ohm; u <= Ratio; u++ {
		for _, m := range values {
			for _, v := range []float64{m, -m} {
				if u == Celsius && v < -273.15 {
					continue
				}
				roundTrip(t, v, u)
			}
		}
	}
}

func roundTrip(t *testing.T, v float64, u Unit) {
	t.Helper()
	for name, s := range map[string]string{"Code": Code(v, u), "Format": Format(v, u)} {
		got, err := Parse(s, u)
		if err != nil {
			t.Errorf("Parse(%s(%v, %v) = %q): %v", name, v, u, s, err)
		} else if math.Float64bits(got) != math.Float64bits(v) {
			t.Errorf("Parse(%s(%v, %v) = %q) = %v, want %v", name, v, u, s, got, v)
		}
	}
}

func TestUnitString(t *testing.T) {
	if Ohm.String() != "ohm" || Hertz.String() != "Hz" || Unit(-1).String() != "?" || Unit(99).String() != "?" {
		t.Errorf("Unit.String: %q %q %q %q", Ohm, Hertz, Unit(-1), Unit(99))
	}
}

// FuzzParse: any string, any field — never a panic, and every accepted value is
// finite (the project's rule: bad input never yields NaN or Inf).
func FuzzParse(f *testing.F) {
	for _, s := range []string{"4k7", "R47", "1µ0", "298.15K", "-40C", "5%", "9.5mm", "1e999", "4k7k", ""} {
		f.Add(s, uint8(0))
	}
	f.Fuzz(func(t *testing.T, s string, unit uint8) {
		u := Unit(unit % uint8(Ratio+1))
		v, err := Parse(s, u)
		if err != nil {
			var qe *Error
			if !errors.As(err, &qe) || qe.Input != s || qe.Msg == "" {
				t.Fatalf("Parse(%q, %v): error %#v lacks input or message", s, u, err)
			}
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("Parse(%q, %v) = %v", s, u, v)
		}
		if u == Celsius && v < -273.15 {
			t.Fatalf("Parse(%q, %v) = %v, below absolute zero", s, u, v)
		}
	})
}

// FuzzRoundTrip: for any finite non-zero float and every unit, Code and Format
// read back bit for bit (temperatures from absolute zero up).
func FuzzRoundTrip(f *testing.F) {
	for _, v := range []float64{4700, 0.47, 0.68e-12, 0.07, 25, math.MaxFloat64, math.SmallestNonzeroFloat64} {
		f.Add(math.Float64bits(v), uint8(0))
	}
	f.Fuzz(func(t *testing.T, bits uint64, unit uint8) {
		v := math.Float64frombits(bits)
		if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
			return
		}
		u := Unit(unit % uint8(Ratio+1))
		if u == Celsius && v < -273.15 {
			return
		}
		roundTrip(t, v, u)
	})
}

func BenchmarkParse(b *testing.B) {
	for b.Loop() {
		for _, s := range []string{"4k7", "10.1MHz", "22 µH", "298.15K"} {
			u := Ohm
			switch s[len(s)-1] {
			case 'z':
				u = Hertz
			case 'H':
				u = Henry
			case 'K':
				u = Celsius
			}
			if _, err := Parse(s, u); err != nil {
				b.Fatal(err)
			}
		}
	}
}

// No message prints a negative zero: a value that rounds to nothing is 0.
func TestNoNegativeZero(t *testing.T) {
	for _, u := range []Unit{Ohm, Farad, Henry, Volt, Ampere, Watt, Hertz, Metre, Celsius, Fraction, Ratio, Decibel} {
		for _, got := range []string{Format(math.Copysign(0, -1), u), Approx(math.Copysign(0, -1), u)} {
			if strings.HasPrefix(got, "-") {
				t.Errorf("unit %v: %q", u, got)
			}
		}
	}
}

// A level in decibels reads with or without its unit, and writes with it.
func TestDecibel(t *testing.T) {
	for in, want := range map[string]float64{"8dB": 8, "8 dB": 8, "10": 10, "0.5dB": 0.5} {
		if got, err := Parse(in, Decibel); err != nil || got != want {
			t.Errorf("Parse(%q) = %v, %v; want %v", in, got, err, want)
		}
	}
	if _, err := Parse("8kdB", Decibel); err == nil {
		t.Error("a prefix on a level in dB was accepted")
	}
	if got := Format(8, Decibel); got != "8 dB" {
		t.Errorf("Format(8 dB) = %q", got)
	}
	if v, err := Parse(Code(1.5, Decibel), Decibel); err != nil || v != 1.5 {
		t.Errorf("Code round trip: %v %v", v, err)
	}
}
