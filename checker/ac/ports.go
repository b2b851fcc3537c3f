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
	nw := r.net
	p := PortPoint{Frequency: f}
	if !positive(f) {
		return p, fmt.Errorf("frequency %g Hz is not a positive finite value", f)
	}
	p.HasIn = nw.hasIn && nw.inNode != ground
	p.HasOut = nw.hasOut && nw.outNd != ground
	if p.HasIn {
		p.RS = nw.rs
	}
	if p.HasOut {
		p.RL = nw.rl
	}
	if !p.HasIn && !p.HasOut {
		return p, nil
	}
	w := 2 * math.Pi * f
	n := nw.n
	lo, hi := make([]int, n), make([]int, n)
	for i := range n {
		lo[i], hi[i] = i, i
	}
	d := make([][]complex128, len(nw.elems))
	for i, e := range nw.elems {
		di, err := e.adm(w)
		if err != nil {
			return p, fmt.Errorf("%s at %g Hz: %w", name(e), f, err)
		}
		d[i] = di
		span(lo, hi, e.branches, di)
	}
	y := newSparse(n, lo, hi)
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
		return p, fmt.Errorf("two-port at %g Hz: %w", f, err)
	}
	nodes := [2]int{nw.inNode, nw.outNd}
	has := [2]bool{p.HasIn, p.HasOut}
	rhs := make([]complex128, n)
	for j := range 2 {
		if !has[j] {
			continue
		}
		clear(rhs)
		rhs[nodes[j]] = 1
		x := fa.solve(rhs)
		for i := range 2 {
			if has[i] {
				p.Z[i][j] = x[nodes[i]]
			}
		}
	}
	for i := range 2 {
		for j := range 2 {
			if !finite(p.Z[i][j]) {
				return p, fmt.Errorf("two-port at %g Hz: %w", f, errSingular)
			}
		}
	}
	return p, nil
}
