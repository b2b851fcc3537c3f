package dc

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"headroom/checker/circuit"
)

// Region thresholds (FORMAT.md §5, RULES.md bias.region defaults).
const (
	cutoffIC = 1e-6 // A
	satVCE   = 0.3  // V
)

// Solve finds the DC operating point of c at c.Ambient.Nominal by modified
// nodal analysis and Newton–Raphson iteration with junction limiting, the
// model of FORMAT.md §6. When plain Newton fails it tries gmin stepping, then
// source stepping. The error, when not nil, is always a *Failure: a
// connectivity problem (zero-resistance loop, shorted ideal supplies), a
// singular network, no convergence (naming the transistors whose junctions
// did not settle), or a value the loader should have refused. Solve never
// modifies c and never returns NaN or Inf in a Result.
func Solve(c *circuit.Circuit) (*Result, error) {
	if c == nil {
		return nil, &Failure{Reason: "no circuit", Cause: Invalid}
	}
	nl, f := compile(c)
	if f != nil {
		return nil, f
	}
	if nl.size == 0 {
		return nl.result(c, nil, 0, "newton")
	}
	s := newSolver(nl)
	o, method := s.cold()
	return s.finish(c, o, method)
}

// cold runs Newton from the solver's zero state, then the fall-backs.
func (s *solver) cold() (outcome, string) {
	o := s.newton(1, 0, maxNewton, true)
	method := "newton"
	if o == diverged {
		s.firstTry = append([]float64(nil), s.x...)
		method = "gmin-stepping"
		o = s.gminStepping()
	}
	if o == diverged {
		method = "source-stepping"
		o = s.sourceStepping()
	}
	return o, method
}

// finish turns the outcome of the solve into Solve's answer.
func (s *solver) finish(c *circuit.Circuit, o outcome, method string) (*Result, error) {
	nl := s.nl
	switch o {
	case singular:
		if f := nl.overdriven(s.x); f != nil {
			return nil, f
		}
		return nil, s.singularFailure()
	case diverged:
		return nil, s.convergenceFailure()
	}
	if f := nl.overdriven(s.x); f != nil {
		return nil, f
	}
	return nl.result(c, s.x, s.iters, method)
}

// overdriven finds a junction pushed past the range where the exponential
// is evaluated exactly (expMax·VT, about 2 V at 25 °C): the solution there is
// the tangent continuation's, not the model's, and the model's current would
// be unbounded.
func (nl *netlist) overdriven(x []float64) *Failure {
	if f := nl.overdrivenFET(x); f != nil {
		return f
	}
	for _, q := range nl.bjts {
		vb := volt(x, q.b)
		for _, j := range []struct {
			name string
			v    float64
		}{{"base-emitter", q.pol * (vb - volt(x, q.e))}, {"base-collector", q.pol * (vb - volt(x, q.c))}} {
			if j.v > expMax*nl.vt {
				return &Failure{Cause: Overdriven, Part: q.ref, Parts: []string{q.ref},
					Reason: fmt.Sprintf("the %s junction of %s is forward-biased by %.3g V with nothing to limit its current "+
						"(a supply across it, directly or through other junctions)", j.name, q.ref, j.v)}
			}
		}
	}
	return nil
}

func (s *solver) singularFailure() *Failure {
	nl := s.nl
	k := s.singularAt
	if k < nl.nodes {
		return &Failure{Cause: Singular, Net: nl.names[k],
			Reason: "the network is singular: nothing fixes the voltage of net " + nl.names[k]}
	}
	owner := nl.branchOwner[k-nl.nodes]
	f := &Failure{Cause: Singular, Reason: "the network is singular at the current of " + owner}
	if net, ok := strings.CutPrefix(owner, "supply "); ok {
		f.Net = net
	} else {
		ref, _, _ := strings.Cut(owner, ":") // a potentiometer section is REF:a or REF:b
		f.Part, f.Parts = ref, []string{ref}
	}
	return f
}

