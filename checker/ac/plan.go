package ac

import (
	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// Plan analyses many cases of one circuit.
type Plan struct{}

// NewPlan prepares the cases of c.
func NewPlan(c *circuit.Circuit, op *dc.Result) *Plan { return &Plan{} }

// Analyze is Analyze(c, op) for a circuit wired as the plan's.
func (p *Plan) Analyze(c *circuit.Circuit, op *dc.Result) (*Result, error) { return Analyze(c, op) }
