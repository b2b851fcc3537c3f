package dc

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"headroom/checker/circuit"
)

// e24 is the IEC 60063 E24 series (REFERENCES.md §1).
var e24 = []float64{1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
	3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1}

// pickE24 draws an E24 value between lo and hi, log-uniformly by decade.
func pickE24(rng *rand.Rand, lo, hi float64) float64 {
	for {
		dec := math.Pow(10, math.Floor(math.Log10(lo))+float64(rng.IntN(int(math.Ceil(math.Log10(hi/lo)))+1)))
		v := e24[rng.IntN(len(e24))] * dec
		if v >= lo && v <= hi {
			return v
		}
	}
}

// randomStage builds a divider-biased stage with an emitter resistor: NPN
// (divider to gnd, emitter resistor to gnd) or PNP (emitter resistor and
// divider top to the rail).
func randomStage(rng *rand.Rand) (*builder, string) {
	vcc := 5 + 19*rng.Float64()
	z := 0.0
	if rng.IntN(3) == 0 {
		z = 10 * rng.Float64()
	}
	temp := -20 + 90*rng.Float64()
	hfe := 40 + 460*rng.Float64()
	p := transistor(hfe, 0.6+0.15*rng.Float64(), pickE24(rng, 1e-3, 50e-3))
	r1, r2 := pickE24(rng, 2.2e3, 220e3), pickE24(rng, 1e3, 47e3)
	rc, re := pickE24(rng, 220, 10e3), pickE24(rng, 47, 2.2e3)
	if rng.IntN(2) == 0 { // a base spreading resistance on half of them
		p.RB = pickE24(rng, 1, 1e3)
	}
	b := newCircuit(temp).supply("vcc", vcc, z).
		port("in", "rf_in", "in", 50).port("out", "rf_out", "out", 50).
		cap("C1", "rf_in", "base", 10e-9).cap("C2", "coll", "rf_out", 10e-9)
	desc := fmt.Sprintf("vcc %.2f V (%.2f Ω) %.1f °C hFE %.0f R1 %g R2 %g RC %g RE %g rb %g", vcc, z, temp, hfe, r1, r2, rc, re, p.RB)
	if rng.IntN(2) == 0 {
		b.res("R1", "vcc", "base", r1).res("R2", "base", "gnd", r2).
			res("RC", "vcc", "coll", rc).res("RE", "emit", "gnd", re).
			npn("Q1", "coll", "base", "emit", p)
		return b, "NPN " + desc
	}
	b.res("R1", "vcc", "base", r1).res("R2", "base", "gnd", r2).
		res("RC", "coll", "gnd", rc).res("RE", "vcc", "emit", re).
		pnp("Q1", "coll", "base", "emit", p)
	return b, "PNP " + desc
}

// (k) every member of a seeded random family of valid bias networks converges,
// balances KCL at every net to 1e-9 relative, and (when active) obeys the
// Thevenin closed form of closedform_test.go.
func TestRandomBiasNetworks(t *testing.T) {
	rng := rand.New(rand.NewPCG(20260601, 7))
	methods := map[string]int{}
	maxIter := 0
	for i := 0; i < 500; i++ {
		b, desc := randomStage(rng)
		r, err := Solve(b.c)
		if err != nil {
			t.Errorf("#%d %s: %v", i, desc, err)
			continue
		}
		methods[r.Method]++
		maxIter = max(maxIter, r.Iterations)
		if worst, at := kclWorst(t, b.c, r, 0); !(worst <= 1e-9) {
			t.Errorf("#%d %s: KCL at %s off by %.3g", i, desc, at, worst)
		}
		q := r.BJTs["Q1"]
		// The closed form neglects the collector junction's current, which
		// is below 1e-4 of IB only when VCE > VT·ln(β·1e4), about 0.45 V;
		// between 0.3 V and that the stage counts as active but is not
		// described by it.
		// It also drops the collector junction's −IS from IB, which is
		// below 1e-3 of IB only when IB > 1000·IS (a stage starved to a
		// few nA of base current is not).
		if q.Region != "active" || q.VCE < 0.5 || q.IB < 1e3*q.IS {
			continue
		}
		// Thevenin from the rail's actual voltage (it sags behind the supply
		// impedance; that drop is checked by KCL above).
		p := b.c.Part("Q1")
		beta := p.BJT.NominalHFE()
		r1, r2 := b.c.Part("R1").Value, b.c.Part("R2").Value
		re := b.c.Part("RE").Value
		vs := r.V["vcc"]
		vth, rth := vs*r2/(r1+r2), parallel(r1, r2)
		// q.VBE is between the pins; the junction's is IB·rb less.
		vj := q.VBE - q.IB*p.BJT.RB
		drive := vth - vj // NPN: divider above the junction
		if p.Kind == circuit.PNP {
			drive = vs - vth - vj
		}
		if ib := drive / (rth + p.BJT.RB + (beta+1)*re); !near(q.IB, ib, 1e-3) {
			t.Errorf("#%d %s: IB %.6g, closed form %.6g", i, desc, q.IB, ib)
		}
	}
	t.Logf("methods %v, most Newton iterations %d", methods, maxIter)
}

