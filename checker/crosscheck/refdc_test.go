package crosscheck

// The reference DC operating point: FORMAT.md §6 written a second time, on
// purpose in a different formulation from checker/dc.
//
//   - Every zero-resistance inductor or winding is removed by merging its two
//     nets (union-find); a zero-impedance supply fixes its merged group's
//     voltage, gnd fixes its group at 0. The unknowns are the voltages of the
//     remaining free groups, and the equations are plain KCL (no branch
//     currents). The current in a merged element is recovered afterwards by
//     walking its tree of merged nets from the leaves (the elements that merge
//     a group form a forest, otherwise there is a zero-resistance loop).
//   - Newton on the group voltages, the step scaled as a whole so that no
//     forward-biased junction rises by more than VT·ln(1 + Δ/VT) beyond the
//     larger of its old value and its critical voltage. When that fails, a
//     shunt from every group to gnd is stepped down decade by decade, and
//     after that the supplies are ramped up from zero.
//   - A transistor with a base spreading resistance rb > 0 gets an internal
//     base b' of its own, a net like any other (it has 1e-12 S to gnd too):
//     rb is a resistor from the base pin to b', and the junctions sit
//     between b', the collector and the emitter. VBE is reported between the
//     pins, the junction's own as VBJf.

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"headroom/checker/circuit"
)

// Exact SI constants (SI Brochure, 9th edition, 2019: the defining constants).
const (
	boltzmann  = 1.380649e-23    // J/K
	charge     = 1.602176634e-19 // C
	kelvinAt0C = 273.15          // K, 0 °C (SI Brochure, definition of the degree Celsius)

	gminNet  = 1e-12 // S from every net to gnd (FORMAT.md §6)
	minSect  = 1e-3  // Ω, least potentiometer section (FORMAT.md §6)
	betaRev  = 1.0   // βR (FORMAT.md §6)
	expLinAt = 80.0  // exponent beyond which e^u is continued linearly while iterating
)

// refOP is the reference operating point.
type refOP struct {
	TempC  float64
	VT     float64
	V      map[string]float64            // every net, gnd included
	Cur    map[string]float64            // resistor, inductor: from Nets[0] to Nets[1]
	Wind   map[string]map[string]float64 // transformer → winding → current, first net to second
	Power  map[string]float64            // resistor, potentiometer (total)
	Sect   map[string][2]float64         // potentiometer section currents [a→wiper, wiper→b]
	CapV   map[string]float64            // capacitor |ΔV|
	Supply map[string]float64            // current each supply delivers out of its net
	BJT    map[string]*refBJT
	Method string
	Iter   int
}

// refBJT holds a transistor's state in its forward sense (all positive for a
// forward-active stage of either polarity).
type refBJT struct {
	ICf, IBf, VBEf, VCEf float64
	VBJf                 float64 // VBE at the junction: from b' (behind rb) to the emitter
	IS, BF               float64
	Region               string
}

func (b *refBJT) power() float64 { return b.VCEf*b.ICf + b.VBEf*b.IBf }

// thermalVoltage is k·T/q.
func thermalVoltage(tempC float64) float64 { return boltzmann * (tempC + kelvinAt0C) / charge }

// satCurrent is IS = ic_ref / e^(VBEref/VT), VBEref = vbe − 2 mV/°C·(T − 25).
func satCurrent(p *circuit.BJTParams, tempC float64) float64 {
	vt := thermalVoltage(tempC)
	return p.ICRef / math.Exp((p.VBE-0.002*(tempC-25))/vt)
}

// expLim is e^u, continued along its tangent above expLinAt so that a wild
// Newton iterate cannot overflow. At a converged point u is far below it.
func expLim(u float64) (val, deriv float64) {
	if u <= expLinAt {
		e := math.Exp(u)
		return e, e
	}
	e := math.Exp(expLinAt)
	return e * (1 + u - expLinAt), e
}

// conductance is a linear element between two nets (b may be gnd).
type conductance struct {
	a, b string
	g    float64
}

// mergeEdge is a zero-resistance inductor or winding.
type mergeEdge struct {
	ref, winding string
	a, b         string
}

type dcBJT struct {
	ref        string
	sign       float64 // +1 NPN, −1 PNP
	c, b, e    string  // the junctions' nets: b is the internal base when rb > 0
	pin        string  // the base pin's net
	rb         float64 // Ω
	is, bf, vt float64
}

