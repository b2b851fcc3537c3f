package filter

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/topology"
)

// coupled builds a top-C coupled band-pass filter of shunt resonators from
// the normalised k and q values of a coupled-resonator table (Kikkert ch. 7,
// eq. 7.8, as in REFERENCES-2.md §4.1): Q_BW = f0/BW, node capacitance
// C_node = 1/(ω0²·L), coupling C_ij = k_ij/Q_BW·C_node, each shunt capacitor
// C_node less its neighbours' couplings, end resistances R = Q_E·X0 with the
// table's end q read as the end resonator's total loaded Q, its own loss
// included: 1/Q_E = 1/(q·Q_BW) − 1/Q_U (the reading rule of §4.1). qu = 0
// is lossless.
func coupled(f0, bw, l, qu float64, q1, qn float64, k []float64) string {
	w := 2 * math.Pi * f0
	qbw := f0 / bw
	x0 := w * l
	cn := 1 / (w * x0)
	end := func(q float64) float64 {
		inv := 1 / (q * qbw)
		if qu > 0 {
			inv -= 1 / qu
		}
		return x0 / inv
	}
	var b strings.Builder
	fmt.Fprintf(&b, "[circuit]\nname = \"table filter\"\nband = [%g, %g]\n\n", f0*0.999, f0/0.999)
	n := len(k) + 1
	fmt.Fprintf(&b, "[ports.in]\nnet = \"n1\"\ndirection = \"in\"\nimpedance = %g\n\n", end(q1))
	fmt.Fprintf(&b, "[ports.out]\nnet = \"n%d\"\ndirection = \"out\"\nimpedance = %g\n\n", n, end(qn))
	cc := make([]float64, len(k))
	for i, ki := range k {
		cc[i] = ki / qbw * cn
		fmt.Fprintf(&b, "[parts.CC%d]\nkind = \"capacitor\"\nvalue = %g\nnets = [\"n%d\", \"n%d\"]\n\n", i+1, cc[i], i+1, i+2)
	}
	for i := 1; i <= n; i++ {
		c := cn
		if i > 1 {
			c -= cc[i-2]
		}
		if i < n {
			c -= cc[i-1]
		}
		fmt.Fprintf(&b, "[parts.L%d]\nkind = \"inductor\"\nvalue = %g\nnets = [\"n%d\", \"gnd\"]\nrole = \"tuning\"\n", i, l, i)
		if qu > 0 {
			fmt.Fprintf(&b, "q = %g\nq_freq = %g\n", qu, f0)
		}
		fmt.Fprintf(&b, "\n[parts.C%d]\nkind = \"capacitor\"\nvalue = %g\nnets = [\"n%d\", \"gnd\"]\nrole = \"tuning\"\n\n", i, c, i)
	}
	return b.String()
}

func analyse(t *testing.T, src string) (*circuit.Circuit, *ac.Result) {
	t.Helper()
	c, err := circuit.LoadBytes("filter.toml", []byte(src), circuit.Options{})
	if err != nil {
		t.Fatalf("%v\n%s", err, src)
	}
	r, err := ac.Analyze(c, nil)
	if err != nil {
		t.Fatal(err)
	}
	return c, r
}

func lossAt(t *testing.T, r *ac.Result, f float64) float64 {
	t.Helper()
	pts, err := Response(r, []float64{f})
	if err != nil {
		t.Fatal(err)
	}
	return pts[0].InsertionLossDB
}

