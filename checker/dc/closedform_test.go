package dc

import (
	"math"
	"testing"
)

// Closed forms of textbook bias networks, with the VBE the solver found put
// into them (Sedra & Smith, Microelectronic Circuits, and Horowitz & Hill,
// The Art of Electronics, ch. 2, both derive these by Thevenin's theorem and
// KVL round the base loop; cited from memory, no page). Every expected value
// is computed here from the resistor values, never read from Solve.

// dividerStage is a divider-biased NPN common-emitter stage for a 30 m
// receive preamp: vcc 12 V, R1 22k / R2 4k7, RC 1k, RE 330 Ω, with 50 Ω
// ports and coupling capacitors (open at DC).
func dividerStage() *builder {
	return newCircuit(25).
		supply("vcc", 12, 0).
		port("in", "rf_in", "in", 50).
		port("out", "rf_out", "out", 50).
		cap("C1", "rf_in", "base", 10e-9).
		res("R1", "vcc", "base", 22e3).
		res("R2", "base", "gnd", 4.7e3).
		res("RC", "vcc", "coll", 1e3).
		res("RE", "emit", "gnd", 330).
		cap("CE", "emit", "gnd", 100e-9).
		cap("C2", "coll", "rf_out", 10e-9).
		npn("Q1", "coll", "base", "emit", npn3904())
}

// (a) Thevenin closed form of the divider-biased NPN stage, to 0.1 %.
func TestDividerNPNThevenin(t *testing.T) {
	b := dividerStage()
	r := solve(t, b.c)
	q := r.BJTs["Q1"]
	const vcc, r1, r2, rc, re = 12.0, 22e3, 4.7e3, 1e3, 330.0
	beta := math.Sqrt(100 * 300) // FORMAT.md §3: nominal hFE √(min·max)

	vth := vcc * r2 / (r1 + r2)
	rth := parallel(r1, r2)
	ib := (vth - q.VBE) / (rth + (beta+1)*re) // KVL round the base loop
	ic := beta * ib
	checkRel(t, "IB", q.IB, ib, 1e-3)
	checkRel(t, "IC", q.IC, ic, 1e-3)
	checkRel(t, "V(emit)", r.V["emit"], (beta+1)*ib*re, 1e-3)
	checkRel(t, "V(base)", r.V["base"], vth-ib*rth, 1e-3)
	checkRel(t, "V(coll)", r.V["coll"], vcc-ic*rc, 1e-3)
	checkRel(t, "VCE", q.VCE, vcc-ic*rc-(beta+1)*ib*re, 1e-3)
	checkRel(t, "hFE used", q.HFE, beta, 1e-12)

	// Ebers–Moll: in forward activity IC = IS·e^(VBE/VT) (the e^(VBC/VT) and
	// −1 terms are below 1e-9 of it here), with IS from FORMAT.md §6.
	is := isAt(npn3904(), 25)
	checkRel(t, "IS", q.IS, is, 1e-12)
	checkRel(t, "IC against IS·e^(VBE/VT)", q.IC, is*math.Exp(q.VBE/vtAt(25)), 1e-6)

	// Part currents and powers from Ohm's law; supply current by KCL at vcc.
	i1 := (vcc - r.V["base"]) / r1
	checkRel(t, "R1 current", r.Parts["R1"].Current, i1, 1e-9)
	checkRel(t, "R1 power", r.Parts["R1"].Power, i1*i1*r1, 1e-9)
	checkRel(t, "RE current", r.Parts["RE"].Current, ic+ib, 1e-3)
	checkRel(t, "supply current", r.SupplyCurrent["vcc"], i1+ic, 1e-3)
	// The input port's 50 Ω holds rf_in at 0 V, so C1 sees V(base).
	checkRel(t, "C1 voltage", r.Parts["C1"].Voltage, vth-ib*rth, 1e-3)
	checkRel(t, "CE voltage", r.Parts["CE"].Voltage, (beta+1)*ib*re, 1e-3)
	checkRel(t, "power", q.Power, q.VCE*q.IC+q.VBE*q.IB, 1e-12)
	if q.Region != "active" {
		t.Errorf("region %s, want active (%v)", q.Region, q)
	}
	if r.Method != "newton" {
		t.Errorf("method %s, want plain newton for a simple stage", r.Method)
	}
	checkKCL(t, b.c, r, 1e-9)
}