// eval returns the forward-sense currents and their derivatives with respect
// to the forward-sense junction voltages vbe and vbc.
func (q *dcBJT) eval(vbe, vbc float64) (icf, ibf, dicVbe, dicVbc, dibVbe, dibVbc float64) {
	ef, def := expLim(vbe / q.vt)
	er, der := expLim(vbc / q.vt)
	icf = q.is*(ef-er) - q.is/betaRev*(er-1)
	ibf = q.is/q.bf*(ef-1) + q.is/betaRev*(er-1)
	dicVbe = q.is * def / q.vt
	dicVbc = -q.is*der/q.vt - q.is/betaRev*der/q.vt
	dibVbe = q.is / q.bf * def / q.vt
	dibVbc = q.is / betaRev * der / q.vt
	return
}

// dcNet is the compiled DC network.
type dcNet struct {
	nets    []string
	parent  map[string]string // union-find
	group   map[string]int    // net → unknown index, −1 when fixed
	fixed   map[string]float64
	nFree   int
	conds   []conductance
	inject  map[string]float64 // current source into a net (supplies behind impedance), A
	bjts    []*dcBJT
	edges   []mergeEdge
	vt      float64
	gshunt  float64 // continuation shunt per free group, S
	srcFrac float64 // continuation supply scale
}

func (n *dcNet) find(x string) string {
	for n.parent[x] != x {
		n.parent[x] = n.parent[n.parent[x]]
		x = n.parent[x]
	}
	return x
}

type refFailure struct{ reason string }

func (f *refFailure) Error() string { return f.reason }

// compileDC builds the merged nodal network of c.
func compileDC(c *circuit.Circuit) (*dcNet, error) {
	n := &dcNet{
		parent: map[string]string{},
		group:  map[string]int{},
		fixed:  map[string]float64{},
		inject: map[string]float64{},
		vt:     thermalVoltage(c.Ambient.Nominal),
	}
	n.nets = append([]string{circuit.Gnd}, c.Nets()...)
	for _, x := range n.nets {
		n.parent[x] = x
	}
	union := func(e mergeEdge) error {
		ra, rb := n.find(e.a), n.find(e.b)
		if ra == rb {
			return &refFailure{fmt.Sprintf("zero-resistance loop through %s%s", e.ref, e.winding)}
		}
		n.parent[ra] = rb
		n.edges = append(n.edges, e)
		return nil
	}
	addR := func(a, b string, r float64) {
		if r <= 0 || math.IsNaN(r) || math.IsInf(r, 0) {
			panic(fmt.Sprintf("bad resistance %g", r))
		}
		n.conds = append(n.conds, conductance{a, b, 1 / r})
	}
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Resistor:
			addR(p.Nets[0], p.Nets[1], p.Value)
		case circuit.Potentiometer:
			ra, rb := potSections(p)
			addR(p.Nets[0], p.Nets[1], ra)
			addR(p.Nets[1], p.Nets[2], rb)
		case circuit.Inductor:
			if p.Resistance == 0 {
				if err := union(mergeEdge{ref: p.Ref, a: p.Nets[0], b: p.Nets[1]}); err != nil {
					return nil, err
				}
			} else {
				addR(p.Nets[0], p.Nets[1], p.Resistance)
			}
		case circuit.Transformer:
			for _, w := range p.Windings {
				if w.Resistance == 0 {
					if err := union(mergeEdge{ref: p.Ref, winding: "." + w.Name, a: w.Nets[0], b: w.Nets[1]}); err != nil {
						return nil, err
					}
				} else {
					addR(w.Nets[0], w.Nets[1], w.Resistance)
				}
			}
		case circuit.NPN, circuit.PNP:
			s := 1.0
			if p.Kind == circuit.PNP {
				s = -1
			}
			q := &dcBJT{
				ref: p.Ref, sign: s, c: p.Nets[0], b: p.Nets[1], e: p.Nets[2], pin: p.Nets[1],
				is: satCurrent(p.BJT, c.Ambient.Nominal), bf: p.BJT.NominalHFE(), vt: n.vt,
			}
			if rb := p.BJT.RB; rb > 0 {
				q.b, q.rb = innerNet(p.Ref), rb
				n.nets = append(n.nets, q.b)
				n.parent[q.b] = q.b
				addR(q.pin, q.b, rb)
			}
			n.bjts = append(n.bjts, q)
		}
	}
	for _, pt := range c.Ports {
		addR(pt.Net, circuit.Gnd, pt.Impedance)
	}
	// Fixed groups: gnd, and every zero-impedance supply.
	fixedBy := map[string]string{n.find(circuit.Gnd): "gnd"}
	n.fixed[n.find(circuit.Gnd)] = 0
	for _, s := range c.Supplies {
		if s.Impedance > 0 {
			n.conds = append(n.conds, conductance{s.Net, circuit.Gnd, 1 / s.Impedance})
			n.inject[s.Net] += s.Volts / s.Impedance
			continue
		}
		r := n.find(s.Net)
		if other, ok := fixedBy[r]; ok {
			return nil, &refFailure{fmt.Sprintf("supply %s shorted to %s", s.Net, other)}
		}
		fixedBy[r] = "supply " + s.Net
		n.fixed[r] = s.Volts
	}
	roots := map[string]int{}
	for _, x := range n.nets {
		r := n.find(x)
		if _, ok := n.fixed[r]; ok {
			n.group[x] = -1
			continue
		}
		i, ok := roots[r]
		if !ok {
			i = n.nFree
			roots[r] = i
			n.nFree++
		}
		n.group[x] = i
	}
	return n, nil
}

