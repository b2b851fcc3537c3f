package dc

import (
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

// refill writes c's values into the netlist by compile's own walk. It
// reports false when c is not wired as the netlist's circuit, when a value
// would change how a part is modelled (a resistance crossing branchBelow, a
// winding resistance becoming zero), or when a value is one compile refuses.
func (nl *netlist) refill(c *circuit.Circuit) bool {
	t := c.Ambient.Nominal
	if !finite(t) || t+zeroC <= 0 {
		return false
	}
	nl.tempC, nl.vt = t, ThermalVoltage(t)
	w := &walker{nl: nl, refill: true, inner: nl.nets}
	return w.walk(c) == nil && !w.mismatch && w.ci == len(nl.conds) && w.si == len(nl.sources) &&
		w.ni == len(nl.nortons) && w.bi == len(nl.bjts) && w.fi == len(nl.fets)
}
