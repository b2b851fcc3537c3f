package ac

import (
	"errors"
	"math"
)

// errSingular reports a zero pivot: the network has no unique solution at
// that frequency.
var errSingular = errors.New("singular network")

// lu is the LU factorisation with partial pivoting of a complex n×n matrix,
// held as the rows the elimination left: L (unit diagonal implied) left of
// the diagonal, U from it on. Entries outside a row's span are zero, and
// solves skip the zeros inside it.
//
// Why not gonum: gonum/mat factorises only real matrices, and the stacked real
// form [[G, −B], [B, G]] of the nodal system is twice the size, so its
// factorisation costs about twice the floating-point work of this one and
// allocates through the mat API on every call. The networks here have tens to
// hundreds of nets in a chain, for which a plain complex elimination over the
// rows' occupied spans is the fastest and simplest.
type lu struct {
	n    int
	piv  []int // row i of the factors is row piv[i] of the original
	rows []row
	diag []divisor // row i's pivot, prepared for the solves to divide by
}

// row is one row of a matrix being factorised: the entries of columns
// lo … lo+len(v)−1; every entry outside that span is exactly +0.
type row struct {
	lo int
	v  []complex128
}

// at is the entry in column j.
func (r *row) at(j int) complex128 {
	if j < r.lo || j >= r.lo+len(r.v) {
		return 0
	}
	return r.v[j-r.lo]
}

// hi is the last column the row spans (lo−1 for an empty row).
func (r *row) hi() int { return r.lo + len(r.v) - 1 }

// sparse is an n×n matrix held as row spans, with the last row in which each
// column is spanned (before any row exchange), which bounds the rows that
// elimination can reach.
type sparse struct {
	n       int
	rows    []row
	colLast []int
	room    []int        // capacity reserved for each row, from its first column
	buf     []complex128 // the block the rows were cut from
	piv, nz []int        // factor's: the factors' row order (kept by them) and scratch
	diag    []divisor    // factor's: the pivots (kept by the factors)
	f       lu           // the factors factor returns (a later factor of m replaces them)
}

// newSparse allocates rows spanning lo[i] … hi[i] (every entry +0).
func newSparse(n int, lo, hi []int) *sparse {
	ints := make([]int, 2*n) // colLast and room in one block
	m := &sparse{n: n, rows: make([]row, n), colLast: ints[:n:n], room: ints[n:]}
	for i := range m.colLast {
		m.colLast[i] = -1
	}
	below, above := 0, 0 // the band the spans fit in
	for i := range n {
		below, above = max(below, i-lo[i]), max(above, hi[i]-i)
		for j := lo[i]; j <= hi[i]; j++ {
			m.colLast[j] = i
		}
	}
	// Row exchanges move a row up to `below` places and fill it to the
	// right up to `below+above` past its new place: reserve that much, so
	// that elimination rarely has to grow a row.
	for i := range n {
		m.room[i] = min(n-1, i+2*below+above) - lo[i] + 1
	}
	m.buf = m.arena()
	buf := m.buf
	for i := range n {
		m.rows[i] = row{lo: lo[i], v: buf[: hi[i]-lo[i]+1 : m.room[i]]}
		buf = buf[m.room[i]:]
	}
	return m
}

// arena allocates the room of every row in one block.
func (m *sparse) arena() []complex128 {
	total := 0
	for _, r := range m.room {
		total += r
	}
	return make([]complex128, total)
}

// clone copies m; the copy's rows may grow without touching m.
func (m *sparse) clone() *sparse { return m.cloneInto(nil) }

// cloneInto copies m into c, reusing c's memory when it came from a clone of
// m before (c's previous contents, and factors made from them, are lost); nil
// allocates.
func (m *sparse) cloneInto(c *sparse) *sparse {
	if c == nil || c.n != m.n || len(c.buf) != len(m.buf) {
		c = &sparse{n: m.n, rows: make([]row, m.n), colLast: m.colLast, room: m.room, buf: m.arena()}
	}
	buf := c.buf
	for i, r := range m.rows {
		c.rows[i] = row{lo: r.lo, v: buf[:len(r.v):m.room[i]]}
		copy(c.rows[i].v, r.v)
		buf = buf[m.room[i]:]
	}
	return c
}

// add adds v to entry (i, j), which must lie in row i's span.
func (m *sparse) add(i, j int, v complex128) {
	r := &m.rows[i]
	r.v[j-r.lo] += v
}

