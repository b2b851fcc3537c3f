package sweep

import (
	"math"
	"math/cmplx"
	"path/filepath"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
)

func polar(mag, deg float64) complex128 { return cmplx.Rect(mag, deg*math.Pi/180) }

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.Abs(got-want) > tol {
		t.Errorf("%s = %.5g, want %.5g ± %g", what, got, want, tol)
	}
}

// yToZ inverts a 2×2 admittance matrix.
func yToZ(y [2][2]complex128) [2][2]complex128 {
	d := y[0][0]*y[1][1] - y[0][1]*y[1][0]
	return [2][2]complex128{{y[1][1] / d, -y[0][1] / d}, {-y[1][0] / d, y[0][0] / d}}
}

// TestPublishedExamples recomputes the worked examples of REFERENCES-2 §1.2.
func TestPublishedExamples(t *testing.T) {
	// E1: Bowick, RF Circuit Design, Ex 6-4 (200 MHz): K 1.74 printed,
	// 1.7359 recomputed; |Δ| 0.068; μ 1.4354, μ' 1.3889 recomputed [C].
	s := [2][2]complex128{{polar(0.4, 162), polar(0.04, 60)}, {polar(5.2, 63), polar(0.35, -39)}}
	mu, mup, k, d := Figures(s)
	near(t, "E1 K", k, 1.7359, 5e-5)
	near(t, "E1 |Δ|", d, 0.0680, 5e-5)
	near(t, "E1 μ", mu, 1.4354, 5e-5)
	near(t, "E1 μ'", mup, 1.3889, 5e-5)

	// E2: Bowick Ex 6-1 (100 MHz), y in mS: Linvill C 0.71 printed; in
	// 50 Ω S11 0.4637∠−38.6, S21 3.7939∠142.8, |Δ| 0.4423, μ 1.0142,
	// μ' 1.2226, K = 1/C = 1.4074 recomputed [C].
	ms := func(re, im float64) complex128 { return complex(re, im) * 1e-3 }
	y := [2][2]complex128{{ms(8, 5.7), ms(0.01, -0.1)}, {ms(52, -20), ms(0.4, 1.5)}}
	s = ToS(yToZ(y), 50, 50)
	near(t, "E2 |S11|", cmplx.Abs(s[0][0]), 0.4637, 5e-5)
	near(t, "E2 ∠S11", cmplx.Phase(s[0][0])*180/math.Pi, -38.6, 0.05)
	near(t, "E2 |S21|", cmplx.Abs(s[1][0]), 3.7939, 5e-5)
	near(t, "E2 ∠S21", cmplx.Phase(s[1][0])*180/math.Pi, 142.8, 0.05)
	near(t, "E2 |S12|", cmplx.Abs(s[0][1]), 0.0068, 5e-5)
	near(t, "E2 |S22|", cmplx.Abs(s[1][1]), 0.9526, 5e-5)
	mu, mup, k, d = Figures(s)
	near(t, "E2 |Δ|", d, 0.4423, 5e-5)
	near(t, "E2 μ", mu, 1.0142, 5e-5)
	near(t, "E2 μ'", mup, 1.2226, 5e-5)
	near(t, "E2 K", k, 1.4074, 5e-5)
	near(t, "E2 Linvill C = 1/K (printed 0.71)", 1/k, 0.71, 0.005)

	// E3: Bowick Ex 6-3 (200 MHz), potentially unstable: Linvill C 2.27
	// printed; K 0.4397, |Δ| 0.7482, μ 0.7118 in 50 Ω recomputed [C]. (The
	// example's printed GT of 18.3 dB is a slip that does not reproduce,
	// REFERENCES-2 §1.6 item 5: nothing here is tested against it.)
	y = [2][2]complex128{{ms(2.25, 7.2), ms(0.05, -0.7)}, {ms(40, -20), ms(0.4, 1.9)}}
	mu, _, k, d = Figures(ToS(yToZ(y), 50, 50))
	near(t, "E3 K", k, 0.4397, 5e-5)
	near(t, "E3 |Δ|", d, 0.7482, 5e-5)
	near(t, "E3 μ", mu, 0.7118, 5e-5)
	near(t, "E3 Linvill C = 1/K (printed 2.27)", 1/k, 2.2743, 5e-4)
	if mu >= 1 {
		t.Error("E3 must be potentially unstable (μ < 1)")
	}
}

