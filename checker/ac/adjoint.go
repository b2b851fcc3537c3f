package ac

import (
	"fmt"
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

// Adjoint solves the transposed system at f on the factors the band
// analysis keeps for f (no factorisation of its own at a band frequency):
// Y0ᵀ·z0 = e_out, and the in port's source conductance gs, which Y0 leaves
// out, added back by the Sherman–Morrison identity: with u = Y0⁻ᵀ·e_in,
// z = z0 − u·gs·z0[in]/(1 + gs·u[in]). It needs one in and one out port
// (HasGain); it fails when the network is singular at f.
func (r *Result) Adjoint(f float64) (*Adjoint, error) {
	nw := r.net
	if !nw.gains {
		return nil, fmt.Errorf("no single in and out port")
	}
	if !positive(f) {
		return nil, fmt.Errorf("frequency %g Hz is not a positive finite value", f)
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	fr, err := r.at(f)
	if err != nil {
		return nil, err
	}
	a := &Adjoint{Frequency: f, nw: nw, z: make([]complex128, nw.n), d: fr.d}
	if nw.outNd == ground {
		return a, nil // the out port is AC ground: nothing reaches it
	}
	e := make([]complex128, nw.n)
	e[nw.outNd] = 1
	fr.f0.solveTransposeInto(a.z, e)
	if nw.source >= 0 {
		gs := fr.d[nw.source][0]
		clear(e)
		e[nw.inNode] = 1
		u := fr.f0.solveTransposeInto(make([]complex128, nw.n), e)
		k := gs * a.z[nw.inNode] / (1 + gs*u[nw.inNode])
		for i := range a.z {
			a.z[i] -= k * u[i]
		}
	}
	for _, v := range a.z {
		if !finite(v) {
			return nil, fmt.Errorf("adjoint network at %g Hz: %w", f, errSingular)
		}
	}
	return a, nil
}

// solveTransposeInto returns z with Aᵀ·z = b in dst (length n, not b), b
// untouched. With P·A = L·U (row i of the factors is row piv[i] of A),
// Aᵀ = Uᵀ·Lᵀ·P: solve Uᵀ·w = b forwards and Lᵀ·y = w backwards, both by
// scattering each finished entry along its row of the factors, then
// z[piv[i]] = y[i].
func (f *lu) solveTransposeInto(dst, b []complex128) []complex128 {
	n := f.n
	acc := make([]complex128, n)
	copy(acc, b)
	for j := range n {
		r := &f.rows[j]
		w, ok := f.diag[j].quo(acc[j])
		if !ok {
			w = acc[j] / r.v[j-r.lo]
		}
		acc[j] = w
		if w == 0 {
			continue
		}
		for k := j + 1; k <= r.hi(); k++ {
			if v := r.v[k-r.lo]; v != 0 {
				acc[k] -= v * w
			}
		}
	}
	for k := n - 1; k > 0; k-- {
		r := &f.rows[k]
		y := acc[k]
		if y == 0 {
			continue
		}
		for i := r.lo; i < k; i++ {
			if v := r.v[i-r.lo]; v != 0 {
				acc[i] -= v * y
			}
		}
	}
	z := dst[:n]
	for i, p := range f.piv {
		z[p] = acc[i]
	}
	return z
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
