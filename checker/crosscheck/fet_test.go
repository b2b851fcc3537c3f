package crosscheck

// The FET cross-check: docs/fet.md written a second time, on purpose in a
// different formulation from checker/dc and checker/ac, and compared with
// them on seeded random FET stages.
//
//   - The channel is written from the sheet's signed form (VP negative for
//     an n-channel part): ID = IDSS(1 − VGS/VP)² and
//     IDSS[2(1 − VGS/VP)(VDS/−VP) − (VDS/VP)²], drain and source exchanged
//     for VDS < 0; a p-channel part by mirroring every terminal voltage.
//   - A dual gate's internal node is an ordinary unknown of the nodal
//     system (checker/dc solves it inside the device).
//   - Every Jacobian, DC and small-signal, is taken by central finite
//     differences of the currents, never from written-out derivatives.
//   - The AC system keeps the internal node too, and is solved directly
//     with the source and load in place.

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
)

const fetGateIS = 1e-14 // A, docs/fet.md

// sheetChannel is the channel current drain→source of an n-channel part in
// the sheet's form, vp < 0.
func sheetChannel(idss, vp, vgs, vds float64) float64 {
	if vds < 0 {
		return -sheetChannel(idss, vp, vgs-vds, -vds)
	}
	if vgs <= vp {
		return 0
	}
	u := 1 - vgs/vp
	if vds >= vgs-vp {
		return idss * u * u
	}
	return idss * (2*u*(vds/-vp) - (vds/vp)*(vds/vp))
}

// refFETNet is the reference's nodal system of one FET circuit: the free
// nets and each dual gate's internal node are the unknowns.
type refFETNet struct {
	c     *circuit.Circuit
	nodes []string // unknown nets (free), then one internal node per dual gate
	index map[string]int
	fixed map[string]float64
	vt    float64
}

func newRefFETNet(c *circuit.Circuit) *refFETNet {
	n := &refFETNet{c: c, index: map[string]int{}, fixed: map[string]float64{circuit.Gnd: 0},
		vt: thermalVoltage(c.Ambient.Nominal)}
	for _, s := range c.Supplies {
		if s.Impedance == 0 {
			n.fixed[s.Net] = s.Volts
		}
	}
	for _, net := range c.Nets() {
		if _, ok := n.fixed[net]; !ok {
			n.index[net] = len(n.nodes)
			n.nodes = append(n.nodes, net)
		}
	}
	for _, p := range c.Parts {
		if p.Kind == circuit.DualGateMOSFET {
			name := p.Ref + "#mid"
			n.index[name] = len(n.nodes)
			n.nodes = append(n.nodes, name)
		}
	}
	return n
}

func (n *refFETNet) v(x []float64, net string) float64 {
	if i, ok := n.index[net]; ok {
		return x[i]
	}
	return n.fixed[net]
}

// fetCurrents gives the currents into a FET's terminals (drain, gate, source,
// gate 2, and a dual gate's internal node as half 1's drain) at x.
func (n *refFETNet) fetCurrents(p *circuit.Part, x []float64) map[string]float64 {
	f := p.FET
	vp := -f.VP
	s := 1.0
	if p.Kind == circuit.PJFET {
		s = -1
	}
	d, g, src := p.Nets[0], p.Nets[1], p.Nets[2]
	vd, vg, vs := s*n.v(x, d), s*n.v(x, g), s*n.v(x, src)
	out := map[string]float64{}
	add := func(net string, i float64) { out[net] += s * i }
	if p.Kind == circuit.DualGateMOSFET {
		m := p.Ref + "#mid"
		vm, vg2 := n.v(x, m), n.v(x, p.Nets[3])
		i1 := sheetChannel(f.IDSS, vp, vg-vs, vm-vs)
		i2 := sheetChannel(f.IDSS, vp, vg2-vm, vd-vm)
		add(m, i1-i2)
		add(src, -i1)
		add(d, i2)
		return out
	}
	ich := sheetChannel(f.IDSS, vp, vg-vs, vd-vs)
	e := func(v float64) float64 { x, _ := expLim(v / n.vt); return fetGateIS * (x - 1) }
	igs, igd := e(vg-vs), e(vg-vd)
	add(d, ich-igd)
	add(g, igs+igd)
	add(src, -ich-igs)
	return out
}

