package circuit

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"

	"golang.org/x/tools/txtar"
)

// FuzzLoad feeds arbitrary bytes to the loader, as the circuit and as every
// library it names: it must never panic or hang, every error must carry a
// position of line ≥ 1 and column ≥ 1, and a circuit that loads must hold no
// NaN or Inf (FORMAT.md §7). The seed corpus is the demo circuits, the
// malformed circuits of testdata/bad and testdata/fuzz/FuzzLoad.
func FuzzLoad(f *testing.F) {
	demos, _ := filepath.Glob("../../testdata/circuits/*.toml")
	for _, p := range demos {
		if d, err := os.ReadFile(p); err == nil {
			f.Add(d)
		}
	}
	bad, _ := filepath.Glob("../../testdata/bad/*.txtar")
	for _, p := range bad {
		if ar, err := txtar.ParseFile(p); err == nil {
			for _, file := range ar.Files {
				f.Add(file.Data)
			}
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		read := func(string) ([]byte, error) { return data, nil }
		c, err := LoadBytes("fuzz.toml", data, Options{ReadFile: read})
		if err != nil {
			if errors.Is(err, ErrNotCircuit) {
				return
			}
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("error %v (%T) is not an *InputError", err, err)
			}
			if ie.Pos.Line < 1 || ie.Pos.Col < 1 || ie.Pos.File == "" || ie.Msg == "" {
				t.Fatalf("error without a position: %#v", ie)
			}
			return
		}
		finite(t, c)
	})
}

// finite fails on any NaN or Inf in the loaded circuit.
func finite(t *testing.T, c *Circuit) {
	t.Helper()
	check := func(what string, vs ...float64) {
		for _, v := range vs {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("%s holds %v", what, v)
			}
		}
	}
	check("band", c.Band[0], c.Band[1])
	check("ambient", c.Ambient.Nominal, c.Ambient.Lo, c.Ambient.Hi)
	for _, s := range c.Supplies {
		check("supply "+s.Net, s.Volts, s.Range[0], s.Range[1], s.Impedance)
	}
	for _, p := range c.Ports {
		check("port "+p.Name, p.Impedance)
	}
	for _, p := range c.Parts {
		check(p.Ref, p.Value, p.Tolerance, p.Rating, p.Resistance, p.Turns, p.AL, p.ALTolerance, p.Coupling, p.Setting, p.Inductance())
		for _, w := range p.Windings {
			check(p.Ref+"."+w.Name, w.Turns, w.Resistance)
		}
		if b := p.BJT; b != nil {
			check(p.Ref, b.FT, b.HFEMin, b.HFEMax, b.HFETyp, b.VBE, b.ICRef, b.PD, b.TjMax, b.ICMax, b.VCEO, b.Cob, b.NominalHFE())
		}
	}
}
