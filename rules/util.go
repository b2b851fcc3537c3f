package rules

import (
	"headroom/checker/circuit"
	"headroom/checker/engine"
)

// bjts lists the circuit's transistors in file order.
func bjts(p *engine.Pass) []*circuit.Part {
	var out []*circuit.Part
	for _, part := range p.Circuit.Parts {
		if part.Kind.IsBJT() {
			out = append(out, part)
		}
	}
	return out
}
