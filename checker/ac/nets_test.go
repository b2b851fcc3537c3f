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
// with their first supply no longer AC ground, and again with the base
// resistance of every transistor given or taken away (which adds or removes
// internal base nodes, with the wiring unchanged).
func TestNumberingMemo(t *testing.T) {
	rng := rand.New(rand.NewPCG(6, 1))
	fresh := func(c *circuit.Circuit, acg map[string]bool) (map[string]int, map[string]int) {
		nodes := map[string]int{circuit.Gnd: ground}
		inner := map[string]int{}
		for i, v := range order(c, acg) {
			if v.part != nil {
				inner[v.part.Ref] = i
			} else {
				nodes[v.net] = i
			}
		}
		for net := range acg {
			nodes[net] = ground
		}
		return nodes, inner
	}
	for trial := 0; trial < 200; trial++ {
		c := &circuit.Circuit{Supplies: []*circuit.Supply{{Net: fmt.Sprintf("n%d", rng.IntN(8))}}}
		net := func() string { return fmt.Sprintf("n%d", rng.IntN(12)) }
		for i := range 1 + rng.IntN(20) {
			if rng.IntN(4) == 0 {
				c.Parts = append(c.Parts, &circuit.Part{Ref: fmt.Sprintf("Q%d", i), Kind: circuit.NPN,
					Nets: []string{net(), net(), net()}, BJT: &circuit.BJTParams{RB: float64(rng.IntN(2)) * 10}})
				continue
			}
			c.Parts = append(c.Parts, &circuit.Part{Kind: circuit.Resistor, Nets: []string{net(), net()}})
		}
		for _, flip := range []bool{false, true} {
			if flip {
				for _, p := range c.Parts {
					if p.BJT != nil {
						p.BJT.RB = 10 - p.BJT.RB
					}
				}
			}
			for _, acg := range []map[string]bool{{c.Supplies[0].Net: true}, {}} {
				want, wantInner := fresh(c, acg)
				for range 2 {
					got, inner, n := numbering(c, acg)
					if !maps.Equal(got, want) || !maps.Equal(inner, wantInner) || n != len(order(c, acg)) {
						t.Fatalf("trial %d, AC ground %v: numbering %v %v (%d nodes), want %v %v", trial, acg, got, inner, n, want, wantInner)
					}
				}
			}
		}
	}
}
