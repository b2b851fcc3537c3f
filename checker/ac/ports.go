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
// fn, reusing one matrix and one set of scratch vectors for all of them (the
// sparsity pattern is the same at every frequency); nothing is kept after it
// returns. It stops at the first error, fn's included.
func (r *Result) PortsEach(freqs []float64, fn func(PortPoint) error) error {
	nw := r.net
	tmpl := PortPoint{HasIn: nw.hasIn && nw.inNode != ground, HasOut: nw.hasOut && nw.outNd != ground}
	if tmpl.HasIn {
		tmpl.RS = nw.rs
	}
	if tmpl.HasOut {
		tmpl.RL = nw.rl
	}
	n := nw.n
	d := nw.admBlock() // rewritten at every frequency
	var blank, y *sparse
	rhs, x := make([]complex128, n), make([]complex128, n)
	nodes := [2]int{nw.inNode, nw.outNd}
	has := [2]bool{tmpl.HasIn, tmpl.HasOut}
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
		if blank == nil {
			lo, hi := make([]int, n), make([]int, n)
			for i := range n {
				lo[i], hi[i] = i, i
			}
			for i, e := range nw.elems {
				span(lo, hi, e.branches, d[i])
			}
			blank = newSparse(n, lo, hi)
		}
		y = blank.cloneInto(y)
		for i := range n {
			y.add(i, i, Gmin)
		}
		for i, e := range nw.elems {
			if i != nw.source && i != nw.load {
				stamp(y, e.branches, d[i], 1)
			}
		}
		fa, err := y.factor()
		if err != nil {
			return fmt.Errorf("two-port at %g Hz: %w", f, err)
		}
		for j := range 2 {
			if !has[j] {
				continue
			}
			clear(rhs)
			rhs[nodes[j]] = 1
			fa.solveInto(x, rhs)
			for i := range 2 {
				if has[i] {
					p.Z[i][j] = x[nodes[i]]
				}
			}
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
