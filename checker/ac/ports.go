package ac

import (
	"fmt"
	"math"
)

// PortPoint is the circuit between its in and out ports at one frequency,
// with both ports' own terminations taken off (the in port's RS and the out
// port's RL) and everything else in place: the open-circuit impedance matrix
// the stability analysis turns into S-parameters.
type PortPoint struct {
	Frequency float64 // Hz
	// HasIn and HasOut tell which ports exist and are not AC ground; Z's
	// rows and columns for a missing port are zero.
	HasIn, HasOut bool
	// Z[i][j] is the voltage at port i per ampere driven into port j
	// (0 = in, 1 = out), each against gnd, Ω.
	Z [2][2]complex128
	// RS and RL are the in and out ports' impedances, Ω (0 when missing).
	RS, RL float64
}

// Ports computes the two-port at f. Unlike the band points it keeps nothing:
// the wide sweep asks for hundreds of frequencies once each, and the worst-
// case search for every corner, so each call assembles and factorises afresh
// and the result holds no memory of it.
func (r *Result) Ports(f float64) (PortPoint, error) {
	var p PortPoint
	err := r.PortsEach([]float64{f}, func(q PortPoint) error { p = q; return nil })
	return p, err
}

// PortsEach computes the two-port at each frequency in turn and hands it to
// fn; nothing is kept after it returns. It stops at the first error, fn's
// included. Everything that depends only on the wiring is prepared at the
// first frequency and reused at every other (portSolver): the matrix's
// memory and spans, where each admittance entry lands, the pivots' and the
// solves' scratch; a frequency only writes values and factorises them.
func (r *Result) PortsEach(freqs []float64, fn func(PortPoint) error) error {
	nw := r.net
	tmpl := PortPoint{HasIn: nw.hasIn && nw.inNode != ground, HasOut: nw.hasOut && nw.outNd != ground}
	if tmpl.HasIn {
		tmpl.RS = nw.rs
	}
	if tmpl.HasOut {
		tmpl.RL = nw.rl
	}
	d, flat := admFlat(nw) // rewritten at every frequency
	var ps *portSolver
	nodes := [2]int{nw.inNode, nw.outNd}
	has := [2]bool{tmpl.HasIn, tmpl.HasOut}
	stop := nw.n // the lowest port node: the solves need x from there on
	for j := range 2 {
		if has[j] {
			stop = min(stop, nodes[j])
		}
	}
	for _, f := range freqs {
		p := tmpl
		p.Frequency = f
		if !positive(f) {
			return fmt.Errorf("frequency %g Hz is not a positive finite value", f)
		}
		if !p.HasIn && !p.HasOut {
			if err := fn(p); err != nil {
				return err
			}
			continue
		}
		w := 2 * math.Pi * f
		for i := range nw.elems {
			e := &nw.elems[i]
			if err := e.fill(w, d[i]); err != nil {
				return fmt.Errorf("%s at %g Hz: %w", name(*e), f, err)
			}
		}
		if ps == nil {
			ps = newPortSolver(nw, d, nil, nil)
		}
		if !ps.assemble(flat) {
			// An entry that was zero where the spans were drawn is not
			// now: widen them by this frequency's entries and start again.
			ps = newPortSolver(nw, d, ps.lo, ps.hi)
			ps.assemble(flat)
		}
		fa, err := ps.m.factor()
		if err != nil {
			return fmt.Errorf("two-port at %g Hz: %w", f, err)
		}
		if has[0] && has[1] {
			fa.solvePair(ps.x, ps.y, nodes[0], nodes[1], stop)
			for i := range 2 {
				p.Z[i][0], p.Z[i][1] = ps.x[nodes[i]], ps.y[nodes[i]]
			}
		} else {
			j := 0
			if has[1] {
				j = 1
			}
			clear(ps.rhs)
			ps.rhs[nodes[j]] = 1
			p.Z[j][j] = fa.solvePart(ps.x, ps.rhs, stop)[nodes[j]]
		}
		for i := range 2 {
			for j := range 2 {
				if !finite(p.Z[i][j]) {
					return fmt.Errorf("two-port at %g Hz: %w", f, errSingular)
				}
			}
		}
		if err := fn(p); err != nil {
			return err
		}
	}
	return nil
}