// pnpStage is a 160 m PNP stage on 9 V: emitter resistor to the rail,
// divider R1 4k7 (rail side) / R2 15k, collector load 1k to gnd.
func pnpStage() *builder {
	return newCircuit(25).
		supply("vcc", 9, 0).
		res("RE", "vcc", "emit", 330).
		res("R1", "vcc", "base", 4.7e3).
		res("R2", "base", "gnd", 15e3).
		res("RC", "coll", "gnd", 1e3).
		cap("CB", "emit", "gnd", 1e-6).
		pnp("Q1", "coll", "base", "emit", pnp3906())
}

// (b) the same closed form mirrored for a PNP (2N3906-like figures).
func TestDividerPNPThevenin(t *testing.T) {
	b := pnpStage()
	r := solve(t, b.c)
	q := r.BJTs["Q1"]
	const vcc, r1, r2, rc, re = 9.0, 4.7e3, 15e3, 1e3, 330.0
	beta := math.Sqrt(100 * 300)

	vth := vcc * r2 / (r1 + r2)
	rth := parallel(r1, r2)
	ib := (vcc - vth - q.VBE) / (rth + (beta+1)*re) // KVL from the rail down the emitter
	ic := beta * ib
	checkRel(t, "IB", q.IB, ib, 1e-3)
	checkRel(t, "IC", q.IC, ic, 1e-3)
	checkRel(t, "V(emit)", r.V["emit"], vcc-(beta+1)*ib*re, 1e-3)
	checkRel(t, "V(base)", r.V["base"], vth+ib*rth, 1e-3)
	checkRel(t, "V(coll)", r.V["coll"], ic*rc, 1e-3)
	is := isAt(pnp3906(), 25)
	checkRel(t, "IC against IS·e^(VEB/VT)", q.IC, is*math.Exp(q.VBE/vtAt(25)), 1e-6)
	// Magnitudes read like an NPN; the forward-sense figures are positive too.
	if q.ICf <= 0 || q.IBf <= 0 || q.VBEf <= 0 || q.VCEf <= 0 {
		t.Errorf("forward-sense figures of an active PNP must be positive: %+v", q)
	}
	if q.Region != "active" {
		t.Errorf("region %s, want active", q.Region)
	}
	// The collector current flows out of the collector into RC: RC's current
	// from coll to gnd is +IC; RE's from vcc to emit is +IE.
	checkRel(t, "RC current", r.Parts["RC"].Current, ic, 1e-3)
	checkRel(t, "RE current", r.Parts["RE"].Current, ic+ib, 1e-3)
	checkKCL(t, b.c, r, 1e-9)
}

// (c) collector-to-base feedback bias: Vcc = (IC+IB)·RC + IB·RB + VBE + IE·RE,
// so IB = (Vcc − VBE)/(RB + (β+1)(RC + RE)).
func TestCollectorFeedback(t *testing.T) {
	const vcc, rc, rb, re, beta = 12.0, 2.2e3, 220e3, 100.0, 120.0
	b := newCircuit(25).
		supply("vcc", vcc, 0).
		res("RC", "vcc", "coll", rc).
		res("RB", "coll", "base", rb).
		res("RE", "emit", "gnd", re).
		npn("Q1", "coll", "base", "emit", transistor(beta, 0.68, 5e-3))
	r := solve(t, b.c)
	q := r.BJTs["Q1"]
	ib := (vcc - q.VBE) / (rb + (beta+1)*(rc+re))
	checkRel(t, "IB", q.IB, ib, 1e-3)
	checkRel(t, "IC", q.IC, beta*ib, 1e-3)
	checkRel(t, "V(coll)", r.V["coll"], vcc-(beta+1)*ib*rc, 1e-3)
	checkRel(t, "RB current", r.Parts["RB"].Current, ib, 1e-3)
	checkKCL(t, b.c, r, 1e-9)
}

// seriesFedStage solves by hand a divider-biased stage whose divider top and
// collector both hang on a node fed from v0 through rs (a supply impedance or
// a decoupling resistor). Unknowns Vs and IB, two linear equations once VBE
// is known:
//
//	base KCL:   (Vs − VB)/R1 − VB/R2 − IB = 0,  VB = VBE + (β+1)·RE·IB
//	feed KVL:   Vs = v0 − rs·((Vs − VB)/R1 + β·IB)
func seriesFedStage(v0, rs, r1, r2, re, beta, vbe float64) (vs, ib float64) {
	g := 1/r1 + 1/r2
	a11, a12, b1 := 1/r1, -(g*(beta+1)*re + 1), vbe*g
	a21, a22, b2 := 1+rs/r1, rs*beta-rs*(beta+1)*re/r1, v0+rs*vbe/r1
	det := a11*a22 - a12*a21
	return (b1*a22 - a12*b2) / det, (a11*b2 - a21*b1) / det
}

