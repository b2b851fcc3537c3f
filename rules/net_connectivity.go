package rules

import (
	"headroom/checker/engine"
	"headroom/checker/topology"
)

// NetConnectivity is the second safety net: wiring mistakes that make every
// number meaningless.
var NetConnectivity = &engine.Rule{
	ID: "net.connectivity",
	Doc: engine.Doc{
		Title: "every net must be wired into the circuit",
		Why: "A net named once is almost always a typo, a supply shorted through ideal windings has no defined current, " +
			"a loop of zero-resistance windings has no defined DC current, and a transistor terminal with no DC path to a rail " +
			"cannot be biased. Every other figure depends on the wiring being right.",
		Formula: "a net (not gnd) with one connection; a supply shorted to gnd or another supply through zero DC resistance; " +
			"a loop of zero-resistance inductors or windings; a transistor terminal with no DC path to a supply or gnd",
		Source: "common practice, no published source (wiring checks every schematic review makes)",
		Fix:    "Correct the net name, add the missing connection, or give one winding of a loop its DC `resistance`.",
	},
	Run: func(p *engine.Pass) error {
		for _, pr := range p.A.Topo.Problems {
			p.Report(engine.Finding{Part: pr.Part, Message: pr.Message, Fix: connectivityFix[pr.Kind]})
		}
		return nil
	},
}

// connectivityFix is the advice for each kind of wiring fault.
var connectivityFix = map[topology.ProblemKind]string{
	topology.SupplyShort:        "give the winding or inductor between the rails its DC resistance, or correct the net it connects to",
	topology.ZeroResistanceLoop: "give one winding or inductor of the loop its DC `resistance`",
	topology.OneConnection:      "correct the net name (a typo makes a net with one connection) or add the missing connection",
	topology.NoDCPath:           "add a DC path from the terminal to a rail: a bias resistor, a choke or a winding",
}
