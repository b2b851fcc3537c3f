package crosscheck

// The reference small-signal analysis: FORMAT.md §6 written a second time.
// Every question is answered by building the complex admittance matrix of the
// circuit as it stands for that question (parts removed, port in or out) and
// solving it afresh as the real system [[G, −B], [B, G]]·[vr; vi] = [ir; ii],
// with one step of iterative refinement. Nothing is cached or reused between
// questions; that is slow and simple, which is the point.

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"

	"headroom/checker/circuit"
)

// refAC is the reference small-signal result.
type refAC struct {
	Freq     [3]float64
	Zin      [3]complex128
	RL       [3]float64
	GainDB   [3]*float64
	VGainDB  [3]*float64
	HasInput bool
	HasGain  bool
	React    map[string]float64 // capacitor, inductor: at the lowest band frequency
	CircZ    map[string]float64 // |Z| seen by the part with it removed
	WReact   map[string]map[string]float64
	WTerm    map[string]map[string]float64
	GM       map[string]float64
	Rpi      map[string]float64
	Cpi      map[string]float64
	Cmu      map[string]float64
	BetaHigh map[string]float64
}

// acModel is the circuit's AC form, ready to be stamped at any frequency.
type acModel struct {
	c     *circuit.Circuit
	index map[string]int // net → row; −1 for an AC ground (gnd, zero-impedance supply)
	n     int
	gm    map[string]float64
	cpi   map[string]float64
}

// admittance is a complex matrix and a right-hand side under construction.
type admittance struct {
	m   *acModel
	y   [][]complex128
	rhs []complex128
}

func (m *acModel) newAdmittance() *admittance {
	a := &admittance{m: m, y: make([][]complex128, m.n), rhs: make([]complex128, m.n)}
	for i := range a.y {
		a.y[i] = make([]complex128, m.n)
	}
	return a
}

// branch stamps admittance y between nets p and q.
func (a *admittance) branch(p, q string, y complex128) {
	i, j := a.m.index[p], a.m.index[q]
	if i >= 0 {
		a.y[i][i] += y
	}
	if j >= 0 {
		a.y[j][j] += y
	}
	if i >= 0 && j >= 0 {
		a.y[i][j] -= y
		a.y[j][i] -= y
	}
}

// entry adds y to row net r, column net k (a controlled source or coupling).
func (a *admittance) entry(r, k string, y complex128) {
	i, j := a.m.index[r], a.m.index[k]
	if i >= 0 && j >= 0 {
		a.y[i][j] += y
	}
}

// source drives current i into net p.
func (a *admittance) source(p string, i complex128) {
	if k := a.m.index[p]; k >= 0 {
		a.rhs[k] += i
	}
}

// solve returns every net's voltage (0 at AC grounds).
func (a *admittance) solve() (map[string]complex128, error) {
	n := a.m.n
	v := map[string]complex128{}
	for net, i := range a.m.index {
		if i < 0 {
			v[net] = 0
		}
	}
	if n == 0 {
		return v, nil
	}
	big := mat.NewDense(2*n, 2*n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			g, b := real(a.y[i][j]), imag(a.y[i][j])
			big.Set(i, j, g)
			big.Set(i, j+n, -b)
			big.Set(i+n, j, b)
			big.Set(i+n, j+n, g)
		}
	}
	var lu mat.LU
	lu.Factorize(big)
	rhs := mat.NewVecDense(2*n, nil)
	for i := 0; i < n; i++ {
		rhs.SetVec(i, real(a.rhs[i]))
		rhs.SetVec(i+n, imag(a.rhs[i]))
	}
	x := mat.NewVecDense(2*n, nil)
	if err := lu.SolveVecTo(x, false, rhs); err != nil {
		if c, ok := err.(mat.Condition); ok && math.IsInf(float64(c), 1) {
			return nil, fmt.Errorf("singular admittance matrix")
		}
	}
	// One step of iterative refinement, the residual taken in complex form.
	xc := make([]complex128, n)
	for i := range xc {
		xc[i] = complex(x.AtVec(i), x.AtVec(i+n))
	}
	res := mat.NewVecDense(2*n, nil)
	for i := 0; i < n; i++ {
		r := a.rhs[i]
		for j := 0; j < n; j++ {
			r -= a.y[i][j] * xc[j]
		}
		res.SetVec(i, real(r))
		res.SetVec(i+n, imag(r))
	}
	dx := mat.NewVecDense(2*n, nil)
	_ = lu.SolveVecTo(dx, false, res)
	for i := range xc {
		xc[i] += complex(dx.AtVec(i), dx.AtVec(i+n))
	}
	for net, i := range a.m.index {
		if i >= 0 {
			v[net] = xc[i]
		}
	}
	return v, nil
}

