package crosscheck

// The reference is itself checked on circuits small enough to solve by a
// closed form or a one-variable search written here, so that agreement with
// dc and ac means agreement with the model, not two programs sharing a slip.
// All circuits are invented for the tests.

import (
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/circuit"
)

func oneCase(name string, lo, hi float64) *circuit.Circuit {
	return &circuit.Circuit{Name: name, Band: [2]float64{lo, hi}, Ambient: circuit.Ambient{Nominal: 25, Lo: 25, Hi: 25}}
}

func closeTo(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.12g, want %.12g (±%g relative)", what, got, want, rel)
	}
}

// TestReferenceDiodeConnected: an NPN with base and collector tied (VBC = 0)
// fed from 9 V through 4.7 kΩ. FORMAT.md §6's Ebers–Moll equations give
// IC = IS(e^(VBE/VT) − 1), IB = IC/βF, and KCL (9 − V)/R = IC + IB fixes V;
// the scalar equation is solved here by bisection.
func TestReferenceDiodeConnected(t *testing.T) {
	c := oneCase("diode-connected NPN", 7e6, 7.2e6)
	c.Ambient = circuit.Ambient{Nominal: 40, Lo: 40, Hi: 40}
	c.Supplies = []*circuit.Supply{{Net: "vcc", Volts: 9, Range: [2]float64{9, 9}}}
	q := &circuit.BJTParams{FT: 250e6, HFEMin: 60, HFEMax: 240, VBE: 0.68, ICRef: 5e-3, PD: 0.5, TjMax: 150, ICMax: 0.2, VCEO: 30}
	c.Parts = []*circuit.Part{
		{Ref: "R1", Kind: circuit.Resistor, Value: 4700, Nets: []string{"vcc", "d"}},
		{Ref: "Q1", Kind: circuit.NPN, Nets: []string{"d", "d", circuit.Gnd}, BJT: q},
	}
	// Exact SI constants (SI Brochure, 9th edition, 2019).
	vt := 1.380649e-23 * (40 + 273.15) / 1.602176634e-19
	is := 5e-3 / math.Exp((0.68-0.002*(40-25))/vt) // FORMAT.md §6
	bf := math.Sqrt(60 * 240)                      // FORMAT.md §3: no hfe_typ
	f := func(v float64) float64 {                 // current surplus at the node, A
		return (9-v)/4700 - is*(math.Exp(v/vt)-1)*(1+1/bf) - 1e-12*v
	}
	lo, hi := 0.0, 9.0
	for i := 0; i < 200; i++ {
		if mid := (lo + hi) / 2; f(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	v := (lo + hi) / 2
	op, err := refSolveDC(c)
	if err != nil {
		t.Fatal(err)
	}
	closeTo(t, "V(d)", op.V["d"], v, 1e-9)
	closeTo(t, "IC", op.BJT["Q1"].ICf, is*(math.Exp(v/vt)-1), 1e-7)
	closeTo(t, "R1 current", op.Cur["R1"], (9-v)/4700, 1e-9)
	// VCE = VBE ≈ 0.6 V ≥ 0.3 V and IC ≫ 1 µA: active (FORMAT.md §5).
	if op.BJT["Q1"].Region != "active" {
		t.Errorf("region %q, want active (VCE = VBE = %.3f V)", op.BJT["Q1"].Region, v)
	}
}

// TestReferenceBaseResistance: an NPN whose base pin is held at 2 V by an
// ideal source, with rb = 1 kΩ to its internal base b', RE 1 kΩ to gnd and
// the collector on 9 V (the junction b'–c reverse by about 7 V). With Vj
// the junction's VBE and IC, IB from FORMAT.md §6's Ebers–Moll equations at
// Vj: KCL at the emitter, IC + IB = Ve/RE + 1e-12·Ve; at b', the current
// through rb is IB + 1e-12·Vb' with Vb' = Ve + Vj; and 2 V = Vb' + rb·that.
// Solved here by bisection on Vj.
func TestReferenceBaseResistance(t *testing.T) {
	c := oneCase("stiff base behind rb", 7e6, 7.2e6)
	c.Supplies = []*circuit.Supply{{Net: "vcc", Volts: 9, Range: [2]float64{9, 9}}, {Net: "vbb", Volts: 2, Range: [2]float64{2, 2}}}
	q := &circuit.BJTParams{FT: 250e6, HFEMin: 50, HFEMax: 200, VBE: 0.70, ICRef: 1e-3, PD: 0.5, TjMax: 150, ICMax: 0.2, VCEO: 30, RB: 1e3}
	c.Parts = []*circuit.Part{
		{Ref: "RE", Kind: circuit.Resistor, Value: 1e3, Nets: []string{"emit", circuit.Gnd}},
		{Ref: "Q1", Kind: circuit.NPN, Nets: []string{"vcc", "vbb", "emit"}, BJT: q},
	}
	vt := 1.380649e-23 * (25 + 273.15) / 1.602176634e-19
	is := 1e-3 / math.Exp(0.70/vt)
	bf := math.Sqrt(50 * 200)
	const g = 1e-12
	state := func(vj float64) (ve, vbi, ic, ib float64) {
		vbc := vj - 9 // Vb' − Vc to well within a volt; its exponential is 0 either way
		ic = is*(math.Exp(vj/vt)-math.Exp(vbc/vt)) - is*(math.Exp(vbc/vt)-1)
		ib = is/bf*(math.Exp(vj/vt)-1) + is*(math.Exp(vbc/vt)-1)
		ve = (ic + ib) / (1/1e3 + g)
		return ve, ve + vj, ic, ib
	}
	lo, hi := 0.3, 1.0
	for i := 0; i < 200; i++ {
		mid := (lo + hi) / 2
		if _, vbi, _, ib := state(mid); 2-vbi-1e3*(ib+g*vbi) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	vj := (lo + hi) / 2
	ve, _, ic, ib := state(vj)
	op, err := refSolveDC(c)
	if err != nil {
		t.Fatal(err)
	}
	closeTo(t, "V(emit)", op.V["emit"], ve, 1e-9)
	closeTo(t, "IC", op.BJT["Q1"].ICf, ic, 1e-8)
	closeTo(t, "IB", op.BJT["Q1"].IBf, ib, 1e-8)
	closeTo(t, "VBE between the pins", op.BJT["Q1"].VBEf, 2-ve, 1e-9)
	closeTo(t, "VBE at the junction", op.BJT["Q1"].VBJf, vj, 1e-9)
}

// TestReferenceMergedCurrents: zero-resistance parts are merged away, so
// their currents come from KCL alone. A 12 V supply behind 0.5 Ω feeds a
// zero-resistance choke into a net that a zero-resistance winding ties to a
// second net; 1 kΩ and 2 kΩ go to gnd from the two nets. By Ohm's law and
// KCL (vcc, a and b are one node): the choke carries both resistor
// currents, the winding only the 2 kΩ one.
func TestReferenceMergedCurrents(t *testing.T) {
	c := oneCase("merged nets", 3.5e6, 3.8e6)
	c.Supplies = []*circuit.Supply{{Net: "vcc", Volts: 12, Range: [2]float64{12, 12}, Impedance: 0.5}}
	c.Parts = []*circuit.Part{
		{Ref: "L1", Kind: circuit.Inductor, Value: 10e-6, Nets: []string{"vcc", "a"}},
		{Ref: "T1", Kind: circuit.Transformer, AL: 100e-9, Coupling: 0.95, Windings: []*circuit.Winding{
			{Name: "p", Turns: 10, Nets: [2]string{"b", "a"}},
			{Name: "s", Turns: 5, Nets: [2]string{"c", circuit.Gnd}, Resistance: 0.2},
		}},
		{Ref: "R1", Kind: circuit.Resistor, Value: 1000, Nets: []string{"a", circuit.Gnd}},
		{Ref: "R2", Kind: circuit.Resistor, Value: 2000, Nets: []string{"b", circuit.Gnd}},
		{Ref: "R3", Kind: circuit.Resistor, Value: 50, Nets: []string{"c", circuit.Gnd}},
	}
	op, err := refSolveDC(c)
	if err != nil {
		t.Fatal(err)
	}
	// vcc, a and b are one node; each carries FORMAT.md §6's 1e-12 S to gnd.
	const g = 1e-12
	v := 12 / 0.5 / (1/0.5 + 1.0/1000 + 1.0/2000 + 3*g)
	closeTo(t, "V(a)", op.V["a"], v, 1e-12)
	closeTo(t, "V(b)", op.V["b"], v, 1e-12)
	closeTo(t, "L1 current (vcc → a)", op.Cur["L1"], v/1000+v/2000+2*g*v, 1e-12)
	closeTo(t, "T1.p current (b → a)", op.Wind["T1"]["p"], -(v/2000 + g*v), 1e-12)
	closeTo(t, "supply current", op.Supply["vcc"], (12-v)/0.5, 1e-12)
	if math.Abs(op.Wind["T1"]["s"]) > 1e-12 || math.Abs(op.V["c"]) > 1e-12 {
		t.Errorf("secondary: %g A, V(c) = %g V; want 0 (no DC source on it)", op.Wind["T1"]["s"], op.V["c"])
	}
}

// TestReferenceCoupledCoils: the impedance looking into the primary of two
// coupled coils with the secondary loaded by R is
// Z = R1 + jωL1 + (ωM)²/(R2 + R + jωL2) (the reflected impedance of a linear
// transformer, standard circuit theory; from memory). The primary sits
// between the in port's net and gnd, so this is the input impedance. With
// the dots at opposite ends the result must not change (M enters squared),
// while the voltage across the load flips sign and keeps its magnitude.
func TestReferenceCoupledCoils(t *testing.T) {
	for _, flip := range []bool{false, true} {
		c := oneCase("coupled coils", 10.1e6, 10.15e6)
		sec := [2]string{"out", circuit.Gnd}
		if flip {
			sec = [2]string{circuit.Gnd, "out"}
		}
		c.Parts = []*circuit.Part{
			{Ref: "T1", Kind: circuit.Transformer, AL: 360e-9, Coupling: 0.9, Windings: []*circuit.Winding{
				{Name: "p", Turns: 4, Nets: [2]string{"in", circuit.Gnd}, Resistance: 0.1},
				{Name: "s", Turns: 2, Nets: sec, Resistance: 0.05},
			}},
		}
		c.Ports = []*circuit.Port{
			{Name: "in", Net: "in", Direction: "in", Impedance: 50, Matched: true},
			{Name: "out", Net: "out", Direction: "out", Impedance: 12.5, Matched: true},
		}
		r, err := refAnalyze(c, &refOP{VT: thermalVoltage(25), BJT: map[string]*refBJT{}})
		if err != nil {
			t.Fatal(err)
		}
		w := 2 * math.Pi * 10.1e6
		l1, l2 := 360e-9*16, 360e-9*4
		m := 0.9 * math.Sqrt(l1*l2)
		// Every net's 1e-12 S to gnd changes these by parts in 1e12.
		z := complex(0.1, w*l1) + complex(w*w*m*m, 0)/complex(0.05+12.5, w*l2)
		if d := cmplx.Abs(r.Zin[0] - z); d > 1e-9*cmplx.Abs(z) {
			t.Errorf("flip %v: Zin %v, want %v", flip, r.Zin[0], z)
		}
		// Load voltage for E = 1 V: I1 = 1/(RS + Z), V(load) = jωM·I1·RL/(R2 + RL + jωL2).
		i1 := 1 / (complex(50, 0) + z)
		vout := complex(0, w*m) * i1 * complex(12.5, 0) / complex(0.05+12.5, w*l2)
		wantG := 10 * math.Log10(cmplx.Abs(vout)*cmplx.Abs(vout)/12.5/(1.0/(4*50)))
		if r.GainDB[0] == nil || math.Abs(*r.GainDB[0]-wantG) > 1e-9 {
			t.Errorf("flip %v: gain %v dB, want %.9f", flip, fmtPtr(r.GainDB[0]), wantG)
		}
		// Termination of the primary with the transformer removed: nothing
		// but the in port's 50 Ω (and 1e-12 S) is left between in and gnd.
		closeTo(t, "primary termination", r.WTerm["T1"]["p"], 50, 1e-9)
	}
}

// TestReferenceCommonEmitter: an NPN stage with its emitter at gnd, base fed
// from the in port and biased by RB from a 0 Ω supply, a collector resistor
// RC to the supply and the out port as RL, cob = 0. With the hybrid-π of
// FORMAT.md §6 the base node sees 1/RS + 1/RB + 1/rπ + jωCπ and
// Vout = −gm·Vb·(RC ∥ RL), so Vout/E follows in closed form from the
// operating point's IC.
func TestReferenceCommonEmitter(t *testing.T) {
	c := oneCase("30 m common-emitter test stage", 10.1e6, 10.15e6)
	c.Supplies = []*circuit.Supply{{Net: "vcc", Volts: 12, Range: [2]float64{12, 12}}}
	c.Ports = []*circuit.Port{
		{Name: "in", Net: "b", Direction: "in", Impedance: 50, Matched: true},
		{Name: "out", Net: "c", Direction: "out", Impedance: 1000, Matched: true},
	}
	q := &circuit.BJTParams{FT: 300e6, HFEMin: 100, HFEMax: 300, HFETyp: 150, VBE: 0.65, ICRef: 10e-3,
		PD: 0.625, TjMax: 150, ICMax: 0.2, VCEO: 40}
	c.Parts = []*circuit.Part{
		{Ref: "RB", Kind: circuit.Resistor, Value: 220e3, Nets: []string{"vcc", "b"}},
		{Ref: "RC", Kind: circuit.Resistor, Value: 1000, Nets: []string{"vcc", "c"}},
		{Ref: "Q1", Kind: circuit.NPN, Nets: []string{"c", "b", circuit.Gnd}, BJT: q},
	}
	op, err := refSolveDC(c)
	if err != nil {
		t.Fatal(err)
	}
	r, err := refAnalyze(c, op)
	if err != nil {
		t.Fatal(err)
	}
	gm := op.BJT["Q1"].ICf / op.VT
	rpi := 150 / gm
	cpi := gm / (2 * math.Pi * 300e6)
	for k, f := range r.Freq {
		w := 2 * math.Pi * f
		yb := complex(1.0/50+1.0/220e3+1/rpi+1e-12, w*cpi)
		vb := complex(1.0/50, 0) / yb // E = 1 V as a Norton source into the base
		rl := 1 / (1.0/1000 + 1.0/1000 + 1e-12)
		vout := -complex(gm, 0) * vb * complex(rl, 0)
		zin := 1 / (yb - complex(1.0/50, 0))
		if d := cmplx.Abs(r.Zin[k] - zin); d > 1e-9*cmplx.Abs(zin) {
			t.Errorf("%g Hz: Zin %v, want %v", f, r.Zin[k], zin)
		}
		wantV := 20 * math.Log10(cmplx.Abs(vout)/cmplx.Abs(vb))
		if r.VGainDB[k] == nil || math.Abs(*r.VGainDB[k]-wantV) > 1e-9 {
			t.Errorf("%g Hz: voltage gain %v dB, want %.9f", f, fmtPtr(r.VGainDB[k]), wantV)
		}
	}
	closeTo(t, "beta_high", r.BetaHigh["Q1"], 300e6/10.15e6, 1e-12)
}

// TestReferenceSeriesAiding: two coupled windings in series between the in
// port's net and gnd show R1 + R2 + jω(L1 + L2 ± 2M): plus when the current
// enters both at their dots (series aiding), minus when it enters one at its
// dot and the other at its undotted end (series opposing) — standard circuit
// theory, from memory. FORMAT.md §6 puts every dot at the winding's first
// net, so this fixes the sign convention of the mutual inductance.
func TestReferenceSeriesAiding(t *testing.T) {
	for _, aiding := range []bool{true, false} {
		c := oneCase("series coils", 1.8e6, 2e6)
		sec := [2]string{"mid", circuit.Gnd} // current from mid to gnd enters at the dot
		if !aiding {
			sec = [2]string{circuit.Gnd, "mid"}
		}
		c.Parts = []*circuit.Part{
			{Ref: "T1", Kind: circuit.Transformer, AL: 250e-9, Coupling: 0.95, Windings: []*circuit.Winding{
				{Name: "a", Turns: 6, Nets: [2]string{"in", "mid"}, Resistance: 0.3},
				{Name: "b", Turns: 3, Nets: sec, Resistance: 0.2},
			}},
		}
		c.Ports = []*circuit.Port{{Name: "in", Net: "in", Direction: "in", Impedance: 50, Matched: true}}
		r, err := refAnalyze(c, &refOP{VT: thermalVoltage(25), BJT: map[string]*refBJT{}})
		if err != nil {
			t.Fatal(err)
		}
		w := 2 * math.Pi * 1.8e6
		l1, l2 := 250e-9*36, 250e-9*9
		m := 0.95 * math.Sqrt(l1*l2)
		if !aiding {
			m = -m
		}
		z := complex(0.5, w*(l1+l2+2*m))
		// The 1e-12 S at "in" and "mid" shift this by parts in 1e10 at most.
		if d := cmplx.Abs(r.Zin[0] - z); d > 1e-8*cmplx.Abs(z) {
			t.Errorf("aiding %v: Zin %v, want %v", aiding, r.Zin[0], z)
		}
	}
}
