// Package analysis bundles what the rules read about one case of a circuit:
// its topology (which does not depend on values), the DC operating point and
// the band analysis. The worst-case search builds one Case per corner.
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
}

// Run analyses c. topo may be shared between cases of the same circuit,
// since values do not change it; nil computes it.
func Run(c *circuit.Circuit, topo *topology.Topology) *Case {
	if topo == nil {
		topo = topology.Analyze(c)
	}
	cs := &Case{Circuit: c, Topo: topo}
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
