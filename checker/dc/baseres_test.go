package dc

import (
	"math"
	"testing"
)

// The base spreading resistance rb sits between the base pin and the
// internal base b' (issue 13, FORMAT.md §6 as headroom documents it in
// docs/model.md): the base current drops IB·rb across it before it reaches
// the junction. The expected values below come from KVL round the base loop
// (Sedra & Smith, Microelectronic Circuits, bias chapter: the same loop as
// closedform_test.go with rb added in series with the base; cited from
// memory, no page), solved here by bisection on the junction voltage, never
// read from Solve.

// stiffBaseStage: the base pin held at 2.0 V by an ideal source, RE 1 kΩ to
// gnd, collector on 9 V; hFE 100, VBE 0.70 V at 1 mA.
func stiffBaseStage(rb float64) *builder {
	p := transistor(100, 0.70, 1e-3)
	p.RB = rb
	return newCircuit(25).
		supply("vcc", 9, 0).
		supply("vbb", 2.0, 0).
		res("RE", "emit", "gnd", 1e3).
		npn("Q1", "vcc", "vbb", "emit", p)
}

// stiffBaseByHand solves Vbb = IB·rb + Vj + IE·RE for the junction voltage
// Vj by bisection, with the Ebers–Moll currents of FORMAT.md §6 (the
// collector junction is reverse-biased by about 7 V: its exponential is 0).
func stiffBaseByHand(rb float64) (vj, ic, ib float64) {
	const vbb, re, beta = 2.0, 1e3, 100.0
	vt := vtAt(25)
	is := isAt(transistor(beta, 0.70, 1e-3), 25)
	f := func(v float64) float64 {
		ic, ib := emForward(is, beta, v, v-9, vt)
		return vbb - v - (ic+ib)*re - ib*rb
	}
	lo, hi := 0.3, 1.0
	for range 200 {
		mid := (lo + hi) / 2
		if f(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	vj = (lo + hi) / 2
	ic, ib = emForward(is, beta, vj, vj-9, vt)
	return vj, ic, ib
}

// rb·IB moves the emitter: with rb = 1 kΩ, IB is about 12.8 µA (IE ≈
// (2 − 0.707)/1k = 1.29 mA, β = 100), so the base pin sits 12.8 mV above
// b'; the junction gives back a little of that as IE falls, VT·ΔIE/IE, so
// to first order ΔVE = −IB·rb·RE/(RE + re) with re = VT/IE ≈ 19.9 Ω, about
// −12.56 mV with IB at rb = 0 (12.81 µA) and −12.43 mV with IB at the new
// point (12.68 µA): about −12.5 mV (hand figures). The hand solve leaves out
// the 1e-12 S aids (about 1e-9 of these currents), so it is compared to 1e-8.
func TestBaseResistanceShiftsEmitter(t *testing.T) {
	const rb = 1e3
	r0 := solve(t, stiffBaseStage(0).c)
	b := stiffBaseStage(rb)
	r := solve(t, b.c)
	q := r.BJTs["Q1"]

	vj, ic, ib := stiffBaseByHand(rb)
	checkRel(t, "IB", q.IB, ib, 1e-8)
	checkRel(t, "IC", q.IC, ic, 1e-8)
	checkRel(t, "V(emit)", r.V["emit"], (ic+ib)*1e3, 1e-8)
	checkRel(t, "junction VBE (VBJf)", q.VBJf, vj, 1e-8)
	// report's vbe stays between the pins: the junction's plus IB·rb.
	checkRel(t, "VBE at the pins", q.VBE, 2.0-r.V["emit"], 1e-8)
	checkRel(t, "VBE at the pins = Vj + IB·rb", q.VBE, vj+ib*rb, 1e-8)
	// Power counts what rb dissipates: VCE·IC + VBE(pins)·IB.
	checkRel(t, "power", q.Power, q.VCE*q.IC+q.VBE*q.IB, 1e-12)

	vj0, ic0, ib0 := stiffBaseByHand(0)
	checkRel(t, "V(emit) without rb", r0.V["emit"], (ic0+ib0)*1e3, 1e-8)
	checkRel(t, "VBJf = VBEf without rb", r0.BJTs["Q1"].VBJf, vj0, 1e-8)
	shift := r.V["emit"] - r0.V["emit"]
	checkRel(t, "shift of V(emit)", shift, (ic+ib-ic0-ib0)*1e3, 1e-6)
	ie := ic0 + ib0
	checkRel(t, "shift against −IB·rb·RE/(RE + VT/IE)", shift, -ib0*rb*1e3/(1e3+vtAt(25)/ie), 0.02)
	checkAbs(t, "shift, hand figure −12.5 mV", shift, -12.5e-3, 0.1e-3)
	checkKCL(t, b.c, r, 1e-9)
}

// The divider stage of closedform_test.go with rb = 100 Ω: Thevenin with rb
// in series with the base, IB = (Vth − Vj)/(Rth + rb + (β+1)·RE), Vj the
// junction's own VBE.
func TestDividerWithBaseResistance(t *testing.T) {
	b := dividerStage()
	b.c.Part("Q1").BJT.RB = 100
	r := solve(t, b.c)
	q := r.BJTs["Q1"]
	const vcc, r1, r2, re, rb = 12.0, 22e3, 4.7e3, 330.0, 100.0
	beta := math.Sqrt(100 * 300)
	vth, rth := vcc*r2/(r1+r2), parallel(r1, r2)
	ib := (vth - q.VBJf) / (rth + rb + (beta+1)*re)
	checkRel(t, "IB", q.IB, ib, 1e-3)
	checkRel(t, "V(base) pin", r.V["base"], vth-ib*rth, 1e-3)
	checkRel(t, "V(emit)", r.V["emit"], (beta+1)*ib*re, 1e-3)
	checkRel(t, "pin VBE − junction VBE = IB·rb", q.VBE-q.VBJf, q.IB*rb, 1e-6)
	is := isAt(npn3904(), 25)
	checkRel(t, "IC against IS·e^(Vj/VT)", q.IC, is*math.Exp(q.VBJf/vtAt(25)), 1e-6)
	checkKCL(t, b.c, r, 1e-9)
}

// A PNP with rb below 1 Ω, which the solver carries as a branch of its own:
// the drop across it is still IB·rb, and KCL holds.
func TestSmallBaseResistancePNP(t *testing.T) {
	b := pnpStage()
	b.c.Part("Q1").BJT.RB = 0.5
	r := solve(t, b.c)
	q := r.BJTs["Q1"]
	checkRel(t, "pin VEB − junction VEB = IB·rb", q.VBE-q.VBJf, q.IB*0.5, 1e-6)
	if q.VBJf <= 0 || q.VBE <= q.VBJf {
		t.Errorf("forward-sense VBE %g and junction %g of an active PNP", q.VBE, q.VBJf)
	}
	checkKCL(t, b.c, r, 1e-9)
}

// A negative or non-finite rb that reaches Solve (the loader refuses it) is
// a Failure naming the part, never a panic or a NaN.
func TestInvalidBaseResistance(t *testing.T) {
	for _, rb := range []float64{-1, math.NaN(), math.Inf(1)} {
		b := dividerStage()
		b.c.Part("Q1").BJT.RB = rb
		_, err := Solve(b.c)
		f, ok := err.(*Failure)
		if !ok || f.Part != "Q1" || f.Cause != Invalid {
			t.Errorf("rb %g: %v, want an Invalid failure naming Q1", rb, err)
		}
	}
}
