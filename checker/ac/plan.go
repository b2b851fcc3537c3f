package ac

import (
	"errors"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// Plan analyses many cases of one circuit — circuits wired as it is, with
// other values and operating points — as the worst-case search does: the
// network's numbering (the ordering of its nodes), its elements' branches
// and the part index are built once from the nominal circuit and shared,
// read-only, by every case's network, which holds only the case's values.
// A case's Result is Analyze's to the bit. Safe for concurrent use.
type Plan struct {
	like *network
}

// NewPlan prepares the cases of c, whose nominal operating point is op. It
// returns nil when c has no network (Analyze fails on it); a nil Plan's
// Analyze is Analyze.
func NewPlan(c *circuit.Circuit, op *dc.Result) *Plan {
	nw, err := build(c, op, nil)
	if err != nil {
		return nil
	}
	return &Plan{like: nw}
}

// Analyze is Analyze(c, op) for c wired as the plan's circuit; any other
// circuit, or one whose values change the network's shape (a supply's
// impedance becoming zero), is left to Analyze.
func (p *Plan) Analyze(c *circuit.Circuit, op *dc.Result) (*Result, error) {
	if p == nil {
		return Analyze(c, op)
	}
	r, err := analyze(c, op, p.like)
	if errors.Is(err, errShape) {
		return Analyze(c, op)
	}
	return r, err
}
