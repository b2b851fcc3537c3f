package dc

import (
	"fmt"
	"math"

	"headroom/checker/circuit"
)

// The field-effect transistor of docs/fet.md: the square-law (Shockley)
// channel with its triode region, no channel-length modulation, and for a
// JFET the gate junction as two diodes (gate-source, gate-drain) with
// GateIS and the case's VT. A dual-gate MOSFET is the cascode of two
// identical square-law halves; its internal node is solved inside the
// device, so the netlist keeps one row per net.

// GateIS is the saturation current of a JFET's gate diodes (docs/fet.md):
// forward bias near 0.6 V at 0.1 mA, a few picoamperes of leakage in
// reverse — the order of a small-signal JFET's gate, common practice.
const GateIS = 1e-14 // A

// FETRegionOn is the drain current below which a FET counts as cut off.
const FETRegionOn = 1e-6 // A

// noNode marks an absent terminal (a JFET's second gate).
const noNode = gnd

// fet is one field-effect transistor with its Newton state.
type fet struct {
	ref       string
	d, g, s   int
	g2        int     // dual gate: gate 2; a JFET: noNode
	dual      bool    // a dual-gate MOSFET
	pol       float64 // +1 n-channel, −1 p-channel
	idss, vp  float64 // A, V (magnitude)
	vcrit     float64 // V, where the gate-diode limiting starts (JFET)
	vgs, vds  float64 // V, forward sense, the point the last stamp was taken at
	vg2s      float64
	vm        float64 // V, the dual gate's internal node over the source, last solved
	moved     float64
	limited   bool
	terminals [4]int // d, g, g2, s, the order of the stamps
}

func newFET(p *circuit.Part, vt float64) (fet, *Failure) {
	f := p.FET
	if f == nil {
		return fet{}, invalid(p.Ref, "no FET figures")
	}
	if !positive(f.IDSS) || !positive(f.VP) {
		return fet{}, invalid(p.Ref, "IDSS %g A, VP %g V do not make a FET", f.IDSS, f.VP)
	}
	q := fet{ref: p.Ref, pol: 1, idss: f.IDSS, vp: f.VP, g2: noNode, dual: p.Kind == circuit.DualGateMOSFET}
	if p.Kind == circuit.PJFET {
		q.pol = -1
	}
	q.vcrit = vt * math.Log(vt/(math.Sqrt2*GateIS))
	return q, nil
}

// fetPoint is the forward-sense terminal currents of a FET at one bias
// (into the drain, into gate 1, into gate 2) and their partial derivatives
// with respect to (vds, vgs, vg2s).
type fetPoint struct {
	i   [3]float64
	jac [3][3]float64
	ich float64 // the channel current, drain to source, A
	vm  float64 // dual gate: internal node over the source, V
}

// squareLaw is the channel current from drain to source for vds ≥ 0:
//
//	cut-off     vgs ≤ −VP:        0
//	saturation  vds ≥ vgs + VP:   IDSS·(1 + vgs/VP)²
//	triode      otherwise:        IDSS·[2(1 + vgs/VP)(vds/VP) − (vds/VP)²]
//
// (VP a magnitude here; with the sheet's signed VP these are docs/fet.md's
// IDSS·(1 − VGS/VP)² and IDSS·[2(1 − VGS/VP)(VDS/−VP) − (VDS/VP)²]), with
// its partials gm = ∂I/∂vgs and gds = ∂I/∂vds.
func squareLaw(idss, vp, vgs, vds float64) (i, gm, gds float64) {
	vov := vgs + vp
	if vov <= 0 {
		return 0, 0, 0
	}
	b := idss / (vp * vp)
	if vds >= vov {
		return b * vov * vov, 2 * b * vov, 0
	}
	return b * (2*vov*vds - vds*vds), 2 * b * vds, 2 * b * (vov - vds)
}

// Channel is the channel current from drain to source at any vds: for
// vds < 0 drain and source swap roles (the device is symmetric), so
// I(vgs, vds) = −squareLaw(vgs − vds, −vds).
func Channel(idss, vp, vgs, vds float64) (i, gm, gds float64) {
	if vds >= 0 {
		return squareLaw(idss, vp, vgs, vds)
	}
	j, a, b := squareLaw(idss, vp, vgs-vds, -vds)
	return -j, -a, a + b
}

