package dc

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"

	"headroom/checker/circuit"
)

// netIndex's memo answers each set of nets with its own numbering: random
// circuits are numbered twice, the second time from the memo.
func TestNetIndexMemo(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 7))
	for trial := 0; trial < 200; trial++ {
		c := &circuit.Circuit{}
		for range 1 + rng.IntN(20) {
			c.Parts = append(c.Parts, &circuit.Part{Kind: circuit.Resistor,
				Nets: []string{fmt.Sprintf("n%d", rng.IntN(12)), circuit.Gnd}})
		}
		want := c.Nets()
		for range 2 {
			names, index := netIndex(c)
			if !slices.Equal(names, want) || len(index) != len(want) {
				t.Fatalf("trial %d: names %v (index %v), want %v", trial, names, index, want)
			}
			for i, n := range names {
				if index[n] != i {
					t.Fatalf("trial %d: index of %s is %d, want %d", trial, n, index[n], i)
				}
			}
		}
	}
}