// residual is the current leaving every unknown node at x.
func (n *refFETNet) residual(x []float64) []float64 {
	f := make([]float64, len(n.nodes))
	leave := func(net string, i float64) {
		if k, ok := n.index[net]; ok {
			f[k] += i
		}
	}
	for _, net := range n.c.Nets() {
		leave(net, gminNet*n.v(x, net))
	}
	// A dual gate's internal node floats when both halves are cut off: the
	// reference holds it with gmin to gnd (checker/dc picks a point inside
	// the interval; the currents are zero either way).
	for _, p := range n.c.Parts {
		if p.Kind == circuit.DualGateMOSFET {
			leave(p.Ref+"#mid", gminNet*n.v(x, p.Ref+"#mid"))
		}
	}
	for _, s := range n.c.Supplies {
		if s.Impedance > 0 {
			leave(s.Net, (n.v(x, s.Net)-s.Volts)/s.Impedance)
		}
	}
	for _, pt := range n.c.Ports {
		leave(pt.Net, n.v(x, pt.Net)/pt.Impedance)
	}
	for _, p := range n.c.Parts {
		switch p.Kind {
		case circuit.Resistor:
			i := (n.v(x, p.Nets[0]) - n.v(x, p.Nets[1])) / p.Value
			leave(p.Nets[0], i)
			leave(p.Nets[1], -i)
		case circuit.Inductor:
			i := (n.v(x, p.Nets[0]) - n.v(x, p.Nets[1])) / p.Resistance
			leave(p.Nets[0], i)
			leave(p.Nets[1], -i)
		case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
			for net, i := range n.fetCurrents(p, x) {
				leave(net, i)
			}
		}
	}
	return f
}

// solve is damped Newton with a finite-difference Jacobian, then a supply
// ramp when that fails.
func (n *refFETNet) solve() ([]float64, error) {
	x := make([]float64, len(n.nodes))
	if n.newton(x, 1, 400) {
		return x, nil
	}
	x = make([]float64, len(n.nodes))
	orig := make([]float64, len(n.c.Supplies))
	for i, s := range n.c.Supplies {
		orig[i] = s.Volts
	}
	defer n.scaleSupplies(orig, 1)
	for k := 1; k <= 50; k++ {
		n.scaleSupplies(orig, float64(k)/50)
		if !n.newton(x, 1, 200) {
			return nil, fmt.Errorf("reference: no convergence at %d/50 of the supplies", k)
		}
	}
	return x, nil
}

// scaleSupplies sets every supply to k times its volts in orig.
func (n *refFETNet) scaleSupplies(orig []float64, k float64) {
	for i, s := range n.c.Supplies {
		s.Volts = orig[i] * k
		if _, ok := n.fixed[s.Net]; ok {
			n.fixed[s.Net] = s.Volts
		}
	}
}