// hybridPi is the common-emitter hybrid-π two-port of REFERENCES-2 §1.3
// (2N3904 at 10 mA, 300 K: gm 0.38682 S, rπ 447.76 Ω, Cπ 201.213 pF, Cμ
// 4 pF, ro ∞) with rb in series with the base, as an impedance matrix.
func hybridPi(f, rb float64) [2][2]complex128 {
	w := 2 * math.Pi * f
	gm, gpi, cpi, cmu := 0.38682, 1/447.76, 201.213e-12, 4e-12
	y := [2][2]complex128{
		{complex(gpi, w*(cpi+cmu)), complex(0, -w*cmu)},
		{complex(gm, -w*cmu), complex(0, w*cmu)},
	}
	z := yToZ(y)
	z[0][0] += complex(rb, 0)
	return z
}

// TestHybridPiTable checks K and μ in 50 Ω against the table of
// REFERENCES-2 §1.3 [C] (the ro = ∞ rows: the model has no Early effect).
func TestHybridPiTable(t *testing.T) {
	freqs := []float64{1e6, 3e6, 10e6, 30e6, 100e6, 300e6}
	rows := []struct {
		rb    float64
		k, mu []float64
	}{
		{0, []float64{0.000, 0.000, 0.001, 0.002, 0.006, 0.019}, []float64{0.806, 0.542, 0.224, 0.096, 0.089, 0.199}},
		{10, []float64{0.026, 0.078, 0.259, 0.776, 2.586, 7.755}, []float64{0.815, 0.596, 0.492, 0.855, 1.535, 1.754}},
		{50, []float64{0.129, 0.387, 1.290, 3.871, 12.902, 38.698}, []float64{0.849, 0.772, 1.128, 1.717, 2.017, 1.920}},
	}
	for _, r := range rows {
		for i, f := range freqs {
			mu, _, k, _ := Figures(ToS(hybridPi(f, r.rb), 50, 50))
			near(t, "K", k, r.k[i], 6e-4*math.Max(1, r.k[i]))
			near(t, "μ", mu, r.mu[i], 6e-4)
		}
	}
	// rb = 0: K = ωCμ/√(gm² + ω²Cμ²) in closed form, 0.006497 at 100 MHz.
	_, _, k, _ := Figures(ToS(hybridPi(100e6, 0), 50, 50))
	near(t, "K(rb 0, 100 MHz)", k, 0.006497, 5e-6)
}

// TestUnconditionalAbove: the frequency above which K > 1 and μ > 1 for the
// device alone, REFERENCES-2 §1.3 [C]: rb 10 Ω → 38.68 MHz, 50 Ω → 7.751 MHz,
// 100 Ω → 3.876 MHz.
func TestUnconditionalAbove(t *testing.T) {
	for _, c := range []struct{ rb, want float64 }{{10, 38.68e6}, {50, 7.751e6}, {100, 3.876e6}} {
		lo, hi := 1e5, 1e9
		for hi/lo > 1+1e-7 {
			m := math.Sqrt(lo * hi)
			mu, _, k, _ := Figures(ToS(hybridPi(m, c.rb), 50, 50))
			if k > 1 && mu > 1 {
				hi = m
			} else {
				lo = m
			}
		}
		near(t, "crossover", hi/1e6, c.want/1e6, 0.0051*c.want/1e6/10)
	}
}

// TestSweepAgreesWithBand: at the band's three frequencies the sweep's gain
// and return loss are the band analysis's (two assemblies: the band
// analysis keeps the load in its base matrix and the source aside, the sweep
// takes both off and converts).
func TestSweepAgreesWithBand(t *testing.T) {
	files, _ := filepath.Glob("../../testdata/circuits/*.toml")
	for _, f := range files {
		c, err := circuit.Load(f, circuit.Options{})
		if err != nil {
			t.Fatal(err)
		}
		cs := analysis.Run(c, nil)
		r, err := RunAt(cs.AC, []float64{c.Band[0], math.Sqrt(c.Band[0] * c.Band[1]), c.Band[1]})
		if err != nil {
			t.Fatal(err)
		}
		for i, b := range cs.AC.Band {
			p := r.Points[i]
			near(t, f+" return loss", p.ReturnLossDB, b.ReturnLossDB, 1e-6)
			if b.GainDB != nil && r.TwoPort {
				near(t, f+" gain", *p.GainDB, *b.GainDB, 1e-6)
			}
			if b.VoltageGainDB != nil && r.TwoPort {
				near(t, f+" voltage gain", *p.VoltageGainDB, *b.VoltageGainDB, 1e-6)
			}
			if cmplx.Abs(p.PortZ-b.InputImpedance) > 1e-6*cmplx.Abs(b.InputImpedance) {
				t.Errorf("%s Zin %v, band analysis %v", f, p.PortZ, b.InputImpedance)
			}
		}
	}
}