// sub subtracts v from entry (i, j), which must lie in row i's span.
func (m *sparse) sub(i, j int, v complex128) {
	r := &m.rows[i]
	r.v[j-r.lo] -= v
}

// factor overwrites a (row-major, n×n) with nothing useful and returns its
// LU factors. It fails only on an exactly zero or non-finite pivot.
func factor(a []complex128, n int) (*lu, error) {
	lo, hi := make([]int, n), make([]int, n)
	for i := range n {
		lo[i], hi[i] = i, i
		for j := range n {
			// A −0 is kept in the span so that it is copied as it is.
			if v := a[i*n+j]; v != 0 || math.Signbit(real(v)) || math.Signbit(imag(v)) {
				lo[i], hi[i] = min(lo[i], j), max(hi[i], j)
			}
		}
	}
	m := newSparse(n, lo, hi)
	for i := range n {
		copy(m.rows[i].v, a[i*n+lo[i]:i*n+hi[i]+1])
	}
	return m.factor()
}

// factor eliminates m in place (its rows are consumed) and returns the
// factors. It performs exactly the arithmetic of dense Gaussian elimination
// with partial pivoting (the first largest |re|+|im| of the column wins, a
// pivot row's zero entries and a row's zero multiplier are skipped), in the
// same order, so its factors are bit for bit those of the dense algorithm;
// it only leaves out the entries that are zero and stay zero. At step k no row
// below R(k), the last row spanning any of columns 0…k, can hold a non-zero
// in column k: exchanges and eliminations happen only at or above R(k).
func (m *sparse) factor() (*lu, error) {
	n := m.n
	rows := m.rows
	if len(m.piv) != n {
		ints := make([]int, 2*n) // piv and nz in one block
		m.piv, m.nz, m.diag = ints[:n:n], ints[n:n], make([]divisor, n)
	}
	piv, nz, diag := m.piv, m.nz, m.diag
	for i := range piv {
		piv[i] = i
	}
	reach := 0 // R(k)
	for k := 0; k < n; k++ {
		reach = max(reach, k, m.colLast[k])
		p, best := k, -1.0
		for i := k; i <= reach; i++ {
			if v := abs1(rows[i].at(k)); v > best {
				p, best = i, v
			}
		}
		if best < 0 && reach < n-1 {
			best = 0 // every candidate NaN: the zeros below would win
		}
		if best == 0 || math.IsNaN(best) || math.IsInf(best, 0) {
			return nil, errSingular
		}
		if p != k {
			rows[k], rows[p] = rows[p], rows[k]
			piv[k], piv[p] = piv[p], piv[k]
		}
		rk := &rows[k]
		pk := rk.at(k)
		diag[k] = newDivisor(pk)
		inv, ok := diag[k].quo(1)
		if !ok {
			inv = 1 / pk
		}
		nz = nz[:0]
		for j := k + 1; j <= rk.hi(); j++ {
			if rk.v[j-rk.lo] != 0 {
				nz = append(nz, j)
			}
		}
		for i := k + 1; i <= reach; i++ {
			ri := &rows[i]
			if k < ri.lo || k > ri.hi() {
				continue
			}
			mult := ri.v[k-ri.lo]
			if mult == 0 {
				continue
			}
			mult *= inv
			ri.v[k-ri.lo] = mult
			if len(nz) == 0 {
				continue
			}
			if last := nz[len(nz)-1]; last > ri.hi() {
				ri.v = append(ri.v, make([]complex128, last-ri.hi())...)
			}
			for _, j := range nz {
				ri.v[j-ri.lo] -= mult * rk.v[j-rk.lo]
			}
		}
	}
	if m.f.rows == nil { // the same slices every time: written once
		m.f = lu{n: n, piv: piv, rows: rows, diag: diag}
	}
	return &m.f, nil
}

// solve returns x with A·x = b; b is left untouched.
func (f *lu) solve(b []complex128) []complex128 {
	return f.solveInto(make([]complex128, f.n), b)
}