// (d) an emitter follower (a 20 m buffer) on a 9 V supply with 4.7 Ω source
// impedance: the supply impedance drop solved by hand.
func TestEmitterFollower(t *testing.T) {
	const v0, zs, r1, r2, re = 9.0, 4.7, 10e3, 10e3, 1e3
	beta := 150.0
	b := newCircuit(25).
		supply("vcc", v0, zs).
		res("R1", "vcc", "base", r1).
		res("R2", "base", "gnd", r2).
		res("RE", "emit", "gnd", re).
		port("out", "out", "out", 50).
		cap("C2", "emit", "out", 1e-6).
		npn("Q1", "vcc", "base", "emit", transistor(beta, 0.66, 5e-3))
	r := solve(t, b.c)
	q := r.BJTs["Q1"]
	vs, ib := seriesFedStage(v0, zs, r1, r2, re, beta, q.VBE)
	checkRel(t, "V(vcc) behind the supply impedance", r.V["vcc"], vs, 1e-6)
	checkRel(t, "IB", q.IB, ib, 1e-3)
	checkRel(t, "V(emit)", r.V["emit"], (beta+1)*ib*re, 1e-3)
	checkRel(t, "follower: V(base) − V(emit) = VBE", r.V["base"]-r.V["emit"], q.VBE, 1e-9)
	checkRel(t, "VCE", q.VCE, vs-(beta+1)*ib*re, 1e-3)
	checkRel(t, "supply current", r.SupplyCurrent["vcc"], (v0-vs)/zs, 1e-6)
	checkKCL(t, b.c, r, 1e-9)
}

// (e) two stages of a 30 m preamp: the first on an RC-decoupled rail
// (100 Ω, 10 µF), the second straight on vcc, joined by a coupling capacitor.
func TestTwoStagesDecoupledRail(t *testing.T) {
	const vcc, rdec = 12.0, 100.0
	const r1, r2, rc1, re1 = 33e3, 6.8e3, 1.5e3, 270.0
	const r3, r4, rc2, re2 = 22e3, 4.7e3, 1e3, 220.0
	b := newCircuit(25).
		supply("vcc", vcc, 0).
		res("RD", "vcc", "vdec", rdec).
		cap("CD", "vdec", "gnd", 10e-6).
		res("R1", "vdec", "b1", r1).
		res("R2", "b1", "gnd", r2).
		res("RC1", "vdec", "c1", rc1).
		res("RE1", "e1", "gnd", re1).
		npn("Q1", "c1", "b1", "e1", npn3904()).
		cap("CC", "c1", "b2", 10e-9).
		res("R3", "vcc", "b2", r3).
		res("R4", "b2", "gnd", r4).
		res("RC2", "vcc", "c2", rc2).
		res("RE2", "e2", "gnd", re2).
		npn("Q2", "c2", "b2", "e2", npn3904())
	r := solve(t, b.c)
	beta := math.Sqrt(100 * 300)

	q1 := r.BJTs["Q1"]
	vd, ib1 := seriesFedStage(vcc, rdec, r1, r2, re1, beta, q1.VBE)
	checkRel(t, "V(vdec)", r.V["vdec"], vd, 1e-6)
	checkRel(t, "RD drop", vcc-r.V["vdec"], vcc-vd, 1e-4)
	checkRel(t, "IB1", q1.IB, ib1, 1e-3)
	checkRel(t, "V(c1)", r.V["c1"], vd-beta*ib1*rc1, 1e-3)

	q2 := r.BJTs["Q2"]
	vth, rth := vcc*r4/(r3+r4), parallel(r3, r4)
	ib2 := (vth - q2.VBE) / (rth + (beta+1)*re2)
	checkRel(t, "IB2", q2.IB, ib2, 1e-3)
	checkRel(t, "CC voltage", r.Parts["CC"].Voltage, math.Abs(vd-beta*ib1*rc1-(vth-ib2*rth)), 1e-3)
	checkKCL(t, b.c, r, 1e-9)
}