// innerNet names the internal base of transistor ref: no net of a circuit
// file can hold a NUL.
func innerNet(ref string) string { return "\x00" + ref + ".b'" }

// withInner adds to v, the net voltages of checker/dc's answer, the internal
// base of every transistor with rb, from the emitter and the junction's VBE
// that checker/dc reports.
func withInner(c *circuit.Circuit, v map[string]float64, vbj func(ref string) float64) map[string]float64 {
	out := make(map[string]float64, len(v))
	for k, x := range v {
		out[k] = x
	}
	for _, p := range c.Parts {
		if p.Kind.IsBJT() && p.BJT.RB > 0 {
			s := 1.0
			if p.Kind == circuit.PNP {
				s = -1
			}
			out[innerNet(p.Ref)] = v[p.Nets[2]] + s*vbj(p.Ref)
		}
	}
	return out
}

// potSections gives a potentiometer's a–wiper and wiper–b resistances.
func potSections(p *circuit.Part) (float64, float64) {
	return math.Max(p.Value*(1-p.Setting), minSect), math.Max(p.Value*p.Setting, minSect)
}

// volts gives every net's voltage for the unknowns x.
func (n *dcNet) volts(x []float64) map[string]float64 {
	v := make(map[string]float64, len(n.nets))
	for _, net := range n.nets {
		if g := n.group[net]; g >= 0 {
			v[net] = x[g]
		} else {
			v[net] = n.fixed[n.find(net)] * n.srcFrac
		}
	}
	return v
}

// system fills the KCL residual f (current leaving each free group) and its
// Jacobian at x.
func (n *dcNet) system(x []float64, f []float64, jac *mat.Dense) {
	n.kcl(x, f, nil, jac)
}

