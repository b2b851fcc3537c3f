package topology

import (
	"sort"

	"headroom/checker/circuit"
)

// The roles of RULES.md's Roles table.
const (
	Coupling   = "coupling"
	Decoupling = "decoupling"
	Bypass     = "bypass"
	Tuning     = "tuning"
	Choke      = "choke"
)

// Topology is everything Analyze found. It is read-only once built.
type Topology struct {
	// Rails holds gnd and every supply net. These are also the AC-ground nets.
	Rails map[string]bool
	// Roles gives the role of every capacitor and inductor, by reference.
	Roles map[string]string
	// Decoupled holds every net other than gnd that carries a capacitor of
	// role decoupling (after roles were given).
	Decoupled map[string]bool
	// BJTs holds the facts of every transistor, by reference.
	BJTs map[string]*BJT
	// Problems are the net.connectivity findings, in a deterministic order:
	// supply shorts, zero-resistance loops, one-connection nets, then
	// transistor terminals with no DC path; within a kind, by the file order
	// of the part named.
	Problems []Problem

	c       *circuit.Circuit
	g       *graph
	touches map[string][]Terminal
	flags   map[string]pinFlags
}

// Terminal is one connection to a net: a part terminal, a winding end, a port
// or a supply.
type Terminal struct {
	Ref     string       // part reference; port name for a port; net for a supply
	Kind    circuit.Kind // the part's kind; "" for a port or supply
	Pin     string       // "1"/"2" (two-terminal parts and winding ends), "a"/"wiper"/"b", "collector"/"base"/"emitter"; "" for a port or supply
	Winding string       // the winding's name, for a transformer
	Port    bool         // the connection is a port
	Supply  bool         // the connection is a supply
	Order   int          // the part's index in file order; ports and supplies after every part
}

// pinFlags records what kinds of terminal touch a net.
type pinFlags struct {
	collector, base, emitter, port bool
	bjts                           []*circuit.Part // transistors with any terminal on the net, file order, no repeats
}

// Analyze derives the topology of c. It never fails: problems in the wiring
// are returned in Problems, and parts with the wrong number of nets (which
// the loader rejects) are left out.
func Analyze(c *circuit.Circuit) *Topology {
	t := &Topology{
		Rails:     map[string]bool{circuit.Gnd: true},
		Roles:     map[string]string{},
		Decoupled: map[string]bool{},
		BJTs:      map[string]*BJT{},
		c:         c,
		touches:   map[string][]Terminal{},
		flags:     map[string]pinFlags{},
	}
	for _, s := range c.Supplies {
		if s != nil {
			t.Rails[s.Net] = true
		}
	}
	t.index()
	t.g = buildGraph(c)
	t.assignRoles()
	t.analyzeBJTs()
	t.findProblems()
	return t
}

// index fills touches and flags.
func (t *Topology) index() {
	c := t.c
	touch := func(net string, term Terminal) {
		t.touches[net] = append(t.touches[net], term)
	}
	for i, p := range c.Parts {
		if p == nil {
			continue
		}
		switch p.Kind {
		case circuit.Transformer:
			for _, w := range p.Windings {
				if w == nil {
					continue
				}
				for j, n := range w.Nets {
					touch(n, Terminal{Ref: p.Ref, Kind: p.Kind, Pin: [2]string{"1", "2"}[j], Winding: w.Name, Order: i})
				}
			}
		case circuit.Potentiometer:
			for j, n := range p.Nets {
				if j < 3 {
					touch(n, Terminal{Ref: p.Ref, Kind: p.Kind, Pin: [3]string{"a", "wiper", "b"}[j], Order: i})
				}
			}
		case circuit.NPN, circuit.PNP:
			for j, n := range p.Nets {
				if j >= 3 {
					break
				}
				touch(n, Terminal{Ref: p.Ref, Kind: p.Kind, Pin: [3]string{"collector", "base", "emitter"}[j], Order: i})
				f := t.flags[n]
				switch j {
				case 0:
					f.collector = true
				case 1:
					f.base = true
				case 2:
					f.emitter = true
				}
				if len(f.bjts) == 0 || f.bjts[len(f.bjts)-1] != p {
					f.bjts = append(f.bjts, p)
				}
				t.flags[n] = f
			}
		case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
			t.indexFET(i, p, touch)
		default:
			for j, n := range p.Nets {
				if j < 2 {
					touch(n, Terminal{Ref: p.Ref, Kind: p.Kind, Pin: [2]string{"1", "2"}[j], Order: i})
				}
			}
		}
	}
	next := len(c.Parts)
	for _, pt := range c.Ports {
		if pt == nil {
			continue
		}
		touch(pt.Net, Terminal{Ref: pt.Name, Port: true, Order: next})
		f := t.flags[pt.Net]
		f.port = true
		t.flags[pt.Net] = f
		next++
	}
	for _, s := range c.Supplies {
		if s == nil {
			continue
		}
		touch(s.Net, Terminal{Ref: s.Net, Supply: true, Order: next})
		next++
	}
}

// ACGround reports whether net is AC ground: gnd or a supply net.
func (t *Topology) ACGround(net string) bool { return t.Rails[net] }

// RailEMF is a rail's EMF in volts: the supply's nominal volts, 0 for gnd and
// for a net that is not a rail.
func (t *Topology) RailEMF(net string) float64 {
	if net == circuit.Gnd {
		return 0
	}
	if s := t.c.Supply(net); s != nil {
		return s.Volts
	}
	return 0
}

// Touches lists every connection to net: part terminals in file order, then
// ports, then the supply. The slice is shared; do not modify it.
func (t *Topology) Touches(net string) []Terminal { return t.touches[net] }

// NetsOf lists the nets a part touches (windings included), in the order of
// the file; nil for an unknown reference.
func (t *Topology) NetsOf(ref string) []string {
	if p := t.c.Part(ref); p != nil {
		return p.PartNets()
	}
	return nil
}

// FirstPartOn is the reference of the first part in file order with a
// terminal on net, or "" when only ports and supplies touch it.
func (t *Topology) FirstPartOn(net string) string {
	for _, term := range t.touches[net] {
		if !term.Port && !term.Supply {
			return term.Ref
		}
	}
	return ""
}

// Role is the role of the capacitor or inductor ref, "" for any other part.
func (t *Topology) Role(ref string) string { return t.Roles[ref] }

// TouchesCollector, TouchesBase and TouchesEmitter report whether any
// transistor has that terminal on net; TouchesPort whether a port does.
func (t *Topology) TouchesCollector(net string) bool { return t.flags[net].collector }
func (t *Topology) TouchesBase(net string) bool      { return t.flags[net].base }
func (t *Topology) TouchesEmitter(net string) bool   { return t.flags[net].emitter }
func (t *Topology) TouchesPort(net string) bool      { return t.flags[net].port }

// nets lists every net named in the circuit, gnd included, sorted.
func (t *Topology) nets() []string {
	out := make([]string, 0, len(t.touches))
	for n := range t.touches {
		out = append(out, n)
	}
	sort.Strings(out)
	return out
}

// railsIn returns the rails among nets, sorted by name for determinism.
func (t *Topology) railsIn(nets []string) []string {
	var out []string
	for _, n := range nets {
		if t.Rails[n] {
			out = append(out, n)
		}
	}
	sort.Strings(out)
	return out
}