// (f) temperature: with the emitter current forced by 10 kΩ to −100 V, IC is
// nearly fixed, and VBE must fall about 2 mV/°C (common practice, no
// published source; FORMAT.md §6 builds it into IS(T)). Exactly, with
// IC = IS·e^(VBE/VT): VBE(T) = vbe − 0.002·(T − 25) + VT(T)·ln(IC/ic_ref).
func TestVBETemperature(t *testing.T) {
	p := npn3904()
	build := func(tempC float64) *builder {
		return newCircuit(tempC).
			supply("vcc", 12, 0).
			supply("vee", -100, 0).
			res("RC", "vcc", "coll", 470).
			res("RE", "emit", "vee", 10e3).
			npn("Q1", "coll", "gnd", "emit", p)
	}
	vbe := map[float64]float64{}
	ic := map[float64]float64{}
	for _, tc := range []float64{25, 50} {
		c := build(tc).c
		r := solve(t, c)
		q := r.BJTs["Q1"]
		want := p.VBE - 0.002*(tc-25) + vtAt(tc)*math.Log(q.IC/p.ICRef)
		checkAbs(t, "VBE", q.VBE, want, 1e-6)
		checkRel(t, "VT in the result", r.VT, vtAt(tc), 1e-12)
		vbe[tc], ic[tc] = q.VBE, q.IC
		checkKCL(t, c, r, 1e-9)
	}
	if d := ic[50]/ic[25] - 1; math.Abs(d) > 1e-3 {
		t.Errorf("IC moved %.2g between 25 and 50 °C; the bias should hold it", d)
	}
	// −2 mV/°C over 25 °C is −50 mV; at IC ≈ ic_ref the VT·ln term is tiny.
	checkAbs(t, "VBE(50 °C) − VBE(25 °C)", vbe[50]-vbe[25], -0.050, 0.5e-3)
}

// (g) the thermal voltage from the exact SI constants (REFERENCES.md §3 table,
// 5 digits in mV).
func TestThermalVoltage(t *testing.T) {
	for _, c := range []struct{ tempC, mV float64 }{
		{-40, 20.091}, {0, 23.538}, {25, 25.693}, {27, 25.865}, {26.85, 25.852}, {50, 27.847}, {85, 30.863},
	} {
		checkAbs(t, "VT mV", ThermalVoltage(c.tempC)*1e3, c.mV, 0.0005)
	}
	r := solve(t, dividerStage().c)
	checkAbs(t, "VT of a 25 °C solve, mV", r.VT*1e3, 25.693, 0.0005)
}