// Zverev's Butterworth k–q tables with finite q0 = Q_U/Q_BW (Zverev,
// Handbook of Filter Synthesis, p.341, as reproduced in Kikkert, RF
// Electronics, Table 7.1a; REFERENCES-2.md §4.1): the printed insertion loss
// at the centre, to the table's 0.001 dB, built at 7.1 MHz with Q_BW 20.
func TestZverevFiniteQTables(t *testing.T) {
	cases := []struct {
		q0, il, q1, qn float64
		k              []float64
	}{
		{14.142, 0.915, 1.4142, 1.4142, []float64{0.7071}},
		{7.071, 1.938, 1.4142, 1.4142, []float64{0.7071}},
		{3.536, 4.437, 1.4142, 1.4142, []float64{0.7071}},
		{20.000, 0.958, 0.8041, 1.4156, []float64{0.7687, 0.6582}},
		{10.000, 2.052, 0.8007, 1.5359, []float64{0.7388, 0.6716}},
		// Printed q1 0.9097 is a slip for 0.8097 (REFERENCES-2.md §4.1: 0.9097
		// gives 3.185 dB); the corrected row is tested.
		{6.667, 3.300, 0.8097, 1.6301, []float64{0.7005, 0.6879}},
		{26.131, 1.002, 0.5376, 1.4782, []float64{1.0927, 0.5668, 0.6670}},
	}
	const f0, qbw = 7.1e6, 20.0
	for _, tc := range cases {
		_, r := analyse(t, coupled(f0, f0/qbw, 1e-6, tc.q0*qbw, tc.q1, tc.qn, tc.k))
		// The table is for the centre frequency; narrowband top-C coupling
		// holds it to a few thousandths of a dB at Q_BW 20.
		if got := lossAt(t, r, f0); math.Abs(got-tc.il) > 0.005 {
			t.Errorf("n = %d, q0 %g: insertion loss %.4f dB, table %.3f dB", len(tc.k)+1, tc.q0, got, tc.il)
		}
	}
}

// The 3-pole Butterworth design vector of REFERENCES-2.md §4.2 (recomputed
// there from the k–q tables): 7.1 MHz, BW 355 kHz, L 1 µH; lossless it has
// no loss at the centre and a 3 dB bandwidth of 351.4 kHz (the narrowband
// coupling formula's ~1 % error); with Q_U 400, 200, 100 the centre loss is
// 0.868, 1.734, 3.452 dB, beside Cohn's estimate 4.343·Σg·Q_BW/Q_U
// (S. B. Cohn, Proc. IRE 1959, from memory) of 0.869, 1.737, 3.474 dB.
func TestButterworthDesignVector(t *testing.T) {
	const f0, bw = 7.1e6, 355e3
	c, r := analyse(t, coupled(f0, bw, 1e-6, 0, 1, 1, []float64{0.7071, 0.7071}))
	if got := lossAt(t, r, f0); math.Abs(got) > 0.001 {
		t.Errorf("lossless centre loss %.4f dB, want 0", got)
	}
	s, err := Measure(c, r)
	if err != nil || !s.Found {
		t.Fatalf("no 3 dB points: %v", err)
	}
	// The sheet's 351.4 kHz does not reproduce: a separate nodal solve of
	// the same circuit (three nodes, Gaussian elimination, written by hand
	// for this check) gives 3 dB points 6.93039 and 7.28590 MHz, 355.50 kHz
	// apart, which is tested here; the figure is named in the report.
	if math.Abs(s.BandwidthHz-355.50e3) > 0.05e3 {
		t.Errorf("3 dB bandwidth %.2f kHz, want 355.50 kHz (recomputed; the sheet prints 351.4)", s.BandwidthHz/1e3)
	}
	if math.Abs(s.CenterHz-f0)/f0 > 0.002 {
		t.Errorf("centre %.4f MHz, want about 7.1 MHz", s.CenterHz/1e6)
	}
	for _, tc := range []struct{ qu, il, cohn float64 }{{400, 0.868, 0.869}, {200, 1.734, 1.737}, {100, 3.452, 3.474}} {
		// The reference's lossy runs keep the lossless end resistances.
		src := coupled(f0, bw, 1e-6, 0, 1, 1, []float64{0.7071, 0.7071})
		src = strings.ReplaceAll(src, "role = \"tuning\"\n\n[parts.C", fmt.Sprintf("role = \"tuning\"\nq = %g\nq_freq = %g\n\n[parts.C", tc.qu, f0))
		_, r := analyse(t, src)
		got := lossAt(t, r, f0)
		if math.Abs(got-tc.il) > 0.002 {
			t.Errorf("Q_U %g: centre loss %.4f dB, want %.3f dB", tc.qu, got, tc.il)
		}
		// Cohn's first-order estimate, Σg = 4 for n = 3 Butterworth.
		if cohn := 4.343 * 4 * 20 / tc.qu; math.Abs(cohn-tc.cohn) > 0.001 {
			t.Errorf("Cohn estimate %.4f, reference %.3f", cohn, tc.cohn)
		}
	}
}