// randomNetwork wires parts of every kind at random between six nets and
// gnd, with values from 1 mΩ to 100 MΩ, one or two supplies of either sign.
func randomNetwork(rng *rand.Rand) *builder {
	nets := []string{"gnd", "a", "b", "c", "d", "e", "f"}
	pick := func() string { return nets[rng.IntN(len(nets))] }
	value := func() float64 { return math.Pow(10, -3+11*rng.Float64()) } // 1 mΩ … 100 MΩ
	b := newCircuit(-40 + 125*rng.Float64())
	for k := 0; k < 1+rng.IntN(2); k++ {
		z := 0.0
		if rng.IntN(2) == 0 {
			z = value()
		}
		v := (1 + 99*rng.Float64()) * float64(1-2*rng.IntN(2))
		b.supply(nets[1+k], v, z)
	}
	for k := 0; k < 2+rng.IntN(8); k++ {
		ref := fmt.Sprintf("X%d", k)
		switch rng.IntN(7) {
		case 0, 1:
			b.res(ref, pick(), pick(), value())
		case 2:
			b.cap(ref, pick(), pick(), 1e-9)
		case 3:
			dcr := 0.0
			if rng.IntN(2) == 0 {
				dcr = value()
			}
			b.ind(ref, pick(), pick(), 1e-6, dcr)
		case 4:
			b.pot(ref, pick(), pick(), pick(), value(), rng.Float64())
		case 5:
			b.xfmr(ref, winding("p", pick(), pick(), 10, float64(rng.IntN(2))*value()),
				winding("s", pick(), pick(), 3, float64(rng.IntN(2))*value()))
		case 6:
			// ic_ref 1 µA … 1 A, VBE 0.3 … 0.9 V, hFE 10 … 1000.
			p := transistor(10+990*rng.Float64(), 0.3+0.6*rng.Float64(), math.Pow(10, -6+6*rng.Float64()))
			if rng.IntN(2) == 0 {
				p.RB = math.Pow(10, -3+6*rng.Float64()) // 1 mΩ … 1 kΩ: below 1 Ω rb is a branch
			}
			if rng.IntN(2) == 0 {
				b.npn(ref, pick(), pick(), pick(), p)
			} else {
				b.pnp(ref, pick(), pick(), pick(), p)
			}
		}
	}
	return b
}

// Random networks of every part kind with extreme values and random wiring:
// Solve must return a finite Result or a *Failure, never panic, never hang,
// never NaN or Inf; and a Result must balance KCL.
func TestRandomNetworksNeverMisbehave(t *testing.T) {
	rng := rand.New(rand.NewPCG(42, 1960))
	counts := map[string]int{}
	for i := 0; i < 2000; i++ {
		b := randomNetwork(rng)
		r, err := Solve(b.c)
		if err != nil {
			var f *Failure
			if !errors.As(err, &f) {
				t.Fatalf("#%d: error %T is not a *Failure", i, err)
			}
			if f.Reason == "" {
				t.Errorf("#%d: failure without a reason", i)
			}
			// Every failure names where it happened.
			if f.Part == "" && f.Net == "" {
				t.Errorf("#%d: %s failure names neither a part nor a net: %s", i, f.Cause, f.Reason)
			}
			counts[string(f.Cause)]++
			continue
		}
		counts[r.Method]++
		if bad := r.firstNonFinite(); bad != "" {
			t.Fatalf("#%d: non-finite value at %s", i, bad)
		}
		for ref, q := range r.BJTs {
			if !finite(q.IC) || !finite(q.Power) {
				t.Fatalf("#%d %s: %v", i, ref, q)
			}
		}
		// 1e-6 rather than 1e-9: 1 mΩ beside 100 MΩ spans eleven decades;
		// and a residual under 1 fA is not judged (floating nets held by
		// the 1e-12 S aid carry currents of 1e-20 A).
		if worst, at := kclWorst(t, b.c, r, 1e-15); !(worst <= 1e-6) {
			t.Errorf("#%d: KCL at %s off by %.3g", i, at, worst)
		}
	}
	t.Logf("outcomes %v", counts)
}
