package poles

import (
	"fmt"
	"math"
	"math/cmplx"
	"path/filepath"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
)

// loadCase loads and analyses a circuit file.
func loadCase(t testing.TB, path string) *analysis.Case {
	t.Helper()
	c, err := circuit.Load(path, circuit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	cs := analysis.Run(c, nil)
	if cs.AC == nil {
		t.Fatalf("%s: %v %v", path, cs.OPErr, cs.ACErr)
	}
	return cs
}

// TestPencilAgreesWithBand evaluates the pencil at s = jω and compares the
// impedance at every net against gnd with the band analysis's Impedance
// (the same circuit, every termination in place) at several frequencies.
// Two independent assemblies of the same model (admittance stamps with
// inductors inverted there, branch currents here) must agree: an error in
// either shows.
func TestPencilAgreesWithBand(t *testing.T) {
	files, _ := filepath.Glob("../../testdata/circuits/*.toml")
	if len(files) == 0 {
		t.Fatal("no example circuits")
	}
	for _, f := range files {
		cs := loadCase(t, f)
		pr, err := Find(cs.Circuit, cs.AC)
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		agree(t, filepath.Base(f), cs, pr, 1e5, 3.3e6, cs.Circuit.Band[0], 47e6, 210e6)
		t.Logf("%s: %d unknowns, least damped %+v", filepath.Base(f), pr.pen.n, pr.Poles[:min(3, len(pr.Poles))])
	}
	// rb on both sides: the stability templates with rb 0 and 33 Ω set in
	// Go (the pencil's b' node against the band analysis's).
	for _, name := range []string{"colpitts", "follower", "ce-inductive"} {
		for _, rb := range []float64{0, 33} {
			cs := analyse(t, template(t, name, "FEEDBACK", "emit", "RLOAD", "4k7"), map[string]float64{"Q1": rb})
			pr := find(t, cs)
			agree(t, fmt.Sprintf("%s rb %g", name, rb), cs, pr, 2e5, 7e6, 55e6, 400e6)
		}
	}
}

// agree compares the pencil at s = jω with the band analysis's impedance at
// every net against gnd, at each frequency.
func agree(t *testing.T, label string, cs *analysis.Case, pr *Result, freqs ...float64) {
	t.Helper()
	for _, hz := range freqs {
		for _, net := range cs.Circuit.Nets() {
			if pr.pen.node[net] == ground {
				continue
			}
			want, err := cs.AC.Impedance(hz, net, circuit.Gnd)
			if err != nil {
				t.Fatal(err)
			}
			got, err := pr.Impedance(complex(0, 2*math.Pi*hz), net)
			if err != nil {
				t.Fatal(err)
			}
			if d := cmplx.Abs(got[0][0] - want); d > 1e-7*cmplx.Abs(want)+1e-9 {
				t.Errorf("%s %s at %g Hz: pencil %v, band analysis %v", label, net, hz, got[0][0], want)
			}
		}
	}
}
