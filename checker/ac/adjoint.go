package ac

import (
	"fmt"
	"math"
)

// Adjoint is the circuit at one frequency seen backwards from the out port,
// every port terminated (the in port by RS, the out port by RL): for a unit
// current driven into any branch of any element, the voltage it makes at the
// out port's net. One solve of the transposed nodal system Yᵀ·z = e_out gives
// every such transfer at once (the adjoint method): V_out = zᵀ·i for any
// injected current vector i. Noise analysis (checker/noise) needs exactly
// these transfers, one per noise source.
type Adjoint struct {
	Frequency float64 // Hz
	nw        *network
	z         []complex128
	d         [][]complex128
}

// Adjoint solves the transposed system at f. It needs one in and one out port
// (HasGain); it fails when the network is singular at f.
func (r *Result) Adjoint(f float64) (*Adjoint, error) {
	nw := r.net
	if !nw.gains {
		return nil, fmt.Errorf("no single in and out port")
	}
	if !positive(f) {
		return nil, fmt.Errorf("frequency %g Hz is not a positive finite value", f)
	}
	a := &Adjoint{Frequency: f, nw: nw, z: make([]complex128, nw.n), d: make([][]complex128, len(nw.elems))}
	if nw.outNd == ground {
		return a, nil // the out port is AC ground: nothing reaches it
	}
	w := 2 * math.Pi * f
	n := nw.n
	lo, hi := make([]int, n), make([]int, n)
	for i := range n {
		lo[i], hi[i] = i, i
	}
	dt := make([][]complex128, len(nw.elems))
	for i, e := range nw.elems {
		d, err := e.adm(w)
		if err != nil {
			return nil, fmt.Errorf("%s at %g Hz: %w", name(e), f, err)
		}
		a.d[i] = d
		dt[i] = transpose(d, len(e.branches))
		span(lo, hi, e.branches, dt[i])
	}
	y := newSparse(n, lo, hi)
	for i := range n {
		y.add(i, i, Gmin)
	}
	for i, e := range nw.elems {
		stamp(y, e.branches, dt[i], 1) // the source too: the in port is terminated
	}
	fa, err := y.factor()
	if err != nil {
		return nil, fmt.Errorf("adjoint network at %g Hz: %w", f, err)
	}
	rhs := make([]complex128, n)
	rhs[nw.outNd] = 1
	fa.solveInto(a.z, rhs)
	for _, v := range a.z {
		if !finite(v) {
			return nil, fmt.Errorf("adjoint network at %g Hz: %w", f, errSingular)
		}
	}
	return a, nil
}

// transpose returns the r×r row-major matrix d transposed.
func transpose(d []complex128, r int) []complex128 {
	t := make([]complex128, len(d))
	for i := range r {
		for j := range r {
			t[j*r+i] = d[i*r+j]
		}
	}
	return t
}

// Branches returns, for the element of part ref, the out-port voltage per
// ampere driven into each of its branches (into the branch's first node, out
// of its second), and the element's admittance matrix D among those branches
// (row-major, r×r). The branch order is the stamp's: a resistor, capacitor or
// inductor [a–b]; a potentiometer [a–wiper, wiper–b]; a transformer one per
// winding; a transistor [b′–e, b′–c, c–e] and, with rb > 0, [b–b′] (b′ the
// internal base); a FET [d–s, g–s, g2–s, g–d].
func (a *Adjoint) Branches(ref string) (h, d []complex128, err error) {
	i, ok := a.nw.parts[ref]
	if !ok {
		return nil, nil, fmt.Errorf("no part %q in the circuit", ref)
	}
	e := a.nw.elems[i]
	h = make([]complex128, len(e.branches))
	for k, b := range e.branches {
		h[k] = across(a.z, b)
	}
	return h, a.d[i], nil
}

// Source returns the out-port voltage per ampere driven into the in port's
// net from gnd (the Norton form of the source), and RS. It is zero when the
// in net is AC ground.
func (a *Adjoint) Source() (h complex128, rs float64) {
	return across(a.z, branch{a.nw.inNode, ground}), a.nw.rs
}

// VoltageRatios returns V(net)/V(in net) at f for each net named, the source
// connected (the ratio does not depend on the source's level or impedance):
// how a signal at the in port reaches each net. A net at AC ground reads 0.
func (r *Result) VoltageRatios(f float64, nets ...string) ([]complex128, error) {
	nw := r.net
	if !nw.hasIn || nw.inNode == ground {
		return nil, fmt.Errorf("no in port off AC ground")
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	fr, err := r.at(f)
	if err != nil {
		return nil, err
	}
	x0 := fr.solveBranch(branch{nw.inNode, ground})
	vin := x0[nw.inNode]
	if vin == 0 || !finite(vin) {
		return nil, fmt.Errorf("the in net carries no signal at %g Hz", f)
	}
	out := make([]complex128, len(nets))
	for i, n := range nets {
		k, ok := nw.nodes[n]
		if !ok {
			return nil, fmt.Errorf("no net %q in the circuit", n)
		}
		if k != ground {
			out[i] = x0[k] / vin
		}
	}
	return out, nil
}