// A parallel RLC tank: |Z| peaks at f0 = 1/(2π√(LC)) and falls to 1/√2 of the
// peak at two frequencies exactly 1/(2π·R·C) apart, so Q = R/X0 (Bowick, RF
// Circuit Design, eq. 2-1 and 2-6; the parallel RLC's half-power bandwidth
// is exact, not a high-Q approximation). 1 µH, 100 pF, 10 kΩ: f0 15.9155 MHz,
// X0 100 Ω, Q 100, bandwidth 159.155 kHz. The capacitor sits on the supply
// rail, which Tanks counts as the inductor's gnd end.
func TestParallelTank(t *testing.T) {
	src := `[circuit]
name = "tank"
band = ["15MHz", "17MHz"]

[supplies.vcc]
volts = "12V"

[parts.L1]
kind = "inductor"
value = "1uH"
nets = ["a", "gnd"]
role = "tuning"

[parts.C1]
kind = "capacitor"
value = "100pF"
nets = ["a", "vcc"]

[parts.R1]
kind = "resistor"
value = "10k"
nets = ["a", "gnd"]
`
	c, r := analyse(t, src)
	tanks := Tanks(c, topology.Analyze(c))
	if len(tanks) != 1 || tanks[0].Ref != "L1" || len(tanks[0].Caps) != 1 || tanks[0].Caps[0] != "C1" {
		t.Fatalf("tanks %+v, want L1 with C1", tanks)
	}
	res, err := Resonate(r, tanks[0])
	if err != nil || !res.Found {
		t.Fatalf("resonance %+v, %v", res, err)
	}
	f0 := 1 / (2 * math.Pi * math.Sqrt(1e-6*100e-12))
	if math.Abs(res.Hz-f0)/f0 > 1e-6 {
		t.Errorf("resonance %.6f MHz, want %.6f", res.Hz/1e6, f0/1e6)
	}
	if bw := 1 / (2 * math.Pi * 10e3 * 100e-12); math.Abs(res.BandwidthHz-bw)/bw > 1e-5 {
		t.Errorf("bandwidth %.4f kHz, want %.4f", res.BandwidthHz/1e3, bw/1e3)
	}
	if math.Abs(res.LoadedQ-100) > 1e-3 {
		t.Errorf("loaded Q %.5f, want 100", res.LoadedQ)
	}
}

// In a filter each resonator is resonated with the others shorted (Dishal's
// alignment): the design vector's nodes all ring at 7.1 MHz (C_node 502.49 pF
// with 1 µH), the end resonators with the termination's loaded Q, q·Q_BW =
// 1 × 20 (892.21 Ω over X0 = 44.611 Ω, REFERENCES-2.md §4.2), and the
// middle one, with inductors of Q_U 200 and nothing else to load it, at
// Q 200 (a series-loss Q converts to the parallel form as (Q² + 1)/Q: 200.005).
func TestDishalResonances(t *testing.T) {
	const f0 = 7.1e6
	src := coupled(f0, 355e3, 1e-6, 0, 1, 1, []float64{0.7071, 0.7071})
	src = strings.ReplaceAll(src, "role = \"tuning\"\n\n[parts.C2]", fmt.Sprintf("role = \"tuning\"\nq = 200\nq_freq = %g\n\n[parts.C2]", f0))
	c, r := analyse(t, src)
	tanks, res, err := Resonances(c, topology.Analyze(c), r)
	if err != nil || len(tanks) != 3 {
		t.Fatalf("%d tanks, %v", len(tanks), err)
	}
	for i, want := range []float64{20, 200, 20} {
		if math.Abs(res[i].Hz-f0)/f0 > 2e-4 {
			t.Errorf("%s: resonance %.5f MHz, want 7.1", tanks[i].Key(), res[i].Hz/1e6)
		}
		if !res[i].Found || math.Abs(res[i].LoadedQ-want)/want > 2e-3 {
			t.Errorf("%s: loaded Q %.4f, want %g", tanks[i].Key(), res[i].LoadedQ, want)
		}
	}
}