func (s *solver) convergenceFailure() *Failure {
	for _, x := range [][]float64{s.x, s.firstTry} {
		if x == nil {
			continue
		}
		if f := s.nl.overdriven(x); f != nil {
			return f
		}
	}
	var refs []string
	for _, q := range s.nl.bjts {
		if q.limited || !(q.moved <= 1e-6) {
			refs = append(refs, q.ref)
		}
	}
	if len(refs) == 0 {
		for _, q := range s.nl.bjts {
			refs = append(refs, q.ref)
		}
	}
	f := &Failure{Cause: NoConvergence, Parts: refs}
	f.Reason = "no DC operating point found (Newton, gmin stepping and source stepping all failed)"
	if len(refs) > 0 {
		f.Part = refs[0]
		f.Reason += ": the junctions of " + strings.Join(refs, ", ") + " did not settle"
	}
	if net := s.nl.floatingTerminal(refs); net != "" {
		f.Net = net
		f.Reason += "; net " + net + " has no DC path to a supply or gnd except through transistor junctions"
	}
	return f
}

// floatingTerminal returns the first terminal net of the named transistors
// that reaches neither gnd nor a supply through resistive parts and sources:
// the usual reason iteration cannot settle (only the 1e-12 S aid holds it).
func (nl *netlist) floatingTerminal(refs []string) string {
	sf := newShortFinder(nl.nodes)
	join := func(a, b int) {
		ra, rb := sf.find(sf.slot(a)), sf.find(sf.slot(b))
		sf.parent[ra] = rb
	}
	for _, c := range nl.conds {
		join(c.a, c.b)
	}
	for _, v := range nl.sources {
		join(v.p, v.m)
	}
	ground := sf.find(sf.slot(gnd))
	for _, q := range nl.bjts {
		if !slices.Contains(refs, q.ref) {
			continue
		}
		for _, t := range []int{q.c, q.bp, q.e} {
			if t != gnd && sf.find(t) != ground {
				return nl.names[t]
			}
		}
	}
	return ""
}

// result evaluates every part at the solution x.
func (nl *netlist) result(c *circuit.Circuit, x []float64, iters int, method string) (*Result, error) {
	r := &Result{
		TempC:         nl.tempC,
		VT:            nl.vt,
		V:             make(map[string]float64, nl.nodes+1),
		Parts:         make(map[string]*Part, len(c.Parts)),
		BJTs:          make(map[string]*BJT, len(nl.bjts)),
		FETs:          make(map[string]*FET, len(nl.fets)),
		SupplyCurrent: make(map[string]float64, len(c.Supplies)),
		Iterations:    iters,
		Method:        method,
	}
	v := func(net string) float64 {
		if net == circuit.Gnd {
			return 0
		}
		return x[nl.index[net]]
	}
	// Every part's and transistor's figures are cut from one block each: a
	// map entry apiece was most of a case's allocations.
	parts := make([]Part, len(c.Parts))
	bjts := make([]BJT, len(nl.bjts))
	r.V[circuit.Gnd] = 0
	for i, name := range nl.names[:nl.nets] {
		r.V[name] = x[i]
	}
	// through is the current from a to b of a part of resistance res: its
	// branch current when it has one, else Ohm's law.
	through := func(owner, a, b string, res float64) float64 {
		if row, ok := nl.branchOf[owner]; ok {
			return x[row]
		}
		return (v(a) - v(b)) / res
	}
	for _, s := range c.Supplies {
		if s == nil {
			continue
		}
		if row, ok := nl.branchOf["supply "+s.Net]; ok {
			r.SupplyCurrent[s.Net] = -x[row]
		} else {
			r.SupplyCurrent[s.Net] = (s.Volts - v(s.Net)) / s.Impedance
		}
	}
	k := 0 // transistors in compile order
	for pi, p := range c.Parts {
		if p == nil {
			continue
		}
		part := func(x Part) {
			parts[pi] = x
			r.Parts[p.Ref] = &parts[pi]
		}
		switch p.Kind {
		case circuit.Resistor:
			i := through(p.Ref, p.Nets[0], p.Nets[1], p.Value)
			part(Part{Current: i, Power: i * i * p.Value})
		case circuit.Capacitor:
			part(Part{Voltage: math.Abs(v(p.Nets[0]) - v(p.Nets[1]))})
		case circuit.Inductor:
			part(Part{Current: through(p.Ref, p.Nets[0], p.Nets[1], p.Resistance)})
		case circuit.Transformer:
			w := make(map[string]float64, len(p.Windings))
			for _, wd := range p.Windings {
				if wd != nil {
					w[wd.Name] = through(p.Ref+"."+wd.Name, wd.Nets[0], wd.Nets[1], wd.Resistance)
				}
			}
			part(Part{Windings: w})
		case circuit.Potentiometer:
			ra, rb, _ := potSections(p)
			ia := through(p.Ref+":a", p.Nets[0], p.Nets[1], ra)
			ib := through(p.Ref+":b", p.Nets[1], p.Nets[2], rb)
			sa := Section{R: ra, Current: ia, Power: ia * ia * ra}
			sb := Section{R: rb, Current: ib, Power: ib * ib * rb}
			part(Part{Power: sa.Power + sb.Power, Sections: [2]Section{sa, sb}})
		case circuit.NPN, circuit.PNP:
			q := &nl.bjts[k]
			bjts[k] = q.operatingPoint(volt(x, q.c), volt(x, q.b), volt(x, q.bp), volt(x, q.e), nl.vt)
			r.BJTs[p.Ref] = &bjts[k]
			k++
		case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
			nl.fetResult(r, p.Ref, x)
		}
	}
	if bad := r.firstNonFinite(); bad != "" {
		return nil, &Failure{Cause: NoConvergence, Reason: "the operating point overflowed at " + bad, Part: bad}
	}
	return r, nil
}

