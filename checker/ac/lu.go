package ac

import (
	"errors"
	"math"
	"math/cmplx"
)

// errSingular reports a zero pivot: the network has no unique solution at
// that frequency.
var errSingular = errors.New("singular network")

// lu is the LU factorisation with partial pivoting of a dense complex n×n
// matrix, stored row-major in one slice.
//
// Why not gonum: gonum/mat factorises only real matrices, and the stacked real
// form [[G, −B], [B, G]] of the nodal system is twice the size, so its
// factorisation costs about twice the floating-point work of this one and
// allocates through the mat API on every call. The networks here have tens of
// nets, for which a plain complex elimination is the fastest and simplest.
type lu struct {
	n   int
	a   []complex128 // L below the diagonal (unit diagonal implied), U on and above
	piv []int        // row i of the factors is row piv[i] of the original
	// The factors' non-zero entries off the diagonal, row by row (row i's
	// are col[start[i]:start[i+1]]), so that solves skip the zeros.
	lcol, lstart []int
	ucol, ustart []int
}

// factor overwrites a (row-major, n×n) with its LU factors. It fails only on an
// exactly zero or non-finite pivot.
func factor(a []complex128, n int) (*lu, error) {
	piv := make([]int, n)
	nz := make([]int, 0, n)
	for i := range piv {
		piv[i] = i
	}
	for k := 0; k < n; k++ {
		p, best := k, -1.0
		for i := k; i < n; i++ {
			if m := abs1(a[i*n+k]); m > best {
				p, best = i, m
			}
		}
		if best == 0 || math.IsNaN(best) || math.IsInf(best, 0) {
			return nil, errSingular
		}
		if p != k {
			rk, rp := a[k*n:k*n+n], a[p*n:p*n+n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
			piv[k], piv[p] = piv[p], piv[k]
		}
		inv := 1 / a[k*n+k]
		// Nodal matrices are sparse: update only the pivot row's non-zero columns.
		nz = nz[:0]
		for j := k + 1; j < n; j++ {
			if a[k*n+j] != 0 {
				nz = append(nz, j)
			}
		}
		rk := a[k*n : k*n+n]
		for i := k + 1; i < n; i++ {
			m := a[i*n+k]
			if m == 0 {
				continue
			}
			m *= inv
			a[i*n+k] = m
			ri := a[i*n : i*n+n]
			for _, j := range nz {
				ri[j] -= m * rk[j]
			}
		}
	}
	f := &lu{n: n, a: a, piv: piv, lstart: make([]int, n+1), ustart: make([]int, n+1)}
	for i := 0; i < n; i++ {
		for j := 0; j < i; j++ {
			if a[i*n+j] != 0 {
				f.lcol = append(f.lcol, j)
			}
		}
		f.lstart[i+1] = len(f.lcol)
		for j := i + 1; j < n; j++ {
			if a[i*n+j] != 0 {
				f.ucol = append(f.ucol, j)
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
		row := f.a[i*n : i*n+n]
		for _, j := range f.lcol[f.lstart[i]:f.lstart[i+1]] {
			s -= row[j] * x[j]
		}
		x[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := x[i]
		row := f.a[i*n : i*n+n]
		for _, j := range f.ucol[f.ustart[i]:f.ustart[i+1]] {
			s -= row[j] * x[j]
		}
		x[i] = s / row[i]
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