// newACModel takes the hybrid-π figures from the reference operating point.
func newACModel(c *circuit.Circuit, op *refOP) *acModel { return newACModelGm(c, op, false) }

// newACModelGm is newACModel; with gmOfMagnitude, a transistor conducting in
// reverse gets gm = |IC|/VT instead of FORMAT.md §6's 0 — ac's present
// convention (TestBugGmOfReverseConductingTransistor), used only to keep
// checking the rest of ac on such circuits until that is settled.
func newACModelGm(c *circuit.Circuit, op *refOP, gmOfMagnitude bool) *acModel {
	m := &acModel{c: c, index: map[string]int{}, gm: map[string]float64{}, cpi: map[string]float64{}}
	ground := map[string]bool{circuit.Gnd: true}
	for _, s := range c.Supplies {
		if s.Impedance == 0 {
			ground[s.Net] = true
		}
	}
	m.index[circuit.Gnd] = -1
	for _, net := range c.Nets() {
		if ground[net] {
			m.index[net] = -1
			continue
		}
		m.index[net] = m.n
		m.n++
	}
	// The internal base b' of a transistor with rb > 0 is a node like any
	// net (with its 1e-12 S to gnd).
	for _, p := range c.Parts {
		if p.Kind.IsBJT() && p.BJT.RB > 0 {
			m.index[innerNet(p.Ref)] = m.n
			m.n++
		}
	}
	for _, p := range c.Parts {
		if !p.Kind.IsBJT() {
			continue
		}
		gm := 0.0
		if b := op.BJT[p.Ref]; b != nil && b.ICf > 0 {
			gm = b.ICf / op.VT
		} else if b != nil && gmOfMagnitude {
			gm = math.Abs(b.ICf) / op.VT
		}
		m.gm[p.Ref] = gm
		m.cpi[p.Ref] = math.Max(gm/(2*math.Pi*p.BJT.FT)-p.BJT.Cob, 0)
	}
	return m
}

// stamp builds the network at f without the parts in removed; the in port is
// RS to gnd when withIn.
func (m *acModel) stamp(f float64, removed map[string]bool, withIn bool) *admittance {
	w := 2 * math.Pi * f
	a := m.newAdmittance()
	for net := range m.index {
		if net != circuit.Gnd {
			a.branch(net, circuit.Gnd, gminNet)
		}
	}
	for _, s := range m.c.Supplies {
		if s.Impedance > 0 {
			a.branch(s.Net, circuit.Gnd, complex(1/s.Impedance, 0))
		}
	}
	for _, pt := range m.c.Ports {
		if pt.Direction == "in" && !withIn {
			continue
		}
		a.branch(pt.Net, circuit.Gnd, complex(1/pt.Impedance, 0))
	}
	for _, p := range m.c.Parts {
		if removed[p.Ref] {
			continue
		}
		switch p.Kind {
		case circuit.Resistor:
			a.branch(p.Nets[0], p.Nets[1], complex(1/p.Value, 0))
		case circuit.Potentiometer:
			ra, rb := potSections(p)
			a.branch(p.Nets[0], p.Nets[1], complex(1/ra, 0))
			a.branch(p.Nets[1], p.Nets[2], complex(1/rb, 0))
		case circuit.Capacitor:
			a.branch(p.Nets[0], p.Nets[1], complex(0, w*p.Value))
		case circuit.Inductor:
			a.branch(p.Nets[0], p.Nets[1], 1/complex(p.Resistance, w*p.Inductance()))
		case circuit.Transformer:
			stampTransformer(a, p, w)
		case circuit.NPN, circuit.PNP:
			c, b, e := p.Nets[0], p.Nets[1], p.Nets[2]
			if rb := p.BJT.RB; rb > 0 { // rb from the base pin to b', the rest from b'
				a.branch(b, innerNet(p.Ref), complex(1/rb, 0))
				b = innerNet(p.Ref)
			}
			gm := m.gm[p.Ref]
			ypi := complex(0, w*m.cpi[p.Ref])
			if gm > 0 {
				ypi += complex(gm/p.BJT.NominalHFE(), 0)
			}
			a.branch(b, e, ypi)
			a.branch(b, c, complex(0, w*p.BJT.Cob))
			// gm·(vb − ve) flows into the collector and out of the emitter.
			g := complex(gm, 0)
			a.entry(c, b, g)
			a.entry(c, e, -g)
			a.entry(e, b, -g)
			a.entry(e, e, g)
		}
	}
	return a
}