func (n *refFETNet) newton(x []float64, _ float64, maxIter int) bool {
	m := len(x)
	if m == 0 {
		return true
	}
	norm := func(f []float64) float64 {
		s := 0.0
		for _, v := range f {
			s += v * v
		}
		return math.Sqrt(s)
	}
	for it := 0; it < maxIter; it++ {
		f := n.residual(x)
		j := mat.NewDense(m, m, nil)
		for k := range x {
			h := 1e-6 * (1 + math.Abs(x[k]))
			old := x[k]
			x[k] = old + h
			fp := n.residual(x)
			x[k] = old - h
			fm := n.residual(x)
			x[k] = old
			for r := range fp {
				j.Set(r, k, (fp[r]-fm[r])/(2*h))
			}
		}
		var dx mat.VecDense
		if err := dx.SolveVec(j, mat.NewVecDense(m, f)); err != nil {
			return false
		}
		step := 0.0
		for k := range x {
			step = math.Max(step, math.Abs(dx.AtVec(k)))
		}
		alpha := 1.0
		if step > 0.5 {
			alpha = 0.5 / step
		}
		f0 := norm(f)
		trial := make([]float64, m)
		for tries := 0; tries < 30; tries++ {
			for k := range x {
				trial[k] = x[k] - alpha*dx.AtVec(k)
			}
			if norm(n.residual(trial)) <= f0 || alpha < 1e-6 {
				break
			}
			alpha /= 2
		}
		copy(x, trial)
		if alpha*step < 1e-11 && norm(n.residual(x)) < 1e-10 {
			return true
		}
	}
	return false
}

// genFETCircuit is one random FET stage: an n- or p-channel JFET or a dual
// gate, fixed or divider gate bias, a source resistor (sometimes none,
// sometimes lifted to cut the part off), a drain resistor or choke, a 50 Ω
// source and load coupled through capacitors. The figures are invented for
// the test, in the ranges of small-signal parts.
func genFETCircuit(seed uint64) *circuit.Circuit {
	r := rand.New(rand.NewPCG(seed, 0x51ed27))
	uni := func(a, b float64) float64 { return a + (b-a)*r.Float64() }
	logU := func(a, b float64) float64 { return math.Exp(uni(math.Log(a), math.Log(b))) }
	kinds := []circuit.Kind{circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET}
	kind := kinds[r.IntN(3)]
	s := 1.0
	if kind == circuit.PJFET {
		s = -1
	}
	lo := logU(1e6, 100e6)
	amb := uni(-10, 50)
	c := &circuit.Circuit{Name: fmt.Sprintf("random FET %d", seed), Band: [2]float64{lo, lo * 1.05},
		Ambient: circuit.Ambient{Nominal: amb, Lo: amb, Hi: amb}}
	vdd := s * uni(6, 24)
	imp := 0.0
	if r.IntN(2) == 0 {
		imp = logU(0.5, 50)
	}
	c.Supplies = []*circuit.Supply{{Net: "vdd", Volts: vdd, Range: [2]float64{vdd, vdd}, Impedance: imp}}
	c.Ports = []*circuit.Port{{Name: "in", Net: "in", Direction: "in", Impedance: 50, Matched: true},
		{Name: "out", Net: "out", Direction: "out", Impedance: 50, Matched: true}}
	k := 0
	part := func(kind circuit.Kind, v float64, nets ...string) *circuit.Part {
		k++
		p := &circuit.Part{Ref: fmt.Sprintf("X%d", k), Kind: kind, Value: v, Tolerance: 0.05, Nets: nets}
		c.Parts = append(c.Parts, p)
		return p
	}
	idss := logU(2e-3, 60e-3)
	vpm := uni(0.4, 7)
	f := &circuit.FETParams{IDSSMin: idss, IDSSMax: idss, VPMin: vpm, VPMax: vpm, IDSS: idss, VP: vpm,
		VDSMax: 30, PD: 1, TjMax: 150, Ciss: logU(1e-12, 10e-12)}
	f.Crss = f.Ciss * uni(0.005, 0.4)
	if r.IntN(2) == 0 {
		f.Coss = f.Crss + logU(0.2e-12, 3e-12)
	}
	part(circuit.Capacitor, 10e-9, "in", "g")
	switch r.IntN(4) {
	case 0: // a divider lifts the gate (sometimes far enough to forward-bias a JFET's gate)
		part(circuit.Resistor, logU(10e3, 2e6), "vdd", "g")
		part(circuit.Resistor, logU(10e3, 2e6), "g", circuit.Gnd)
	default:
		part(circuit.Resistor, logU(10e3, 2e6), "g", circuit.Gnd)
	}
	srcNet := "s"
	switch r.IntN(5) {
	case 0: // source on gnd: fixed bias
		srcNet = circuit.Gnd
	case 1: // source lifted towards the supply: cut-off or near it
		part(circuit.Resistor, logU(10, 2e3), "s", circuit.Gnd)
		part(circuit.Resistor, logU(500, 20e3), "vdd", "s")
	default:
		part(circuit.Resistor, logU(10, 3e3), "s", circuit.Gnd)
		part(circuit.Capacitor, 100e-9, "s", circuit.Gnd)
	}
	if r.IntN(3) == 0 {
		l := part(circuit.Inductor, logU(1e-6, 100e-6), "vdd", "d")
		l.Resistance = logU(0.1, 20)
	} else {
		part(circuit.Resistor, logU(50, 10e3), "vdd", "d")
	}
	part(circuit.Capacitor, 10e-9, "d", "out")
	nets := []string{"d", "g", srcNet}
	if kind == circuit.DualGateMOSFET {
		part(circuit.Resistor, logU(20e3, 1e6), "vdd", "g2")
		part(circuit.Resistor, logU(20e3, 1e6), "g2", circuit.Gnd)
		part(circuit.Capacitor, 10e-9, "g2", circuit.Gnd)
		nets = append(nets, "g2")
	}
	k++
	c.Parts = append(c.Parts, &circuit.Part{Ref: "Q1", Kind: kind, Nets: nets, FET: f})
	return c
}

