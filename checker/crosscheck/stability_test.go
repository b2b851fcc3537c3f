package crosscheck

import (
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/sweep"
)

// refStability is the two-port figures written a second time: the
// reference network with both ports terminated, driven by a current at each
// port in turn (fresh solves), gives the terminated port impedance matrix
// Zt; Kron reduction commutes with the ports' own conductances, so the
// two-port's admittance matrix is Zt⁻¹ − diag(1/RS, 1/RL). S follows from Y
// normalised to each port's reference by REFERENCES-2 §1.1's Y → S formulas
// (Bowick), generalised to unequal real references by y_ij·√(Ri·Rj), and
// μ, K and |Δ| from their definitions there. The voltage gain is the out
// net's voltage over the in net's when the in net alone is driven with both
// ports terminated: the ratio does not depend on how the in net is driven.
func refStability(m *acModel, in, out *circuit.Port, f float64) (mu, k, delta, gainDB, vgainDB float64, err error) {
	var zt [2][2]complex128
	for j, p := range []*circuit.Port{in, out} {
		a := m.stamp(f, nil, true)
		a.source(p.Net, 1)
		v, err := a.solve()
		if err != nil {
			return 0, 0, 0, 0, 0, err
		}
		zt[0][j], zt[1][j] = v[in.Net], v[out.Net]
	}
	inv := func(z [2][2]complex128) [2][2]complex128 {
		d := z[0][0]*z[1][1] - z[0][1]*z[1][0]
		return [2][2]complex128{{z[1][1] / d, -z[0][1] / d}, {-z[1][0] / d, z[0][0] / d}}
	}
	y := inv(zt)
	y[0][0] -= complex(1/in.Impedance, 0)
	y[1][1] -= complex(1/out.Impedance, 0)
	r := [2]float64{in.Impedance, out.Impedance}
	var yn [2][2]complex128
	for i := range 2 {
		for j := range 2 {
			yn[i][j] = y[i][j] * complex(math.Sqrt(r[i]*r[j]), 0)
		}
	}
	d := (1+yn[0][0])*(1+yn[1][1]) - yn[0][1]*yn[1][0]
	s11 := ((1-yn[0][0])*(1+yn[1][1]) + yn[0][1]*yn[1][0]) / d
	s12 := -2 * yn[0][1] / d
	s21 := -2 * yn[1][0] / d
	s22 := ((1+yn[0][0])*(1-yn[1][1]) + yn[0][1]*yn[1][0]) / d
	dl := s11*s22 - s12*s21
	mu = (1 - sqAbs(s11)) / (cmplx.Abs(s22-dl*cmplx.Conj(s11)) + cmplx.Abs(s12*s21))
	k = (1 - sqAbs(s11) - sqAbs(s22) + sqAbs(dl)) / (2 * cmplx.Abs(s12*s21))
	return mu, k, cmplx.Abs(dl), 20 * math.Log10(cmplx.Abs(s21)), 20 * math.Log10(cmplx.Abs(zt[1][0]/zt[0][0])), nil
}

func sqAbs(z complex128) float64 { return real(z)*real(z) + imag(z)*imag(z) }

// TestSweepAgainstReference compares the wide sweep's μ, K, |Δ| and gain with
// refStability on generated circuits with an in and an out port, at a few
// frequencies from below the band to above it.
func TestSweepAgainstReference(t *testing.T) {
	compared, vcompared := 0, 0
	for seed := uint64(1); seed <= uint64(circuitCount(400, 80)); seed++ {
		c := genCircuit(seed, false)
		in, out := c.InPort(), c.OutPort()
		if in == nil || out == nil || in.Net == out.Net {
			continue
		}
		if s := c.Supply(in.Net); s != nil || in.Net == circuit.Gnd {
			continue
		}
		if s := c.Supply(out.Net); s != nil || out.Net == circuit.Gnd {
			continue
		}
		ref, err := refSolveDC(c)
		got, gerr := dc.Solve(c)
		if err != nil || gerr != nil {
			continue
		}
		res, err := ac.Analyze(c, got)
		if err != nil {
			continue
		}
		m := newACModel(c, ref)
		freqs := []float64{c.Band[0] / 7, c.Band[0], 3 * c.Band[1], 40 * c.Band[1]}
		sw, err := sweep.RunAt(res, freqs)
		if err != nil || !sw.TwoPort {
			t.Fatalf("seed %d: sweep %v", seed, err)
		}
		for i, f := range freqs {
			mu, k, d, g, vg, err := refStability(m, in, out, f)
			if err != nil || math.IsNaN(mu+k+d+g) || math.IsInf(mu+k+d+g, 0) {
				continue
			}
			p := sw.Points[i]
			rel := func(a, b float64) float64 { return math.Abs(a-b) / math.Max(1, math.Abs(b)) }
			// K divides by |S12·S21|: below about −80 dB of gain through the
			// two-port its numerator is a difference of near-equal terms and
			// carries only a few digits in either implementation.
			if rel(p.Mu, mu) > 1e-5 || rel(p.Delta, d) > 1e-5 || (math.Abs(k) < 1e6 && g > -80 && rel(p.K, k) > 1e-5) ||
				(p.GainDB != nil && g > -200 && math.Abs(*p.GainDB-g) > 1e-5) {
				t.Errorf("seed %d at %g Hz: sweep μ %g K %g |Δ| %g gain %v; reference μ %g K %g |Δ| %g gain %g",
					seed, f, p.Mu, p.K, p.Delta, p.GainDB, mu, k, d, g)
			}
			if p.VoltageGainDB != nil && g > -200 && !math.IsNaN(vg) && math.Abs(*p.VoltageGainDB-vg) > 1e-5 {
				t.Errorf("seed %d at %g Hz: sweep voltage gain %g dB, reference %g dB", seed, f, *p.VoltageGainDB, vg)
			}
			if p.VoltageGainDB != nil {
				vcompared++
			}
			compared++
		}
	}
	if compared < 100 || vcompared < 100 {
		t.Errorf("only %d points compared (%d voltage gains): the generator gives too few two-ports", compared, vcompared)
	}
	t.Logf("%d points compared, %d voltage gains", compared, vcompared)
}