// operatingPoint evaluates the model at the solved voltages: the currents
// at the junctions (from the internal base vb), VBE between the pins (from
// the base pin's vbp), so that it includes the drop IB·rb.
func (q *bjt) operatingPoint(vc, vb, vbp, ve, vt float64) BJT {
	vbe := q.pol * (vb - ve)
	vbc := q.pol * (vb - vc)
	p := q.eval(vbe, vbc, vt)
	o := BJT{
		ICf: p.ic, IBf: p.ib, VBEf: q.pol * (vbp - ve), VCEf: vbe - vbc, VBJf: vbe,
		HFE: q.betaF, IS: q.is,
	}
	o.IC, o.IB, o.VBE, o.VCE = math.Abs(o.ICf), math.Abs(o.IBf), math.Abs(o.VBEf), math.Abs(o.VCEf)
	o.Power = o.VCEf*o.ICf + o.VBEf*o.IBf
	switch {
	case o.ICf < cutoffIC:
		o.Region = "cutoff"
	case o.VCEf < satVCE:
		o.Region = "saturated"
	default:
		o.Region = "active"
	}
	return o
}

// firstNonFinite names the first value that is NaN or infinite, or "".
func (r *Result) firstNonFinite() string {
	for n, v := range r.V {
		if !finite(v) {
			return "net " + n
		}
	}
	for n, v := range r.SupplyCurrent {
		if !finite(v) {
			return "supply " + n
		}
	}
	for ref, p := range r.Parts {
		ok := finite(p.Current) && finite(p.Power) && finite(p.Voltage)
		for _, s := range p.Sections {
			ok = ok && finite(s.Current) && finite(s.Power)
		}
		for _, w := range p.Windings {
			ok = ok && finite(w)
		}
		if !ok {
			return ref
		}
	}
	for ref, f := range r.FETs {
		if !(finite(f.ID) && finite(f.IG) && finite(f.VGS) && finite(f.VDS) && finite(f.Power)) {
			return ref
		}
	}
	for ref, b := range r.BJTs {
		if !(finite(b.ICf) && finite(b.IBf) && finite(b.VBEf) && finite(b.VCEf) && finite(b.Power)) {
			return ref
		}
	}
	return ""
}

// String is a one-line summary, for test failures and debugging.
func (b *BJT) String() string {
	return fmt.Sprintf("IC %.6g A, IB %.6g A, VBE %.6g V, VCE %.6g V, %s", b.IC, b.IB, b.VBE, b.VCE, b.Region)
}