// TestGrid: a decade below the band to twice the fastest fT, at least
// PerDecade points a decade, with the band's three points on it.
func TestGrid(t *testing.T) {
	c, err := circuit.Load("../../testdata/circuits/preamp-30m.toml", circuit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	g := Grid(c)
	near(t, "first", g[0], 1.01e6, 1e-3)
	near(t, "last", g[len(g)-1], 600e6, 1e-3) // 2 × 300 MHz, the 2N3904's fT
	for i := 1; i < len(g); i++ {
		if g[i]/g[i-1] > math.Pow(10, 1.0/PerDecade)*(1+1e-9) || g[i] <= g[i-1] {
			t.Fatalf("step %g → %g", g[i-1], g[i])
		}
	}
	for _, f := range []float64{c.Band[0], math.Sqrt(c.Band[0] * c.Band[1]), c.Band[1]} {
		found := false
		for _, x := range g {
			found = found || x == f
		}
		if !found {
			t.Errorf("band point %g not on the grid", f)
		}
	}
}

// TestMuAgreesWithKAndDelta: μ > 1 alone is equivalent to K > 1 with
// |Δ| < 1 (REFERENCES-2 §1.1, Edwards–Sinsky), and μ > 1 ⇔ μ' > 1; checked on
// every point of the shipped examples' sweeps and of the hybrid-π two-port
// over rb and frequency.
func TestMuAgreesWithKAndDelta(t *testing.T) {
	check := func(where string, s [2][2]complex128) {
		mu, mup, k, d := Figures(s)
		if math.Abs(mu-1) < 1e-9 || math.Abs(k-1) < 1e-9 || math.Abs(d-1) < 1e-9 {
			return // on a boundary: rounding decides
		}
		if (mu > 1) != (k > 1 && d < 1) || (mu > 1) != (mup > 1) {
			t.Errorf("%s: μ %g μ' %g K %g |Δ| %g", where, mu, mup, k, d)
		}
	}
	files, _ := filepath.Glob("../../testdata/circuits/*.toml")
	n := 0
	for _, f := range files {
		c, err := circuit.Load(f, circuit.Options{})
		if err != nil {
			t.Fatal(err)
		}
		r, err := Run(c, analysis.Run(c, nil).AC)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range r.Points {
			if r.TwoPort {
				check(f, p.S)
				n++
			}
		}
	}
	for _, rb := range []float64{0, 3, 10, 30, 100} {
		for f := 1e5; f < 2e9; f *= 1.1 {
			check("hybrid-π", ToS(hybridPi(f, rb), 50, 50))
			n++
		}
	}
	if n < 300 {
		t.Errorf("only %d points", n)
	}
}

// TestStabilityIsBareRun: the stability rules' sweep gives Run's points with
// the same S, μ, μ', K, |Δ| and PortZ, bit for bit, and the same least μ and
// Re Z, leaving out only the return loss and the gains.
func TestStabilityIsBareRun(t *testing.T) {
	files, _ := filepath.Glob("../../testdata/circuits/*.toml")
	for _, f := range files {
		c, err := circuit.Load(f, circuit.Options{})
		if err != nil {
			t.Fatal(err)
		}
		cs := analysis.Run(c, nil)
		full, err1 := Run(c, cs.AC)
		bare, err2 := Stability(c, cs.AC)
		if err1 != nil || err2 != nil {
			t.Fatalf("%s: %v, %v", f, err1, err2)
		}
		if !bare.Bare || full.Bare || len(bare.Points) != len(full.Points) || bare.TwoPort != full.TwoPort || bare.OnePort != full.OnePort ||
			bare.MuMin != full.MuMin || bare.MuMinHz != full.MuMinHz || bare.ReMin != full.ReMin || bare.ReMinHz != full.ReMinHz {
			t.Fatalf("%s: bare %v, full %v", f, bare, full)
		}
		for i, p := range bare.Points {
			q := full.Points[i]
			if p.Frequency != q.Frequency || p.S != q.S || p.Mu != q.Mu || p.MuPrime != q.MuPrime || p.K != q.K || p.Delta != q.Delta || p.PortZ != q.PortZ {
				t.Errorf("%s at %g Hz: bare %+v, full %+v", f, p.Frequency, p, q)
			}
			if p.ReturnLossDB != 0 || p.GainDB != nil || p.VoltageGainDB != nil {
				t.Errorf("%s at %g Hz: a bare point with gains %+v", f, p.Frequency, p)
			}
		}
	}
}