// cascode solves the dual gate's internal node vm (over the source) so that
// both halves carry the same current: half 1 (gate 1, source, vm) and half
// 2 (gate 2, vm, drain). i1 − i2 never falls as vm rises, and changes sign
// between min(0, vds) and max(0, vds), so a bracketed Newton step with
// bisection as its guard always finds it.
func cascode(idss, vp, v1, v2, vd, guess float64) (vm, i float64, dv [3]float64, g1 [2]float64) {
	lo, hi := math.Min(0, vd), math.Max(0, vd)
	vm = math.Min(math.Max(guess, lo), hi)
	tol := 1e-14 * (1 + math.Abs(vd) + math.Abs(v1) + math.Abs(v2))
	var i1, a1, b1, a2, b2 float64
	for k := 0; k < 200; k++ {
		var i2 float64
		i1, a1, b1 = Channel(idss, vp, v1, vm)
		i2, a2, b2 = Channel(idss, vp, v2-vm, vd-vm)
		f := i1 - i2
		df := b1 + a2 + b2
		if f == 0 {
			break
		}
		if f < 0 {
			lo = vm
		} else {
			hi = vm
		}
		if hi-lo <= tol {
			break
		}
		next := (lo + hi) / 2
		if df > 0 {
			if n := vm - f/df; n > lo && n < hi {
				next = n
			}
		}
		if math.Abs(next-vm) <= tol {
			vm = next
			i1, a1, b1 = Channel(idss, vp, v1, vm)
			i2, a2, b2 = Channel(idss, vp, v2-vm, vd-vm)
			break
		}
		vm = next
	}
	// Implicit derivatives of vm from i1(v1, vm) = i2(v2 − vm, vd − vm).
	if d := b1 + a2 + b2; d > 0 {
		dv = [3]float64{b2 / d, -a1 / d, a2 / d} // ∂vm/∂(vds, vgs1, vg2s)
	}
	return vm, i1, dv, [2]float64{a1, b1}
}

// eval is the FET's forward-sense terminal currents at (vds, vgs, vg2s).
func (q *fet) eval(vds, vgs, vg2s, vt float64) (p fetPoint) {
	if q.dual {
		vm, i, dv, g1 := cascode(q.idss, q.vp, vgs, vg2s, vds, q.vm)
		p.vm, p.ich = vm, i
		p.i[0] = i
		// ∂I/∂x = ∂i1/∂vgs1·[x = vgs1] + ∂i1/∂vm·∂vm/∂x
		p.jac[0] = [3]float64{g1[1] * dv[0], g1[0] + g1[1]*dv[1], g1[1] * dv[2]}
		return p
	}
	ich, gm, gds := Channel(q.idss, q.vp, vgs, vds)
	egs, dgs := junctionExp(vgs, vt)
	egd, dgd := junctionExp(vgs-vds, vt)
	igs, igd := GateIS*(egs-1), GateIS*(egd-1)
	gs, gd := GateIS*dgs, GateIS*dgd
	p.ich = ich
	p.i[0] = ich - igd
	p.i[1] = igs + igd
	p.jac[0] = [3]float64{gds + gd, gm - gd, 0}
	p.jac[1] = [3]float64{-gd, gs + gd, 0}
	return p
}

// fetLimit shortens a Newton step of a FET's bias: the gate diodes of a
// JFET by the junction limiting of a pn junction, the channel voltages to
// a step of at most max(|VP|, 1 V) on the gate and 2·max(|VP|, 1 V) plus
// half the present value on the drain. The square law is smooth enough that
// this only keeps a wild first step from throwing a stage into the wrong
// region; gmin and source stepping catch the rest.
func (q *fet) limit(vds, vgs, vg2s, vt float64) (float64, float64, float64, bool) {
	limited := false
	clamp := func(v, old, step float64) float64 {
		if v > old+step {
			limited = true
			return old + step
		}
		if v < old-step {
			limited = true
			return old - step
		}
		return v
	}
	s := math.Max(q.vp, 1)
	vgs = clamp(vgs, q.vgs, s)
	vg2s = clamp(vg2s, q.vg2s, s)
	vds = clamp(vds, q.vds, 2*s+math.Abs(q.vds)/2)
	if !q.dual {
		var l bool
		vgs, l = limitJunction(vgs, q.vgs, vt, q.vcrit)
		limited = limited || l
		vgd, l := limitJunction(vgs-vds, q.vgs-q.vds, vt, q.vcrit)
		limited = limited || l
		vds = vgs - vgd
	}
	return vds, vgs, vg2s, limited
}

// bias reads the FET's forward-sense (vds, vgs, vg2s) from x.
func (q *fet) bias(x []float64) (vds, vgs, vg2s float64) {
	vs := volt(x, q.s)
	vds = q.pol * (volt(x, q.d) - vs)
	vgs = q.pol * (volt(x, q.g) - vs)
	if q.dual {
		vg2s = q.pol * (volt(x, q.g2) - vs)
	}
	return
}

