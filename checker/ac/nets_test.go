package ac

import (
	"fmt"
	"maps"
	"math/rand/v2"
	"testing"

	"headroom/checker/circuit"
)

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
