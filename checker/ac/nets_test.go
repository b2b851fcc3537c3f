package ac

import (
	"fmt"
	"maps"
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

// numbering's memo answers each structure with that structure's numbering:
// random circuits are numbered twice (the second from the memo) and again
// with their first supply no longer AC ground.
func TestNumberingMemo(t *testing.T) {
	rng := rand.New(rand.NewPCG(6, 1))
	fresh := func(c *circuit.Circuit, acg map[string]bool) map[string]int {
		nodes := map[string]int{circuit.Gnd: ground}
		for i, net := range order(c, acg) {
			nodes[net] = i
		}
		for net := range acg {
			nodes[net] = ground
		}
		return nodes
	}
	for trial := 0; trial < 200; trial++ {
		c := &circuit.Circuit{Supplies: []*circuit.Supply{{Net: fmt.Sprintf("n%d", rng.IntN(8))}}}
		for range 1 + rng.IntN(20) {
			c.Parts = append(c.Parts, &circuit.Part{Kind: circuit.Resistor,
				Nets: []string{fmt.Sprintf("n%d", rng.IntN(12)), fmt.Sprintf("n%d", rng.IntN(12))}})
		}
		for _, acg := range []map[string]bool{{c.Supplies[0].Net: true}, {}} {
			want := fresh(c, acg)
			for range 2 {
				got, n := numbering(c, acg)
				if !maps.Equal(got, want) || n != len(order(c, acg)) {
					t.Fatalf("trial %d, AC ground %v: numbering %v (%d nodes), want %v", trial, acg, got, n, want)
				}
			}
		}
	}
}
