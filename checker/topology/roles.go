package topology

import "headroom/checker/circuit"

// assignRoles applies RULES.md's Roles table: capacitors first, then the
// decoupled nets, then inductors. An explicit role always wins.
func (t *Topology) assignRoles() {
	reach := map[string]bool{} // memo of reachesEmitter, by net
	for _, p := range t.c.Parts {
		if p == nil || p.Kind != circuit.Capacitor || len(p.Nets) != 2 {
			continue
		}
		t.Roles[p.Ref] = t.capacitorRole(p, reach)
	}
	for _, p := range t.c.Parts {
		if p == nil || p.Kind != circuit.Capacitor || len(p.Nets) != 2 || t.Roles[p.Ref] != Decoupling {
			continue
		}
		for _, n := range p.Nets {
			if n != circuit.Gnd {
				t.Decoupled[n] = true
			}
		}
	}
	for _, p := range t.c.Parts {
		if p == nil || p.Kind != circuit.Inductor || len(p.Nets) != 2 {
			continue
		}
		t.Roles[p.Ref] = t.inductorRole(p)
	}
}

func (t *Topology) capacitorRole(p *circuit.Part, memo map[string]bool) string {
	if p.Role != "" {
		return p.Role
	}
	a, b := p.Nets[0], p.Nets[1]
	ga, gb := t.ACGround(a), t.ACGround(b)
	switch {
	case !ga && !gb:
		return Coupling
	case ga && gb:
		return Decoupling
	}
	x := a // the net that is not AC ground
	if ga {
		x = b
	}
	r, ok := memo[x]
	if !ok {
		r = t.reachesEmitter(x)
		memo[x] = r
	}
	f := t.flags[x]
	switch {
	case r:
		return Bypass
	case f.base && t.heldBase(x):
		return Bypass
	case f.collector || f.base || f.port:
		return Tuning
	case t.resonates(x):
		return Tuning
	}
	return Decoupling
}

// resonates reports whether, in a circuit without a transistor (a passive
// filter, docs/filters.md), net carries an inductor or a transformer winding
// to AC ground: a capacitor from it to AC ground is then a resonator's, not a
// decoupling one. In an amplifier the same wiring is a supply filter's, and
// the Roles table stands.
func (t *Topology) resonates(net string) bool {
	if t.c.HasTransistor() {
		return false
	}
	for _, p := range t.c.Parts {
		if p == nil {
			continue
		}
		var ends [][2]string
		switch {
		case p.Kind == circuit.Inductor && len(p.Nets) == 2:
			ends = append(ends, [2]string{p.Nets[0], p.Nets[1]})
		case p.Kind == circuit.Transformer:
			for _, w := range p.Windings {
				ends = append(ends, w.Nets)
			}
		}
		for _, e := range ends {
			if e[0] == net && t.ACGround(e[1]) || e[1] == net && t.ACGround(e[0]) {
				return true
			}
		}
	}
	return false
}

// reachesEmitter reports whether net touches a transistor emitter, or reaches
// one through resistors alone without crossing a rail or a net that touches a
// base or collector (a split emitter resistor). The start net counts as
// crossed: a net that itself touches a base or collector, and no emitter,
// does not start a walk (its capacitor is a tuning one by the next row).
func (t *Topology) reachesEmitter(net string) bool {
	f := t.flags[net]
	if f.emitter {
		return true
	}
	if f.base || f.collector || t.Rails[net] {
		return false
	}
	blocked := func(n string) bool {
		g := t.flags[n]
		return t.Rails[n] || g.base || g.collector
	}
	for _, n := range t.g.walk(net, resistorOnly, func(n string) bool { return !blocked(n) }) {
		if t.flags[n].emitter && !t.Rails[n] { // an emitter on a rail is not reached
			return true
		}
	}
	return false
}

// heldBase reports whether a capacitor to AC ground on net, which touches a
// base, holds that base at AC ground (a grounded-base stage, a cascode's
// upper device) rather than tuning it: nothing on the net brings a signal
// in. Only bases, bias resistors (not from an emitter, collector or port),
// potentiometers and capacitors to AC ground may touch it; no port,
// collector, emitter, inductor, winding or coupling capacitor.
func (t *Topology) heldBase(net string) bool {
	f := t.flags[net]
	if f.port || f.collector || f.emitter {
		return false
	}
	for _, term := range t.touches[net] {
		switch term.Kind {
		case circuit.Resistor, circuit.Potentiometer:
			// A bias resistor; one from an emitter, a collector or a
			// port brings the signal in (a follower driving the base).
			for _, n := range t.NetsOf(term.Ref) {
				if g := t.flags[n]; n != net && !t.Rails[n] && (g.emitter || g.collector || g.port) {
					return false
				}
			}
		case circuit.NPN, circuit.PNP:
			if term.Pin != "base" {
				return false
			}
		case circuit.Capacitor:
			p := t.c.Part(term.Ref)
			if p == nil || len(p.Nets) != 2 {
				return false
			}
			other := p.Nets[0]
			if other == net {
				other = p.Nets[1]
			}
			if !t.ACGround(other) {
				return false
			}
		default:
			return false
		}
	}
	return true
}

func resistorOnly(e *edge) bool { return e.kind == eResistor }

// inductorRole: one net AC ground or decoupled and the other touching a
// collector makes a choke, or a tuning inductor when a capacitor sits across
// it or from that collector to AC ground (a tank); anything else is tuning.
func (t *Topology) inductorRole(p *circuit.Part) string {
	if p.Role != "" {
		return p.Role
	}
	a, b := p.Nets[0], p.Nets[1]
	choke, tank := false, false
	for _, o := range [2][2]string{{a, b}, {b, a}} {
		feed, coll := o[0], o[1]
		if !(t.ACGround(feed) || t.Decoupled[feed]) || !t.flags[coll].collector {
			continue
		}
		choke = true
		tank = tank || t.hasTankCapacitor(a, b, coll)
	}
	switch {
	case tank:
		return Tuning
	case choke:
		return Choke
	}
	return Tuning
}

// hasTankCapacitor reports whether a capacitor joins a and b (across the
// inductor) or joins coll to an AC-ground net.
func (t *Topology) hasTankCapacitor(a, b, coll string) bool {
	// Both cases put a capacitor on coll, so its edges are enough.
	for _, ei := range t.g.adj[coll] {
		e := &t.g.edges[ei]
		if e.kind != eCapacitor {
			continue
		}
		x, y := e.a, e.b
		if (x == a && y == b) || (x == b && y == a) {
			return true
		}
		if t.ACGround(e.other(coll)) {
			return true
		}
	}
	return false
}
