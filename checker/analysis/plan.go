package analysis

import (
	"sync"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/topology"
)

// Plan analyses many cases of one circuit — circuits wired as it is, with
// other values — as the worst-case search does: what depends only on the
// wiring (the DC netlist and matrix pattern, the small-signal network's
// numbering and branches) is built once from the nominal circuit, and a case
// only writes its values in and solves (dc.Plan, ac.Plan). Its cases are
// those Run gives, to the bit (unless WarmStart). Safe for
// concurrent use; no case shares storage with another.
type Plan struct {
	topo *topology.Topology
	dc   *dc.Plan
	ac   *ac.Plan
}

// WarmStart makes the plans made after it is set start Newton from the
// nominal operating point (dc.NewPlan): fewer iterations, but figures that
// differ from Run's in their last bits. Off: the search's findings stay
// bit for bit those of analysing every case from scratch.
var WarmStart = false

// NewPlan prepares the cases of c, whose topology is topo (nil computes it).
func NewPlan(c *circuit.Circuit, topo *topology.Topology) *Plan {
	if topo == nil {
		topo = topology.Analyze(c)
	}
	return newPlan(c, topo, nil)
}

// newPlan is NewPlan with c's operating point op when it is known (nil
// solves it).
func newPlan(c *circuit.Circuit, topo *topology.Topology, op *dc.Result) *Plan {
	p := &Plan{topo: topo, dc: dc.NewPlan(c, WarmStart)}
	if op == nil {
		op, _ = p.dc.Solve(c)
	}
	if op != nil {
		p.ac = ac.NewPlan(c, op)
	}
	return p
}

// Run analyses c, which is wired as the plan's circuit; it is Run(c, topo)
// with the plan's topology.
func (p *Plan) Run(c *circuit.Circuit) *Case {
	cs := &Case{Circuit: c, Topo: p.topo}
	cs.OP, cs.OPErr = p.dc.Solve(c)
	if cs.OPErr != nil {
		cs.OP = nil
		return cs
	}
	cs.AC, cs.ACErr = p.ac.Analyze(c, cs.OP)
	if cs.ACErr != nil {
		cs.AC = nil
	}
	return cs
}

// lazyPlan is a case's Plan, made the first time Vary needs it.
type lazyPlan struct {
	once sync.Once
	plan *Plan
}
