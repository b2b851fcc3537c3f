package crosscheck

// The reference noise analysis (docs/noise.md written a second time): every
// noise source is driven on its own into the reference admittance matrix,
// solved afresh with the in port terminated, and its output voltage squared
// and weighted by the source's density; the powers are summed. Winding and
// inductor resistances are taken in their series form (a voltage 4kT·R in
// series with the winding, carried through the winding's admittance), not as
// the Nyquist–Twiss current correlation checker/noise uses, so the two
// methods meet only through the physics.

import (
	"fmt"
	"math"
	"testing"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/noise"
)

// refNoiseF is the noise factor of c at f on the reference model and
// operating point: (Σ sources' output power) ÷ (the source's).
func refNoiseF(c *circuit.Circuit, op *refOP, f float64) (float64, error) {
	m := newACModel(c, op)
	var in, out *circuit.Port
	for _, p := range c.Ports {
		if p.Direction == "in" && in == nil {
			in = p
		}
		if p.Direction == "out" && out == nil {
			out = p
		}
	}
	// vout drives +1 A into net a and −1 A into net b, solved afresh.
	vout := func(a, b string) (complex128, error) {
		y := m.stamp(f, nil, true)
		y.source(a, 1)
		y.source(b, -1)
		v, err := y.solve()
		if err != nil {
			return 0, err
		}
		return v[out.Net], nil
	}
	tK := op.TempC + kelvinAt0C
	kT4 := 4 * boltzmann * tK
	w := 2 * math.Pi * f
	hs, err := vout(in.Net, circuit.Gnd)
	if err != nil {
		return 0, err
	}
	src := sqAbs(hs) * 4 * boltzmann * noise.T0 / in.Impedance
	total := src
	add := func(a, b string, density float64) error {
		h, err := vout(a, b)
		total += sqAbs(h) * density
		return err
	}
	for _, p := range c.Parts {
		var err error
		switch p.Kind {
		case circuit.Resistor:
			err = add(p.Nets[0], p.Nets[1], kT4/p.Value)
		case circuit.Potentiometer:
			ra, rb := potSections(p)
			if err = add(p.Nets[0], p.Nets[1], kT4/ra); err == nil {
				err = add(p.Nets[1], p.Nets[2], kT4/rb)
			}
		case circuit.Inductor:
			// A series voltage e (4kT·R) drives e/(R + jωL) round the part.
			y := 1 / complex(p.Resistance, w*p.Inductance())
			err = add(p.Nets[0], p.Nets[1], kT4*p.Resistance*sqAbs(y))
		case circuit.Transformer:
			err = refWindingNoise(p, w, kT4, vout, &total)
		case circuit.NPN, circuit.PNP:
			b := op.BJT[p.Ref]
			base := p.Nets[1]
			if p.BJT.RB > 0 {
				base = innerNet(p.Ref)
				if err = add(p.Nets[1], base, kT4/p.BJT.RB); err != nil {
					break
				}
			}
			if err = add(base, p.Nets[2], 2*charge*math.Abs(b.IBf)); err == nil {
				err = add(p.Nets[0], p.Nets[2], 2*charge*math.Abs(b.ICf))
			}
		}
		if err != nil {
			return 0, fmt.Errorf("part %s: %w", p.Ref, err)
		}
	}
	return total / src, nil
}

// refWindingNoise adds each winding's series noise voltage: e_j drives the
// Norton currents −Y·e_j·u_j into the windings (Y the windings' admittance
// matrix, u_j the j-th unit vector), whose output is Σ_i h_i·Y_ij·e_j.
func refWindingNoise(p *circuit.Part, w, kT4 float64, vout func(a, b string) (complex128, error), total *float64) error {
	n := len(p.Windings)
	y := invertComplex(windingZ(p, w))
	h := make([]complex128, n)
	for i, wi := range p.Windings {
		var err error
		if h[i], err = vout(wi.Nets[0], wi.Nets[1]); err != nil {
			return err
		}
	}
	for j, wj := range p.Windings {
		var s complex128
		for i := range n {
			s += h[i] * y[i][j]
		}
		*total += sqAbs(s) * kT4 * wj.Resistance
	}
	return nil
}

