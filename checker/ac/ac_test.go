package ac

import (
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// Capacitive reactance 1/(2πfC) and inductive reactance 2πfL, against the
// worked values of REFERENCES.md §10 (coupling into 50 Ω at 1.8 MHz: 22 nF
// 4.02 Ω, 10 nF 8.84 Ω, 100 nF 0.884 Ω) and the handbook formula X_L = 2πfL
// (1 µH at 10 MHz is 62.83 Ω, worked by hand).
func TestReactanceHandbook(t *testing.T) {
	// A 160 m input: three coupling capacitors from the input net, each into 1 kΩ.
	n := newNet(1.8e6, 2.0e6).port("in", "rf_in", "in", 50).
		cap("C1", "rf_in", "n1", 22e-9).r("R1", "n1", "gnd", 1000).
		cap("C2", "rf_in", "n2", 10e-9).r("R2", "n2", "gnd", 1000).
		cap("C3", "rf_in", "n3", 100e-9).r("R3", "n3", "gnd", 1000)
	res := n.analyze(t)
	nearAbs(t, "X(C1 22 nF)", res.Parts["C1"].Reactance, 4.02, 0.005)
	nearAbs(t, "X(C2 10 nF)", res.Parts["C2"].Reactance, 8.84, 0.005)
	nearAbs(t, "X(C3 100 nF)", res.Parts["C3"].Reactance, 0.884, 0.0005)
	if res.Parts["C1"].Inductance != 0 {
		t.Errorf("capacitor inductance = %g, want 0", res.Parts["C1"].Inductance)
	}
	// C1 removed: from rf_in, RS = 50 Ω (the in port in its AC form) in
	// parallel with the two other branches, to gnd, then R1 back up to n1.
	// Series and parallel combination (Ohm's and Kirchhoff's laws).
	f := 1.8e6
	want := ohm(1000) + par(ohm(50), zC(10e-9, f)+ohm(1000), zC(100e-9, f)+ohm(1000))
	near(t, "circuit impedance at C1", res.Parts["C1"].CircuitImpedance, cmplx.Abs(want), 1e-6)

	m := newNet(10e6, 14e6).port("in", "a", "in", 50).ind("L1", "a", "gnd", 1e-6)
	rl := m.analyze(t).Parts["L1"]
	nearAbs(t, "X(L1 1 µH at 10 MHz)", rl.Reactance, 62.83, 0.005)
	near(t, "L1 inductance", rl.Inductance, 1e-6, 1e-12)
	near(t, "circuit impedance at L1 (RS alone)", rl.CircuitImpedance, 50, 1e-6)
}

// An inductor given by turns on a core: L = AL·N² (IEC 60205 definition of
// the inductance factor).
func TestInductorByTurns(t *testing.T) {
	n := newNet(7e6, 7.3e6).port("in", "a", "in", 50).r("R1", "a", "gnd", 50)
	n.c.Parts = append(n.c.Parts, &circuit.Part{Ref: "L1", Kind: circuit.Inductor,
		Nets: []string{"a", "gnd"}, Turns: 10, AL: 20e-9})
	res := n.analyze(t)
	near(t, "L", res.Parts["L1"].Inductance, 2e-6, 1e-12)
	near(t, "X", res.Parts["L1"].Reactance, 2*math.Pi*7e6*2e-6, 1e-12)
}

// A transformer's impedance ratio is its turns ratio squared (handbook fact
// of the ideal transformer): a 2:1 winding loaded with 50 Ω presents about
// 200 Ω. With k = 0.98 and finite inductance the exact value follows from the
// two-winding equations V1 = Z11·I1 + jωM·I2, 0 = jωM·I1 + (Z22 + RL)·I2,
// so Zin = Z11 + (ωM)²/(Z22 + RL). At the 4× winding rule (REFERENCES §11:
// the secondary's reactance four times its 50 Ω load at the lowest frequency),
// the result is within 3 % of the ideal (Fern: "within three percent").
func TestTransformerTurnsRatio(t *testing.T) {
	const al, n1, n2, k, rl, r1 = 360.4e-9, 12.0, 6.0, 0.98, 50.0, 0.1
	l1, l2 := al*n1*n1, al*n2*n2
	lo := 4 * rl / (2 * math.Pi * l2) // ωL2 = 4·RL
	hi := 1.6 * lo
	n := newNet(lo, hi).port("in", "rf_in", "in", 200).port("out", "rf_out", "out", rl).
		xfmr("T1", al, k, wdg("primary", n1, "rf_in", "gnd", r1), wdg("secondary", n2, "rf_out", "gnd", 0))
	res := n.analyze(t)
	m := k * math.Sqrt(l1*l2)
	for i, bp := range res.Band {
		w := 2 * math.Pi * bp.Frequency
		want := ohm(r1) + zL(l1, bp.Frequency) + complex(w*w*m*m, 0)/(zL(l2, bp.Frequency)+ohm(rl))
		nearZ(t, "Zin", bp.InputImpedance, want, 1e-7)
		if i != 1 {
			near(t, "|Zin| against (n1/n2)²·RL", cmplx.Abs(bp.InputImpedance), 200, 0.03)
		}
	}
	ws := res.Windings["T1"]
	w := 2 * math.Pi * lo
	near(t, "primary L", ws["primary"].Inductance, l1, 1e-12)
	near(t, "secondary X", ws["secondary"].Reactance, w*l2, 1e-12)
	near(t, "secondary X = 4·RL by construction", ws["secondary"].Reactance, 200, 1e-9)
	// With the transformer removed each winding sees only its port.
	near(t, "primary termination (RS)", ws["primary"].Termination, 200, 1e-6)
	near(t, "secondary termination (RL)", ws["secondary"].Termination, 50, 1e-6)
}

// Coupled inductors in series: aiding gives L1 + L2 + 2M, opposing L1 + L2 − 2M
// (handbook fact of mutual inductance). This fixes the dot convention: each
// winding's dot is at its first net.
func TestTransformerDots(t *testing.T) {
	const al, n1, n2, k = 100e-9, 10.0, 5.0, 0.9
	l1, l2 := al*n1*n1, al*n2*n2
	m := k * math.Sqrt(l1*l2)
	f := 1e6
	for _, tc := range []struct {
		name string
		sec  *circuit.Winding
		l    float64
	}{
		{"aiding", wdg("s", n2, "mid", "gnd", 0), l1 + l2 + 2*m},
		{"opposing", wdg("s", n2, "gnd", "mid", 0), l1 + l2 - 2*m},
	} {
		n := newNet(f, f).r("R1", "a", "gnd", 1e6).xfmr("T1", al, k, wdg("p", n1, "a", "mid", 0), tc.sec)
		res := n.analyze(t)
		z, err := res.Impedance(f, "a", "gnd")
		if err != nil {
			t.Fatal(err)
		}
		nearZ(t, tc.name, z, par(zL(tc.l, f), ohm(1e6)), 1e-7)
	}
}

// ceStage is a common-emitter stage with a 27 kΩ / 4.7 kΩ divider, 470 Ω
// emitter resistor bypassed by 100 µF, 1 kΩ collector load, 10 µF coupling
// capacitors and 50 Ω ports, for the low-frequency input and gain checks.
func ceStage(kind circuit.Kind, lo, hi float64) *net {
	vcc := 12.0
	if kind == circuit.PNP {
		vcc = -12
	}
	return newNet(lo, hi).supply("vcc", vcc, 0).port("in", "rf_in", "in", 50).port("out", "rf_out", "out", 50).
		cap("C1", "rf_in", "base", 10e-6).r("R1", "vcc", "base", 27e3).r("R2", "base", "gnd", 4.7e3).
		r("RE", "emit", "gnd", 470).cap("CE", "emit", "gnd", 100e-6).r("RC", "vcc", "coll", 1000).
		cap("C2", "coll", "rf_out", 10e-6)
}

// ceExpected is the hybrid-π solution of ceStage without Cμ, by hand: with
// yπ = 1/rπ + jωCπ and ZE = RE ‖ CE, the base shows Zb = 1/yπ + (1 + gm/yπ)·ZE;
// vbe = vb/(yπ·Zb); the collector current gm·vbe flows in RC ‖ (C2 + RL).
func ceExpected(f, gm, beta, ft float64) (zin complex128, av float64) {
	ypi := complex(gm/beta, 2*math.Pi*f*gm/(2*math.Pi*ft))
	ze := par(ohm(470), zC(100e-6, f))
	zb := 1/ypi + (1+complex(gm, 0)/ypi)*ze
	zpar := par(ohm(27e3), ohm(4.7e3), zb)
	zin = zC(10e-6, f) + zpar
	vb := zpar / zin // per volt at rf_in
	vc := -complex(gm, 0) * vb / (ypi * zb) * par(ohm(1000), zC(10e-6, f)+ohm(50))
	vout := vc * 50 / (zC(10e-6, f) + 50)
	return zin, 20 * math.Log10(cmplx.Abs(vout))
}

// Common-emitter stage, emitter bypassed, well below the β cut-off: the input
// impedance is close to R1 ‖ R2 ‖ β·re, re = VT/IE (REFERENCES §9–10). Vector
// of REFERENCES §10: IE = 5 mA at 300 K (re = 5.170 Ω), β = 100, R1 = 27 kΩ,
// R2 = 4.7 kΩ. The exact hybrid-π value (ceExpected) is checked tightly, the
// textbook approximation to 2 %. A PNP's small-signal model is the same
// (FORMAT.md §6).
func TestCommonEmitterInput(t *testing.T) {
	const beta, ie, ft = 100.0, 5e-3, 300e6
	ic := ie * beta / (beta + 1)
	for _, kind := range []circuit.Kind{circuit.NPN, circuit.PNP} {
		n := ceStage(kind, 100e3, 150e3).bjt(kind, "Q1", "coll", "base", "emit", ic, beta, ft, 0)
		n.op.VT = vt(300)
		res := n.analyze(t)

		re := vt(300) / ie
		nearAbs(t, "re (REFERENCES §9)", re, 5.170, 0.0005)
		approx := cmplx.Abs(par(ohm(27e3), ohm(4.7e3), ohm(beta*re)))
		gm := ic / vt(300)
		for _, bp := range res.Band {
			zin, av := ceExpected(bp.Frequency, gm, beta, ft)
			nearZ(t, string(kind)+" Zin exact", bp.InputImpedance, zin, 1e-6)
			near(t, string(kind)+" |Zin| ≈ R1‖R2‖β·re", cmplx.Abs(bp.InputImpedance), approx, 0.02)
			nearAbs(t, string(kind)+" voltage gain", *bp.VoltageGainDB, av, 1e-5)
			// Textbook CE gain, emitter bypassed: |Av| ≈ gm·(RC ‖ RL).
			nearAbs(t, string(kind)+" voltage gain ≈ gm·(RC‖RL)", *bp.VoltageGainDB, 20*math.Log10(gm*1000*50/1050), 0.05)
		}
		b := res.BJTs["Q1"]
		near(t, "gm", b.GM, gm, 1e-12)
		near(t, "rπ = (β+1)·re", b.Rpi, (beta+1)*re, 1e-9)
	}
}

// β(f) ≈ fT/f well above the β cut-off (REFERENCES §9: 300 MHz at 10 MHz
// gives 30, at 30 MHz gives 10), measured as |ic/ib| of a transistor whose
// collector is shorted through a 1 mΩ shunt (the out port). The model
// figures are the §9 vector: 2N3904 at 10 mA and 25 °C, gm = 0.38922 S,
// Cπ = 202.49 pF with Cμ = 4 pF, rπ = 445.0 Ω at hFE 173.2.
func TestBetaFallsAsFtOverF(t *testing.T) {
	const shunt = 1e-3
	n := newNet(10e6, 30e6).port("in", "base", "in", 50).port("out", "coll", "out", shunt).
		bjt(circuit.NPN, "Q1", "coll", "base", "gnd", 10e-3, 173.2, 300e6, 4e-12)
	res := n.analyze(t)
	b := res.BJTs["Q1"]
	near(t, "gm", b.GM, 0.38922, 2e-5)
	near(t, "Cπ", b.Cpi, 202.49e-12, 5e-5)
	near(t, "rπ", b.Rpi, 445.0, 2e-4)
	near(t, "Cμ", b.Cmu, 4e-12, 1e-12)
	near(t, "beta_high = ft/fmax", b.BetaHigh, 10, 1e-12)

	for _, c := range []struct {
		bp   BandPoint
		want float64
		rel  float64
	}{{res.Band[0], 30, 0.02}, {res.Band[2], 10, 0.005}} {
		// ib = Vin/Zin, ic = Vout/RL.
		av := math.Pow(10, *c.bp.VoltageGainDB/20)
		beta := av * cmplx.Abs(c.bp.InputImpedance) / shunt
		near(t, "|β| against ft/f", beta, c.want, c.rel)
		// The exact short-circuit value |gm − jωCμ| / |1/rπ + jω(Cπ + Cμ)|.
		w := 2 * math.Pi * c.bp.Frequency
		gm := 10e-3 / vt(298.15)
		cpi := gm/(2*math.Pi*300e6) - 4e-12
		exact := cmplx.Abs(complex(gm, -w*4e-12)) / cmplx.Abs(complex(gm/173.2, w*(cpi+4e-12)))
		near(t, "|β| exact", beta, exact, 1e-4)
	}
}

// Return loss −20·log10|Γ| of resistive loads in a 50 Ω system, the vectors
// of REFERENCES §12: 75 Ω → 13.979 dB, 100 Ω and 25 Ω → 9.542 dB; a perfect
// match is capped at 99 dB (FORMAT.md §5).
func TestReturnLossVectors(t *testing.T) {
	for _, c := range []struct{ load, want float64 }{{75, 13.979}, {100, 9.542}, {25, 9.542}, {50, 99}} {
		res := newNet(14e6, 14.35e6).port("in", "a", "in", 50).r("R1", "a", "gnd", c.load).analyze(t)
		if !res.HasInput || res.HasGain {
			t.Errorf("HasInput %v HasGain %v, want true false", res.HasInput, res.HasGain)
		}
		for _, bp := range res.Band {
			nearAbs(t, "return loss", bp.ReturnLossDB, c.want, 0.0005)
			if bp.GainDB != nil || bp.VoltageGainDB != nil {
				t.Errorf("gains without an out port")
			}
		}
	}
}

// Transducer gain of a resistive divider, closed form: RS = 50 Ω, series
// 100 Ω, shunt 200 Ω, RL = 50 Ω. Vout/E = (200‖50)/(50 + 100 + 200‖50) by
// the voltage divider rule; GT = (|Vout|²/RL)/(|E|²/(4·RS)) (REFERENCES §12).
func TestDividerGain(t *testing.T) {
	res := newNet(3.5e6, 3.8e6).port("in", "a", "in", 50).port("out", "b", "out", 50).
		r("R1", "a", "b", 100).r("R2", "b", "gnd", 200).analyze(t)
	shunt := 200.0 * 50 / 250
	vout := shunt / (50 + 100 + shunt)
	gt := 10 * math.Log10(vout*vout/50*4*50)
	av := 20 * math.Log10(shunt/(100+shunt))
	for _, bp := range res.Band {
		if bp.GainDB == nil || bp.VoltageGainDB == nil {
			t.Fatal("gain missing")
		}
		nearAbs(t, "transducer gain", *bp.GainDB, gt, 1e-6)
		nearAbs(t, "voltage gain", *bp.VoltageGainDB, av, 1e-6)
		nearZ(t, "Zin", bp.InputImpedance, ohm(100+shunt), 1e-9)
	}
	nearAbs(t, "hand value: 10·log10(4·(40/190)²)", gt, -7.5133, 1e-4)
}

// The 4× winding rule vector of REFERENCES §11: a reactance X = 4R across a
// matched R–R path gives |Zin|/R = 0.970 and 18.1 dB return loss.
func TestFourTimesRule(t *testing.T) {
	const r, f = 50.0, 10e6
	l := 4 * r / (2 * math.Pi * f)
	res := newNet(f, 1.5*f).port("in", "a", "in", r).r("R1", "a", "gnd", r).ind("L1", "a", "gnd", l).analyze(t)
	bp := res.Band[0]
	nearAbs(t, "|Zin|/R", cmplx.Abs(bp.InputImpedance)/r, 0.970, 0.0005)
	nearAbs(t, "return loss", bp.ReturnLossDB, 18.1, 0.05)
	near(t, "X/R", res.Parts["L1"].Reactance/r, 4, 1e-12)
	// What the choke sees with itself removed: RS ‖ R1.
	near(t, "circuit impedance", res.Parts["L1"].CircuitImpedance, 25, 1e-6)
}

// An inductive collector load fed back through Cμ makes the input resistance
// negative (FORMAT.md §6; the Miller effect with a phase-shifted gain, textbook
// hybrid-π). Expected value from the two nodal equations:
// b: (yπ + yμ)·vb − yμ·vc = i, c: (gm − yμ)·vb + (yμ + yL)·vc = 0, so
// i/vb = yπ + yμ + yμ·(gm − yμ)/(yμ + yL).
func TestNegativeInputResistance(t *testing.T) {
	const ic, hfe, ft, cmu, l, f = 10e-3, 173.2, 300e6, 4e-12, 1e-6, 10e6
	n := newNet(f, 1.2*f).supply("vcc", 12, 0).port("in", "base", "in", 50).
		ind("L1", "vcc", "coll", l).bjt(circuit.NPN, "Q1", "coll", "base", "gnd", ic, hfe, ft, cmu)
	res := n.analyze(t)
	bp := res.Band[0]
	w := 2 * math.Pi * f
	gm := ic / vt(298.15)
	ypi := complex(gm/hfe+Gmin, w*(gm/(2*math.Pi*ft)-cmu))
	ymu := complex(0, w*cmu)
	yl := 1/zL(l, f) + Gmin
	yin := ypi + ymu + ymu*(complex(gm, 0)-ymu)/(ymu+yl)
	nearZ(t, "Zin", bp.InputImpedance, 1/yin, 1e-7)
	if real(bp.InputImpedance) >= 0 {
		t.Errorf("input resistance %g, want negative", real(bp.InputImpedance))
	}
	if bp.ReturnLossDB >= 0 {
		t.Errorf("return loss %g dB, want negative", bp.ReturnLossDB)
	}
	nearAbs(t, "return loss", bp.ReturnLossDB, gammaRL(1/yin, 50), 1e-6)
}

// No signal path to the output: the gain is nil (FORMAT.md §5), whether the
// out net is simply unconnected to the input or the only path is a cut-off
// transistor (IC = 0: gm = 0, rπ open, Cπ = 0; no cob).
func TestNoPathToOutput(t *testing.T) {
	cases := map[string]*net{
		"separate": newNet(1e6, 2e6).port("in", "a", "in", 50).port("out", "b", "out", 50).
			r("R1", "a", "gnd", 50).r("R2", "b", "gnd", 50),
		"cut-off": newNet(1e6, 2e6).supply("vcc", 9, 0).port("in", "base", "in", 50).port("out", "coll", "out", 50).
			r("R1", "base", "gnd", 1000).r("RC", "vcc", "coll", 1000).
			bjt(circuit.NPN, "Q1", "coll", "base", "gnd", 0, 100, 300e6, 0),
	}
	for name, n := range cases {
		res := n.analyze(t)
		if !res.HasGain {
			t.Errorf("%s: HasGain false", name)
		}
		for _, bp := range res.Band {
			if bp.GainDB != nil || bp.VoltageGainDB != nil {
				t.Errorf("%s: gain %v %v, want nil", name, bp.GainDB, bp.VoltageGainDB)
			}
		}
		if q := res.BJTs["Q1"]; q != nil && (q.GM != 0 || q.Rpi != 0 || q.Cpi != 0) {
			t.Errorf("cut-off transistor model %+v, want zeros", *q)
		}
	}
}

// An in port on an AC-ground net (a supply of zero impedance) sees 0 Ω: |Γ| = 1,
// 0 dB, and no gain can be defined.
func TestInputOnACGround(t *testing.T) {
	res := newNet(1e6, 2e6).supply("vcc", 5, 0).port("in", "vcc", "in", 50).port("out", "b", "out", 50).
		r("R1", "vcc", "b", 50).analyze(t)
	for _, bp := range res.Band {
		if bp.InputImpedance != 0 || bp.ReturnLossDB != 0 || bp.GainDB != nil || bp.VoltageGainDB != nil {
			t.Errorf("band point %+v, want Zin 0, RL 0 dB, no gains", bp)
		}
	}
}

// The reactance rules judge parallel capacitors as one group with the whole
// group removed (RULES.md), while each part's own circuit impedance keeps its
// twin in place. Closed form: R ‖ 1/(jωC).
func TestImpedanceRemovingParallelCapacitors(t *testing.T) {
	const f = 3.6e6
	n := newNet(f, 3.8e6).supply("vcc", 12, 0).r("R1", "vcc", "x", 1000).r("R2", "x", "gnd", 1000).
		cap("C1", "x", "gnd", 100e-9).cap("C2", "x", "gnd", 10e-9)
	res := n.analyze(t)
	g := par(ohm(1000), ohm(1000), ohm(1/Gmin))
	for _, c := range []struct {
		removed []string
		want    complex128
	}{
		{[]string{"C1", "C2"}, g},
		{[]string{"C2", "C1", "C1"}, g},
		{[]string{"C1"}, par(g, zC(10e-9, f))},
		{nil, par(g, zC(10e-9, f), zC(100e-9, f))},
	} {
		for i := 0; i < 2; i++ { // the second call comes from the cache
			z, err := res.Impedance(f, "x", "gnd", c.removed...)
			if err != nil {
				t.Fatal(err)
			}
			nearZ(t, "Z removing "+string(rune('0'+len(c.removed))), z, c.want, 1e-9)
		}
	}
	near(t, "C1 own circuit impedance", res.Parts["C1"].CircuitImpedance, cmplx.Abs(par(g, zC(10e-9, f))), 1e-9)
	if n := len(res.freqs[f].fresh); n != 0 {
		t.Errorf("%d fresh factorisations, want the low-rank update alone", n)
	}
	// Both ends AC ground, or the same net: no impedance.
	if z, _ := res.Impedance(f, "vcc", "gnd"); z != 0 {
		t.Errorf("vcc–gnd = %v, want 0", z)
	}
	for _, bad := range []struct {
		f       float64
		a, b    string
		removed []string
	}{{0, "x", "gnd", nil}, {math.NaN(), "x", "gnd", nil}, {math.Inf(1), "x", "gnd", nil},
		{f, "nowhere", "gnd", nil}, {f, "x", "nowhere", nil}, {f, "x", "gnd", []string{"C9"}}} {
		if _, err := res.Impedance(bad.f, bad.a, bad.b, bad.removed...); err == nil {
			t.Errorf("Impedance(%g, %s, %s, %v) gave no error", bad.f, bad.a, bad.b, bad.removed)
		}
	}
}

// A supply with a source impedance is AC ground behind it: a decoupling
// capacitor across a 0.2 Ω supply loaded by 100 Ω sees 0.2 ‖ 100.
func TestSupplyImpedance(t *testing.T) {
	res := newNet(1e6, 2e6).supply("vcc", 12, 0.2).r("R1", "vcc", "gnd", 100).cap("C1", "vcc", "gnd", 1e-6).analyze(t)
	near(t, "decoupling circuit impedance", res.Parts["C1"].CircuitImpedance, cmplx.Abs(par(ohm(0.2), ohm(100))), 1e-9)
}

// A removed part that dominates the impedance across it makes the low-rank
// update cancel; the answer must still be exact (a fresh factorisation).
// 1 F across 10 kΩ at 1 MHz: the rest of the circuit is 10 kΩ ‖ 1/Gmin.
func TestImpedanceDominantPartRemoved(t *testing.T) {
	const f = 1e6
	res := newNet(f, f).r("R1", "x", "gnd", 1e4).cap("C1", "x", "gnd", 1).r("R2", "x", "y", 10).
		cap("C2", "y", "gnd", 1).analyze(t)
	near(t, "rest at C1", res.Parts["C1"].CircuitImpedance,
		cmplx.Abs(par(ohm(1e4), ohm(1/Gmin), ohm(10)+par(zC(1, f), ohm(1/Gmin)))), 1e-9)
	z, err := res.Impedance(f, "x", "gnd", "C1", "C2")
	if err != nil {
		t.Fatal(err)
	}
	nearZ(t, "both removed", z, par(ohm(1e4), ohm(1/Gmin), ohm(10+1/Gmin)), 1e-9)
	if len(res.freqs[f].fresh) == 0 {
		t.Error("the fresh factorisation was not used")
	}
}

// A potentiometer is two resistors, each at least 1 mΩ (FORMAT.md §6).
func TestPotentiometerSections(t *testing.T) {
	n := newNet(1e6, 2e6).port("in", "a", "in", 50).port("out", "w", "out", 1e6)
	n.c.Parts = append(n.c.Parts, &circuit.Part{Ref: "RV1", Kind: circuit.Potentiometer,
		Nets: []string{"a", "w", "gnd"}, Value: 1000, Setting: 1})
	res := n.analyze(t)
	bp := res.Band[0]
	// Setting 1: a–wiper is the 1 mΩ floor, wiper–gnd 1000 Ω, the load 1 MΩ.
	nearZ(t, "Zin", bp.InputImpedance, ohm(1e-3)+par(ohm(1000), ohm(1e6)), 1e-8)
}

// Inputs the model cannot take are errors, never NaN.
func TestAnalyzeErrors(t *testing.T) {
	for name, n := range map[string]*net{
		"band reversed": newNet(2e6, 1e6).r("R1", "a", "gnd", 50),
		"band zero":     newNet(0, 1e6).r("R1", "a", "gnd", 50),
		"zero resistor": newNet(1e6, 2e6).r("R1", "a", "gnd", 0),
		"no op":         newNet(1e6, 2e6).bjt(circuit.NPN, "Q1", "c", "b", "gnd", 1e-3, 100, 300e6, 0),
		"k = 1": newNet(1e6, 2e6).xfmr("T1", 1e-7, 1, wdg("p", 4, "a", "gnd", 0),
			wdg("s", 2, "b", "gnd", 0)),
		"port impedance": newNet(1e6, 2e6).port("in", "a", "in", 0).r("R1", "a", "gnd", 50),
	} {
		if name == "no op" {
			n.op.BJTs = map[string]*dc.BJT{}
		}
		if _, err := Analyze(n.c, n.op); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

// A winding shorted on itself (both ends on one net) loads the others through
// the coupling: from the two-winding equations with V2 = 0,
// Zin = Z11 − (jωM)²/Z22 (handbook result for a shorted secondary). Removing the
// transformer leaves the rest of the circuit alone.
func TestShortedWinding(t *testing.T) {
	const al, n1, n2, k, r2, f = 100e-9, 10.0, 4.0, 0.9, 0.1, 5e6
	l1, l2 := al*n1*n1, al*n2*n2
	jwm := complex(0, 2*math.Pi*f*k*math.Sqrt(l1*l2))
	// R2 hangs the shorted winding's net on the input; it reaches gnd only through Gmin.
	res := newNet(f, f).port("in", "a", "in", 50).r("R1", "a", "gnd", 330).r("R2", "a", "b", 1000).
		xfmr("T1", al, k, wdg("p", n1, "a", "gnd", 0), wdg("s", n2, "b", "b", r2)).analyze(t)
	zin := zL(l1, f) - jwm*jwm/(ohm(r2)+zL(l2, f))
	rest := par(ohm(330), ohm(1000+1/Gmin))
	nearZ(t, "Zin", res.Band[0].InputImpedance, par(zin, rest), 1e-9)
	near(t, "primary termination", res.Windings["T1"]["p"].Termination, cmplx.Abs(par(ohm(50), rest)), 1e-9)
	if x := res.Windings["T1"]["s"].Termination; x != 0 {
		t.Errorf("shorted winding termination %g, want 0", x)
	}
}
