package ac

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"

	"headroom/checker/circuit"
)

// sortedNets must list exactly what circuit.Nets lists, in the same order.
func TestSortedNetsIsNets(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 9))
	name := func() string {
		if rng.IntN(6) == 0 {
			return circuit.Gnd
		}
		return fmt.Sprintf("n%d", rng.IntN(30))
	}
	for trial := 0; trial < 300; trial++ {
		c := &circuit.Circuit{}
		for range rng.IntN(3) {
			c.Supplies = append(c.Supplies, &circuit.Supply{Net: name()})
		}
		for range rng.IntN(3) {
			c.Ports = append(c.Ports, &circuit.Port{Net: name()})
		}
		for range rng.IntN(30) {
			p := &circuit.Part{Kind: circuit.Resistor, Nets: []string{name(), name()}}
			if rng.IntN(5) == 0 {
				p.Kind = circuit.Transformer
				p.Windings = []*circuit.Winding{{Nets: [2]string{name(), name()}}, {Nets: [2]string{name(), name()}}}
			}
			c.Parts = append(c.Parts, p)
		}
		if got, want := sortedNets(c), c.Nets(); !slices.Equal(got, want) {
			t.Fatalf("trial %d: sortedNets %v, Nets %v", trial, got, want)
		}
	}
}
