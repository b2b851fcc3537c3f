package topology

import (
	"headroom/checker/circuit"
)

// BJT holds the wiring facts of one transistor that the rules need.
type BJT struct {
	Ref                      string
	Kind                     circuit.Kind // circuit.NPN or circuit.PNP, or a FET kind (fet.go)
	Collector, Base, Emitter string       // its nets
	Order                    int          // index in file order

	// ReturnRail is the rail the emitter reaches through resistors alone,
	// not through nets touching another transistor (the emitter net itself
	// may): for an NPN the lowest-EMF such rail, for a PNP the highest; an
	// emitter on a rail returns to that rail. When resistors alone reach no
	// rail (an emitter choke or winding, the upper device of a cascode), it
	// is the rail the emitter reaches through any DC path other than this
	// transistor, chosen the same way, and ReturnByResistors is false. ""
	// when the emitter reaches no rail at all (net.connectivity reports it).
	ReturnRail        string
	ReturnByResistors bool

	// FeedRail is the rail other than ReturnRail that the collector reaches
	// through a DC path that does not run through this transistor: for an
	// NPN the highest-EMF such rail, for a PNP the lowest. A collector on a
	// rail feeds from that rail. "" when the collector reaches no other rail.
	FeedRail string

	// LowerLeg lists the resistors (not potentiometer sections) directly
	// between the base net and ReturnRail, in file order; empty when the
	// base has none or there is no return rail.
	LowerLeg []string

	// InductiveFeed is set when a DC path from the collector to a rail, not
	// passing through this transistor's own base or emitter nets (rails
	// excepted: a path may end on one), contains an inductor or winding.
	// FeedInductor names the first such part in file order ("T1.primary"
	// for a winding).
	InductiveFeed bool
	FeedInductor  string

	// CommonEmitter is set when the collector is not directly on an
	// AC-ground or decoupled net (the stages bias.emitter-fraction judges).
	CommonEmitter bool
}

func (t *Topology) analyzeBJTs() {
	for i, p := range t.c.Parts {
		if p == nil || !(p.Kind.IsBJT() || p.Kind.IsFET()) || len(p.Nets) < 3 {
			continue
		}
		q := &BJT{Ref: p.Ref, Kind: p.Kind, Collector: p.Nets[0], Base: p.Nets[1], Emitter: p.Nets[2], Order: i}
		t.returnRail(p, q)
		q.FeedRail = t.pickRail(positiveFeed(p.Kind), t.dcRails(q.Collector, p), q.ReturnRail, true)
		if q.ReturnRail != "" && q.Base != q.ReturnRail {
			for _, ei := range t.g.adj[q.Base] {
				e := &t.g.edges[ei]
				if e.kind == eResistor && e.other(q.Base) == q.ReturnRail {
					q.LowerLeg = append(q.LowerLeg, e.label)
				}
			}
		}
		q.FeedInductor = t.inductiveFeed(p, q)
		q.InductiveFeed = q.FeedInductor != ""
		q.CommonEmitter = !t.ACGround(q.Collector) && !t.Decoupled[q.Collector]
		t.BJTs[p.Ref] = q
	}
}

func (t *Topology) returnRail(p *circuit.Part, q *BJT) {
	npn := positiveFeed(p.Kind)
	if t.Rails[q.Emitter] {
		q.ReturnRail, q.ReturnByResistors = q.Emitter, true
		return
	}
	other := func(n string) bool {
		for _, b := range t.flags[n].bjts {
			if b != p {
				return true
			}
		}
		return false
	}
	reached := t.g.walk(q.Emitter, resistorOnly, func(n string) bool { return !t.Rails[n] && !other(n) })
	if r := t.pickRail(npn, t.railsIn(reached), "", false); r != "" {
		q.ReturnRail, q.ReturnByResistors = r, true
		return
	}
	q.ReturnRail = t.pickRail(npn, t.dcRails(q.Emitter, p), "", false)
}

// dcRails lists the rails net reaches through a DC path that does not run
// through the transistor self, sorted by name. A rail is an end point:
// no walk continues through it.
func (t *Topology) dcRails(net string, self *circuit.Part) []string {
	if t.Rails[net] {
		return []string{net}
	}
	cross := func(e *edge) bool { return e.dc() && !(e.kind == eCE && e.part == self) }
	return t.railsIn(t.g.walk(net, cross, func(n string) bool { return !t.Rails[n] }))
}

// pickRail chooses among rails (skipping skip) the one a transistor uses: a
// feed rail (feed set) is the highest EMF for an NPN and the lowest for a
// PNP; a return rail the lowest for an NPN and the highest for a PNP. Ties
// go to the first in rails' order (sorted by name).
func (t *Topology) pickRail(npn bool, rails []string, skip string, feed bool) string {
	highest := npn == feed // NPN feed and PNP return pick the highest
	best := ""
	for _, r := range rails {
		if r == skip {
			continue
		}
		if best == "" || (highest && t.RailEMF(r) > t.RailEMF(best)) || (!highest && t.RailEMF(r) < t.RailEMF(best)) {
			best = r
		}
	}
	return best
}
