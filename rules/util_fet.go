package rules

import (
	"headroom/checker/circuit"
	"headroom/checker/engine"
)

// fets lists the circuit's field-effect transistors in file order.
func fets(p *engine.Pass) []*circuit.Part {
	var out []*circuit.Part
	for _, part := range p.Circuit.Parts {
		if part.Kind.IsFET() && part.FET != nil {
			out = append(out, part)
		}
	}
	return out
}

// fetSafety is the caution every FET finding about heat or voltage carries.
const fetSafety = "; a part run past its ratings can fail short and get hot enough to burn"