// solveInto is solve writing x into dst (length n, not b).
func (f *lu) solveInto(dst, b []complex128) []complex128 {
	n := f.n
	x := dst[:n]
	for i, p := range f.piv {
		x[i] = b[p]
	}
	for i := 1; i < n; i++ {
		r := &f.rows[i]
		s := x[i]
		for j := r.lo; j < i; j++ {
			if v := r.v[j-r.lo]; v != 0 {
				s -= v * x[j]
			}
		}
		x[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		r := &f.rows[i]
		s := x[i]
		for j := i + 1; j <= r.hi(); j++ {
			if v := r.v[j-r.lo]; v != 0 {
				s -= v * x[j]
			}
		}
		q, ok := f.diag[i].quo(s)
		if !ok {
			q = s / r.v[i-r.lo]
		}
		x[i] = q
	}
	return x
}

// solvePart is solveInto when only x[stop:] is wanted: the forward
// substitution starts at the first position where b (in the factors' row
// order) is not zero, and the backward one ends at stop; dst[:stop] is left
// undefined. The entries it computes are bit for bit those of solveInto: the
// leading entries it skips are +0 there, and subtracting a product with +0
// changes nothing, as no partial sum of the forward substitution is ever −0
// when b holds no −0 (an exact cancellation gives +0), which the caller
// ensures.
func (f *lu) solvePart(dst, b []complex128, stop int) []complex128 {
	n := f.n
	x := dst[:n]
	first := 0
	for first < n && b[f.piv[first]] == 0 {
		first++
	}
	for i := min(stop, first); i < n; i++ {
		x[i] = b[f.piv[i]]
	}
	for i := max(first, 1); i < n; i++ {
		r := &f.rows[i]
		s := x[i]
		for j := max(r.lo, first); j < i; j++ {
			if v := r.v[j-r.lo]; v != 0 {
				s -= v * x[j]
			}
		}
		x[i] = s
	}
	for i := n - 1; i >= stop; i-- {
		r := &f.rows[i]
		s := x[i]
		for j := i + 1; j <= r.hi(); j++ {
			if v := r.v[j-r.lo]; v != 0 {
				s -= v * x[j]
			}
		}
		q, ok := f.diag[i].quo(s)
		if !ok {
			q = s / r.v[i-r.lo]
		}
		x[i] = q
	}
	return x
}

// solvePair is solvePart for the unit right-hand sides e_a and e_b at once,
// into x and y (length n each): the two substitutions run side by side over
// the same rows, each doing exactly solvePart's arithmetic, so that the
// processor overlaps the two chains of divisions. Where the later start of
// one leaves it rows before its own first non-zero, its entries there stay
// +0 and change nothing, as in solvePart.
func (f *lu) solvePair(x, y []complex128, a, b, stop int) {
	n := f.n
	x, y = x[:n], y[:n]
	pa, pb := n, n // positions of a and b in the factors' row order
	for i, p := range f.piv {
		if p == a {
			pa = i
		}
		if p == b {
			pb = i
		}
	}
	first := min(pa, pb)
	for i := min(stop, first); i < n; i++ {
		x[i], y[i] = 0, 0
	}
	x[pa], y[pb] = 1, 1
	for i := max(first, 1); i < n; i++ {
		r := &f.rows[i]
		s, t := x[i], y[i]
		for j := max(r.lo, first); j < i; j++ {
			if v := r.v[j-r.lo]; v != 0 {
				s -= v * x[j]
				t -= v * y[j]
			}
		}
		x[i], y[i] = s, t
	}
	for i := n - 1; i >= stop; i-- {
		r := &f.rows[i]
		s, t := x[i], y[i]
		for j := i + 1; j <= r.hi(); j++ {
			if v := r.v[j-r.lo]; v != 0 {
				s -= v * x[j]
				t -= v * y[j]
			}
		}
		q, ok := f.diag[i].quo(s)
		if !ok {
			q = s / r.v[i-r.lo]
		}
		u, ok := f.diag[i].quo(t)
		if !ok {
			u = t / r.v[i-r.lo]
		}
		x[i], y[i] = q, u
	}
}

// divisor is a complex number m prepared for dividing by it: the first half
// of Smith's algorithm (R. L. Smith, Algorithm 116: Complex division, Commun.
// ACM 5(8), 1962, 435) exactly as the Go runtime performs n/m, done once for
// a pivot that divides a whole column or solve. quo(n) is then bit for bit
// n/m, with two real divisions instead of three and no call: the solves
// divide by every pivot.
//
// The runtime takes one of two branches, e = (a + b·r)/den, f = (b − a·r)/den
// when |Re m| ≥ |Im m| and e = (a·r + b)/den, f = (b·r − a)/den otherwise
// (n = a + ib, r and den from m). Both are e = (a·p + b·q)/den,
// f = (b·p − a·q)/den with (p, q) = (1, r) or (r, 1): a product with 1 is
// exact, so quo needs no branch.
type divisor struct{ p, q, denom float64 }

// newDivisor prepares m.
func newDivisor(m complex128) divisor {
	re, im := real(m), imag(m)
	if math.Abs(re) >= math.Abs(im) {
		r := im / re
		return divisor{1, r, re + r*im}
	}
	r := re / im
	return divisor{r, 1, im + r*re}
}

// quo returns n/m and true, or false where both parts come out NaN: there
// the runtime goes on to correct the result to C99's infinities and zeros,
// and the caller divides with the operator instead.
func (q *divisor) quo(n complex128) (complex128, bool) {
	e, f := (real(n)*q.p+imag(n)*q.q)/q.denom, (imag(n)*q.p-real(n)*q.q)/q.denom
	return complex(e, f), e == e || f == f
}

// abs1 is |re| + |im|, a cheap magnitude good enough for choosing pivots.
func abs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }

