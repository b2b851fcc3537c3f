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

	// Config is the stage's configuration: CommonBase when the base is held
	// at AC ground (on a rail or a decoupled net, or by a capacitor of role
	// bypass: a grounded-base stage, a cascode's upper device), else
	// CommonCollector when the collector is on an AC-ground or decoupled net
	// (an emitter follower), else CommonEmitter.
	Config string
	// CommonEmitter is Config == CommonEmitter (the stages
	// bias.emitter-fraction and the emitter bypass rule judge).
	CommonEmitter bool
	// BaseBypass names the capacitors of role bypass that hold the base at
	// AC ground, in file order.
	BaseBypass []string
	// Stacked names the transistor whose collector feeds this one's
	// emitter with no other DC path on the net (a cascode: the upper device
	// carries the lower one's collector current); "" otherwise.
	Stacked string
}

// The configurations of BJT.Config.
const (
	CommonEmitter   = "common emitter"
	CommonBase      = "common base"
	CommonCollector = "common collector"
)

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
		t.configure(q)
		t.BJTs[p.Ref] = q
	}
	for _, q := range t.BJTs {
		q.Stacked = t.stackedOn(q)
	}
}

// configure classifies the stage (BJT.Config).
func (t *Topology) configure(q *BJT) {
	for _, term := range t.touches[q.Base] {
		if term.Kind == circuit.Capacitor && t.Roles[term.Ref] == Bypass {
			q.BaseBypass = append(q.BaseBypass, term.Ref)
		}
	}
	switch {
	case t.ACGround(q.Base) || t.Decoupled[q.Base] || len(q.BaseBypass) > 0:
		q.Config = CommonBase
	case t.ACGround(q.Collector) || t.Decoupled[q.Collector]:
		q.Config = CommonCollector
	default:
		q.Config = CommonEmitter
	}
	q.CommonEmitter = q.Config == CommonEmitter
}

// stackedOn is the transistor whose collector alone feeds q's emitter in DC:
// the net holds q's emitter, that collector, and otherwise only capacitors.
func (t *Topology) stackedOn(q *BJT) string {
	if t.Rails[q.Emitter] {
		return ""
	}
	below := ""
	for _, term := range t.touches[q.Emitter] {
		switch {
		case term.Kind == circuit.Capacitor:
		case term.Ref == q.Ref && term.Pin == "emitter":
		case term.Kind.IsBJT() && term.Pin == "collector" && term.Ref != q.Ref && below == "":
			below = term.Ref
		default:
			return ""
		}
	}
	return below
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
