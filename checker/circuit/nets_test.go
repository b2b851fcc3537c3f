package circuit

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"sort"
	"testing"
)

// Nets lists every net but gnd, sorted, once each: checked against a plain
// set built from the same circuit.
func TestNets(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 9))
	name := func() string {
		if rng.IntN(6) == 0 {
			return Gnd
		}
		return fmt.Sprintf("n%d", rng.IntN(30))
	}
	for trial := 0; trial < 300; trial++ {
		c := &Circuit{}
		set := map[string]bool{}
		add := func(n string) string {
			if n != Gnd {
				set[n] = true
			}
			return n
		}
		for range rng.IntN(3) {
			c.Supplies = append(c.Supplies, &Supply{Net: add(name())})
		}
		for range rng.IntN(3) {
			c.Ports = append(c.Ports, &Port{Net: add(name())})
		}
		for range rng.IntN(30) {
			var p *Part
			if rng.IntN(5) == 0 {
				p = &Part{Kind: Transformer,
					Windings: []*Winding{{Nets: [2]string{add(name()), add(name())}}, {Nets: [2]string{add(name()), add(name())}}}}
			} else {
				p = &Part{Kind: Resistor, Nets: []string{add(name()), add(name())}}
			}
			c.Parts = append(c.Parts, p)
		}
		var want []string
		for n := range set {
			want = append(want, n)
		}
		sort.Strings(want)
		if got := c.Nets(); !slices.Equal(got, want) && !(len(got) == 0 && len(want) == 0) {
			t.Fatalf("trial %d: Nets %v, want %v", trial, got, want)
		}
	}
}
