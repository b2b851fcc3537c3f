package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
)

// maxAmplification is the largest error growth the low-rank update in
// Impedance may have before it is replaced by a fresh factorisation. The
// growth is about |y·z|/|1 − y·z| for a removed admittance y across which the
// circuit (with it) shows z: large when the part carries nearly all of the
// admittance between its nets, as a stiff bypass capacitor does. At 1e4 the
// update keeps about eleven significant digits of a well-scaled network, and
// the estimate stays trustworthy even when the base solution has lost all
// but four (a tie of a few µS holding up an island of large admittances).
const maxAmplification = 1e4

// freq holds everything computed at one frequency: the base matrix Y0 (every
// stamp except the in port's source impedance, which Analyze treats as the
// source and Impedance adds back) and its factors, each element's admittance,
// and the solutions already found.
type freq struct {
	w   float64
	y0  *sparse // the assembled base matrix for removal queries, nil until one needs it
	lo  []int   // its rows' spans
	hi  []int
	f0  *lu            // its factors
	d   [][]complex128 // each element's D at w
	sol map[branch][]complex128
	// fresh holds the last factorisation with parts removed, by removed-set
	// key (a transformer's windings ask for the same removal in turn), and
	// scratch the matrix it was made in, whose memory the next one reuses.
	fresh   map[string]*lu
	scratch *sparse
	work    []complex128 // right-hand side and solution of a removal query
	rhs     []complex128 // right-hand side of solveBranch
	part    []complex128 // right-hand side and solution of solvePart
}

// at returns the frequency's data, factorising Y0 the first time. The caller
// holds r.mu.
func (r *Result) at(f float64) (*freq, error) {
	if fr, ok := r.freqs[f]; ok {
		return fr, nil
	}
	nw := r.net
	fr := &freq{w: 2 * math.Pi * f, sol: map[branch][]complex128{}} // fresh is made by the first removal that needs it
	n := nw.n
	fr.d = nw.admBlock()
	spans := make([]int, 2*n) // lo and hi in one block
	lo, hi := spans[:n:n], spans[n:]
	for i := range n {
		lo[i], hi[i] = i, i
	}
	for i := range nw.elems {
		e := &nw.elems[i]
		if err := e.fill(fr.w, fr.d[i]); err != nil {
			return nil, fmt.Errorf("%s at %g Hz: %w", name(*e), f, err)
		}
		span(lo, hi, e.branches, fr.d[i]) // the source too: a removal query stamps it
	}
	fr.lo, fr.hi = lo, hi
	// Y0 is factorised in place; a removal query that needs it whole
	// assembles it again (base), which most frequencies never do.
	f0, err := r.assemble(fr).factor()
	if err != nil {
		return nil, fmt.Errorf("small-signal network at %g Hz: %w", f, err)
	}
	fr.f0 = f0
	r.freqs[f] = fr
	return fr, nil
}

// assemble builds Y0 at fr: Gmin on the diagonal, then every element's stamp
// but the source's, in element order.
func (r *Result) assemble(fr *freq) *sparse {
	nw := r.net
	y := newSparse(nw.n, fr.lo, fr.hi)
	for i := 0; i < nw.n; i++ {
		y.add(i, i, Gmin)
	}
	for i, e := range nw.elems {
		if i != nw.source {
			stamp(y, e.branches, fr.d[i], 1)
		}
	}
	return y
}

// base is Y0 at fr, assembled on first use and kept.
func (r *Result) base(fr *freq) *sparse {
	if fr.y0 == nil {
		fr.y0 = r.assemble(fr)
	}
	return fr.y0
}

func name(e element) string {
	if e.ref == "" {
		return "port or supply"
	}
	return "part " + e.ref
}

// solveBranch returns Y0⁻¹·(e_from − e_to), cached.
func (fr *freq) solveBranch(b branch) []complex128 {
	if x, ok := fr.sol[b]; ok {
		return x
	}
	n := fr.f0.n
	var x []complex128
	if len(fr.rhs) != n {
		// The first solution shares the right-hand side's block.
		block := make([]complex128, 2*n)
		fr.rhs, x = block[:n:n], block[n:]
	} else {
		x = make([]complex128, n)
	}
	rhs := fr.rhs
	clear(rhs)
	if b.from != ground {
		rhs[b.from]++
	}
	if b.to != ground {
		rhs[b.to]-- // a branch from a net to itself is the zero vector
	}
	x = fr.f0.solveInto(x, rhs)
	fr.sol[b] = x
	return x
}

// solvePart is solveBranch's solution where only x[stop:] is needed, in
// scratch that the next call reuses.
func (fr *freq) solvePart(b branch, stop int) []complex128 {
	n := fr.f0.n
	if len(fr.part) != 2*n {
		fr.part = make([]complex128, 2*n)
	}
	rhs, x := fr.part[:n], fr.part[n:]
	clear(rhs)
	if b.from != ground {
		rhs[b.from]++
	}
	if b.to != ground {
		rhs[b.to]--
	}
	return fr.f0.solvePart(x, rhs, stop)
}

