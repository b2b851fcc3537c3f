package rules

import (
	"iter"

	"headroom/checker/circuit"
	"headroom/checker/engine"
)

// fets yields the circuit's field-effect transistors in file order.
func fets(p *engine.Pass) iter.Seq[*circuit.Part] {
	return func(yield func(*circuit.Part) bool) {
		for _, part := range p.Circuit.Parts {
			if part.Kind.IsFET() && part.FET != nil && !yield(part) {
				return
			}
		}
	}
}

// fetSafety is the caution every FET finding about heat or voltage carries.
const fetSafety = "; a part run past its ratings can fail short and get hot enough to burn"