// invert returns the inverse of the small m×m matrix a (row-major); a is
// destroyed. It eliminates a in place, densely, doing exactly the arithmetic
// of factor and solveInto in their order (the same pivots, the same skipped
// zeros), so the inverse is bit for bit theirs, without their row spans and
// allocations: every transformer inverts its winding matrix at every
// frequency of every sweep.
func invert(a []complex128, m int) ([]complex128, error) {
	out := make([]complex128, m*m)
	if err := invertInto(out, a, m); err != nil {
		return nil, err
	}
	return out, nil
}

// invertInto is invert writing the inverse into out (len m²), allocating
// nothing for m ≤ 8.
func invertInto(out, a []complex128, m int) error {
	var pivBuf [8]int
	var xBuf [8]complex128
	var diagBuf [8]divisor
	piv, x, diag := pivBuf[:0], xBuf[:0], diagBuf[:0]
	if m > len(pivBuf) {
		piv, x, diag = make([]int, 0, m), make([]complex128, 0, m), make([]divisor, 0, m)
	}
	piv, x, diag = piv[:m], x[:m], diag[:m]
	for i := range piv {
		piv[i] = i
	}
	for k := 0; k < m; k++ {
		p, best := k, -1.0
		for i := k; i < m; i++ {
			if v := abs1(a[i*m+k]); v > best {
				p, best = i, v
			}
		}
		if best == 0 || math.IsNaN(best) || math.IsInf(best, 0) {
			return errSingular
		}
		if p != k {
			for j := range m {
				a[k*m+j], a[p*m+j] = a[p*m+j], a[k*m+j]
			}
			piv[k], piv[p] = piv[p], piv[k]
		}
		rk := a[k*m : (k+1)*m]
		diag[k] = newDivisor(rk[k])
		inv, ok := diag[k].quo(1)
		if !ok {
			inv = 1 / rk[k]
		}
		for i := k + 1; i < m; i++ {
			ri := a[i*m : (i+1)*m]
			mult := ri[k]
			if mult == 0 {
				continue
			}
			mult *= inv
			ri[k] = mult
			for j := k + 1; j < m; j++ {
				if rk[j] != 0 {
					ri[j] -= mult * rk[j]
				}
			}
		}
	}
	for col := range m {
		for i, p := range piv {
			x[i] = 0
			if p == col {
				x[i] = 1
			}
		}
		for i := 1; i < m; i++ {
			s := x[i]
			for j := 0; j < i; j++ {
				if v := a[i*m+j]; v != 0 {
					s -= v * x[j]
				}
			}
			x[i] = s
		}
		for i := m - 1; i >= 0; i-- {
			s := x[i]
			for j := i + 1; j < m; j++ {
				if v := a[i*m+j]; v != 0 {
					s -= v * x[j]
				}
			}
			q, ok := diag[i].quo(s)
			if !ok {
				q = s / a[i*m+i]
			}
			x[i] = q
		}
		for i, v := range x {
			out[i*m+col] = v
		}
	}
	return nil
}

// finite reports whether z has no NaN or infinite part: x − x is 0 for a
// finite x and NaN for an infinite or NaN one.
func finite(z complex128) bool { return real(z)-real(z) == 0 && imag(z)-imag(z) == 0 }
