package ac

import (
	"math"
	"math/rand/v2"
	"path/filepath"
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// portsFresh is the two-port at f the plain way, as PortsEach did before it
// kept its matrix across frequencies: every element's admittance, a matrix
// assembled afresh (Gmin, then each stamp but the source's and the load's,
// in element order), factorised with its own pivot search, one solve per
// port. The reference PortsEach must match bit for bit.
func portsFresh(r *Result, f float64) ([2][2]complex128, error) {
	nw := r.net
	w := 2 * math.Pi * f
	d := nw.admBlock()
	lo, hi := make([]int, nw.n), make([]int, nw.n)
	for i := range lo {
		lo[i], hi[i] = i, i
	}
	for i := range nw.elems {
		if err := nw.elems[i].fill(w, d[i]); err != nil {
			return [2][2]complex128{}, err
		}
		span(lo, hi, nw.elems[i].branches, d[i])
	}
	y := newSparse(nw.n, lo, hi)
	for i := range nw.n {
		y.add(i, i, Gmin)
	}
	for i, e := range nw.elems {
		if i != nw.source && i != nw.load {
			stamp(y, e.branches, d[i], 1)
		}
	}
	fa, err := y.factor()
	if err != nil {
		return [2][2]complex128{}, err
	}
	var z [2][2]complex128
	nodes := [2]int{nw.inNode, nw.outNd}
	has := [2]bool{nw.hasIn && nw.inNode != ground, nw.hasOut && nw.outNd != ground}
	for j := range 2 {
		if !has[j] {
			continue
		}
		rhs := make([]complex128, nw.n)
		rhs[nodes[j]] = 1
		x := fa.solve(rhs)
		for i := range 2 {
			if has[i] {
				z[i][j] = x[nodes[i]]
			}
		}
	}
	return z, nil
}

// sweepGrid is 40 points a decade over four decades from f0.
func sweepGrid(f0 float64) []float64 {
	var fs []float64
	for k := 0; k <= 160; k++ {
		fs = append(fs, f0*math.Pow(10, float64(k)/40))
	}
	return fs
}

// comparePorts sweeps r and checks every point against portsFresh, bit for
// bit (an error where the fresh way errs), returning how many points it
// compared.
func comparePorts(t *testing.T, what string, r *Result, fs []float64) int {
	t.Helper()
	i, compared := 0, 0
	err := r.PortsEach(fs, func(p PortPoint) error {
		want, err := portsFresh(r, fs[i])
		i++
		if err != nil {
			t.Errorf("%s at %g Hz: PortsEach gives %v, the fresh factorisation fails: %v", what, p.Frequency, p.Z, err)
			return nil
		}
		if !p.HasIn && !p.HasOut {
			return nil
		}
		for a := range 2 {
			for b := range 2 {
				if !sameBits(p.Z[a][b], want[a][b]) {
					t.Errorf("%s at %g Hz: Z%d%d %v, fresh factorisation %v", what, p.Frequency, a+1, b+1, p.Z[a][b], want[a][b])
				}
			}
		}
		compared++
		return nil
	})
	if err != nil {
		if _, ferr := portsFresh(r, fs[i]); ferr == nil {
			t.Errorf("%s at %g Hz: PortsEach fails (%v), the fresh factorisation does not", what, fs[i], err)
		}
	}
	return compared
}

// TestPortsEachMatchesFresh: the sweep's reused matrix and plan give exactly
// the two-port of a matrix assembled and factorised afresh at each
// frequency, on random networks of every part kind (values over many
// decades, where the pivot order changes along the sweep) and on the
// example circuits.
func TestPortsEachMatchesFresh(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 17))
	compared := 0
	for trial := range 300 {
		n := randomNet(rng, 3+rng.IntN(10), 3+rng.IntN(18), trial%2 == 0)
		r, err := Analyze(n.c, n.op)
		if err != nil {
			continue
		}
		compared += comparePorts(t, "random net", r, sweepGrid(n.c.Band[0]/100))
	}
	files, _ := filepath.Glob("../../testdata/circuits/*.toml")
	for _, f := range files {
		c, err := circuit.Load(f, circuit.Options{})
		if err != nil {
			t.Fatal(err)
		}
		op, err := dc.Solve(c)
		if err != nil {
			t.Fatal(err)
		}
		r, err := Analyze(c, op)
		if err != nil {
			t.Fatal(err)
		}
		compared += comparePorts(t, filepath.Base(f), r, sweepGrid(c.Band[0]/10))
	}
	if compared < 20000 {
		t.Errorf("only %d points compared", compared)
	}
	t.Logf("%d points compared", compared)
}

// TestPortSolverWidens: an entry that was zero where the spans were drawn
// and is not now is refused by assemble, and the solver drawn again over it
// gives the fresh two-port.
func TestPortSolverWidens(t *testing.T) {
	n := newNet(1e6, 2e6).port("in", "a", "in", 50).port("out", "c", "out", 50).
		r("R1", "a", "b", 100).cap("C1", "b", "c", 1e-9).r("R2", "c", "gnd", 1e3)
	r, err := Analyze(n.c, n.op)
	if err != nil {
		t.Fatal(err)
	}
	nw := r.net
	d, flat := admFlat(nw)
	for i := range nw.elems {
		if err := nw.elems[i].fill(2*math.Pi*1e6, d[i]); err != nil {
			t.Fatal(err)
		}
	}
	c1 := nw.parts["C1"]
	saved := d[c1][0]
	d[c1][0] = 0 // as if C1 were open where the spans were drawn
	ps := newPortSolver(nw, d, nil, nil)
	d[c1][0] = saved
	if ps.assemble(flat) {
		t.Fatal("assemble wrote an entry outside the spans")
	}
	ps = newPortSolver(nw, d, ps.lo, ps.hi)
	if !ps.assemble(flat) {
		t.Fatal("the widened solver still refuses the entry")
	}
	fa, err := ps.m.factor()
	if err != nil {
		t.Fatal(err)
	}
	rhs := make([]complex128, nw.n)
	rhs[nw.inNode] = 1
	want, err := portsFresh(r, 1e6)
	if err != nil {
		t.Fatal(err)
	}
	if got := fa.solve(rhs)[nw.inNode]; !sameBits(got, want[0][0]) {
		t.Errorf("Z11 %v, fresh factorisation %v", got, want[0][0])
	}
}