// markFETs adds every entry a FET may touch to the pattern.
func (nl *netlist) markFETs(pat *slotter) {
	for k := range nl.fets {
		t := nl.fets[k].terminals
		for _, r := range t {
			for _, c := range t {
				pat.mark(r, c)
			}
		}
	}
}

// fetSlots finds each FET's sixteen slots in m (−1 where a terminal is gnd).
func (nl *netlist) fetSlots(m *sparseLU) [][16]int {
	out := make([][16]int, len(nl.fets))
	for k := range nl.fets {
		t := nl.fets[k].terminals
		for r := range 4 {
			for c := range 4 {
				out[k][4*r+c] = m.slot(t[r], t[c])
			}
		}
	}
	return out
}

// stampFETs linearises every FET (the first iteration at zero bias, then at
// its limited bias) and adds it to ad and bd. It reports whether a step was
// limited.
func (s *solver) stampFETs(ad, bd []float64, first bool) bool {
	nl := s.nl
	any := false
	for k := range nl.fets {
		q := &nl.fets[k]
		if first {
			q.vds, q.vgs, q.vg2s, q.vm = 0, 0, 0, 0
			q.moved, q.limited = math.Inf(1), true
		} else {
			rds, rgs, rg2s := q.bias(s.x)
			vds, vgs, vg2s, l := q.limit(rds, rgs, rg2s, nl.vt)
			q.moved = math.Max(math.Abs(rds-q.vds), math.Max(math.Abs(rgs-q.vgs), math.Abs(rg2s-q.vg2s)))
			q.limited = l
			q.vds, q.vgs, q.vg2s = vds, vgs, vg2s
		}
		any = any || q.limited
		p := q.eval(q.vds, q.vgs, q.vg2s, nl.vt)
		if q.dual {
			q.vm = p.vm
		}
		var g [4][4]float64
		lin := [3]float64{q.vds, q.vgs, q.vg2s}
		var eq [4]float64
		for r := range 3 {
			eq[r] = p.i[r]
			for c := range 3 {
				g[r][c] = p.jac[r][c]
				g[r][3] -= p.jac[r][c]
				g[3][c] -= p.jac[r][c]
				g[3][3] += p.jac[r][c]
				eq[r] -= p.jac[r][c] * lin[c]
			}
			eq[3] -= eq[r]
		}
		slots := &s.fetSlot[k]
		for r := range 4 {
			for c := range 4 {
				if sl := slots[4*r+c]; sl >= 0 {
					ad[sl] += g[r][c]
				}
			}
			if n := q.terminals[r]; n != gnd {
				bd[n] -= q.pol * eq[r]
			}
		}
	}
	return any
}

// balanceFETs adds every FET's terminal currents to the KCL balance.
func (s *solver) balanceFETs(leave func(i int, cur, tol float64)) {
	const eps4 = 4 * 0x1p-52
	nl := s.nl
	for k := range nl.fets {
		q := &nl.fets[k]
		vds, vgs, vg2s := q.bias(s.x)
		p := q.eval(vds, vgs, vg2s, nl.vt)
		size := 0.0
		for _, t := range q.terminals {
			size += math.Abs(volt(s.x, t))
		}
		var cur [4]float64
		for r := range 3 {
			cur[r] = p.i[r]
			cur[3] -= p.i[r]
		}
		for r := range 4 {
			d := 0.0
			for c := range 3 {
				if r < 3 {
					d += math.Abs(p.jac[r][c])
				}
			}
			if r == 3 {
				for rr := range 3 {
					for c := range 3 {
						d += math.Abs(p.jac[rr][c])
					}
				}
			}
			leave(q.terminals[r], q.pol*cur[r], d*eps4*size)
		}
	}
}

// fetsSettled reports whether every FET's bias at s.x lies within
// junctionTol of where it was linearised.
func (s *solver) fetsSettled() bool {
	for k := range s.nl.fets {
		q := &s.nl.fets[k]
		vds, vgs, vg2s := q.bias(s.x)
		if math.Abs(vds-q.vds) > junctionTol || math.Abs(vgs-q.vgs) > junctionTol || math.Abs(vg2s-q.vg2s) > junctionTol {
			return false
		}
	}
	return true
}

// saveFETs and restoreFETs keep the FETs' state across a continuation step
// that fails; resetFETs starts them again from zero bias.
func (s *solver) saveFETs() {
	s.saveF = s.saveF[:0]
	for _, q := range s.nl.fets {
		s.saveF = append(s.saveF, q.vds, q.vgs, q.vg2s, q.vm)
	}
}

