package noise

import (
	"math"
	"testing"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// t0C is T0 = 290 K in °C: every closed form below has the parts at T0.
const t0C = T0 - kelvin

func ckt(lo, hi float64) (*circuit.Circuit, *dc.Result) {
	c := &circuit.Circuit{Name: "noise", Band: [2]float64{lo, hi}, Ambient: circuit.Ambient{Nominal: t0C, Lo: t0C, Hi: t0C}}
	op := &dc.Result{TempC: t0C, VT: Boltzmann * T0 / Charge, BJTs: map[string]*dc.BJT{}, FETs: map[string]*dc.FET{}}
	return c, op
}

func port(c *circuit.Circuit, name, net, dir string, z float64) {
	c.Ports = append(c.Ports, &circuit.Port{Name: name, Net: net, Direction: dir, Impedance: z, Matched: true})
}

func res(c *circuit.Circuit, ref, a, b string, v float64) {
	c.Parts = append(c.Parts, &circuit.Part{Ref: ref, Kind: circuit.Resistor, Nets: []string{a, b}, Value: v})
}

func at(t *testing.T, c *circuit.Circuit, op *dc.Result, f float64) Point {
	t.Helper()
	r, err := ac.Analyze(c, op)
	if err != nil {
		t.Fatal(err)
	}
	p, err := At(c, op, r, f)
	if err != nil {
		t.Fatal(err)
	}
	if !p.Valid {
		t.Fatal("no noise figure")
	}
	return p
}

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.IsNaN(got) || math.IsInf(got, 0) || math.Abs(got-want) > tol {
		t.Errorf("%s = %.6g, want %.6g (±%.2g)", what, got, want, tol)
	}
}

// tPad adds a matched 50 ohm T pad of loss dB between nets a and b (parts
// and middle net named with prefix): series Z0·(K − 1)/(K + 1), shunt
// 2·Z0·K/(K² − 1), K = 10^(L/20) (the standard T-pad design formulas, common
// practice).
func tPad(c *circuit.Circuit, prefix, a, b string, loss float64) {
	k := math.Pow(10, loss/20)
	m := prefix + "m"
	res(c, prefix+"R1", a, m, 50*(k-1)/(k+1))
	res(c, prefix+"R2", m, "gnd", 2*50*k/(k*k-1))
	res(c, prefix+"R3", m, b, 50*(k-1)/(k+1))
}

// A matched resistive T attenuator at T0 has NF equal to its loss (Bowick-x
// p.194, 199, REFERENCES-2 §2.1).
func TestAttenuatorNoiseFigureIsItsLoss(t *testing.T) {
	for _, loss := range []float64{1, 3, 6, 10, 20} {
		c, op := ckt(1e6, 2e6)
		port(c, "in", "a", "in", 50)
		port(c, "out", "b", "out", 50)
		tPad(c, "", "a", "b", loss)
		p := at(t, c, op, 1.5e6)
		near(t, "NF of the pad", p.NFDB, loss, 1e-9)
		near(t, "noise temperature", p.TemperatureK, (math.Pow(10, loss/10)-1)*T0, 1e-6*T0*math.Pow(10, loss/10))
	}
}

// The same pad at another temperature: F = 1 + (L − 1)·T/T0 (the noise
// temperature of a lossy line or pad, Te = (L − 1)·T; IEEE Std 161 noise
// temperature definitions; from memory).
func TestWarmAttenuator(t *testing.T) {
	c, op := ckt(1e6, 2e6)
	op.TempC = 85
	port(c, "in", "a", "in", 50)
	port(c, "out", "b", "out", 50)
	tPad(c, "", "a", "b", 6)
	p := at(t, c, op, 1.5e6)
	l := math.Pow(10, 0.6)
	near(t, "noise temperature", p.TemperatureK, (l-1)*(85+kelvin), 1e-6)
}

// A lone resistor Rp in shunt with the source: F = 1 + Rs/Rp, 3.01 dB at
// Rp = Rs (REFERENCES-2 §2.1, [C]; the output is the shared net, so the
// load's noise is left out and the amplifier after it is noiseless).
func TestLoneShuntResistor(t *testing.T) {
	for _, rp := range []float64{50, 200, 12.5} {
		c, op := ckt(1e6, 2e6)
		port(c, "in", "a", "in", 50)
		port(c, "out", "a", "out", 1e3)
		res(c, "RP", "a", "gnd", rp)
		p := at(t, c, op, 1e6)
		near(t, "F", p.F, 1+50/rp, 1e-12)
	}
	c, op := ckt(1e6, 2e6)
	port(c, "in", "a", "in", 50)
	port(c, "out", "a", "out", 1e3)
	res(c, "RP", "a", "gnd", 50)
	near(t, "NF at Rp = Rs", at(t, c, op, 1e6).NFDB, 3.0103, 1e-4)
}

