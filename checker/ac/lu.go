package ac

import (
	"errors"
	"math"
	"math/cmplx"
)

// errSingular reports a zero pivot: the network has no unique solution at
// that frequency.
var errSingular = errors.New("singular network")

// lu is the LU factorisation with partial pivoting of a complex n×n matrix,
// keeping only the factors' non-zero entries off the diagonal, row by row
// (row i's are col[start[i]:start[i+1]] with values val[...]), so that solves
// skip the zeros.
//
// Why not gonum: gonum/mat factorises only real matrices, and the stacked real
// form [[G, −B], [B, G]] of the nodal system is twice the size, so its
// factorisation costs about twice the floating-point work of this one and
// allocates through the mat API on every call. The networks here have tens to
// hundreds of nets in a chain, for which a plain complex elimination over the
// rows' occupied spans is the fastest and simplest.
type lu struct {
	n            int
	piv          []int        // row i of the factors is row piv[i] of the original
	diag         []complex128 // U's diagonal
	lcol, lstart []int        // L below the diagonal (unit diagonal implied)
	lval         []complex128
	ucol, ustart []int // U above the diagonal
	uval         []complex128
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
}

// newSparse allocates rows spanning lo[i] … hi[i] (every entry +0).
func newSparse(n int, lo, hi []int) *sparse {
	total := 0
	for i := range n {
		total += hi[i] - lo[i] + 1
	}
	buf := make([]complex128, total)
	m := &sparse{n: n, rows: make([]row, n), colLast: make([]int, n)}
	for i := range m.colLast {
		m.colLast[i] = -1
	}
	for i := range n {
		w := hi[i] - lo[i] + 1
		m.rows[i] = row{lo: lo[i], v: buf[:w:w]}
		buf = buf[w:]
		for j := lo[i]; j <= hi[i]; j++ {
			m.colLast[j] = i
		}
	}
	return m
}

// clone copies m; the copy's rows may grow without touching m.
func (m *sparse) clone() *sparse {
	total := 0
	for i := range m.rows {
		total += len(m.rows[i].v)
	}
	buf := make([]complex128, total)
	c := &sparse{n: m.n, rows: make([]row, m.n), colLast: m.colLast}
	for i, r := range m.rows {
		w := len(r.v)
		copy(buf, r.v)
		c.rows[i] = row{lo: r.lo, v: buf[:w:w]}
		buf = buf[w:]
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
	piv := make([]int, n)
	for i := range piv {
		piv[i] = i
	}
	nz := make([]int, 0, n)
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
		inv := 1 / rk.at(k)
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
	f := &lu{n: n, piv: piv, diag: make([]complex128, n), lstart: make([]int, n+1), ustart: make([]int, n+1)}
	for i := range n {
		r := &rows[i]
		for j := r.lo; j < i; j++ {
			if v := r.v[j-r.lo]; v != 0 {
				f.lcol = append(f.lcol, j)
				f.lval = append(f.lval, v)
			}
		}
		f.lstart[i+1] = len(f.lcol)
		f.diag[i] = r.at(i)
		for j := i + 1; j <= r.hi(); j++ {
			if v := r.v[j-r.lo]; v != 0 {
				f.ucol = append(f.ucol, j)
				f.uval = append(f.uval, v)
			}
		}
		f.ustart[i+1] = len(f.ucol)
	}
	return f, nil
}

// solve returns x with A·x = b; b is left untouched.
func (f *lu) solve(b []complex128) []complex128 {
	n := f.n
	x := make([]complex128, n)
	for i, p := range f.piv {
		x[i] = b[p]
	}
	for i := 1; i < n; i++ {
		s := x[i]
		for k := f.lstart[i]; k < f.lstart[i+1]; k++ {
			s -= f.lval[k] * x[f.lcol[k]]
		}
		x[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := x[i]
		for k := f.ustart[i]; k < f.ustart[i+1]; k++ {
			s -= f.uval[k] * x[f.ucol[k]]
		}
		x[i] = s / f.diag[i]
	}
	return x
}

// abs1 is |re| + |im|, a cheap magnitude good enough for choosing pivots.
func abs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }

// invert returns the inverse of the small m×m matrix a (row-major); a is
// destroyed.
func invert(a []complex128, m int) ([]complex128, error) {
	f, err := factor(a, m)
	if err != nil {
		return nil, err
	}
	inv := make([]complex128, m*m)
	e := make([]complex128, m)
	for j := 0; j < m; j++ {
		clear(e)
		e[j] = 1
		col := f.solve(e)
		for i, v := range col {
			inv[i*m+j] = v
		}
	}
	return inv, nil
}

// finite reports whether z has no NaN or infinite part.
func finite(z complex128) bool { return !cmplx.IsNaN(z) && !cmplx.IsInf(z) }
