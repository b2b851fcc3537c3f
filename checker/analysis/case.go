// Package analysis bundles what the rules read about one case of a circuit:
// its topology (which does not depend on values), the DC operating point and
// the band analysis. The worst-case search builds one Case per corner, each
// with the nominal case's Vary, which builds what the wiring alone decides
// once per circuit (Plan).
package analysis

import (
	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/topology"
)

// Case is one analysed case: the nominal circuit or a corner of the box.
type Case struct {
	Circuit *circuit.Circuit
	Topo    *topology.Topology
	OP      *dc.Result // nil when OPErr is set
	OPErr   error      // why no operating point was found (a *dc.Failure)
	AC      *ac.Result // nil when there is no operating point or ACErr is set
	ACErr   error

	plan *lazyPlan // Vary's, nil in a case Run did not make
}

// Run analyses c. topo may be shared between cases of the same circuit,
// since values do not change it; nil computes it.
func Run(c *circuit.Circuit, topo *topology.Topology) *Case {
	if topo == nil {
		topo = topology.Analyze(c)
	}
	cs := &Case{Circuit: c, Topo: topo, plan: &lazyPlan{}}
	cs.OP, cs.OPErr = dc.Solve(c)
	if cs.OPErr != nil {
		cs.OP = nil
		return cs
	}
	cs.AC, cs.ACErr = ac.Analyze(c, cs.OP)
	if cs.ACErr != nil {
		cs.AC = nil
	}
	return cs
}

// Vary analyses c, a circuit wired as cs.Circuit with other values (a case
// of the worst-case search), with cs's topology: the same answer as
// Run(c, cs.Topo), from a Plan built the first time and shared by every
// later call, concurrent ones included.
func (cs *Case) Vary(c *circuit.Circuit) *Case {
	if cs.plan == nil {
		return Run(c, cs.Topo)
	}
	cs.plan.once.Do(func() { cs.plan.plan = newPlan(cs.Circuit, cs.Topo, cs.OP) })
	return cs.plan.plan.Run(c)
}
