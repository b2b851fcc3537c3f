package poles

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/corpus"
)

// referencePoles is the eigen-solve as it was written before the workspace
// (commit 2e91074): G and C assembled with At/Set, M = σ·C + G, mat.LU, A =
// M⁻¹·C and mat.Eigen for the eigenvalues. Tests hold the solver to it bit
// for bit; the benchmark times both in one run.
func referencePoles(pen *pencil, fLo, fHi float64) (*Result, error) {
	out := &Result{MaxHz: 10 * fHi, pen: pen}
	if pen.n == 0 {
		return out, nil
	}
	w0 := 2 * math.Pi * math.Sqrt(fLo*fHi)
	g, c := referenceDense(pen, w0)
	var m, a mat.Dense
	for _, sigma := range []float64{1, 1.7, 0.43, 3.1, 0.19} {
		m.Scale(sigma, c)
		m.Add(&m, g)
		var lu mat.LU
		lu.Factorize(&m)
		if cond := lu.Cond(); cond > 1e14 || math.IsNaN(cond) || math.IsInf(cond, 0) {
			continue
		}
		if err := lu.SolveTo(&a, false, c); err != nil {
			continue
		}
		var eig mat.Eigen
		if !eig.Factorize(&a, mat.EigenNone) {
			return nil, errors.New("the eigenvalue iteration did not converge")
		}
		out.Poles, out.all = poles(eig.Values(nil), sigma, w0, out.MaxHz)
		return out, nil
	}
	return nil, errors.New("the nodal pencil is singular at every trial shift")
}

// referenceDense is G and C·w0 as the solver before the workspace built them.
func referenceDense(pen *pencil, w0 float64) (*mat.Dense, *mat.Dense) {
	g, c := mat.NewDense(pen.n, pen.n, nil), mat.NewDense(pen.n, pen.n, nil)
	for _, e := range pen.entries {
		g.Set(e.i, e.j, g.At(e.i, e.j)+e.g)
		c.Set(e.i, e.j, c.At(e.i, e.j)+e.c*w0)
	}
	return g, c
}

// pencils are the test pencils: the example circuits, the stability
// templates with and without rb, generated stages (corpus and the Nyquist
// test's generator) and the benchmark's cascades.
func pencils(t testing.TB) map[string]*analysis.Case {
	out := map[string]*analysis.Case{}
	files, _ := filepath.Glob("../../testdata/circuits/*.toml")
	for _, f := range files {
		out[filepath.Base(f)] = loadCase(t, f)
	}
	for _, name := range []string{"colpitts", "follower", "ce-inductive"} {
		for _, rb := range []float64{0, 33} {
			out[fmt.Sprintf("%s rb %g", name, rb)] = analyse(t, template(t, name, "FEEDBACK", "emit", "RLOAD", "4k7"), map[string]float64{"Q1": rb})
		}
	}
	rng := rand.New(rand.NewPCG(13, 7))
	for i := range 40 {
		text, rb := stage(rng)
		out[fmt.Sprintf("stage %d", i)] = analyse(t, text, map[string]float64{"Q1": rb})
	}
	for i, f := range corpus.Mixed(100) {
		c, err := circuit.LoadBytes("corpus.toml", f, circuit.Options{})
		if err != nil {
			t.Fatalf("corpus %d: %v", i, err)
		}
		if cs := analysis.Run(c, nil); cs.AC != nil {
			out[fmt.Sprintf("corpus %d", i)] = cs
		}
	}
	for _, n := range []int{10, 30, 100} {
		out[fmt.Sprintf("chain %d", n)] = analyse(t, chain(n), nil)
	}
	return out
}

// TestSolveMatchesReference: the solver with its reused workspace gives
// every pole bit for bit as the solver before it did, on every test pencil,
// the transposed ones (the left vectors' solve) included, twice in a row (a
// workspace left dirty by one size must not leak into the next).
func TestSolveMatchesReference(t *testing.T) {
	cases := pencils(t)
	names := slices.Sorted(func(yield func(string) bool) {
		for k := range cases {
			if !yield(k) {
				return
			}
		}
	})
	for range 2 {
		for _, name := range names {
			cs := cases[name]
			pen, err := build(cs.Circuit, cs.AC)
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			fLo, fHi := span(cs.Circuit)
			want, err1 := referencePoles(pen, fLo, fHi)
			got, err2 := findPoles(pen, fLo, fHi)
			if (err1 == nil) != (err2 == nil) {
				t.Fatalf("%s: reference error %v, solver error %v", name, err1, err2)
			}
			if err1 != nil {
				continue
			}
			if !slices.Equal(got.Poles, want.Poles) || !slices.Equal(got.all, want.all) {
				t.Errorf("%s: poles differ\nsolver    %v\nreference %v", name, got.Poles, want.Poles)
			}
			// The transposed assembly (Participation's left vectors)
			// against the reference's transpose.
			g0, c0 := referenceDense(pen, 3.7e7)
			g, c := pen.dense(3.7e7, true, new(workspace))
			if !mat.Equal(g, g0.T()) || !mat.Equal(c, c0.T()) {
				t.Errorf("%s: the transposed pencil differs from the reference's transpose", name)
			}
		}
	}
}

// TestSolveConcurrently: the search solves from several goroutines at once,
// each taking a workspace from the pool; pencils of different sizes solved
// side by side still give the reference's poles bit for bit.
func TestSolveConcurrently(t *testing.T) {
	var pens []*pencil
	var spans [][2]float64
	var want [][]Pole
	for _, text := range []string{chain(10), chain(30), colpitts(t, "emit", "4k7"), follower(t)} {
		cs := analyse(t, text, nil)
		pen, err := build(cs.Circuit, cs.AC)
		if err != nil {
			t.Fatal(err)
		}
		fLo, fHi := span(cs.Circuit)
		r, err := referencePoles(pen, fLo, fHi)
		if err != nil {
			t.Fatal(err)
		}
		pens, spans, want = append(pens, pen), append(spans, [2]float64{fLo, fHi}), append(want, r.Poles)
	}
	errs := make(chan error, 8)
	for w := range 8 {
		go func() {
			for i := range 40 {
				k := (w + i) % len(pens)
				r, err := findPoles(pens[k], spans[k][0], spans[k][1])
				if err == nil && !slices.Equal(r.Poles, want[k]) {
					err = fmt.Errorf("pencil %d: poles differ from the reference", k)
				}
				if err != nil {
					errs <- err
					return
				}
			}
			errs <- nil
		}()
	}
	for range 8 {
		if err := <-errs; err != nil {
			t.Error(err)
		}
	}
}