// lowest is the lower node of b that is not ground (n when neither is).
func lowest(b branch, n int) int {
	l := n
	if b.from != ground {
		l = min(l, b.from)
	}
	if b.to != ground {
		l = min(l, b.to)
	}
	return l
}

// across is x[from] − x[to], the voltage of b in the solution x.
func across(x []complex128, b branch) complex128 {
	var v complex128
	if b.from != ground {
		v = x[b.from]
	}
	if b.to != ground {
		v -= x[b.to]
	}
	return v
}

// mod is one change to the base matrix: an element added (+1) or removed (−1).
type mod struct {
	elem int
	sign complex128
}

// impedance is uᵀ·(Y0 + Σ sign·P·D·Pᵀ)⁻¹·u for u = e_a − e_b, by the
// Sherman–Morrison–Woodbury identity on Y0's factors: with X = Y0⁻¹·P and
// S = I + Pᵀ·X·D, it is z − (uᵀX)·D·S⁻¹·(Pᵀx) where x = Y0⁻¹u and z = uᵀx.
// That costs one triangular solve per branch instead of a factorisation. When
// the update cancels badly (a removed part that dominates the impedance across
// it) the matrix is assembled and factorised afresh.
func (r *Result) impedance(fr *freq, u branch, mods []mod, key string) (complex128, error) {
	if u.from == u.to {
		return 0, nil
	}
	var brBuf [8]branch
	var ownerBuf [8]int
	br, owner := brBuf[:0], ownerBuf[:0] // owner: position in mods of each branch
	for k, m := range mods {
		for _, b := range r.net.elems[m.elem].branches {
			br = append(br, b)
			owner = append(owner, k)
		}
	}
	x, ok := fr.sol[u]
	if !ok && len(br) > 0 {
		// Only x at the nets of u and of the branches is read below: solve
		// for those (solvePart), in scratch, not kept.
		stop := lowest(u, fr.f0.n)
		for _, b := range br {
			stop = min(stop, lowest(b, fr.f0.n))
		}
		x = fr.solvePart(u, stop)
	} else if !ok {
		x = fr.solveBranch(u)
	}
	z := across(x, u)
	nr := len(br)
	if nr == 0 {
		return z, nil
	}
	// D: block diagonal over the mods, signed. The small matrices live on
	// the stack for up to four branches (a removal and the source).
	var bufs [5][16]complex128
	scratch := func(k int) []complex128 {
		if nr*nr <= 16 {
			return bufs[k][:nr*nr]
		}
		return make([]complex128, nr*nr)
	}
	d := scratch(0)
	for i := 0; i < nr; {
		k := owner[i]
		dm := fr.d[mods[k].elem]
		rm := len(r.net.elems[mods[k].elem].branches)
		for a := 0; a < rm; a++ {
			for b := 0; b < rm; b++ {
				d[(i+a)*nr+i+b] = dm[a*rm+b] * mods[k].sign
			}
		}
		i += rm
	}
	var xsBuf [8][]complex128
	xs := xsBuf[:0]
	if nr > len(xsBuf) {
		xs = make([][]complex128, 0, nr)
	}
	xs = xs[:nr]
	for j, b := range br {
		if b == u {
			xs[j] = x // the same solution as solveBranch's, at the nets read
		} else {
			xs[j] = fr.solveBranch(b)
		}
	}
	// MD = (Pᵀ·X)·D and S = I + MD.
	m := scratch(1)
	for i, bi := range br {
		for j := range br {
			m[i*nr+j] = across(xs[j], bi)
		}
	}
	md := matmulInto(scratch(2), m, d, nr)
	s := scratch(3)
	copy(s, md)
	for i := 0; i < nr; i++ {
		s[i*nr+i]++
	}
	sinv := scratch(4)
	err := invertInto(sinv, s, nr)
	if err == nil && norm(sinv, nr)*(1+norm(md, nr)) <= maxAmplification {
		// w = (uᵀX)·D, v = Pᵀx.
		var wBuf [8]complex128
		w := wBuf[:0]
		if nr > len(wBuf) {
			w = make([]complex128, 0, nr)
		}
		w = w[:nr]
		for j := range nr {
			var t complex128
			for k := range nr {
				t += across(xs[k], u) * d[k*nr+j]
			}
			w[j] = t
		}
		var corr complex128
		for i := range nr {
			var t complex128
			for j := range nr {
				t += sinv[i*nr+j] * across(x, br[j])
			}
			corr += w[i] * t
		}
		if v := z - corr; finite(v) {
			return v, nil
		}
	}
	return r.freshImpedance(fr, u, mods, key)
}