// cePoint is a grounded-emitter stage with the source at the base, ideal
// bias (the operating point is given), Cμ = 0 and a resistive load: the
// model of REFERENCES-2 §2.1.
func cePoint(t *testing.T, ic, beta, rb, rs, f, ft float64) Point {
	c, op := ckt(f, f)
	port(c, "in", "b", "in", rs)
	port(c, "out", "c", "out", 50)
	c.Parts = append(c.Parts, &circuit.Part{Ref: "Q1", Kind: circuit.NPN, Nets: []string{"c", "b", "gnd"},
		BJT: &circuit.BJTParams{FT: ft, HFEMin: beta, HFEMax: beta, RB: rb}})
	op.BJTs["Q1"] = &dc.BJT{IC: ic, ICf: ic, IB: ic / beta, IBf: ic / beta, HFE: beta}
	return at(t, c, op, f)
}

// The hybrid-π noise factor against the computed vectors of REFERENCES-2
// §2.3 ("model" column: the exact numeric form, [C]) to 2·10⁻⁴, and at low
// frequency against the closed form F = 1 + rb/Rs + re/(2Rs) +
// (rb + re + Rs)²/(2·re·Rs)·(1/β0 + (f/fT)²) (E. G. Nielsen, Proc. IRE 45,
// 1957; P. R. Gray, P. J. Hurst, S. H. Lewis, R. G. Meyer, Analysis and Design
// of Analog Integrated Circuits, 5th ed., ch. 11; from memory), which differs
// from the exact model by about 10⁻³ there.
func TestHybridPiNoiseVectors(t *testing.T) {
	for _, v := range []struct {
		ic, beta, rb, rs, f, ft, model, closed float64
	}{
		{100e-6, 100, 10, 1000, 1e3, 300e6, 1.1657, 1.1667},
		{100e-6, 100, 50, 1000, 1e3, 300e6, 1.2077, 1.2088},
		{100e-6, 200, 10, 1000, 1e3, 300e6, 1.1503, 1.1508},
		{10e-3, 173.2, 10, 50, 14e6, 300e6, 1.3469, 1.3493},
		{10e-3, 173.2, 50, 50, 14e6, 300e6, 2.3561, 2.3593},
		{1.5e-3, 79.06, 10, 50, 200e6, 900e6, 1.5162, 1.5854},
		{1.5e-3, 79.06, 10, 250, 200e6, 900e6, 1.5912, 1.6433},
		{1.5e-3, 79.06, 20, 85, 105e6, 900e6, 1.4518, 1.4705},
		{1.5e-3, 79.06, 20, 430, 105e6, 900e6, 1.4525, 1.4650},
	} {
		p := cePoint(t, v.ic, v.beta, v.rb, v.rs, v.f, v.ft)
		near(t, "F (REFERENCES-2 §2.3 model)", p.F, v.model, 2e-4)
		re := Boltzmann * T0 / Charge / v.ic
		closed := 1 + v.rb/v.rs + re/(2*v.rs) + math.Pow(v.rb+re+v.rs, 2)/(2*re*v.rs)*(1/v.beta+math.Pow(v.f/v.ft, 2))
		near(t, "closed form as printed", closed, v.closed, 2e-4)
		if v.f < 1e4 {
			near(t, "F against the closed form at low frequency", p.F, closed, 2e-3)
		}
	}
}

// The optimum collector current for a given Rs with rb = 0 at low frequency
// is gm·Rs = √β0, where F ≈ 1 + 1/√β0 and the closed form gives 1.1105 for
// Rs 50 Ω, β 100 (REFERENCES-2 §2.3, [C]; optimum from a flashcard page [S
// weak], Fmin from memory).
func TestOptimumCurrent(t *testing.T) {
	ic := Boltzmann * T0 / Charge * 10 / 50 // 4.998 mA
	near(t, "IC,opt", ic, 4.998e-3, 1e-6)
	p := cePoint(t, ic, 100, 0, 50, 1e3, 300e6)
	near(t, "F at IC,opt", p.F, 1.1105, 2e-3)
	for _, k := range []float64{0.7, 1.4} {
		if q := cePoint(t, ic*k, 100, 0, 50, 1e3, 300e6); q.F <= p.F {
			t.Errorf("F at %.1f·IC,opt = %.5f, not above F at the optimum %.5f", k, q.F, p.F)
		}
	}
}

