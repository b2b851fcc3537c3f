package dc

import (
	"fmt"
	"math"
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
	o := s.newton(1, 0, maxNewton, true)
	method := "newton"
	if o == diverged {
		method = "gmin-stepping"
		o = s.gminStepping()
	}
	if o == diverged {
		method = "source-stepping"
		o = s.sourceStepping()
	}
	switch o {
	case singular:
		return nil, s.singularFailure()
	case diverged:
		return nil, s.convergenceFailure()
	}
	return nl.result(c, s.x, s.iters, method)
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
		f.Part, f.Parts = owner, []string{owner}
	}
	return f
}

func (s *solver) convergenceFailure() *Failure {
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
	if len(refs) > 0 {
		f.Part = refs[0]
		f.Reason = "no DC operating point found (Newton, gmin stepping and source stepping all failed): " +
			"the junctions of " + strings.Join(refs, ", ") + " did not settle"
	} else {
		f.Reason = "no DC operating point found (Newton, gmin stepping and source stepping all failed)"
	}
	return f
}

// result evaluates every part at the solution x.
func (nl *netlist) result(c *circuit.Circuit, x []float64, iters int, method string) (*Result, error) {
	r := &Result{
		TempC:         nl.tempC,
		VT:            nl.vt,
		V:             make(map[string]float64, nl.nodes+1),
		Parts:         make(map[string]*Part, len(c.Parts)),
		BJTs:          make(map[string]*BJT, len(nl.bjts)),
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
	r.V[circuit.Gnd] = 0
	for i, name := range nl.names {
		r.V[name] = x[i]
	}
	branch := 0 // sources were compiled in the order walked below
	for _, s := range c.Supplies {
		if s == nil {
			continue
		}
		if s.Impedance == 0 {
			r.SupplyCurrent[s.Net] = -x[nl.sources[branch].row]
			branch++
		} else {
			r.SupplyCurrent[s.Net] = (s.Volts - v(s.Net)) / s.Impedance
		}
	}
	dcr := func(a, b string, res float64) float64 {
		if res > 0 {
			return (v(a) - v(b)) / res
		}
		i := x[nl.sources[branch].row]
		branch++
		return i
	}
	k := 0 // transistors in compile order
	for _, p := range c.Parts {
		if p == nil {
			continue
		}
		switch p.Kind {
		case circuit.Resistor:
			vab := v(p.Nets[0]) - v(p.Nets[1])
			r.Parts[p.Ref] = &Part{Current: vab / p.Value, Power: vab * vab / p.Value}
		case circuit.Capacitor:
			r.Parts[p.Ref] = &Part{Voltage: math.Abs(v(p.Nets[0]) - v(p.Nets[1]))}
		case circuit.Inductor:
			r.Parts[p.Ref] = &Part{Current: dcr(p.Nets[0], p.Nets[1], p.Resistance)}
		case circuit.Transformer:
			w := make(map[string]float64, len(p.Windings))
			for _, wd := range p.Windings {
				if wd != nil {
					w[wd.Name] = dcr(wd.Nets[0], wd.Nets[1], wd.Resistance)
				}
			}
			r.Parts[p.Ref] = &Part{Windings: w}
		case circuit.Potentiometer:
			ra, rb, _ := potSections(p)
			va, vw, vb := v(p.Nets[0]), v(p.Nets[1]), v(p.Nets[2])
			sa := Section{R: ra, Current: (va - vw) / ra, Power: (va - vw) * (va - vw) / ra}
			sb := Section{R: rb, Current: (vw - vb) / rb, Power: (vw - vb) * (vw - vb) / rb}
			r.Parts[p.Ref] = &Part{Power: sa.Power + sb.Power, Sections: [2]Section{sa, sb}}
		case circuit.NPN, circuit.PNP:
			q := &nl.bjts[k]
			k++
			r.BJTs[p.Ref] = q.operatingPoint(volt(x, q.c), volt(x, q.b), volt(x, q.e), nl.vt)
		}
	}
	if bad := r.firstNonFinite(); bad != "" {
		return nil, &Failure{Cause: NoConvergence, Reason: "the operating point overflowed at " + bad, Part: bad}
	}
	return r, nil
}

// operatingPoint evaluates the model at the solved terminal voltages.
func (q *bjt) operatingPoint(vc, vb, ve, vt float64) *BJT {
	vbe := q.pol * (vb - ve)
	vbc := q.pol * (vb - vc)
	p := q.eval(vbe, vbc, vt)
	o := &BJT{
		ICf: p.ic, IBf: p.ib, VBEf: vbe, VCEf: vbe - vbc,
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
