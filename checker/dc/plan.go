package dc

import (
	"math"
	"slices"
	"sync"

	"headroom/checker/circuit"
)

// Plan solves many cases of one circuit: circuits wired alike whose values
// differ, as the worst-case search analyses hundreds of. What depends only
// on the wiring — the netlist's numbering and branches, the matrix pattern,
// the fill of its factors — is built once; a case writes its values into it
// and solves with exactly Solve's arithmetic, so that its answer is Solve's
// to the bit.
//
// With warm set, Newton starts each case from the nominal operating point
// instead, and falls back to Solve's cold start (junctions at their critical
// voltage, then gmin and source stepping) when that does not converge, so
// that every case Solve solves the plan solves too. It saves iterations, but
// the answer then differs from Solve's in its last bits (both are within
// the solver's tolerance of the exact point), which moves every figure
// printed in full (the JSON report); so the worst-case search does not use
// it yet.
//
// A Plan is safe for concurrent use: each goroutine solving takes a netlist
// and solver of its own from a free list. Results never share storage with
// the plan or with each other.
type Plan struct {
	proto *netlist // compiled from the nominal circuit, read-only
	// The nominal solution and its transistors' linearisation points, where
	// Newton starts; nil when the nominal circuit has none.
	x    []float64
	jct  []float64 // per transistor vbe, vbc
	fetJ []float64 // per FET vds, vgs, vg2s, vm
	warm bool      // start Newton from x

	mu   sync.Mutex
	free []*solver
}

// NewPlan prepares c's cases, starting Newton from the nominal operating
// point when warm is set. It returns nil when c cannot be compiled or a
// transistor junction hangs on zero-resistance parts (every case then needs
// Solve's full checks); a nil Plan's Solve is Solve.
func NewPlan(c *circuit.Circuit, warm bool) *Plan {
	if c == nil {
		return nil
	}
	nl, f := compile(c)
	if f != nil || nl.pinned || nl.size == 0 {
		return nil
	}
	p := &Plan{proto: nl, warm: warm}
	if !warm {
		return p
	}
	s := p.get()
	defer p.put(s)
	if o, _ := s.cold(); o == converged && nl.overdriven(s.x) == nil {
		p.x = slices.Clone(s.x)
		for _, q := range s.nl.bjts {
			p.jct = append(p.jct, q.vbe, q.vbc)
		}
		s.saveFETs()
		p.fetJ = slices.Clone(s.saveF)
	}
	return p
}

// get takes a solver off the free list, or makes one with a netlist of its
// own (the transistors hold Newton state).
func (p *Plan) get() *solver {
	p.mu.Lock()
	if n := len(p.free); n > 0 {
		s := p.free[n-1]
		p.free = p.free[:n-1]
		p.mu.Unlock()
		return s
	}
	p.mu.Unlock()
	nl := *p.proto
	nl.conds = slices.Clone(nl.conds)
	nl.sources = slices.Clone(nl.sources)
	nl.nortons = slices.Clone(nl.nortons)
	nl.bjts = slices.Clone(nl.bjts)
	nl.fets = slices.Clone(nl.fets)
	return newSolver(&nl)
}

func (p *Plan) put(s *solver) {
	p.mu.Lock()
	p.free = append(p.free, s)
	p.mu.Unlock()
}

// Solve finds the operating point of c, which must be wired as the plan's
// circuit (any other circuit, or a value that changes how a part is
// modelled — a resistance crossing 1 Ω, an invalid value — is solved by
// Solve). The answer is Solve's: the same model, tolerances and failures.
func (p *Plan) Solve(c *circuit.Circuit) (*Result, error) {
	if p == nil || c == nil {
		return Solve(c)
	}
	s := p.get()
	defer p.put(s)
	if !s.nl.refill(c) {
		return Solve(c)
	}
	s.load()
	s.firstTry = nil
	if p.x != nil {
		s.iters = 0
		copy(s.x, p.x)
		for k := range s.nl.bjts {
			s.nl.bjts[k].vbe, s.nl.bjts[k].vbc = p.jct[2*k], p.jct[2*k+1]
		}
		s.saveF = append(s.saveF[:0], p.fetJ...)
		s.restoreFETs()
		if s.newton(1, 0, maxNewton, false) == converged {
			return s.finish(c, converged, "newton")
		}
	}
	s.reset()
	o, method := s.cold()
	return s.finish(c, o, method)
}

