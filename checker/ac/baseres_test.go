package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/circuit"
)

// Closed-form vectors for the hybrid-π with a base spreading resistance:
// REFERENCES-2.md §1.3, tagged [C] there (computed by the sheet's author
// with a nodal and two-port solver, each checked by a second method). The
// device is a 2N3904 at IC 10 mA and 300 K: gm 0.38682 S, β0 173.2,
// rπ 447.76 Ω, fT 300 MHz, Cμ 4 pF, Cπ = gm/(2π·fT) − Cμ = 201.213 pF, no
// output resistance. The sheet prints two decimals; the tolerance is just
// over half a unit of the last printed digit.

// sheetDevice is the §1.3 transistor, base on "base", collector on coll,
// emitter on emit, with rb.
func sheetDevice(n *net, coll, emit string, rb float64) *net {
	n.op.VT = vt(300) // the sheet's 25.852 mV
	n.bjt(circuit.NPN, "Q1", coll, "base", emit, 10e-3, 173.2, 300e6, 4e-12)
	n.c.Part("Q1").BJT.RB = rb
	return n
}

// The sheet's own device figures, from this model's definitions.
func TestSheetDeviceFigures(t *testing.T) {
	n := sheetDevice(newNet(14e6, 14e6), "vcc", "gnd", 10).supply("vcc", 12, 0).port("in", "base", "in", 50)
	q := n.analyze(t).BJTs["Q1"]
	nearAbs(t, "gm", q.GM, 0.38682, 0.000005)
	nearAbs(t, "rπ", q.Rpi, 447.76, 0.005)
	nearAbs(t, "Cπ", q.Cpi, 201.213e-12, 0.0005e-12)
}

// "Zin at the base pin" (REFERENCES-2.md §1.3, [C]): common emitter, the
// collector load ZL from the collector to AC ground, Zin seen at the base
// pin for rb' 0 and 10 Ω, and with a 47 Ω base stopper in series (10 Ω
// rb'). rb adds exactly its own value to Zin's real part; so does the
// stopper. The imaginary part does not move.
func TestZinAtBasePin(t *testing.T) {
	type load struct {
		name string
		f    float64
		add  func(n *net) // the collector load, from coll to vcc (AC ground)
		want [3]complex128
	}
	for _, c := range []load{
		{"14 MHz, 1 µH", 14e6, func(n *net) { n.ind("L", "coll", "vcc", 1e-6) },
			[3]complex128{complex(-23.61, -42.13), complex(-13.61, -42.13), complex(33.39, -42.13)}},
		{"14 MHz, 1 µH ∥ 470 Ω", 14e6, func(n *net) { n.ind("L", "coll", "vcc", 1e-6).r("R", "coll", "vcc", 470) },
			[3]complex128{complex(-19.04, -40.06), complex(-9.04, -40.06), complex(37.96, -40.06)}},
		{"14 MHz, 1 µH ∥ 100 Ω", 14e6, func(n *net) { n.ind("L", "coll", "vcc", 1e-6).r("R", "coll", "vcc", 100) },
			[3]complex128{complex(-7.48, -39.91), complex(2.52, -39.91), complex(49.52, -39.91)}},
		{"14 MHz, 2.2 µH", 14e6, func(n *net) { n.ind("L", "coll", "vcc", 2.2e-6) },
			[3]complex128{complex(-25.92, -18.00), complex(-15.92, -18.00), complex(31.08, -18.00)}},
		{"14 MHz, 470 Ω", 14e6, func(n *net) { n.r("R", "coll", "vcc", 470) },
			[3]complex128{complex(1.90, -12.15), complex(11.90, -12.15), complex(58.90, -12.15)}},
		{"50 MHz, 0.33 µH", 50e6, func(n *net) { n.ind("L", "coll", "vcc", 0.33e-6) },
			[3]complex128{complex(-7.65, -8.88), complex(2.35, -8.88), complex(49.35, -8.88)}},
	} {
		for i, v := range []struct {
			rb      float64
			stopper bool
		}{{0, false}, {10, false}, {10, true}} {
			n := newNet(c.f, c.f).supply("vcc", 12, 0)
			in := "base"
			if v.stopper {
				in = "in"
				n.r("RS", "in", "base", 47)
			}
			n.port("in", in, "in", 50)
			sheetDevice(n, "coll", "gnd", v.rb)
			c.add(n)
			z := n.analyze(t).Band[0].InputImpedance
			what := fmt.Sprintf("%s, rb %g Ω, stopper %v", c.name, v.rb, v.stopper)
			nearAbs(t, what+": Re Zin", real(z), real(c.want[i]), 0.0051)
			nearAbs(t, what+": Im Zin", imag(z), imag(c.want[i]), 0.0051)
		}
	}
}

