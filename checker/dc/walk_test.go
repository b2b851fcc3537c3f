package dc

import (
	"path/filepath"
	"reflect"
	"testing"

	"headroom/checker/circuit"
)

// TestRefillIsCompile holds the two uses of the one walk to each other: a
// netlist compiled from a shipped example and refilled with a copy whose
// values moved (every resistor, winding resistance and supply 3 % up, 35 °C)
// must hold exactly what compiling that copy gives, and a copy wired
// differently (a resistor's nets swapped) must be refused. The reference is
// compile itself, the path every check without a plan takes.
func TestRefillIsCompile(t *testing.T) {
	files, _ := filepath.Glob("../../testdata/circuits/*.toml")
	if len(files) == 0 {
		t.Fatal("no example circuits")
	}
	for _, file := range files {
		c, err := circuit.Load(file, circuit.Options{})
		if err != nil {
			t.Fatal(err)
		}
		nl, f := compile(c)
		if f != nil {
			t.Fatalf("%s: %v", file, f)
		}
		moved := c.Clone()
		moved.Ambient.Nominal = 35
		for _, s := range moved.Supplies {
			s.Volts *= 1.03
		}
		swapped := -1
		for i, p := range moved.Parts {
			switch p.Kind {
			case circuit.Resistor:
				p.Value *= 1.03
				if swapped < 0 && p.Nets[0] != p.Nets[1] {
					swapped = i
				}
			case circuit.Inductor:
				p.Resistance *= 1.03
			}
		}
		want, f := compile(moved)
		if f != nil {
			t.Fatalf("%s moved: %v", file, f)
		}
		if !nl.refill(moved) {
			t.Fatalf("%s: refill refused a copy wired the same", file)
		}
		if !reflect.DeepEqual(nl.conds, want.conds) || !reflect.DeepEqual(nl.sources, want.sources) ||
			!reflect.DeepEqual(nl.nortons, want.nortons) || !reflect.DeepEqual(nl.bjts, want.bjts) ||
			!reflect.DeepEqual(nl.fets, want.fets) || nl.vt != want.vt || nl.tempC != want.tempC {
			t.Errorf("%s: refilled netlist differs from the compiled one", file)
		}
		if swapped >= 0 {
			rewired := moved.Clone()
			n := rewired.Parts[swapped].Nets
			rewired.Parts[swapped].Nets = []string{n[1], n[0]}
			if nl.refill(rewired) {
				t.Errorf("%s: refill took a circuit with %s's nets swapped", file, rewired.Parts[swapped].Ref)
			}
		}
	}
}