// freshImpedance factorises Y0 with the mods applied (the last one is kept,
// by key: a transformer's windings ask for the same removal in turn) and
// solves for u directly.
func (r *Result) freshImpedance(fr *freq, u branch, mods []mod, key string) (complex128, error) {
	f, ok := fr.fresh[key]
	if !ok {
		if fr.fresh == nil {
			fr.fresh = map[string]*lu{}
		}
		clear(fr.fresh) // its memory is about to be reused
		y := r.base(fr).cloneInto(fr.scratch)
		fr.scratch = y
		for _, m := range mods {
			stamp(y, r.net.elems[m.elem].branches, fr.d[m.elem], m.sign)
		}
		var err error
		if f, err = y.factor(); err != nil {
			return 0, err
		}
		fr.fresh[key] = f
	}
	n := r.net.n
	if len(fr.work) != 2*n {
		fr.work = make([]complex128, 2*n)
	}
	rhs, x := fr.work[:n], fr.work[n:]
	clear(rhs)
	if u.from != ground {
		rhs[u.from]++
	}
	if u.to != ground {
		rhs[u.to]--
	}
	z := across(f.solvePart(x, rhs, lowest(u, n)), u)
	if !finite(z) {
		return 0, errSingular
	}
	return z, nil
}

// matmulInto writes a·b for row-major m×m matrices into c (len m²) and
// returns it.
func matmulInto(c, a, b []complex128, m int) []complex128 {
	clear(c)
	for i := 0; i < m; i++ {
		for k := 0; k < m; k++ {
			if v := a[i*m+k]; v != 0 {
				for j := 0; j < m; j++ {
					c[i*m+j] += v * b[k*m+j]
				}
			}
		}
	}
	return c
}

// norm is the infinity norm (largest row sum of magnitudes).
func norm(a []complex128, m int) float64 {
	best := 0.0
	for i := 0; i < m; i++ {
		s := 0.0
		for j := 0; j < m; j++ {
			s += cmplx.Abs(a[i*m+j])
		}
		best = math.Max(best, s)
	}
	return best
}

// cacheKey names one Impedance query.
type cacheKey struct {
	f       float64
	u       branch
	removed string
}

// Impedance is the impedance between nets a and b at frequency f (Hz), with
// the listed parts removed: what an ohmmeter driving a current from a to b
// would read, in the circuit's AC form (supplies AC ground behind their
// impedance, the in port as RS to gnd with its EMF zero, other ports as their
// impedance, Gmin from every net to gnd). It is 0 when a and b are the same
// net or both AC ground. Because of Gmin the result is always finite: a net
// with no other path reads about 1e12 Ω.
//
// Results, factorisations and solutions are cached, so repeated calls cost a
// few triangular solves at most. It fails for f not positive and finite, an
// unknown net or part, or an exactly singular network. Safe for concurrent use.
func (r *Result) Impedance(f float64, a, b string, removed ...string) (complex128, error) {
	if !positive(f) {
		return 0, fmt.Errorf("frequency %g Hz is not a positive finite value", f)
	}
	ia, ok := r.net.nodes[a]
	if !ok {
		return 0, fmt.Errorf("no net %q in the circuit", a)
	}
	ib, ok := r.net.nodes[b]
	if !ok {
		return 0, fmt.Errorf("no net %q in the circuit", b)
	}
	var idxBuf [4]int
	idx, err := r.net.refs(idxBuf[:0], removed)
	if err != nil {
		return 0, err
	}
	key := cacheKey{f: f, u: branch{ia, ib}, removed: removedKey(idx)}

	r.mu.Lock()
	defer r.mu.Unlock()
	if z, ok := r.cache[key]; ok {
		return z, nil
	}
	fr, err := r.at(f)
	if err != nil {
		return 0, err
	}
	var modBuf [4]mod
	mods := modBuf[:0]
	if r.net.source >= 0 {
		mods = append(mods, mod{r.net.source, 1})
	}
	for _, i := range idx {
		mods = append(mods, mod{i, -1})
	}
	z, err := r.impedance(fr, key.u, mods, key.removed)
	if err != nil {
		return 0, fmt.Errorf("impedance %s–%s at %g Hz: %w", a, b, f, err)
	}
	r.cache[key] = z
	return z, nil
}

// removedKey names a sorted removed set: the indices joined by commas. One
// index below 100 is a constant string (strconv.Itoa's), so the usual
// query, one part removed, builds no string.
func removedKey(idx []int) string {
	switch len(idx) {
	case 0:
		return ""
	case 1:
		return strconv.Itoa(idx[0])
	}
	var buf [32]byte
	b := buf[:0]
	for k, i := range idx {
		if k > 0 {
			b = append(b, ',')
		}
		b = strconv.AppendInt(b, int64(i), 10)
	}
	return string(b)
}