// bisectStage solves a divider-biased NPN stage (vcc, divider top rTop,
// bottom rBot, rc, re) by bisection on VBE of the Thevenin base-loop
// equation, with the full Ebers–Moll equations of FORMAT.md §6 — a method
// independent of the MNA/Newton solver. It ignores the 1e-12 S net leakage
// (its currents are below 1e-7 of the base current here).
func bisectStage(vcc, rTop, rBot, rc, re, beta, is, vt float64) (vbe, ic, ib float64) {
	vth, rth := vcc*rBot/(rTop+rBot), parallel(rTop, rBot)
	currents := func(vbe float64) (ic, ib float64) {
		vbc := 0.0
		for i := 0; i < 50; i++ { // VBC follows from the currents; converges at once in the active region
			ic, ib = emForward(is, beta, vbe, vbc, vt)
			vb := vbe + re*(ic+ib)
			vc := vcc - rc*ic
			vbc = vb - vc
		}
		return ic, ib
	}
	lo, hi := 0.0, vth
	for i := 0; i < 200 && hi-lo > 1e-15; i++ {
		mid := (lo + hi) / 2
		ic, ib := currents(mid)
		if vth-ib*rth-mid-re*(ic+ib) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	vbe = (lo + hi) / 2
	ic, ib = currents(vbe)
	return vbe, ic, ib
}

// The independent cross-check: Newton on the MNA matrix against bisection on
// the Thevenin equation, to 0.01 %.
func TestCrossCheckBisection(t *testing.T) {
	beta := math.Sqrt(100 * 300)
	vt := vtAt(25)

	r := solve(t, dividerStage().c)
	q := r.BJTs["Q1"]
	vbe, ic, ib := bisectStage(12, 22e3, 4.7e3, 1e3, 330, beta, isAt(npn3904(), 25), vt)
	checkRel(t, "NPN VBE", q.VBE, vbe, 1e-4)
	checkRel(t, "NPN IC", q.IC, ic, 1e-4)
	checkRel(t, "NPN IB", q.IB, ib, 1e-4)

	// The PNP stage mirrored about the rail is an NPN stage whose divider top
	// is R2 and bottom is R1.
	r = solve(t, pnpStage().c)
	q = r.BJTs["Q1"]
	vbe, ic, ib = bisectStage(9, 15e3, 4.7e3, 1e3, 330, beta, isAt(pnp3906(), 25), vt)
	checkRel(t, "PNP VEB", q.VBE, vbe, 1e-4)
	checkRel(t, "PNP IC", q.IC, ic, 1e-4)
	checkRel(t, "PNP IB", q.IB, ib, 1e-4)
}

// Windings, inductors and a potentiometer at DC: resistances as given, a
// zero-resistance choke as a short carrying the collector current.
func TestInductiveLoadsAndPot(t *testing.T) {
	const vcc = 12.0
	b := newCircuit(25).
		supply("vcc", vcc, 0).
		ind("L1", "vcc", "feed", 22e-6, 0). // ideal short
		pot("RV1", "feed", "base", "gnd", 50e3, 0.8).
		xfmr("T1", winding("primary", "feed", "coll", 12, 0.5), winding("secondary", "out", "gnd", 4, 0)).
		port("out", "out", "out", 50).
		res("RE", "emit", "gnd", 470).
		npn("Q1", "coll", "base", "emit", npn3904())
	r := solve(t, b.c)
	q := r.BJTs["Q1"]
	beta := math.Sqrt(100 * 300)
	// Pot: R·(1 − setting) = 10k from a (feed) to wiper, R·setting = 40k wiper to b.
	ra, rb := 50e3*0.2, 50e3*0.8
	vth, rth := vcc*rb/(ra+rb), parallel(ra, rb)
	ib := (vth - q.VBE) / (rth + (beta+1)*470)
	checkRel(t, "IB", q.IB, ib, 1e-3)
	checkAbs(t, "V(feed) through an ideal choke", r.V["feed"], vcc, 1e-9)
	i1 := (vcc - r.V["base"]) / ra
	checkRel(t, "L1 current (pot + collector)", r.Parts["L1"].Current, i1+q.IC, 1e-3)
	checkRel(t, "primary current", r.Parts["T1"].Windings["primary"], q.IC, 1e-3)
	checkRel(t, "primary drop", r.V["feed"]-r.V["coll"], 0.5*q.IC, 1e-3)
	checkAbs(t, "secondary current", r.Parts["T1"].Windings["secondary"], 0, 1e-15)
	sec := r.Parts["RV1"].Sections
	checkRel(t, "pot a–wiper R", sec[0].R, ra, 1e-12)
	checkRel(t, "pot power", r.Parts["RV1"].Power, i1*i1*ra+(r.V["base"]*r.V["base"])/rb, 1e-9)
	checkKCL(t, b.c, r, 1e-9)

	// A pot at an end stop keeps 1 mΩ on the short side (FORMAT.md §6).
	b.c.Part("RV1").Setting = 1
	r = solve(t, b.c)
	checkRel(t, "end-stop section", r.Parts["RV1"].Sections[0].R, 1e-3, 1e-12)
}

// Resistances under 1 Ω become branches of the matrix (a 0.2 Ω supply, a
// 0.47 Ω emitter resistor; RC 100 Ω keeps the 43 mA stage active): the
// results must still follow the closed forms.
func TestLowResistances(t *testing.T) {
	const v0, zs, r1, r2, re = 12.0, 0.2, 22e3, 4.7e3, 0.47
	b := newCircuit(25).supply("vcc", v0, zs).
		res("R1", "vcc", "base", r1).res("R2", "base", "gnd", r2).
		res("RC", "vcc", "coll", 100).res("RE", "emit", "gnd", re).
		npn("Q1", "coll", "base", "emit", transistor(120, 0.65, 10e-3))
	r := solve(t, b.c)
	q := r.BJTs["Q1"]
	vs, ib := seriesFedStage(v0, zs, r1, r2, re, 120, q.VBE)
	checkRel(t, "V(vcc)", r.V["vcc"], vs, 1e-6)
	checkRel(t, "IB", q.IB, ib, 1e-3)
	checkRel(t, "RE current", r.Parts["RE"].Current, 121*ib, 1e-3)
	checkRel(t, "RE power", r.Parts["RE"].Power, 121*ib*121*ib*re, 2e-3)
	checkRel(t, "supply current", r.SupplyCurrent["vcc"], (v0-vs)/zs, 1e-6)
	checkKCL(t, b.c, r, 1e-9)
}