// kcl fills f with the current leaving each free group at x, mag (when not
// nil) with the sum of the magnitudes of those currents, and jac (when not
// nil) with ∂f/∂x.
func (n *dcNet) kcl(x []float64, f, mag []float64, jac *mat.Dense) {
	for i := range f {
		f[i] = 0
		if mag != nil {
			mag[i] = 0
		}
	}
	if jac != nil {
		jac.Zero()
	}
	v := n.volts(x)
	addI := func(net string, i float64) { // current leaving net
		if g := n.group[net]; g >= 0 {
			f[g] += i
			if mag != nil {
				mag[g] += math.Abs(i)
			}
		}
	}
	addJ := func(net, wrt string, d float64) {
		gi, gj := n.group[net], n.group[wrt]
		if jac != nil && gi >= 0 && gj >= 0 {
			jac.Set(gi, gj, jac.At(gi, gj)+d)
		}
	}
	for _, cd := range n.conds {
		i := cd.g * (v[cd.a] - v[cd.b])
		addI(cd.a, i)
		addI(cd.b, -i)
		addJ(cd.a, cd.a, cd.g)
		addJ(cd.a, cd.b, -cd.g)
		addJ(cd.b, cd.a, -cd.g)
		addJ(cd.b, cd.b, cd.g)
	}
	for _, net := range n.nets[1:] {
		addI(net, gminNet*v[net])
		addJ(net, net, gminNet)
	}
	for net, i := range n.inject {
		addI(net, -i*n.srcFrac)
	}
	for g := 0; g < n.nFree; g++ {
		f[g] += n.gshunt * x[g]
		if jac != nil {
			jac.Set(g, g, jac.At(g, g)+n.gshunt)
		}
	}
	for _, q := range n.bjts {
		s := q.sign
		vbe := s * (v[q.b] - v[q.e])
		vbc := s * (v[q.b] - v[q.c])
		icf, ibf, dcbe, dcbc, dbbe, dbbc := q.eval(vbe, vbc)
		// Current into each terminal (leaving its net): s·ICf, s·IBf, −s·(ICf+IBf).
		// d(s·I(vbe, vbc))/dV = s·(∂I/∂vbe·∂vbe/∂V + …) and ∂vbe/∂Vb = s: s² = 1.
		addI(q.c, s*icf)
		addI(q.b, s*ibf)
		addI(q.e, -s*(icf+ibf))
		addJ(q.c, q.b, dcbe+dcbc)
		addJ(q.c, q.e, -dcbe)
		addJ(q.c, q.c, -dcbc)
		addJ(q.b, q.b, dbbe+dbbc)
		addJ(q.b, q.e, -dbbe)
		addJ(q.b, q.c, -dbbc)
		addJ(q.e, q.b, -(dcbe + dcbc + dbbe + dbbc))
		addJ(q.e, q.e, dcbe+dbbe)
		addJ(q.e, q.c, dcbc+dbbc)
	}
}

// junctions lists every forward-sense junction voltage at x: vbe, vbc per BJT.
func (n *dcNet) junctions(x []float64) []float64 {
	v := n.volts(x)
	out := make([]float64, 0, 2*len(n.bjts))
	for _, q := range n.bjts {
		out = append(out, q.sign*(v[q.b]-v[q.e]), q.sign*(v[q.b]-v[q.c]))
	}
	return out
}

// newton iterates from x (modified in place); it reports convergence and the
// iterations used.
func (n *dcNet) newton(x []float64, maxIter int) (bool, int) {
	if n.nFree == 0 {
		return true, 0
	}
	f := make([]float64, n.nFree)
	jac := mat.NewDense(n.nFree, n.nFree, nil)
	var lu mat.LU
	dx := mat.NewVecDense(n.nFree, nil)
	trial := make([]float64, n.nFree)
	vcrit := make([]float64, 0, 2*len(n.bjts))
	for _, q := range n.bjts {
		vc := q.vt * math.Log(q.vt/(math.Sqrt2*q.is))
		vcrit = append(vcrit, vc, vc)
	}
	small := 0
	for it := 1; it <= maxIter; it++ {
		n.system(x, f, jac)
		lu.Factorize(jac)
		if err := lu.SolveVecTo(dx, false, mat.NewVecDense(n.nFree, f)); err != nil {
			if c, ok := err.(mat.Condition); ok && math.IsInf(float64(c), 1) {
				return false, it
			}
		}
		// dx solves J·dx = f; the Newton step is −dx.
		for i := range trial {
			trial[i] = x[i] - dx.AtVec(i)
		}
		alpha := 1.0
		old, nw := n.junctions(x), n.junctions(trial)
		for j := range old {
			lo := math.Max(old[j], vcrit[j])
			if nw[j] > lo && nw[j]-old[j] > 0 {
				lim := lo + n.vt*math.Log1p((nw[j]-lo)/n.vt)
				if a := (lim - old[j]) / (nw[j] - old[j]); a < alpha {
					alpha = a
				}
			}
		}
		step := 0.0
		for i := range x {
			d := -alpha * dx.AtVec(i)
			if math.IsNaN(d) || math.IsInf(d, 0) {
				return false, it
			}
			x[i] += d
			step = math.Max(step, math.Abs(d)/(1+math.Abs(x[i])))
		}
		if alpha == 1 && step < 1e-13 {
			small++
			if small >= 2 {
				return true, it
			}
		} else {
			small = 0
		}
	}
	return false, maxIter
}

