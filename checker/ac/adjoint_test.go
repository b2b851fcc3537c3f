package ac

import (
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// The transposed solve on seeded random systems, banded and dense (pivoting
// exchanges rows in both): Aᵀ·z = b to a small residual.
func TestSolveTransposeResidual(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{1, 2, 5, 17, 60} {
		for _, band := range []int{1, 3, n} {
			a := make([]complex128, n*n)
			for i := range n {
				for j := range n {
					if i-j <= band && j-i <= band {
						a[i*n+j] = complex(rng.NormFloat64(), rng.NormFloat64())
					}
				}
			}
			b := make([]complex128, n)
			for i := range b {
				b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
			orig := append([]complex128(nil), a...)
			f, err := factor(a, n)
			if err != nil {
				t.Fatalf("n=%d: %v", n, err)
			}
			z := f.solveTransposeInto(make([]complex128, n), b)
			for j := range n {
				var s complex128
				for i := range n {
					s += orig[i*n+j] * z[i]
				}
				if d := cmplx.Abs(s - b[j]); d > 1e-9 {
					t.Errorf("n=%d band %d column %d: residual %g", n, band, j, d)
				}
			}
		}
	}
}
