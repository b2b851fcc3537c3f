package ac

import (
	"math"
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

// TestInvertMatchesFactor: invert's dense elimination must give bit for bit
// the inverse that factor and solve give column by column (the arithmetic
// it claims to repeat), on seeded random matrices with zeros, signed zeros,
// tied pivot candidates and pivots that need row exchanges.
func TestInvertMatchesFactor(t *testing.T) {
	rng := rand.New(rand.NewPCG(16, 3))
	for trial := 0; trial < 2000; trial++ {
		m := 1 + rng.IntN(5)
		a := make([]complex128, m*m)
		for i := range a {
			switch rng.IntN(5) {
			case 0: // zero
			case 1:
				a[i] = complex(math.Copysign(0, -1), rng.NormFloat64())
			case 2: // small integers: ties between pivot candidates
				a[i] = complex(float64(rng.IntN(5)-2), float64(rng.IntN(3)-1))
			default:
				a[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
		}
		got, gerr := invert(append([]complex128(nil), a...), m)
		f, ferr := factor(append([]complex128(nil), a...), m)
		if (gerr == nil) != (ferr == nil) {
			t.Fatalf("trial %d: invert error %v, factor error %v for %v", trial, gerr, ferr, a)
		}
		if ferr != nil {
			continue
		}
		for j := 0; j < m; j++ {
			e := make([]complex128, m)
			e[j] = 1
			col := f.solve(e)
			for i := range col {
				w, g := col[i], got[i*m+j]
				if math.Float64bits(real(w)) != math.Float64bits(real(g)) || math.Float64bits(imag(w)) != math.Float64bits(imag(g)) {
					t.Fatalf("trial %d: inverse (%d, %d) = %v, factor and solve give %v", trial, i, j, g, w)
				}
			}
		}
	}
}

// denseFactor is the plain dense elimination that factor must reproduce bit
// for bit: partial pivoting on the first largest |re|+|im|, zero multipliers
// and zero pivot-row entries skipped.
func denseFactor(a []complex128, n int) ([]complex128, []int, bool) {
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
			return nil, nil, false
		}
		if p != k {
			for j := 0; j < n; j++ {
				a[k*n+j], a[p*n+j] = a[p*n+j], a[k*n+j]
			}
			piv[k], piv[p] = piv[p], piv[k]
		}
		inv := 1 / a[k*n+k]
		for i := k + 1; i < n; i++ {
			m := a[i*n+k]
			if m == 0 {
				continue
			}
			m *= inv
			a[i*n+k] = m
			for j := k + 1; j < n; j++ {
				if a[k*n+j] != 0 {
					a[i*n+j] -= m * a[k*n+j]
				}
			}
		}
	}
	return a, piv, true
}

// sameBits compares complex numbers bit for bit (signed zeros included).
func sameBits(a, b complex128) bool {
	return math.Float64bits(real(a)) == math.Float64bits(real(b)) && math.Float64bits(imag(a)) == math.Float64bits(imag(b))
}

// TestFactorMatchesDense: the span-limited factorisation must give exactly
// the dense algorithm's factors, on banded nodal-like matrices (with exact
// cancellations, whole zero columns below the diagonal and row exchanges) and
// on dense ones.
func TestFactorMatchesDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	compared, exchanged := 0, 0
	for trial := 0; trial < 400; trial++ {
		n := 1 + rng.IntN(40)
		band := 1 + rng.IntN(6)
		if trial%10 == 0 {
			band = n
		}
		a := make([]complex128, n*n)
		for i := 0; i < n; i++ {
			for j := max(0, i-band); j < min(n, i+band+1); j++ {
				switch r := rng.IntN(10); {
				case r < 4:
					// leave zero
				case r == 4:
					a[i*n+j] = complex(1, 0) // small integers make exact cancellations
				case r == 5:
					a[i*n+j] = complex(float64(rng.IntN(3)), float64(rng.IntN(3)))
				default:
					a[i*n+j] = complex(rng.NormFloat64(), rng.NormFloat64()*1e3)
				}
			}
		}
		if trial%7 == 0 && n > 1 {
			a[rng.IntN(n)*n+rng.IntN(n)] = complex(math.Copysign(0, -1), 0)
		}
		if trial%13 == 0 {
			a[rng.IntN(n)*n+rng.IntN(n)] = cmplx.NaN()
		}
		want, wpiv, ok := denseFactor(append([]complex128(nil), a...), n)
		f, err := factor(append([]complex128(nil), a...), n)
		if ok != (err == nil) {
			t.Fatalf("trial %d: dense ok %v, factor error %v", trial, ok, err)
		}
		if !ok {
			continue
		}
		compared++
		for i, p := range f.piv {
			if p != i {
				exchanged++
				break
			}
		}
		got := make([]complex128, n*n)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				got[i*n+j] = f.rows[i].at(j)
			}
		}
		for i := 0; i < n; i++ {
			if f.piv[i] != wpiv[i] {
				t.Fatalf("trial %d: pivot %d is %d, dense %d", trial, i, f.piv[i], wpiv[i])
			}
			for j := 0; j < n; j++ {
				w, g := want[i*n+j], got[i*n+j]
				if w == 0 && g == 0 {
					continue // solves skip zeros, whatever their sign
				}
				if !sameBits(g, w) {
					t.Fatalf("trial %d (n %d, band %d): entry (%d, %d) is %v, dense %v", trial, n, band, i, j, g, w)
				}
			}
		}
		// The solve must match dense substitution over the same factors.
		b := make([]complex128, n)
		for i := range b {
			b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
		x := make([]complex128, n)
		for i := range n {
			x[i] = b[wpiv[i]]
		}
		for i := 1; i < n; i++ {
			s := x[i]
			for j := 0; j < i; j++ {
				if want[i*n+j] != 0 {
					s -= want[i*n+j] * x[j]
				}
			}
			x[i] = s
		}
		for i := n - 1; i >= 0; i-- {
			s := x[i]
			for j := i + 1; j < n; j++ {
				if want[i*n+j] != 0 {
					s -= want[i*n+j] * x[j]
				}
			}
			x[i] = s / want[i*n+i]
		}
		for i, v := range f.solve(b) {
			if !sameBits(v, x[i]) {
				t.Fatalf("trial %d: solve gives x[%d] = %v, dense %v", trial, i, v, x[i])
			}
		}
	}
	if compared < 200 || exchanged < 100 {
		t.Errorf("only %d regular matrices compared, %d with row exchanges", compared, exchanged)
	}
	t.Logf("%d matrices compared, %d with row exchanges", compared, exchanged)
}

