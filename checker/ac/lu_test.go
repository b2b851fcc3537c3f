package ac

import (
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// Seeded random systems: the solution must satisfy A·x = b to a small
// residual, as gonum's own LU tests check theirs.
func TestLUResidual(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{1, 2, 5, 17, 60} {
		a := make([]complex128, n*n)
		for i := range a {
			a[i] = complex(rng.NormFloat64(), rng.NormFloat64())
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
		x := f.solve(b)
		for i := 0; i < n; i++ {
			var s complex128
			for j := 0; j < n; j++ {
				s += orig[i*n+j] * x[j]
			}
			if d := cmplx.Abs(s - b[i]); d > 1e-10 {
				t.Errorf("n=%d row %d: residual %g", n, i, d)
			}
		}
	}
}

// Needs a row swap: [[0, 1], [1, 0]]·x = [2, 3] gives x = [3, 2].
func TestLUPivot(t *testing.T) {
	f, err := factor([]complex128{0, 1, 1, 0}, 2)
	if err != nil {
		t.Fatal(err)
	}
	if x := f.solve([]complex128{2, 3}); x[0] != 3 || x[1] != 2 {
		t.Errorf("x = %v, want [3 2]", x)
	}
}

func TestLUSingular(t *testing.T) {
	if _, err := factor([]complex128{1, 2, 2, 4}, 2); err == nil {
		t.Error("rank-1 matrix factorised without error")
	}
	if _, err := factor([]complex128{cmplx.NaN(), 0, 0, 1}, 2); err == nil {
		t.Error("NaN matrix factorised without error")
	}
}

func TestInvert(t *testing.T) {
	// [[2, j], [j, 2]]⁻¹ = [[2, −j], [−j, 2]] / (4 + 1).
	inv, err := invert([]complex128{2, 1i, 1i, 2}, 2)
	if err != nil {
		t.Fatal(err)
	}
	want := []complex128{0.4, -0.2i, -0.2i, 0.4}
	for i := range want {
		if cmplx.Abs(inv[i]-want[i]) > 1e-15 {
			t.Errorf("inv[%d] = %v, want %v", i, inv[i], want[i])
		}
	}
}