// refSolveDC finds the reference operating point of c.
func refSolveDC(c *circuit.Circuit) (*refOP, error) {
	n, err := compileDC(c)
	if err != nil {
		return nil, err
	}
	x := make([]float64, n.nFree)
	method := "newton"
	n.srcFrac = 1
	ok, iters := n.newton(x, 300)
	if !ok {
		// Shunt stepping: a large conductance from every group to gnd makes
		// the network nearly linear; step it down to nothing.
		method = "shunt"
		for i := range x {
			x[i] = 0
		}
		ok = true
		for g := 1e-2; g >= 1e-13; g /= 10 {
			n.gshunt = g
			if good, _ := n.newton(x, 300); !good {
				ok = false
				break
			}
		}
		n.gshunt = 0
		if ok {
			ok, iters = n.newton(x, 300)
		}
	}
	if !ok {
		// Supply ramp, halving the step on failure.
		method = "ramp"
		for i := range x {
			x[i] = 0
		}
		frac, step := 0.0, 0.05
		ok = true
		for frac < 1 {
			next := math.Min(1, frac+step)
			n.srcFrac = next
			save := append([]float64(nil), x...)
			if good, _ := n.newton(x, 100); good {
				frac = next
				step = math.Min(step*1.5, 0.2)
				continue
			}
			copy(x, save)
			step /= 2
			if step < 1e-6 {
				ok = false
				break
			}
		}
		n.srcFrac = 1
		if ok {
			ok, iters = n.newton(x, 300)
		}
	}
	if !ok {
		return nil, &refFailure{"no convergence"}
	}
	// A junction beyond the range where the exponential is evaluated exactly
	// is the linear continuation's answer, not the model's: the model's
	// current there is astronomically large (e^80·IS), so there is no
	// operating point in the model's sense.
	for i, vj := range n.junctions(x) {
		if vj > expLinAt*n.vt {
			return nil, &refFailure{fmt.Sprintf("%s junction forced forward to %.3g V", n.bjts[i/2].ref, vj)}
		}
	}
	return n.result(c, x, method, iters), nil
}