// TestFETAgainstReference compares dc and ac with the reference above on
// generated FET stages at 0.1 % (relTol): node voltages, ID, VGS, VDS,
// power, gm, and the band's input impedance and voltage gain.
func TestFETAgainstReference(t *testing.T) {
	ty := newTally(t)
	n := circuitCount(600, 150)
	seen := map[string]int{}
	for seed := uint64(1); seed <= uint64(n); seed++ {
		c := genFETCircuit(seed)
		got, err := dc.Solve(c)
		ref := newRefFETNet(c)
		x, rerr := ref.solve()
		if (err == nil) != (rerr == nil) {
			ty.fail("seed %d: reference error %v, dc.Solve error %v\n%s", seed, rerr, err, describe(c))
			continue
		}
		if err != nil {
			continue
		}
		where := fmt.Sprintf("fet seed %d", seed)
		q := got.FETs["Q1"]
		p := c.Parts[len(c.Parts)-1]
		seen[string(p.Kind)]++
		seen[q.Region]++
		for _, net := range c.Nets() {
			ty.cmp("fet net voltage", floorV, where+" net "+net, ref.v(x, net), got.V[net])
		}
		s := 1.0
		if p.Kind == circuit.PJFET {
			s = -1
		}
		vs := ref.v(x, p.Nets[2])
		vgs, vds := s*(ref.v(x, p.Nets[1])-vs), s*(ref.v(x, p.Nets[0])-vs)
		cur := ref.fetCurrents(p, x)
		idrain := s * cur[p.Nets[0]] // the drain terminal: channel less the gate–drain diode
		ich := idrain                // a dual gate: the channel current of its halves
		if p.Kind != circuit.DualGateMOSFET {
			ich = sheetChannel(p.FET.IDSS, -p.FET.VP, vgs, vds)
		}
		ty.cmp("fet vgs", floorV, where, vgs, q.VGS)
		ty.cmp("fet vds", floorV, where, vds, q.VDS)
		ty.cmp("fet channel current", floorI, where, ich, q.ID)
		ty.cmp("fet power", floorP, where, vds*idrain+vgs*s*cur[p.Nets[1]], q.Power)
		// gm by finite differences of the drain current with the gate moved.
		gate := p.Nets[1]
		if _, free := ref.index[gate]; free {
			gm := ref.gm(p, x)
			gres, aerr := ac.Analyze(c, got)
			if aerr != nil {
				ty.fail("%s: ac.Analyze: %v", where, aerr)
				continue
			}
			ty.cmp("fet gm", 1e-7, where, gm, gres.FETs["Q1"].GM)
			compareFETBand(ty, where, c, ref, x, gres)
		}
	}
	ty.log()
	t.Logf("features: %v", seen)
	for _, f := range []string{"njfet", "pjfet", "dual-gate-mosfet", "saturation", "triode", "cutoff"} {
		if seen[f] == 0 {
			t.Errorf("no compared circuit had: %s", f)
		}
	}
}

