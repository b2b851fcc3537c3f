package dc

import (
	"fmt"
	"math"

	"headroom/checker/circuit"
)

// walker writes a circuit's elements into a netlist in one fixed order. When
// compiling it appends them; when refilling a netlist a Plan compiled once, it
// checks each element against the one compile placed there and writes only
// its value, so that the walk, and with it every value's arithmetic, is one
// and the same for both.
type walker struct {
	nl     *netlist
	refill bool
	shorts *shortFinder // compile only: loops of zero-resistance parts and supplies
	inner  int          // the next internal base node
	// refill's places in the netlist's lists, and the element sequence.
	ci, si, ni, bi, fi, seq int
	mismatch                bool // refill: the circuit is not wired as the netlist's
}

func (w *walker) node(net string) int {
	if net == circuit.Gnd {
		return gnd
	}
	i, ok := w.nl.index[net]
	if !ok && w.refill {
		return -2 // matches nothing
	}
	return i
}

func (w *walker) cond(a, b int, g float64) {
	nl := w.nl
	if !w.refill {
		nl.addCond(a, b, g)
		return
	}
	if w.ci == len(nl.conds) {
		w.mismatch = true
		return
	}
	k := &nl.conds[w.ci]
	if k.a != a || k.b != b || k.seq != w.seq {
		w.mismatch = true
		return
	}
	k.g = g
	w.ci++
	w.seq++
}

// owner is named in two pieces, joined only when compiling (a refill
// allocates nothing for it).
func (w *walker) branch(p, m int, e, r float64, owner, sub string) {
	nl := w.nl
	if !w.refill {
		row := nl.nodes + len(nl.sources)
		nl.sources = append(nl.sources, source{p: p, m: m, e: e, r: r, row: row, seq: nl.adds})
		nl.adds++
		owner += sub
		nl.branchOwner = append(nl.branchOwner, owner)
		nl.branchOf[owner] = row
		return
	}
	if w.si == len(nl.sources) {
		w.mismatch = true
		return
	}
	v := &nl.sources[w.si]
	if v.p != p || v.m != m || v.seq != w.seq || (v.r == 0) != (r == 0) {
		w.mismatch = true
		return
	}
	v.e, v.r = e, r
	w.si++
	w.seq++
}

// resistive adds r between a and b, as a conductance or, when small, a branch.
func (w *walker) resistive(a, b int, r float64, owner, sub string) {
	if r < branchBelow {
		w.branch(a, b, 0, r, owner, sub)
		return
	}
	w.cond(a, b, 1/r)
}

// short records a zero-resistance branch for the loop check (compile only).
func (w *walker) short(a, b int, emf float64, owner, sub string, supply bool) *Failure {
	if w.shorts == nil {
		return nil
	}
	if l := w.shorts.add(a, b, emf, owner+sub, supply); l != nil {
		return l.failure(w.nl.names)
	}
	return nil
}

func (w *walker) norton(n int, i float64) {
	nl := w.nl
	if !w.refill {
		nl.nortons = append(nl.nortons, norton{n, i})
		return
	}
	if w.ni == len(nl.nortons) || nl.nortons[w.ni].n != n {
		w.mismatch = true
		return
	}
	nl.nortons[w.ni].i = i
	w.ni++
}

// dcr adds an inductor or winding: its resistance, or a 0 V branch when it
// has none (so that its current is an unknown of its own).
func (w *walker) dcr(owner, sub string, a, b int, r float64) *Failure {
	if !(r >= 0) || math.IsInf(r, 0) {
		return invalid(owner+sub, "DC resistance %g Ω", r)
	}
	if r > 0 {
		w.resistive(a, b, r, owner, sub)
		return nil
	}
	if f := w.short(a, b, 0, owner, sub, false); f != nil {
		return f
	}
	w.branch(a, b, 0, 0, owner, sub)
	return nil
}

func (w *walker) bjt(q bjt) {
	nl := w.nl
	if !w.refill {
		nl.bjts = append(nl.bjts, q)
		return
	}
	if w.bi == len(nl.bjts) {
		w.mismatch = true
		return
	}
	old := &nl.bjts[w.bi]
	w.bi++
	if q.ref != old.ref || q.pol != old.pol || q.c != old.c || q.b != old.b || q.bp != old.bp || q.e != old.e {
		w.mismatch = true
		return
	}
	old.is, old.betaF, old.vcrit = q.is, q.betaF, q.vcrit
}

func (w *walker) fet(q fet) {
	nl := w.nl
	if !w.refill {
		nl.fets = append(nl.fets, q)
		return
	}
	if w.fi == len(nl.fets) {
		w.mismatch = true
		return
	}
	old := &nl.fets[w.fi]
	w.fi++
	if q.ref != old.ref || q.pol != old.pol || q.dual != old.dual || q.terminals != old.terminals {
		w.mismatch = true
		return
	}
	old.idss, old.vp, old.vcrit = q.idss, q.vp, q.vcrit
}