// stampTransformer adds the windings as the inverse of their impedance matrix
// Z = R + jωL, Lij = k·√(Li·Lj) off the diagonal, every dot at the first net.
func stampTransformer(a *admittance, p *circuit.Part, w float64) {
	y := invertComplex(windingZ(p, w))
	// Winding i carries Ii = Σj Yij·(V(aj) − V(bj)) from ai to bi.
	for i, wi := range p.Windings {
		for j, wj := range p.Windings {
			a.entry(wi.Nets[0], wj.Nets[0], y[i][j])
			a.entry(wi.Nets[0], wj.Nets[1], -y[i][j])
			a.entry(wi.Nets[1], wj.Nets[0], -y[i][j])
			a.entry(wi.Nets[1], wj.Nets[1], y[i][j])
		}
	}
}

// windingZ is a transformer's winding impedance matrix Z = R + jωL,
// Lij = k·√(Li·Lj) off the diagonal.
func windingZ(p *circuit.Part, w float64) [][]complex128 {
	nw := len(p.Windings)
	z := make([][]complex128, nw)
	for i, wi := range p.Windings {
		z[i] = make([]complex128, nw)
		li := p.AL * wi.Turns * wi.Turns
		for j, wj := range p.Windings {
			lj := p.AL * wj.Turns * wj.Turns
			if i == j {
				z[i][j] = complex(wi.Resistance, w*li)
			} else {
				z[i][j] = complex(0, w*p.Coupling*math.Sqrt(li*lj))
			}
		}
	}
	return z
}

// invertComplex inverts a small complex matrix by Gauss–Jordan elimination
// with partial pivoting.
func invertComplex(z [][]complex128) [][]complex128 {
	n := len(z)
	a := make([][]complex128, n)
	for i := range a {
		a[i] = make([]complex128, 2*n)
		copy(a[i], z[i])
		a[i][n+i] = 1
	}
	for col := 0; col < n; col++ {
		piv := col
		for r := col + 1; r < n; r++ {
			if cmplx.Abs(a[r][col]) > cmplx.Abs(a[piv][col]) {
				piv = r
			}
		}
		a[col], a[piv] = a[piv], a[col]
		d := a[col][col]
		for k := range a[col] {
			a[col][k] /= d
		}
		for r := 0; r < n; r++ {
			if r == col || a[r][col] == 0 {
				continue
			}
			f := a[r][col]
			for k := range a[r] {
				a[r][k] -= f * a[col][k]
			}
		}
	}
	out := make([][]complex128, n)
	for i := range out {
		out[i] = a[i][n:]
	}
	return out
}

// impedance drives 1 A from net p to net q at f with the parts in removed
// taken out (in port as RS to gnd) and reads V(p) − V(q).
func (m *acModel) impedance(f float64, p, q string, removed ...string) (complex128, error) {
	rm := map[string]bool{}
	for _, r := range removed {
		rm[r] = true
	}
	a := m.stamp(f, rm, true)
	a.source(p, 1)
	a.source(q, -1)
	v, err := a.solve()
	if err != nil {
		return 0, err
	}
	return v[p] - v[q], nil
}

const maxRL = 99 // dB, FORMAT.md §5: return loss capped at 99 dB