// TestNoiseAgainstReference compares checker/noise's adjoint computation
// with the reference's source-by-source sum on generated circuits at the
// band's three frequencies.
func TestNoiseAgainstReference(t *testing.T) {
	ty := newTally(t)
	n := circuitCount(300, 60)
	compared := 0
	for seed := uint64(1); seed <= uint64(n); seed++ {
		c := genCircuit(seed, false)
		ref, refErr := refSolveDC(c)
		got, gotErr := dc.Solve(c)
		if refErr != nil || gotErr != nil {
			continue
		}
		gac, err := ac.Analyze(c, got)
		if err != nil || !gac.HasGain {
			continue
		}
		pts, err := noise.Band(c, got, gac)
		if err != nil {
			ty.fail("seed %d: noise.Band: %v", seed, err)
			continue
		}
		for i, p := range pts {
			where := fmt.Sprintf("seed %d at %g Hz", seed, p.Frequency)
			rf, err := refNoiseF(c, ref, p.Frequency)
			if err != nil {
				ty.fail("%s: reference: %v", where, err)
				continue
			}
			if !p.Valid {
				if rf < 1e12 && !math.IsInf(rf, 0) && !math.IsNaN(rf) {
					ty.fail("%s: no noise figure, reference F %g", where, rf)
				}
				continue
			}
			if i == 0 {
				compared++
			}
			// F spans decades (an attenuating stage has F in the
			// thousands): compare its logarithm, to 10⁻⁴ dB plus what the
			// two operating points differ by.
			ty.cmp("NF dB", 1e-3, where, 10*math.Log10(rf), p.NFDB)
		}
	}
	t.Logf("%d circuits compared", compared)
	ty.log()
	if compared < n/2 {
		t.Errorf("only %d of %d circuits compared: the generator has drifted", compared, n)
	}
}

// TestFETNoiseAgainstReference compares checker/noise on generated FET
// stages with the FET reference (fet_test.go): each source driven alone into
// a fresh solve of the reference admittance matrix; the channel's gm by
// finite differences of the reference drain current (dual gate: the internal
// node re-settled), the gate current from the reference's terminal currents;
// inductors in series form.
func TestFETNoiseAgainstReference(t *testing.T) {
	ty := newTally(t)
	n := circuitCount(200, 60)
	compared := 0
	for seed := uint64(1); seed <= uint64(n); seed++ {
		c := genFETCircuit(seed)
		got, err := dc.Solve(c)
		ref := newRefFETNet(c)
		x, rerr := ref.solve()
		if err != nil || rerr != nil {
			continue
		}
		gac, err := ac.Analyze(c, got)
		if err != nil || !gac.HasGain {
			continue
		}
		pts, err := noise.Band(c, got, gac)
		if err != nil {
			ty.fail("fet seed %d: noise.Band: %v", seed, err)
			continue
		}
		p := c.Parts[len(c.Parts)-1]
		gate := p.Nets[1]
		if _, free := ref.index[gate]; !free {
			continue
		}
		gm := math.Abs(ref.gm(p, x))
		ig := 0.0
		if p.Kind != circuit.DualGateMOSFET {
			ig = math.Abs(ref.fetCurrents(p, x)[gate])
		}
		kT4 := 4 * boltzmann * (c.Ambient.Nominal + kelvinAt0C)
		for _, pt := range pts {
			if !pt.Valid {
				continue
			}
			w := 2 * math.Pi * pt.Frequency
			y, idx := refFETAdmittance(c, ref, x, w)
			vout := func(a, b string) complex128 {
				rhs := make([]complex128, len(y))
				if i := idx(a); i >= 0 {
					rhs[i]++
				}
				if i := idx(b); i >= 0 {
					rhs[i]--
				}
				v := solveComplex(y, rhs)
				if v == nil || idx("out") < 0 {
					return 0
				}
				return v[idx("out")]
			}
			var in *circuit.Port
			for _, port := range c.Ports {
				if port.Direction == "in" {
					in = port
				}
			}
			src := sqAbs(vout(in.Net, circuit.Gnd)) * 4 * boltzmann * noise.T0 / in.Impedance
			total := src
			for _, q := range c.Parts {
				switch q.Kind {
				case circuit.Resistor:
					total += sqAbs(vout(q.Nets[0], q.Nets[1])) * kT4 / q.Value
				case circuit.Inductor:
					yl := 1 / complex(q.Resistance, w*q.Value)
					total += sqAbs(vout(q.Nets[0], q.Nets[1])) * kT4 * q.Resistance * sqAbs(yl)
				}
			}
			total += sqAbs(vout(p.Nets[0], p.Nets[2])) * kT4 * noise.Gamma * gm
			total += sqAbs(vout(p.Nets[1], p.Nets[2])) * 2 * charge * ig
			ty.cmp("fet NF dB", 1e-3, fmt.Sprintf("fet seed %d at %g Hz", seed, pt.Frequency), 10*math.Log10(total/src), pt.NFDB)
			compared++
		}
	}
	t.Logf("%d band points compared", compared)
	ty.log()
	if compared < n {
		t.Errorf("only %d band points in %d circuits: the generator has drifted", compared, n)
	}
}
