package rules

import (
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/topology"
)

// figs is one item's message figures and the function that writes the
// message from them (a function literal that captures nothing). A rule
// keeps its items' figs in one engine.Block per pass and points each
// finding's Messenger at them: a closure per item would be an allocation
// per item at every case of a worst-case search, for a message written
// only for the case reported.
type figs struct {
	say  func(m *figs) string
	part *circuit.Part
	tb   *topology.BJT
	s    string
	v    [6]float64
}

func (m *figs) Message() string { return m.say(m) }

// bjtFigs is a block with room for k items per transistor.
func bjtFigs(p *engine.Pass, k int) engine.Block[figs] {
	n := 0
	for range bjts(p) {
		n++
	}
	return engine.NewBlock[figs](k * n)
}