// refAnalyze runs the reference small-signal analysis at op.
func refAnalyze(c *circuit.Circuit, op *refOP) (*refAC, error) {
	return refAnalyzeGm(c, op, false)
}

// refAnalyzeGm is refAnalyze with the gm convention of newACModelGm.
func refAnalyzeGm(c *circuit.Circuit, op *refOP, gmOfMagnitude bool) (*refAC, error) {
	m := newACModelGm(c, op, gmOfMagnitude)
	lo, hi := c.Band[0], c.Band[1]
	r := &refAC{
		Freq:  [3]float64{lo, math.Sqrt(lo * hi), hi},
		React: map[string]float64{}, CircZ: map[string]float64{},
		WReact: map[string]map[string]float64{}, WTerm: map[string]map[string]float64{},
		GM: map[string]float64{}, Rpi: map[string]float64{}, Cpi: map[string]float64{},
		Cmu: map[string]float64{}, BetaHigh: map[string]float64{},
	}
	w := 2 * math.Pi * lo
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Capacitor, circuit.Inductor:
			if p.Kind == circuit.Capacitor {
				r.React[p.Ref] = 1 / (w * p.Value)
			} else {
				r.React[p.Ref] = w * p.Inductance()
			}
			z, err := m.impedance(lo, p.Nets[0], p.Nets[1], p.Ref)
			if err != nil {
				return nil, err
			}
			r.CircZ[p.Ref] = cmplx.Abs(z)
		case circuit.Transformer:
			r.WReact[p.Ref] = map[string]float64{}
			r.WTerm[p.Ref] = map[string]float64{}
			for _, wd := range p.Windings {
				r.WReact[p.Ref][wd.Name] = w * p.AL * wd.Turns * wd.Turns
				z, err := m.impedance(lo, wd.Nets[0], wd.Nets[1], p.Ref)
				if err != nil {
					return nil, err
				}
				r.WTerm[p.Ref][wd.Name] = cmplx.Abs(z)
			}
		case circuit.NPN, circuit.PNP:
			gm := m.gm[p.Ref]
			r.GM[p.Ref] = gm
			if gm > 0 {
				r.Rpi[p.Ref] = p.BJT.NominalHFE() / gm
			}
			r.Cpi[p.Ref] = m.cpi[p.Ref]
			r.Cmu[p.Ref] = p.BJT.Cob
			r.BetaHigh[p.Ref] = p.BJT.FT / hi
		}
	}
	in, out := c.InPort(), c.OutPort()
	nIn, nOut := 0, 0
	for _, pt := range c.Ports {
		switch pt.Direction {
		case "in":
			nIn++
		case "out":
			nOut++
		}
	}
	r.HasInput = in != nil
	r.HasGain = nIn == 1 && nOut == 1
	for k, f := range r.Freq {
		if in == nil {
			continue
		}
		// Input impedance: 1 A into the in net, the in port taken out.
		a := m.stamp(f, nil, false)
		a.source(in.Net, 1)
		v, err := a.solve()
		if err != nil {
			return nil, err
		}
		zin := v[in.Net]
		r.Zin[k] = zin
		gamma := cmplx.Abs((zin - complex(in.Impedance, 0)) / (zin + complex(in.Impedance, 0)))
		rl := -20 * math.Log10(gamma)
		r.RL[k] = math.Max(-maxRL, math.Min(maxRL, rl))
		if !r.HasGain {
			continue
		}
		// Gains: EMF E = 1 V behind RS, as a Norton source E/RS into the in net.
		a = m.stamp(f, nil, true)
		a.source(in.Net, complex(1/in.Impedance, 0))
		v, err = a.solve()
		if err != nil {
			return nil, err
		}
		vout, vin := cmplx.Abs(v[out.Net]), cmplx.Abs(v[in.Net])
		if vout > 0 {
			g := 10 * math.Log10((vout*vout/out.Impedance)/(1/(4*in.Impedance)))
			r.GainDB[k] = &g
			if vin > 0 {
				vg := 20 * math.Log10(vout/vin)
				r.VGainDB[k] = &vg
			}
		}
	}
	return r, nil
}
