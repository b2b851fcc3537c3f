package dc

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
)

// randomSystem is a nodal-like matrix: a few neighbours per row, some
// one-way entries (a transistor's transconductance), branch rows with a zero
// diagonal (ideal sources), small integers that cancel exactly and tie for
// the pivot, and now and then a row or column left empty (singular).
func randomSystem(rng *rand.Rand, n int) *sparseLU {
	pat := newSlotter(n)
	type entry struct {
		i, j int
		v    float64
	}
	var es []entry
	put := func(i, j int, v float64) {
		pat.mark(i, j)
		es = append(es, entry{i, j, v})
	}
	val := func() float64 {
		switch rng.IntN(4) {
		case 0:
			return float64(rng.IntN(5) - 2)
		case 1:
			return math.Ldexp(rng.Float64(), rng.IntN(40)-20)
		}
		return rng.NormFloat64()
	}
	branches := rng.IntN(1 + n/8)
	for i := 0; i < n-branches; i++ {
		put(i, i, math.Abs(val())+float64(rng.IntN(2)))
		for range rng.IntN(4) {
			j := i + rng.IntN(9) - 4
			if j < 0 || j >= n-branches {
				continue
			}
			g := val()
			put(i, j, -g)
			if rng.IntN(5) > 0 {
				put(j, i, -g)
			}
			put(j, j, g)
		}
		if rng.IntN(6) == 0 {
			put(i, rng.IntN(n), val()) // far-away coupling
		}
	}
	for b := n - branches; b < n; b++ {
		p := rng.IntN(n - branches)
		put(p, b, 1)
		put(b, p, 1)
		put(b, b, 0)
	}
	if rng.IntN(10) == 0 && n > 1 { // an empty column: singular
		k := rng.IntN(n)
		kept := es[:0]
		for _, e := range es {
			if e.j != k {
				kept = append(kept, e)
			}
		}
		es = kept
	}
	m := pat.build()
	for _, e := range es {
		m.vals[m.slot(e.i, e.j)] += e.v
	}
	return m
}

// TestSparseLUMatchesLAPACK: the sparse factorisation and solve must give
// the dense LAPACK routines' results bit for bit, below and above the block
// size (64) at which Getrf switches to its blocked algorithm, also when an
// earlier factorisation with other values (other pivots) filled the pattern,
// and the same verdict and pivot magnitudes on singular matrices.
func TestSparseLUMatchesLAPACK(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	solved, singular, exchanged := 0, 0, 0
	for trial := 0; trial < 600; trial++ {
		n := 1 + rng.IntN(40)
		if trial%6 == 0 {
			n = 60 + rng.IntN(120)
		}
		m := randomSystem(rng, n)
		if trial%3 == 0 {
			// Factorise once with other values: the next factorisation
			// starts from the pattern this one filled, as Newton's do.
			saved := append([]float64(nil), m.vals...)
			for i := range m.vals {
				m.vals[i] = rng.NormFloat64()
			}
			m.factor()
			copy(m.vals, saved)
		}
		a := blas64.General{Rows: n, Cols: n, Stride: n, Data: make([]float64, n*n)}
		m.dense(a.Data)
		piv := make([]int, n)
		wantOK := lapack64.Getrf(a, piv)
		ok, dense := m.factor()
		if dense {
			t.Fatalf("trial %d: finite matrix sent to the dense fall-back", trial)
		}
		if ok != wantOK {
			t.Fatalf("trial %d (n %d): sparse ok %v, LAPACK %v", trial, n, ok, wantOK)
		}
		for k := 0; k < n; k++ {
			if got, want := m.pivot(k), math.Abs(a.Data[k*n+k]); got != want {
				t.Fatalf("trial %d (n %d): pivot %d is %g, LAPACK %g", trial, n, k, got, want)
			}
		}
		for k, p := range piv {
			if p != k {
				exchanged++
				break
			}
		}
		if !ok {
			singular++
			continue
		}
		solved++
		b := make([]float64, n)
		for i := range b {
			b[i] = rng.NormFloat64()
		}
		rhs := blas64.General{Rows: n, Cols: 1, Stride: 1, Data: append([]float64(nil), b...)}
		lapack64.Getrs(blas.NoTrans, a, rhs, piv)
		m.solve(b)
		for i := range b {
			if math.Float64bits(b[i]) != math.Float64bits(rhs.Data[i]) {
				t.Fatalf("trial %d (n %d): x[%d] = %v, LAPACK %v", trial, n, i, b[i], rhs.Data[i])
			}
		}
	}
	if solved < 300 || singular < 20 || exchanged < 300 {
		t.Errorf("only %d regular and %d singular systems compared, %d with row exchanges", solved, singular, exchanged)
	}
	t.Logf("%d regular and %d singular systems, %d with row exchanges", solved, singular, exchanged)
}

// A value that is not finite goes to the dense routines.
func TestSparseLUNonFiniteFallsBack(t *testing.T) {
	pat := newSlotter(2)
	pat.mark(0, 0)
	pat.mark(1, 1)
	m := pat.build()
	m.vals[0], m.vals[1] = 1, math.Inf(1)
	if _, dense := m.factor(); !dense {
		t.Error("an infinite entry was factorised sparsely")
	}
}
