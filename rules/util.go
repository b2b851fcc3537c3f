package rules

import (
	"iter"

	"headroom/checker/circuit"
	"headroom/checker/engine"
)

// bjts yields the circuit's transistors in file order (without a list:
// the rules walk them at every case of a worst-case search).
func bjts(p *engine.Pass) iter.Seq[*circuit.Part] {
	return func(yield func(*circuit.Part) bool) {
		for _, part := range p.Circuit.Parts {
			if part.Kind.IsBJT() && !yield(part) {
				return
			}
		}
	}
}

// hasBJT reports whether the circuit has a transistor.
func hasBJT(p *engine.Pass) bool {
	for range bjts(p) {
		return true
	}
	return false
}
