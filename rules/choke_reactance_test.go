package rules

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"
)

// rxChokeFeed is a 20 m choke feeding a 50 ohm load from a 12 V supply: with
// the choke removed, the impedance across it is the load's 50 ohm (the
// supply end is AC ground). The role is given, as there is no transistor.
func rxChokeFeed(l1 string) string {
	return fmt.Sprintf(`
[circuit]
name = "20 m choke feed into 50 ohm"
band = ["14MHz", "14.35MHz"]
[supplies.vcc]
volts = "12V"
[ports.out]
net = "load"
direction = "out"
[parts]
L1 = { kind = "inductor", %s, nets = ["vcc", "load"], role = "choke" }
`, l1)
}

// REFERENCES.md §11 [C]: a shunt reactance of ten times a node's impedance
// lowers it by 0.5 % (|Z ∥ j10Z| = 0.995 Z); the choke's min_ratio of 10
// is common practice, no published source. At the strict 20: 0.125 %.
func TestChokeTenTimesCostsHalfAPercent(t *testing.T) {
	for _, tc := range []struct {
		set  string
		drop float64
	}{{"default", 0.00499}, {"strict", 0.00125}} {
		f := rxOne(t, rxRun(t, rxChokeFeed(`value = "2u2"`), tc.set, "choke.reactance", false, nil), "L1")
		k := f.Limit
		drop := 1 - cmplx.Abs(1/complex(1, -1/k)) // 1 − |Z ∥ jkZ|/Z
		rxNear(t, tc.set+" drop at the limit", drop, tc.drop, 0.01)
	}
}

// By closed form: X = 2π·14 MHz·2.2 µH = 193.5 ohm against 50 ohm, 3.870x:
// fails; the need 10·50/(2π·14 MHz) = 5.684 µH rounds up (E12) to 6.8 µH.
// 6.8 µH itself gives 598.2 ohm, 11.96x.
func TestChokeValueClosedForm(t *testing.T) {
	f := rxOne(t, rxRun(t, rxChokeFeed(`value = "2u2"`), "default", "choke.reactance", false, nil), "L1")
	if f.Unit != "ratio" || f.Comparison != ">=" {
		t.Errorf("unit %q comparison %q, want ratio >=", f.Unit, f.Comparison)
	}
	w := 2 * math.Pi * 14e6
	rxNear(t, "ratio(2.2 µH)", f.Measured, w*2.2e-6/50, 1e-6)
	if to := rxChange(f, "L1", "value"); to != "6.8uH" {
		t.Errorf("fix %q, want 6.8uH", to)
	}
	g := rxOne(t, rxRun(t, rxChokeFeed(`value = "6u8"`), "default", "choke.reactance", false, nil), "L1")
	rxNear(t, "ratio(6.8 µH)", g.Measured, w*6.8e-6/50, 1e-6)
	if g.Measured < g.Limit {
		t.Errorf("6.8 µH should pass: %.4g", g.Measured)
	}
}

// A choke given by value is judged at value × (1 − tolerance) in the worst
// case: 6.8 µH at -10 % is 6.12 µH, 10.77x (passes); at 20 % tolerance,
// 5.44 µH, 9.57x, fails, and the nominal need 5.684/0.8 = 7.105 µH rounds up
// to 8.2 µH.
func TestChokeValueWorstCase(t *testing.T) {
	w := 2 * math.Pi * 14e6
	f := rxOne(t, rxRun(t, rxChokeFeed(`value = "6u8"`), "default", "choke.reactance", true, nil), "L1")
	rxNear(t, "ratio at -10 %", f.Measured, w*6.12e-6/50, 1e-6)
	f = rxOne(t, rxRun(t, rxChokeFeed(`value = "6u8", tolerance = "20%"`), "default", "choke.reactance", true, nil), "L1")
	rxNear(t, "ratio at -20 %", f.Measured, w*5.44e-6/50, 1e-6)
	if to := rxChange(f, "L1", "value"); to != "8.2uH" {
		t.Errorf("fix %q, want 8.2uH", to)
	}
}

// A choke wound on the shipped 9.5 mm mu800 toroid (AL 360.44 nH by IEC
// 60205, REFERENCES.md §7): 4 turns, 5.767 µH, 10.15x at nominal; at AL
// -25 % (270.33 nH) 7.613x, and the turns needed there are
// sqrt(5.684 µH/270.33 nH) = 4.585: 5 turns.
func TestChokeTurnsOnCore(t *testing.T) {
	const al = 360.44e-9 // 4π·10⁻⁷·800·3.25 mm·ln 2/(2π), REFERENCES.md §7
	w := 2 * math.Pi * 14e6
	src := rxChokeFeed(`turns = 4, core = "toroid-9.5x4.75x3.25-mu800"`)
	f := rxOne(t, rxRun(t, src, "default", "choke.reactance", false, nil), "L1")
	rxNear(t, "nominal ratio", f.Measured, w*al*16/50, 1e-4)
	if f.Measured < f.Limit {
		t.Errorf("4 turns should pass at nominal AL: %.4g", f.Measured)
	}
	f = rxOne(t, rxRun(t, src, "default", "choke.reactance", true, nil), "L1")
	rxNear(t, "ratio at AL -25 %", f.Measured, w*0.75*al*16/50, 1e-4)
	if to := rxChange(f, "L1", "turns"); to != "5" {
		t.Errorf("fix %q, want 5 turns (changes %+v)", to, f.Changes)
	}
}

// The 20 m buffer of the goldens: a 2N3904 with an unbypassed emitter and
// its collector on the choke; the collector is a current source, so the
// choke shunts only the 50 ohm load through C3, |50 − j0.114| ohm by closed
// form (Cμ's feedback, left out, lowers it by about 0.1 %).
func TestChokeBufferClosedForm(t *testing.T) {
	src := `
[circuit]
name = "20 m buffer, choke-fed collector"
band = ["14MHz", "14.35MHz"]
[supplies.vcc]
volts = "12V"
[ports.in]
net = "rf_in"
direction = "in"
[ports.out]
net = "rf_out"
direction = "out"
[parts]
C1 = { kind = "capacitor", value = "100n", nets = ["rf_in", "base"] }
R1 = { kind = "resistor", value = "22k", nets = ["vcc", "base"] }
R2 = { kind = "resistor", value = "4k7", nets = ["base", "gnd"] }
Q1 = { kind = "npn", device = "2N3904", nets = { collector = "coll", base = "base", emitter = "emit" } }
R3 = { kind = "resistor", value = "220", nets = ["emit", "gnd"] }
L1 = { kind = "inductor", value = "2u2", nets = ["vcc", "coll"] }
C3 = { kind = "capacitor", value = "100n", nets = ["coll", "rf_out"] }
`
	f := rxOne(t, rxRun(t, src, "default", "choke.reactance", false, nil), "L1")
	w := 2 * math.Pi * 14e6
	z := rxAbs(50 + rxCap(100e-9, 14e6))
	rxNear(t, "ratio", f.Measured, w*2.2e-6/z, 0.005)
}