// TestSolvePartMatchesSolve: the entries solvePart computes are solve's, bit
// for bit, for right-hand sides like a branch's (a few ±1, the rest +0), and
// so are solvePair's for two unit right-hand sides.
func TestSolvePartMatchesSolve(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 3))
	compared := 0
	for trial := 0; trial < 300; trial++ {
		n := 1 + rng.IntN(40)
		band := 1 + rng.IntN(4)
		a := make([]complex128, n*n)
		for i := 0; i < n; i++ {
			for j := max(0, i-band); j < min(n, i+band+1); j++ {
				if rng.IntN(3) > 0 {
					a[i*n+j] = complex(rng.NormFloat64(), rng.NormFloat64())
				}
			}
			a[i*n+i] += complex(float64(rng.IntN(3)), 0)
		}
		f, err := factor(a, n)
		if err != nil {
			continue
		}
		b := make([]complex128, n)
		for range 1 + rng.IntN(2) {
			b[rng.IntN(n)] = complex(float64(1-2*rng.IntN(2)), 0)
		}
		want := f.solve(b)
		stop := rng.IntN(n)
		got := f.solvePart(make([]complex128, n), b, stop)
		for i := stop; i < n; i++ {
			if !sameBits(got[i], want[i]) {
				t.Fatalf("trial %d (n %d, stop %d): x[%d] = %v, solve %v", trial, n, stop, i, got[i], want[i])
			}
		}
		compared++
		// solvePair: two unit right-hand sides at once.
		ea, eb := make([]complex128, n), make([]complex128, n)
		na, nc := rng.IntN(n), rng.IntN(n)
		ea[na], eb[nc] = 1, 1
		x, y := make([]complex128, n), make([]complex128, n)
		f.solvePair(x, y, na, nc, stop)
		wa, wb := f.solve(ea), f.solve(eb)
		for i := stop; i < n; i++ {
			if !sameBits(x[i], wa[i]) || !sameBits(y[i], wb[i]) {
				t.Fatalf("trial %d (n %d, stop %d): pair gives x[%d] = %v, %v; solve %v, %v", trial, n, stop, i, x[i], y[i], wa[i], wb[i])
			}
		}
	}
	if compared < 200 {
		t.Errorf("only %d systems compared", compared)
	}
}

// TestDivisorMatchesDivision: a prepared divisor divides bit for bit as Go's
// own complex division does (the Go runtime's complex128div, Smith's
// algorithm with the C99 corrections), on ordinary, tiny, huge, signed-zero,
// infinite and NaN parts.
func TestDivisorMatchesDivision(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	special := []float64{0, math.Copysign(0, -1), 1, -1, 2.5, 5e-324, -1e-310, 1e308, -3e307,
		math.Inf(1), math.Inf(-1), math.NaN()}
	part := func() float64 {
		if rng.IntN(3) == 0 {
			return special[rng.IntN(len(special))]
		}
		return rng.NormFloat64() * math.Pow(10, float64(rng.IntN(40)-20))
	}
	same := func(a, b complex128) bool {
		eq := func(x, y float64) bool {
			return math.Float64bits(x) == math.Float64bits(y) || (math.IsNaN(x) && math.IsNaN(y))
		}
		return eq(real(a), real(b)) && eq(imag(a), imag(b))
	}
	fixed := 0 // left to the operator
	for range 200000 {
		m, n := complex(part(), part()), complex(part(), part())
		q := newDivisor(m)
		if got, ok := q.quo(n); ok && !same(got, n/m) {
			t.Fatalf("(%v)/(%v): divisor %v, operator %v", n, m, got, n/m)
		} else if !ok {
			fixed++
		}
		one := complex(1, 0)
		if got, ok := q.quo(1); ok && !same(got, one/m) {
			t.Fatalf("1/(%v): divisor %v, operator %v", m, got, one/m)
		}
	}
	if fixed == 0 || fixed > 50000 {
		t.Errorf("%d of 200000 quotients left to the operator", fixed)
	}
}

// TestFinite: finite agrees with math/cmplx on every mix of ordinary,
// zero, subnormal, huge, infinite and NaN parts.
func TestFinite(t *testing.T) {
	parts := []float64{0, math.Copysign(0, -1), 1, -2.5, 5e-324, math.MaxFloat64, -math.MaxFloat64,
		math.Inf(1), math.Inf(-1), math.NaN()}
	for _, re := range parts {
		for _, im := range parts {
			z := complex(re, im)
			if want := !cmplx.IsNaN(z) && !cmplx.IsInf(z); finite(z) != want {
				t.Errorf("finite(%v) = %v, want %v", z, finite(z), want)
			}
		}
	}
}