// gm is ∂ID/∂VGS of FET p at x (forward sense) by central finite
// differences of the drain current with the gate moved; a dual gate's
// internal node follows (re-solved alone). The gate must be a free node.
func (n *refFETNet) gm(p *circuit.Part, x []float64) float64 {
	s := 1.0
	if p.Kind == circuit.PJFET {
		s = -1
	}
	g := n.index[p.Nets[1]]
	h := 1e-5
	xp := append([]float64(nil), x...)
	xm := append([]float64(nil), x...)
	xp[g] += s * h
	xm[g] -= s * h
	if p.Kind == circuit.DualGateMOSFET {
		n.settleMid(p, xp)
		n.settleMid(p, xm)
	}
	return (s*n.fetCurrents(p, xp)[p.Nets[0]] - s*n.fetCurrents(p, xm)[p.Nets[0]]) / (2 * h)
}

// settleMid re-solves a dual gate's internal node for the other voltages in x.
func (n *refFETNet) settleMid(p *circuit.Part, x []float64) {
	k := n.index[p.Ref+"#mid"]
	for it := 0; it < 200; it++ {
		f := n.residual(x)[k]
		h := 1e-7
		x[k] += h
		fp := n.residual(x)[k]
		x[k] -= h
		d := (fp - f) / h
		if d == 0 {
			return
		}
		step := f / d
		x[k] -= step
		if math.Abs(step) < 1e-13 {
			return
		}
	}
}

// refFETAdmittance is the reference's small-signal admittance matrix of a
// FET circuit at angular frequency w, every port stamped: the FET
// linearised by finite differences of its terminal currents (internal node
// kept), its capacitances Cgs = ciss − crss, Cgd = crss, Cds = coss − crss,
// capacitors jωC, inductors R + jωL, supplies AC ground behind their
// impedance. idx is a net's row (−1 for an AC ground).
func refFETAdmittance(c *circuit.Circuit, ref *refFETNet, x []float64, w float64) ([][]complex128, func(string) int) {
	m := len(ref.nodes)
	y := make([][]complex128, m)
	for i := range y {
		y[i] = make([]complex128, m)
	}
	idx := func(net string) int {
		if i, ok := ref.index[net]; ok {
			return i
		}
		return -1
	}
	stampY := func(a, b string, v complex128) {
		ia, ib := idx(a), idx(b)
		if ia >= 0 {
			y[ia][ia] += v
		}
		if ib >= 0 {
			y[ib][ib] += v
		}
		if ia >= 0 && ib >= 0 {
			y[ia][ib] -= v
			y[ib][ia] -= v
		}
	}
	for _, net := range c.Nets() {
		stampY(net, circuit.Gnd, complex(gminNet, 0))
	}
	for _, s := range c.Supplies {
		if s.Impedance > 0 {
			stampY(s.Net, circuit.Gnd, complex(1/s.Impedance, 0))
		}
	}
	for _, pt := range c.Ports {
		stampY(pt.Net, circuit.Gnd, complex(1/pt.Impedance, 0))
	}
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Resistor:
			stampY(p.Nets[0], p.Nets[1], complex(1/p.Value, 0))
		case circuit.Capacitor:
			stampY(p.Nets[0], p.Nets[1], complex(0, w*p.Value))
		case circuit.Inductor:
			stampY(p.Nets[0], p.Nets[1], 1/complex(p.Resistance, w*p.Value))
		default:
			f := p.FET
			stampY(p.Nets[1], p.Nets[2], complex(0, w*math.Max(f.Ciss-f.Crss, 0)))
			stampY(p.Nets[1], p.Nets[0], complex(0, w*f.Crss))
			stampY(p.Nets[0], p.Nets[2], complex(0, w*math.Max(f.Coss-f.Crss, 0)))
			// conductances by finite differences of the terminal currents
			terms := append([]string{}, p.Nets...)
			if p.Kind == circuit.DualGateMOSFET {
				terms = append(terms, p.Ref+"#mid")
			}
			for _, wrt := range terms {
				j := idx(wrt)
				if j < 0 {
					continue
				}
				h := 1e-6
				xp := append([]float64(nil), x...)
				xm := append([]float64(nil), x...)
				xp[j] += h
				xm[j] -= h
				ip, im := ref.fetCurrents(p, xp), ref.fetCurrents(p, xm)
				for _, at := range terms {
					if i := idx(at); i >= 0 {
						y[i][j] += complex((ip[at]-im[at])/(2*h), 0)
					}
				}
			}
		}
	}
	return y, idx
}

