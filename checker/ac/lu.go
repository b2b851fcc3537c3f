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
}

// factor overwrites a (row-major, n×n) with its LU factors. It fails only on an
// exactly zero or non-finite pivot.
func factor(a []complex128, n int) (*lu, error) {
	piv := make([]int, n)
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
		rk := a[k*n+k+1 : k*n+n]
		for i := k + 1; i < n; i++ {
			m := a[i*n+k]
			if m == 0 {
				continue
			}
			m *= inv
			a[i*n+k] = m
			ri := a[i*n+k+1 : i*n+n]
			for j, v := range rk {
				ri[j] -= m * v
			}
		}
	}
	return &lu{n: n, a: a, piv: piv}, nil
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
		row := f.a[i*n : i*n+i]
		for j, v := range row {
			s -= v * x[j]
		}
		x[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := x[i]
		row := f.a[i*n+i+1 : i*n+n]
		for j, v := range row {
			s -= v * x[i+1+j]
		}
		x[i] = s / f.a[i*n+i]
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