// A FET with the source at its gate and nothing else noisy: F = 1 +
// γ/(gm·Rs) at low frequency (channel noise 4kT·γ·gm against the source's
// 4kT·Rs·gm²; B. Razavi, RF Microelectronics, ch. 2; from memory).
func TestFETChannelNoise(t *testing.T) {
	c, op := ckt(1e5, 1e5)
	port(c, "in", "g", "in", 200)
	port(c, "out", "d", "out", 1e3)
	c.Parts = append(c.Parts, &circuit.Part{Ref: "J1", Kind: circuit.NJFET, Nets: []string{"d", "g", "gnd"},
		FET: &circuit.FETParams{IDSS: 20e-3, VP: 3}})
	op.FETs["J1"] = &dc.FET{Jac: [3][3]float64{{0, 10e-3, 0}}}
	p := at(t, c, op, 1e5)
	near(t, "F", p.F, 1+Gamma/(10e-3*200), 1e-9)
	if len(p.Parts) != 1 || p.Parts[0].Source != "channel thermal" {
		t.Errorf("contributions %+v, want the channel alone", p.Parts)
	}
}

// Shares add up to one and name the larger resistor of a lossy pad first.
func TestShares(t *testing.T) {
	c, op := ckt(1e6, 2e6)
	port(c, "in", "a", "in", 50)
	port(c, "out", "b", "out", 50)
	res(c, "R1", "a", "b", 100)
	res(c, "R2", "b", "gnd", 1e4)
	s := at(t, c, op, 1e6).Shares()
	sum := 0.0
	for _, x := range s {
		sum += x.Fraction
	}
	near(t, "sum of shares", sum, 1, 1e-12)
	if s[0].Ref != "R1" {
		t.Errorf("largest share %s, want R1 (series 100 Ω against a 10 kΩ shunt)", s[0].Ref)
	}
}

// The optimum source resistance of REFERENCES-2 §2.3 ([C], from dF/dRs = 0
// of the closed form): the model's NF there matches the tabulated "F at
// Rs,opt" to the closed form's distance from the model, and a source 25 %
// off either way is noisier.
func TestOptimumSourceResistance(t *testing.T) {
	for _, v := range []struct{ ic, beta, rb, f, ft, rsOpt, nf, tol float64 }{
		{100e-6, 100, 10, 1e3, 300e6, 2610.1, 0.472, 0.01},
		{100e-6, 200, 10, 1e3, 300e6, 3682.0, 0.330, 0.01},
		{10e-3, 173.2, 10, 14e6, 300e6, 85.0, 1.174, 0.03},
	} {
		p := cePoint(t, v.ic, v.beta, v.rb, v.rsOpt, v.f, v.ft)
		near(t, "NF at Rs,opt", p.NFDB, v.nf, v.tol)
		for _, k := range []float64{0.75, 1.25} {
			if q := cePoint(t, v.ic, v.beta, v.rb, v.rsOpt*k, v.f, v.ft); q.F <= p.F {
				t.Errorf("Rs %.0f: F %.5f not above F %.5f at Rs,opt %.0f", v.rsOpt*k, q.F, p.F, v.rsOpt)
			}
		}
	}
}

// Friis' cascade formula F = F1 + (F2 − 1)/G1 (Bowick-x Eq. 8-8, REFERENCES-2
// §2.1): two matched pads of 3 and 6 dB at T0 in cascade, F1 = L1, G1 = 1/L1,
// F2 = L2, give F = L1·L2, NF 9 dB.
func TestFriisTwoPads(t *testing.T) {
	c, op := ckt(1e6, 2e6)
	port(c, "in", "a", "in", 50)
	port(c, "out", "z", "out", 50)
	tPad(c, "A", "a", "y", 3)
	tPad(c, "B", "y", "z", 6)
	l1, l2 := math.Pow(10, 0.3), math.Pow(10, 0.6)
	p := at(t, c, op, 1e6)
	near(t, "F of the cascade", p.F, l1+(l2-1)*l1, 1e-7)
	near(t, "NF of the cascade", p.NFDB, 10*math.Log10(l1*l2), 1e-8)
}

// A capacitor of finite Q (a series loss resistance r = 1/(ωC·Q) at the
// band centre, docs/filters.md) shunting the source: its noise current is
// 4kT·Re(y), y = jωC/(1 + jωC·r), against the source's 4kT/RS through the
// same impedance, so F = 1 + RS·Re(y) at T0 (Nyquist's theorem for a lossy
// reactance, common practice).
func TestLossyCapacitorNoise(t *testing.T) {
	c, op := ckt(10e6, 10e6)
	port(c, "in", "a", "in", 50)
	port(c, "out", "a", "out", 1e3)
	c.Parts = append(c.Parts, &circuit.Part{Ref: "C1", Kind: circuit.Capacitor, Nets: []string{"a", "gnd"}, Value: 100e-12, Q: 50})
	w := 2 * math.Pi * 10e6
	r := 1 / (w * 100e-12 * 50)
	y := complex(0, w*100e-12) / (1 + complex(0, w*100e-12)*complex(r, 0))
	p := at(t, c, op, 10e6)
	near(t, "F", p.F, 1+50*real(y), 1e-9)
	// Without Q the capacitor is noiseless.
	c.Parts[0].Q = 0
	near(t, "F of a lossless capacitor", at(t, c, op, 10e6).F, 1, 1e-9)
}