// compareFETBand solves the small-signal system at the band's three
// frequencies: the FET linearised by finite differences of its terminal
// currents (internal node kept), its capacitances Cgs = ciss − crss,
// Cgd = crss, Cds = coss − crss, capacitors jωC, inductors R + jωL, supplies
// AC ground behind their impedance, the in port a 1 V source behind 50 Ω.
func compareFETBand(ty *tally, where string, c *circuit.Circuit, ref *refFETNet, x []float64, got *ac.Result) {
	for bi, bp := range got.Band {
		y, idx := refFETAdmittance(c, ref, x, 2*math.Pi*bp.Frequency)
		m := len(ref.nodes)
		// The in port's source: 1 V behind its 50 Ω (already stamped): inject 1/50 A.
		in := idx("in")
		rhs := make([]complex128, m)
		rhs[in] = complex(1/50.0, 0)
		v := solveComplex(y, rhs)
		if v == nil {
			ty.fail("%s: reference AC singular", where)
			return
		}
		vin, vout := v[in], v[idx("out")]
		// Zin looks into the circuit with the port removed: Vin/(I − Vin/RS).
		zin := vin / (complex(1/50.0, 0) - vin/50)
		ty.cmpC("fet input impedance", 1e-6, fmt.Sprintf("%s band %d", where, bi), zin, bp.InputImpedance)
		if bp.VoltageGainDB != nil && cmplx.Abs(vin) > 0 && cmplx.Abs(vout) > 1e-9*cmplx.Abs(vin) {
			ty.cmp("fet voltage gain dB", 1e-4, fmt.Sprintf("%s band %d", where, bi), 20*math.Log10(cmplx.Abs(vout/vin)), *bp.VoltageGainDB)
		}
	}
}

// solveComplex is Gaussian elimination with partial pivoting.
func solveComplex(a [][]complex128, b []complex128) []complex128 {
	n := len(b)
	m := make([][]complex128, n)
	for i := range a {
		m[i] = append(append([]complex128(nil), a[i]...), b[i])
	}
	for k := 0; k < n; k++ {
		p := k
		for i := k + 1; i < n; i++ {
			if cmplx.Abs(m[i][k]) > cmplx.Abs(m[p][k]) {
				p = i
			}
		}
		if m[p][k] == 0 {
			return nil
		}
		m[k], m[p] = m[p], m[k]
		for i := k + 1; i < n; i++ {
			f := m[i][k] / m[k][k]
			for j := k; j <= n; j++ {
				m[i][j] -= f * m[k][j]
			}
		}
	}
	x := make([]complex128, n)
	for i := n - 1; i >= 0; i-- {
		s := m[i][n]
		for j := i + 1; j < n; j++ {
			s -= m[i][j] * x[j]
		}
		x[i] = s / m[i][i]
	}
	return x
}