// The emitter follower with a capacitive emitter load (REFERENCES-2.md
// §1.3, [C]): collector at AC ground, CE from emitter to gnd, rb' = 0, Zin
// at the base. The sheet prints one decimal.
func TestFollowerCapacitiveLoad(t *testing.T) {
	for _, c := range []struct {
		f, ce float64
		want  complex128
	}{
		{10e6, 100e-12, complex(-1564.0, -2301.9)}, {10e6, 1000e-12, complex(-415.6, -214.5)},
		{30e6, 100e-12, complex(-401.6, -252.7)}, {30e6, 1000e-12, complex(-49.7, -35.8)},
		{100e6, 100e-12, complex(-42.5, -28.1)}, {100e6, 1000e-12, complex(-4.5, -9.4)},
	} {
		n := newNet(c.f, c.f).supply("vcc", 12, 0).port("in", "base", "in", 50)
		sheetDevice(n, "vcc", "emit", 0)
		n.cap("CE", "emit", "gnd", c.ce)
		z := n.analyze(t).Band[0].InputImpedance
		what := fmt.Sprintf("follower %g MHz, CE %g pF", c.f/1e6, c.ce*1e12)
		nearAbs(t, what+": Re Zin", real(z), real(c.want), 0.051)
		nearAbs(t, what+": Im Zin", imag(z), imag(c.want), 0.051)
		// The sheet's guide −ωT/(ω²·CE) for the real part holds where β(f) ≫ 1.
		if c.f == 100e6 {
			w, wt := 2*math.Pi*c.f, 2*math.Pi*300e6
			if guide := -wt / (w * w * c.ce); math.Abs(real(z)-guide) > 0.15*math.Abs(guide) {
				t.Errorf("%s: Re Zin %.4g far from the guide %.4g", what, real(z), guide)
			}
		}
	}
}

// The same follower with CE 100 pF ∥ RE 470 Ω and rb' 10 Ω (REFERENCES-2.md
// §1.3, [C]): at 100 MHz Zin = −31.6 − j29.4 Ω, and a 100 Ω base stopper
// makes the real part +68.4 Ω; at 30 MHz the stopper still leaves −255.3 Ω.
func TestFollowerStopper(t *testing.T) {
	for _, c := range []struct {
		f       float64
		stopper bool
		re      float64
		im      float64 // NaN: not printed
	}{{100e6, false, -31.6, -29.4}, {100e6, true, 68.4, -29.4}, {30e6, true, -255.3, math.NaN()}} {
		n := newNet(c.f, c.f).supply("vcc", 12, 0)
		in := "base"
		if c.stopper {
			in = "in"
			n.r("RB", "in", "base", 100)
		}
		n.port("in", in, "in", 50)
		sheetDevice(n, "vcc", "emit", 10)
		n.cap("CE", "emit", "gnd", 100e-12).r("RE", "emit", "gnd", 470)
		z := n.analyze(t).Band[0].InputImpedance
		what := fmt.Sprintf("follower ∥ 470 Ω at %g MHz, stopper %v", c.f/1e6, c.stopper)
		nearAbs(t, what+": Re Zin", real(z), c.re, 0.051)
		if !math.IsNaN(c.im) {
			nearAbs(t, what+": Im Zin", imag(z), c.im, 0.051)
		}
	}
}

// rb is a series element at the base pin: with every other value fixed,
// Zin(rb) − Zin(0) = rb exactly when the base is driven straight (the
// first identity of REFERENCES-2.md §1.1, "Zin(port) = rb' + 1/Yin(b')"),
// at any load and frequency, but for the 1e-12 S aid that b' carries like
// every net (it moves Zin by about 1e-12·|Zin|²).
func TestBaseResistanceIsSeries(t *testing.T) {
	zin := func(rb float64, f float64) complex128 {
		n := newNet(f, f).supply("vcc", 12, 0).port("in", "base", "in", 50)
		sheetDevice(n, "coll", "emit", rb)
		n.ind("L", "coll", "vcc", 1.5e-6).r("RE", "emit", "gnd", 22).cap("CE", "emit", "gnd", 1e-9)
		return n.analyze(t).Band[0].InputImpedance
	}
	for _, f := range []float64{1e6, 14e6, 144e6} {
		z0 := zin(0, f)
		for _, rb := range []float64{0.01, 10, 220} {
			a := cmplx.Abs(z0) + rb
			if d := zin(rb, f) - z0; cmplx.Abs(d-complex(rb, 0)) > 1e-9*a+2e-12*a*a {
				t.Errorf("%g MHz, rb %g: Zin moved by %v, want %g", f/1e6, rb, d, rb)
			}
		}
	}
}