// refill writes c's values into the netlist, walking c as compile does. It
// reports false when c is not wired as the netlist's circuit, when a value
// would change how a part is modelled (a resistance crossing branchBelow, a
// winding resistance becoming zero), or when a value is one compile refuses.
func (nl *netlist) refill(c *circuit.Circuit) bool {
	t := c.Ambient.Nominal
	if !finite(t) || t+zeroC <= 0 {
		return false
	}
	nl.tempC, nl.vt = t, ThermalVoltage(t)
	var ci, si, ni, bi, fi, seq int
	node := func(net string) int {
		if net == circuit.Gnd {
			return gnd
		}
		i, ok := nl.index[net]
		if !ok {
			return -2 // matches nothing
		}
		return i
	}
	cond := func(a, b int, g float64) bool {
		if ci == len(nl.conds) {
			return false
		}
		k := &nl.conds[ci]
		if k.a != a || k.b != b || k.seq != seq {
			return false
		}
		k.g = g
		ci++
		seq++
		return true
	}
	branch := func(pn, m int, e, r float64) bool {
		if si == len(nl.sources) {
			return false
		}
		v := &nl.sources[si]
		if v.p != pn || v.m != m || v.seq != seq || (v.r == 0) != (r == 0) {
			return false
		}
		v.e, v.r = e, r
		si++
		seq++
		return true
	}
	resistive := func(a, b int, r float64) bool {
		if r < branchBelow {
			return branch(a, b, 0, r)
		}
		return cond(a, b, 1/r)
	}
	dcr := func(a, b int, r float64) bool {
		if !(r >= 0) || math.IsInf(r, 0) {
			return false
		}
		if r > 0 {
			return resistive(a, b, r)
		}
		return branch(a, b, 0, 0)
	}
	for _, s := range c.Supplies {
		if s == nil {
			continue
		}
		if !finite(s.Volts) || !(s.Impedance >= 0) || math.IsInf(s.Impedance, 0) {
			return false
		}
		n := node(s.Net)
		switch {
		case s.Impedance == 0:
			if !branch(n, gnd, s.Volts, 0) {
				return false
			}
		case s.Impedance < branchBelow:
			if !branch(n, gnd, s.Volts, s.Impedance) {
				return false
			}
		default:
			if !cond(n, gnd, 1/s.Impedance) {
				return false
			}
			if n != gnd {
				if ni == len(nl.nortons) || nl.nortons[ni].n != n {
					return false
				}
				nl.nortons[ni].i = s.Volts / s.Impedance
				ni++
			}
		}
	}
	for _, p := range c.Ports {
		if p == nil {
			continue
		}
		if !positive(p.Impedance) || !cond(node(p.Net), gnd, 1/p.Impedance) {
			return false
		}
	}
	for _, p := range c.Parts {
		if p == nil {
			continue
		}
		ok := true
		switch p.Kind {
		case circuit.Resistor:
			ok = len(p.Nets) == 2 && positive(p.Value) && resistive(node(p.Nets[0]), node(p.Nets[1]), p.Value)
		case circuit.Capacitor:
			ok = len(p.Nets) == 2
		case circuit.Inductor:
			ok = len(p.Nets) == 2 && dcr(node(p.Nets[0]), node(p.Nets[1]), p.Resistance)
		case circuit.Transformer:
			for _, w := range p.Windings {
				if w != nil && ok {
					ok = dcr(node(w.Nets[0]), node(w.Nets[1]), w.Resistance)
				}
			}
		case circuit.Potentiometer:
			ra, rb, good := potSections(p)
			ok = good && len(p.Nets) == 3
			if ok {
				w := node(p.Nets[1])
				ok = resistive(node(p.Nets[0]), w, ra) && resistive(w, node(p.Nets[2]), rb)
			}
		case circuit.NPN, circuit.PNP:
			if len(p.Nets) != 3 || bi == len(nl.bjts) {
				return false
			}
			q, f := newBJT(p, nl.tempC, nl.vt)
			old := &nl.bjts[bi]
			bi++
			if f != nil || q.ref != old.ref || q.pol != old.pol ||
				old.c != node(p.Nets[0]) || old.bp != node(p.Nets[1]) || old.e != node(p.Nets[2]) {
				return false
			}
			old.is, old.betaF, old.vcrit = q.is, q.betaF, q.vcrit
			rb := p.BJT.RB
			if (rb != 0) != (old.b != old.bp) {
				return false
			}
			if rb != 0 {
				ok = rb > 0 && !math.IsInf(rb, 0) && resistive(old.bp, old.b, rb)
			}
		case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
			if fi == len(nl.fets) {
				return false
			}
			q, f := newFET(p, nl.vt)
			old := &nl.fets[fi]
			fi++
			if f != nil || q.ref != old.ref || q.pol != old.pol || q.dual != old.dual ||
				len(p.Nets) != 3+btoi(q.dual) || old.d != node(p.Nets[0]) || old.g != node(p.Nets[1]) || old.s != node(p.Nets[2]) {
				return false
			}
			old.idss, old.vp, old.vcrit = q.idss, q.vp, q.vcrit
		default:
			return false
		}
		if !ok {
			return false
		}
	}
	return ci == len(nl.conds) && si == len(nl.sources) && ni == len(nl.nortons) &&
		bi == len(nl.bjts) && fi == len(nl.fets)
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}