// result derives every figure of the operating point from the group voltages.
func (n *dcNet) result(c *circuit.Circuit, x []float64, method string, iters int) *refOP {
	v := n.volts(x)
	op := &refOP{
		TempC: c.Ambient.Nominal, VT: n.vt, V: v,
		Cur: map[string]float64{}, Wind: map[string]map[string]float64{},
		Power: map[string]float64{}, Sect: map[string][2]float64{}, CapV: map[string]float64{},
		Supply: map[string]float64{}, BJT: map[string]*refBJT{},
		Method: method, Iter: iters,
	}
	// leaving[net]: current leaving the net through every element that is not
	// a merging edge and not a zero-impedance supply.
	leaving := map[string]float64{}
	for _, net := range n.nets[1:] {
		leaving[net] += gminNet * v[net]
	}
	flow := func(a, b string, i float64) { leaving[a] += i; leaving[b] -= i }
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Resistor:
			i := (v[p.Nets[0]] - v[p.Nets[1]]) / p.Value
			op.Cur[p.Ref] = i
			op.Power[p.Ref] = i * i * p.Value
			flow(p.Nets[0], p.Nets[1], i)
		case circuit.Potentiometer:
			ra, rb := potSections(p)
			ia := (v[p.Nets[0]] - v[p.Nets[1]]) / ra
			ib := (v[p.Nets[1]] - v[p.Nets[2]]) / rb
			op.Sect[p.Ref] = [2]float64{ia, ib}
			op.Power[p.Ref] = ia*ia*ra + ib*ib*rb
			flow(p.Nets[0], p.Nets[1], ia)
			flow(p.Nets[1], p.Nets[2], ib)
		case circuit.Capacitor:
			op.CapV[p.Ref] = math.Abs(v[p.Nets[0]] - v[p.Nets[1]])
		case circuit.Inductor:
			if p.Resistance > 0 {
				i := (v[p.Nets[0]] - v[p.Nets[1]]) / p.Resistance
				op.Cur[p.Ref] = i
				flow(p.Nets[0], p.Nets[1], i)
			}
		case circuit.Transformer:
			op.Wind[p.Ref] = map[string]float64{}
			for _, w := range p.Windings {
				if w.Resistance > 0 {
					i := (v[w.Nets[0]] - v[w.Nets[1]]) / w.Resistance
					op.Wind[p.Ref][w.Name] = i
					flow(w.Nets[0], w.Nets[1], i)
				}
			}
		}
	}
	for _, pt := range c.Ports {
		leaving[pt.Net] += v[pt.Net] / pt.Impedance
	}
	for _, s := range c.Supplies {
		if s.Impedance > 0 {
			i := (s.Volts - v[s.Net]) / s.Impedance
			op.Supply[s.Net] = i
			leaving[s.Net] -= i
		}
	}
	for _, q := range n.bjts {
		s := q.sign
		vbe := s * (v[q.b] - v[q.e])
		vbc := s * (v[q.b] - v[q.c])
		icf, ibf, _, _, _, _ := q.eval(vbe, vbc)
		leaving[q.c] += s * icf
		leaving[q.b] += s * ibf
		leaving[q.e] -= s * (icf + ibf)
		if q.rb > 0 {
			flow(q.pin, q.b, (v[q.pin]-v[q.b])/q.rb)
		}
		b := &refBJT{ICf: icf, IBf: ibf, VBEf: s * (v[q.pin] - v[q.e]), VCEf: vbe - vbc, VBJf: vbe, IS: q.is, BF: q.bf}
		switch {
		case icf < 1e-6:
			b.Region = "cutoff"
		case b.VCEf < 0.3:
			b.Region = "saturated"
		default:
			b.Region = "active"
		}
		op.BJT[q.ref] = b
	}
	// Merging edges: in each group they form a tree. Root it at the net that
	// can absorb current (gnd or the zero-impedance supply), else anywhere;
	// the current into a subtree through its parent edge equals everything
	// that leaves the subtree.
	zs := map[string]bool{circuit.Gnd: true}
	for _, s := range c.Supplies {
		if s.Impedance == 0 {
			zs[s.Net] = true
		}
	}
	adj := map[string][]int{}
	for i, e := range n.edges {
		adj[e.a] = append(adj[e.a], i)
		adj[e.b] = append(adj[e.b], i)
	}
	visited := map[string]bool{}
	var walk func(net string, via int) float64
	walk = func(net string, via int) float64 {
		visited[net] = true
		sum := leaving[net]
		for _, ei := range adj[net] {
			if ei == via {
				continue
			}
			e := n.edges[ei]
			child := e.a
			if child == net {
				child = e.b
			}
			sub := walk(child, ei)
			// sub flows from net into child through e.
			i := sub
			if e.a == child {
				i = -sub
			}
			if e.winding == "" {
				op.Cur[e.ref] = i
			} else {
				op.Wind[e.ref][e.winding[1:]] = i
			}
			sum += sub
		}
		return sum
	}
	ordered := append([]string{circuit.Gnd}, n.nets[1:]...)
	for _, s := range c.Supplies { // zero-impedance supplies first, as roots
		if s.Impedance == 0 {
			ordered = append([]string{s.Net}, ordered...)
		}
	}
	for _, net := range ordered {
		if visited[net] {
			continue
		}
		total := walk(net, -1)
		if zs[net] && net != circuit.Gnd {
			op.Supply[net] = total
		}
	}
	return op
}

// kclError checks that the net voltages v (another program's answer) solve
// the reference's equations: it returns the largest KCL imbalance of a free
// group relative to the currents through it (absolute below 1 pA), and the
// largest voltage difference between nets merged into one group.
func kclError(c *circuit.Circuit, v map[string]float64) (imbalance, spread float64, err error) {
	n, err := compileDC(c)
	if err != nil {
		return 0, 0, err
	}
	n.srcFrac = 1
	x := make([]float64, n.nFree)
	set := make([]bool, n.nFree)
	for _, net := range n.nets {
		g := n.group[net]
		if g < 0 {
			spread = math.Max(spread, math.Abs(v[net]-n.fixed[n.find(net)]))
			continue
		}
		if !set[g] {
			x[g], set[g] = v[net], true
		}
		spread = math.Max(spread, math.Abs(v[net]-x[g]))
	}
	f := make([]float64, n.nFree)
	mag := make([]float64, n.nFree)
	n.kcl(x, f, mag, nil)
	for g := range f {
		imbalance = math.Max(imbalance, math.Abs(f[g])/math.Max(mag[g], 1e-12))
	}
	return imbalance, spread, nil
}