// walk writes c's supplies, ports and parts, in that order; the first value
// the model refuses is the failure.
func (w *walker) walk(c *circuit.Circuit) *Failure {
	for _, s := range c.Supplies {
		if s == nil {
			continue
		}
		if !finite(s.Volts) || !(s.Impedance >= 0) || math.IsInf(s.Impedance, 0) {
			return &Failure{Reason: fmt.Sprintf("supply %s: volts %g behind %g Ω is not a source", s.Net, s.Volts, s.Impedance), Net: s.Net, Cause: Invalid}
		}
		n := w.node(s.Net)
		if s.Impedance == 0 {
			if f := w.short(n, gnd, s.Volts, "supply ", s.Net, true); f != nil {
				return f
			}
			w.branch(n, gnd, s.Volts, 0, "supply ", s.Net)
			continue
		}
		if s.Impedance < branchBelow {
			w.branch(n, gnd, s.Volts, s.Impedance, "supply ", s.Net)
			continue
		}
		w.cond(n, gnd, 1/s.Impedance)
		if n != gnd {
			w.norton(n, s.Volts/s.Impedance)
		}
	}
	for _, p := range c.Ports {
		if p == nil {
			continue
		}
		if !positive(p.Impedance) {
			return &Failure{Reason: fmt.Sprintf("port %s: impedance %g Ω", p.Name, p.Impedance), Net: p.Net, Cause: Invalid}
		}
		w.cond(w.node(p.Net), gnd, 1/p.Impedance)
	}
	for _, p := range c.Parts {
		if p == nil {
			continue
		}
		if f := w.part(p); f != nil {
			return f
		}
	}
	return nil
}

func (w *walker) part(p *circuit.Part) *Failure {
	switch p.Kind {
	case circuit.Resistor, circuit.Capacitor, circuit.Inductor:
		if len(p.Nets) != 2 {
			return invalid(p.Ref, "needs two nets, has %d", len(p.Nets))
		}
	case circuit.Potentiometer, circuit.NPN, circuit.PNP, circuit.NJFET, circuit.PJFET:
		if len(p.Nets) != 3 {
			return invalid(p.Ref, "needs three nets, has %d", len(p.Nets))
		}
	}
	switch p.Kind {
	case circuit.Resistor:
		if !positive(p.Value) {
			return invalid(p.Ref, "resistance %g Ω", p.Value)
		}
		w.resistive(w.node(p.Nets[0]), w.node(p.Nets[1]), p.Value, p.Ref, "")
	case circuit.Capacitor:
		// open at DC
	case circuit.Inductor:
		return w.dcr(p.Ref, "", w.node(p.Nets[0]), w.node(p.Nets[1]), p.Resistance)
	case circuit.Transformer:
		for _, wd := range p.Windings {
			if wd == nil {
				continue
			}
			if f := w.dcr(p.Ref, "."+wd.Name, w.node(wd.Nets[0]), w.node(wd.Nets[1]), wd.Resistance); f != nil {
				return f
			}
		}
	case circuit.Potentiometer:
		ra, rb, ok := potSections(p)
		if !ok {
			return invalid(p.Ref, "value %g Ω at setting %g", p.Value, p.Setting)
		}
		wp := w.node(p.Nets[1])
		w.resistive(w.node(p.Nets[0]), wp, ra, p.Ref, ":a")
		w.resistive(wp, w.node(p.Nets[2]), rb, p.Ref, ":b")
	case circuit.NPN, circuit.PNP:
		q, f := newBJT(p, w.nl.tempC, w.nl.vt)
		if f != nil {
			return f
		}
		q.c, q.b, q.e = w.node(p.Nets[0]), w.node(p.Nets[1]), w.node(p.Nets[2])
		q.bp = q.b
		if rb := p.BJT.RB; rb != 0 {
			if !(rb > 0) || math.IsInf(rb, 0) {
				return invalid(p.Ref, "base resistance rb %g Ω", rb)
			}
			w.resistive(q.bp, w.inner, rb, p.Ref, ":rb")
			q.b = w.inner
			w.inner++
		}
		w.bjt(q)
	case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
		q, f := w.newFET(p)
		if f != nil {
			return f
		}
		w.fet(q)
	default:
		return invalid(p.Ref, "kind %q has no DC model", p.Kind)
	}
	return nil
}

// newFET makes one FET part with its terminals numbered.
func (w *walker) newFET(p *circuit.Part) (fet, *Failure) {
	want := 3
	if p.Kind == circuit.DualGateMOSFET {
		want = 4
	}
	if len(p.Nets) != want {
		return fet{}, invalid(p.Ref, "needs %d nets, has %d", want, len(p.Nets))
	}
	q, f := newFET(p, w.nl.vt)
	if f != nil {
		return fet{}, f
	}
	q.d, q.g, q.s = w.node(p.Nets[0]), w.node(p.Nets[1]), w.node(p.Nets[2])
	if q.dual {
		q.g2 = w.node(p.Nets[3])
	}
	q.terminals = [4]int{q.d, q.g, q.g2, q.s}
	return q, nil
}