func (s *solver) restoreFETs() {
	for k := range s.nl.fets {
		q := &s.nl.fets[k]
		q.vds, q.vgs, q.vg2s, q.vm = s.saveF[4*k], s.saveF[4*k+1], s.saveF[4*k+2], s.saveF[4*k+3]
	}
}

func (s *solver) resetFETs() {
	for k := range s.nl.fets {
		q := &s.nl.fets[k]
		q.vds, q.vgs, q.vg2s, q.vm = 0, 0, 0, 0
	}
}

// overdrivenFET finds a JFET gate diode pushed past expMax·VT.
func (nl *netlist) overdrivenFET(x []float64) *Failure {
	for _, q := range nl.fets {
		if q.dual {
			continue
		}
		vds, vgs, _ := q.bias(x)
		for _, j := range []struct {
			name string
			v    float64
		}{{"gate-source", vgs}, {"gate-drain", vgs - vds}} {
			if j.v > expMax*nl.vt {
				return &Failure{Cause: Overdriven, Part: q.ref, Parts: []string{q.ref},
					Reason: fmt.Sprintf("the %s junction of %s is forward-biased by %.3g V with nothing to limit its current", j.name, q.ref, j.v)}
			}
		}
	}
	return nil
}

// FET is a field-effect transistor's operating point. ID, VGS, VDS are in
// the device's forward sense (an n-channel part's as measured, a p-channel
// part's mirrored), so a stage biased as intended has ID, VDS > 0 and VGS
// between −VP and 0 (docs/fet.md).
type FET struct {
	ID     float64 // A, channel current into the drain (gate current excluded)
	IG     float64 // A, into the gate (gate diodes; 0 for a dual gate)
	VGS    float64 // V, gate 1 over the source
	VDS    float64 // V
	VG2S   float64 // V, gate 2 over the source (dual gate)
	VM     float64 // V, the dual gate's internal node over the source
	IDSS   float64 // A, the figure used for this case
	VP     float64 // V, |pinch-off| used for this case
	Power  float64 // W, Σ V·I over the terminals
	Region string  // "cutoff" (ID < 1 µA), "triode" (VDS < VGS + VP), "gate-forward" (gate diode above 0.5 V), or "saturation"
	// SatMargin is VDS − (VGS + VP): how far the drain sits above the
	// saturation edge, V (for a dual gate, the smaller of its two halves').
	SatMargin float64
	// Jac is the linearised device at this point, forward sense:
	// ∂(ID, IG, IG2)/∂(VDS, VGS, VG2S), S. The small-signal model stamps it
	// as it is (a p-channel part's mirrored signs cancel).
	Jac [3][3]float64
}

// GateForward is the gate-source (or gate-drain) voltage above which a
// JFET's gate is called forward-biased: a diode of GateIS carries about
// 2 µA there at 25 °C.
const GateForward = 0.5 // V

// operatingPoint evaluates the FET at the solution x.
func (q *fet) operatingPoint(x []float64, vt float64) *FET {
	vds, vgs, vg2s := q.bias(x)
	p := q.eval(vds, vgs, vg2s, vt)
	o := &FET{ID: p.ich, IG: p.i[1], VGS: vgs, VDS: vds, VG2S: vg2s, VM: p.vm, IDSS: q.idss, VP: q.vp, Jac: p.jac}
	o.Power = vds*p.i[0] + vgs*p.i[1]
	o.SatMargin = vds - (vgs + q.vp)
	if q.dual {
		o.SatMargin = math.Min(p.vm-(vgs+q.vp), (vds-p.vm)-(vg2s-p.vm+q.vp))
	}
	switch {
	case o.ID < FETRegionOn:
		o.Region = "cutoff"
	case !q.dual && math.Max(vgs, vgs-vds) > GateForward:
		o.Region = "gate-forward"
	case o.SatMargin < 0:
		o.Region = "triode"
	default:
		o.Region = "saturation"
	}
	return o
}

// String is a one-line summary, for test failures and debugging.
func (f *FET) String() string {
	return fmt.Sprintf("ID %.6g A, VGS %.6g V, VDS %.6g V, %s", f.ID, f.VGS, f.VDS, f.Region)
}

// fetResult stores the operating point of the FET ref.
func (nl *netlist) fetResult(r *Result, ref string, x []float64) {
	for k := range nl.fets {
		if nl.fets[k].ref == ref {
			r.FETs[ref] = nl.fets[k].operatingPoint(x, nl.vt)
			return
		}
	}
}