// Bowick, RF Circuit Design, 2nd ed., Examples 2-1 and 2-3 (REFERENCES-2.md
// §4.2, recomputed values), as a shunt tank between the in and out ports:
//   - Ex 2-1: RS 150 Ω, RL 1 kΩ, loaded Q 20 at 50 MHz, lossless:
//     Rp = 150 ∥ 1000 = 130.43 Ω, Xp = Rp/Q = 6.5217 Ω, L 20.759 nH,
//     C 488.08 pF; the loaded resonance is 50 MHz with Q 20.
//   - Ex 2-3: 3 dB bandwidth 10 MHz at 100 MHz (Q_L 10), RS = RL = 1 kΩ,
//     Q_U 85: Xp 44.118 Ω, L 70.215 nH, C 36.075 pF; Q_L 10, BW 10 MHz.
//     The inductor's Q is a fixed series resistance here, whose parallel
//     form X²/R grows with f² across the 10 % bandwidth: the measured Q_L
//     is 10 to 1e-3 (10.005), the book's narrowband figure, and the |Z| peak
//     sits 5e-4 above 100 MHz (the loss falls with f: d ln Rp/d ln f = 2
//     with Rp carrying 0.118 of the loading, over (2·Q_L)² = 400).
func TestBowickTankExamples(t *testing.T) {
	for _, tc := range []struct {
		name             string
		rs, rl, l, c, qu float64
		f0, ql           float64
	}{
		{"Ex 2-1", 150, 1000, 20.759e-9, 488.08e-12, 0, 50e6, 20},
		{"Ex 2-3", 1000, 1000, 70.215e-9, 36.075e-12, 85, 100e6, 10},
	} {
		q := ""
		if tc.qu > 0 {
			q = fmt.Sprintf("q = %g\n", tc.qu)
		}
		src := fmt.Sprintf("[circuit]\nname = %q\nband = [%g, %g]\n\n[ports.in]\nnet = \"a\"\ndirection = \"in\"\nimpedance = %g\n\n"+
			"[ports.out]\nnet = \"a\"\ndirection = \"out\"\nimpedance = %g\n\n[parts.L1]\nkind = \"inductor\"\nvalue = %g\nnets = [\"a\", \"gnd\"]\n%s\n"+
			"[parts.C1]\nkind = \"capacitor\"\nvalue = %g\nnets = [\"a\", \"gnd\"]\n", tc.name, tc.f0*0.999, tc.f0/0.999, tc.rs, tc.rl, tc.l, q, tc.c)
		c, r := analyse(t, src)
		tanks, res, err := Resonances(c, topology.Analyze(c), r)
		if err != nil || len(tanks) != 1 || !res[0].Found {
			t.Fatalf("%s: %v %v", tc.name, tanks, err)
		}
		if math.Abs(res[0].Hz-tc.f0)/tc.f0 > 1e-3 {
			t.Errorf("%s: resonance %.6g Hz, want %g", tc.name, res[0].Hz, tc.f0)
		}
		if math.Abs(res[0].LoadedQ-tc.ql)/tc.ql > 1e-3 {
			t.Errorf("%s: loaded Q %.5f, want %g", tc.name, res[0].LoadedQ, tc.ql)
		}
	}
}
