// Package poles finds the natural frequencies of a circuit linearised at its
// operating point, with its real terminations: the in port's source
// impedance, the out port's load and every other port, the supplies behind
// their impedance (a supply of zero impedance is AC ground), and Gmin from
// every node to gnd as in the band analysis. A pole with a positive real part
// is a response that grows by itself: the circuit, as terminated, oscillates.
//
// The circuit is written as the pencil (G + sC)·x = 0 in modified nodal form:
// node voltages, an internal base node b' for every transistor with rb > 0,
// and one branch current for every inductor and every transformer winding, so
// that inductance (mutual inductance included) sits in C and a winding's
// resistance in G without inverting anything. Its poles are the s where
// G + sC is singular.
//
// Method: gonum has no generalised eigensolver for a real pencil (mat offers
// Eigen for A·x = λ·x only), and C is singular (a resistor-only node has no
// capacitance), so the pencil is turned into a standard problem by a real
// shift and invert: with M = G + σ·C, A = M⁻¹·C has eigenvalues
// λ = −1/(s − σ), so s = σ − 1/λ, and the pencil's infinite eigenvalues (the
// rows without dynamics) become λ = 0 and are dropped. The shift σ is real
// and positive — a decaying circuit has no pole there, so M is regular — and
// placed at the geometric middle of the frequencies of interest, so that the
// poles from a coupling capacitor's hertz to a transistor's gigahertz are all
// resolved; s is scaled by the same angular frequency so that the matrix is
// of order one. LAPACK's dgeev (with balancing, as mat.Eigen calls it) then
// gives all the eigenvalues of the dense real A in O(n³): tens of microseconds
// for the tens of unknowns of a hand-designed stage; its storage is reused
// from solve to solve. Eigenvectors are computed only for the
// poles whose participation is asked for.
package poles

import (
	"errors"
	"fmt"
	"hash/maphash"
	"math"
	"math/cmplx"
	"slices"
	"sort"
	"sync"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/lapack64"
	"gonum.org/v1/gonum/mat"

	"headroom/checker/ac"
	"headroom/checker/circuit"
)

// minSection matches the band analysis: the smallest resistance of a
// potentiometer section, Ω.
const minSection = 1e-3

// Resolution is the damping ratio below which a pole counts as on the
// imaginary axis: the eigen-solver's rounding moves a lossless tank's poles
// by about this much, so smaller values carry no sign.
const Resolution = 1e-7

// Pole is one natural frequency s = Re + j·2π·Freq.
type Pole struct {
	S complex128 // rad/s
	// Damping is ζ = −Re s/|s|: 1 for a real decaying pole, 0 on the axis,
	// negative for a growing one; values within ±Resolution read 0.
	Damping float64
}

// Freq is the pole's frequency |Im s|/2π, Hz.
func (p Pole) Freq() float64 { return math.Abs(imag(p.S)) / (2 * math.Pi) }

// Growing reports a pole that grows: a positive real part beyond the
// solver's resolution.
func (p Pole) Growing() bool { return p.Damping < 0 }

// GrowthDBPerMicrosecond is how fast a growing pole's envelope rises:
// 20·log10(e)·Re s per µs (negative for a decaying one).
func (p Pole) GrowthDBPerMicrosecond() float64 { return 20 * math.Log10(math.E) * real(p.S) * 1e-6 }

// Result is the poles of one circuit.
type Result struct {
	// Poles holds every finite pole below MaxHz, complex pairs once each
	// (the one with Im s ≥ 0), least damped first.
	Poles []Pole
	// MaxHz is the frequency above which poles are left out: ten times the
	// top of the sweep, far past where the transistor model means anything.
	MaxHz float64

	pen *pencil
	all []complex128 // every finite pole, both of each pair, unfiltered (tests)
}

// Least returns the least-damped pole, and false when there is none.
func (r *Result) Least() (Pole, bool) {
	if len(r.Poles) == 0 {
		return Pole{}, false
	}
	return r.Poles[0], true
}

// Growing returns the growing poles, least damped (fastest growing) first.
func (r *Result) Growing() []Pole {
	var g []Pole
	for _, p := range r.Poles {
		if p.Growing() {
			g = append(g, p)
		}
	}
	return g
}

// Find computes the poles of c as linearised in res (its band analysis, which
// holds each transistor's hybrid-π figures at the operating point).
func Find(c *circuit.Circuit, res *ac.Result) (*Result, error) {
	pen, err := build(c, res)
	if err != nil {
		return nil, err
	}
	fLo, fHi := span(c)
	h := pen.hash(fLo, fHi)
	if r := solved.get(h, pen, fLo, fHi); r != nil {
		return r, nil
	}
	out, err := findPoles(pen, fLo, fHi)
	if err == nil {
		solved.put(h, out, fLo, fHi)
	}
	return out, err
}

// findPoles solves the pencil for its poles.
func findPoles(pen *pencil, fLo, fHi float64) (*Result, error) {
	out := &Result{MaxHz: 10 * fHi, pen: pen}
	if pen.n == 0 {
		return out, nil
	}
	w0 := 2 * math.Pi * math.Sqrt(fLo*fHi)
	lams, sigma, err := pen.eigenvalues(w0)
	if err != nil {
		return nil, err
	}
	out.Poles, out.all = poles(lams, sigma, w0, out.MaxHz)
	return out, nil
}

// span is the frequency range the analysis cares about: the sweep's.
func span(c *circuit.Circuit) (float64, float64) {
	lo, hi := c.Band[0]/10, 10*c.Band[1]
	for _, p := range c.Parts {
		if p.Kind.IsBJT() && p.BJT != nil && p.BJT.FT > 0 && !math.IsInf(p.BJT.FT, 0) {
			hi = math.Max(hi, 2*p.BJT.FT)
		}
	}
	return lo, hi
}

// poles turns the shifted-and-inverted eigenvalues back into poles (s in
// rad/s), drops the infinite ones and those above maxHz, keeps one of each
// conjugate pair and sorts them least damped first.
func poles(lams []complex128, sigma, w0, maxHz float64) ([]Pole, []complex128) {
	big := 0.0
	for _, l := range lams {
		big = math.Max(big, cmplx.Abs(l))
	}
	var out []Pole
	var all []complex128
	for _, l := range lams {
		// λ = 0 is an infinite pole; rounding leaves it at ε·‖A‖.
		if cmplx.Abs(l) <= 1e-12*big || big == 0 {
			continue
		}
		s := complex(w0, 0) * (complex(sigma, 0) - 1/l)
		if cmplx.IsNaN(s) || cmplx.IsInf(s) {
			continue
		}
		all = append(all, s)
		if imag(s) < 0 {
			continue
		}
		if cmplx.Abs(s) > 2*math.Pi*maxHz {
			continue
		}
		z := 0.0
		if m := cmplx.Abs(s); m > 0 {
			z = -real(s) / m
		}
		if math.Abs(z) < Resolution {
			z = 0
		}
		out = append(out, Pole{S: s, Damping: z})
	}
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].Damping != out[j].Damping {
			return out[i].Damping < out[j].Damping
		}
		return real(out[i].S) > real(out[j].S)
	})
	return out, all
}

// entry is one contribution g + s·c to row i, column j of the pencil, from
// the part owner ("" for ports, supplies, Gmin and the fixed ±1 that tie a
// branch current to its nodes).
type entry struct {
	i, j  int
	g, c  float64
	owner string
}

// pencil is the circuit as a list of entries over n unknowns.
type pencil struct {
	n       int
	entries []entry
	names   []string // each unknown, for messages and tests
	node    map[string]int
	centre  float64 // the band's geometric centre, Hz, where a Q without q_freq applies
}

const ground = -1

func (p *pencil) add(i, j int, g, c float64, owner string) {
	if i == ground || j == ground || (g == 0 && c == 0) {
		return
	}
	p.entries = append(p.entries, entry{i, j, g, c, owner})
}

// admit stamps an admittance g + s·c between nodes a and b.
func (p *pencil) admit(a, b int, g, c float64, owner string) {
	p.add(a, a, g, c, owner)
	p.add(b, b, g, c, owner)
	p.add(a, b, -g, -c, owner)
	p.add(b, a, -g, -c, owner)
}

// unknown appends one unknown.
func (p *pencil) unknown(name string) int {
	p.names = append(p.names, name)
	p.n++
	return p.n - 1
}

// build writes the pencil of c.
func build(c *circuit.Circuit, res *ac.Result) (*pencil, error) {
	p := &pencil{node: map[string]int{circuit.Gnd: ground}, centre: c.BandCentre()}
	for _, s := range c.Supplies {
		if !(s.Impedance >= 0) || math.IsInf(s.Impedance, 0) {
			return nil, fmt.Errorf("supply %s: impedance %g is not a finite value ≥ 0", s.Net, s.Impedance)
		}
		if s.Impedance == 0 {
			p.node[s.Net] = ground
		}
	}
	for _, net := range c.Nets() {
		if _, ok := p.node[net]; !ok {
			p.node[net] = p.unknown(net)
		}
	}
	nodes := p.n
	for i := range nodes {
		p.add(i, i, ac.Gmin, 0, "")
	}
	nd := func(net string) int { return p.node[net] }
	for _, s := range c.Supplies {
		if s.Impedance > 0 {
			p.admit(nd(s.Net), ground, 1/s.Impedance, 0, "")
		}
	}
	for _, port := range c.Ports {
		if !(port.Impedance > 0) || math.IsInf(port.Impedance, 0) {
			return nil, fmt.Errorf("port %s: impedance %g is not a positive finite value", port.Name, port.Impedance)
		}
		p.admit(nd(port.Net), ground, 1/port.Impedance, 0, "")
	}
	for _, part := range c.Parts {
		if err := p.part(part, res, nd); err != nil {
			return nil, fmt.Errorf("part %s: %w", part.Ref, err)
		}
	}
	return p, nil
}

func positive(x float64) bool { return x > 0 && !math.IsInf(x, 0) }

// netsOf is how many nets each two- and three-terminal kind must have.
var netsOf = map[circuit.Kind]int{circuit.Resistor: 2, circuit.Capacitor: 2, circuit.Inductor: 2,
	circuit.Potentiometer: 3, circuit.NPN: 3, circuit.PNP: 3}

// part stamps one part.
func (p *pencil) part(part *circuit.Part, res *ac.Result, nd func(string) int) error {
	ref := part.Ref
	if k, ok := netsOf[part.Kind]; ok && len(part.Nets) != k {
		return fmt.Errorf("%s needs %d nets, has %d", part.Kind, k, len(part.Nets))
	}
	switch part.Kind {
	case circuit.Resistor:
		if !positive(part.Value) {
			return fmt.Errorf("resistance %g is not a positive finite value", part.Value)
		}
		p.admit(nd(part.Nets[0]), nd(part.Nets[1]), 1/part.Value, 0, ref)
	case circuit.Capacitor:
		if !positive(part.Value) {
			return fmt.Errorf("capacitance %g is not a positive finite value", part.Value)
		}
		a, b, cv := nd(part.Nets[0]), nd(part.Nets[1]), part.Value
		rq := part.QLoss(0, cv, p.centre)
		if rq == 0 {
			p.admit(a, b, 0, cv, ref)
			break
		}
		// With its Q as a series resistance rq, a branch current i:
		// s·C·(V(a) − V(b) − rq·i) − i = 0.
		k := p.unknown(ref + ".i")
		p.add(a, k, 1, 0, "")
		p.add(b, k, -1, 0, "")
		p.add(k, a, 0, cv, ref)
		p.add(k, b, 0, -cv, ref)
		p.add(k, k, -1, -cv*rq, ref)
	case circuit.Potentiometer:
		if !positive(part.Value) || !(part.Setting >= 0 && part.Setting <= 1) {
			return fmt.Errorf("value %g or setting %g out of range", part.Value, part.Setting)
		}
		ra := math.Max(part.Value*(1-part.Setting), minSection)
		rb := math.Max(part.Value*part.Setting, minSection)
		a, w, b := nd(part.Nets[0]), nd(part.Nets[1]), nd(part.Nets[2])
		p.admit(a, w, 1/ra, 0, ref)
		p.admit(w, b, 1/rb, 0, ref)
	case circuit.Inductor:
		l, r := part.Inductance(), part.Resistance
		if !positive(l) || !(r >= 0) || math.IsInf(r, 0) {
			return fmt.Errorf("inductance %g or resistance %g out of range", l, r)
		}
		r += part.QLoss(l, 0, p.centre)
		k := p.unknown(ref + ".i")
		p.branch(k, nd(part.Nets[0]), nd(part.Nets[1]))
		p.add(k, k, -r, -l, ref)
	case circuit.Transformer:
		m := len(part.Windings)
		if m < 2 || !(part.Coupling > 0 && part.Coupling < 1) {
			return fmt.Errorf("%d windings, coupling %g: not a transformer", m, part.Coupling)
		}
		ks := make([]int, m)
		ls := make([]float64, m)
		for i, w := range part.Windings {
			ls[i] = part.AL * w.Turns * w.Turns
			if !positive(ls[i]) || !(w.Resistance >= 0) || math.IsInf(w.Resistance, 0) {
				return fmt.Errorf("winding %s: inductance %g or resistance %g out of range", w.Name, ls[i], w.Resistance)
			}
			ks[i] = p.unknown(ref + "." + w.Name + ".i")
			p.branch(ks[i], nd(w.Nets[0]), nd(w.Nets[1]))
		}
		for i := range m {
			for j := range m {
				lij := part.Coupling * math.Sqrt(ls[i]*ls[j])
				r := 0.0
				if i == j {
					lij, r = ls[i], part.Windings[i].Resistance+part.QLoss(ls[i], 0, p.centre)
				}
				p.add(ks[i], ks[j], -r, -lij, ref)
			}
		}
	case circuit.NPN, circuit.PNP:
		return p.bjt(part, res, nd)
	case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
		return p.fet(part, res, nd)
	default:
		return fmt.Errorf("kind %q has no small-signal model", part.Kind)
	}
	return nil
}

// branch ties branch current k to nodes a → b: the current leaves a and
// enters b, and row k reads V(a) − V(b) − Z·i = 0.
func (p *pencil) branch(k, a, b int) {
	p.add(a, k, 1, 0, "")
	p.add(b, k, -1, 0, "")
	p.add(k, a, 1, 0, "")
	p.add(k, b, -1, 0, "")
}

// bjt stamps the hybrid-π: rb from the base pin to b' (b' is the pin when
// rb = 0), rπ ‖ Cπ from b' to the emitter, Cμ from b' to the collector, and
// gm·v(b'e) from the collector to the emitter.
func (p *pencil) bjt(part *circuit.Part, res *ac.Result, nd func(string) int) error {
	h := res.BJTs[part.Ref]
	if h == nil || part.BJT == nil {
		return errors.New("no small-signal model for the transistor")
	}
	rb := part.BJT.RB
	if !(rb >= 0) || math.IsInf(rb, 0) {
		return fmt.Errorf("rb %g is not a finite value ≥ 0", rb)
	}
	c, b, e := nd(part.Nets[0]), nd(part.Nets[1]), nd(part.Nets[2])
	bi := b
	if rb > 0 {
		bi = p.unknown(part.Ref + ".b'")
		p.add(bi, bi, ac.Gmin, 0, "")
		p.admit(b, bi, 1/rb, 0, part.Ref)
	}
	gpi := 0.0
	if h.Rpi > 0 {
		gpi = 1 / h.Rpi
	}
	p.admit(bi, e, gpi, h.Cpi, part.Ref)
	p.admit(bi, c, 0, h.Cmu, part.Ref)
	p.add(c, bi, h.GM, 0, part.Ref)
	p.add(c, e, -h.GM, 0, part.Ref)
	p.add(e, bi, -h.GM, 0, part.Ref)
	p.add(e, e, h.GM, 0, part.Ref)
	return nil
}

// fet stamps the linearised FET as the ac package does (docs/fet.md): the
// DC Jacobian among the branches drain–source, gate–source and gate 2–source,
// Cds and Cgs across the first two and Cgd from gate to drain.
func (p *pencil) fet(part *circuit.Part, res *ac.Result, nd func(string) int) error {
	m := res.FETs[part.Ref]
	if m == nil {
		return errors.New("no small-signal model for the FET")
	}
	d, g, s := nd(part.Nets[0]), nd(part.Nets[1]), nd(part.Nets[2])
	g2 := ground
	if part.Kind == circuit.DualGateMOSFET {
		g2 = nd(part.Nets[3])
	}
	from, to := [3]int{d, g, g2}, [3]int{s, s, s}
	for i := range 3 {
		for j := range 3 {
			y := m.Jac[i][j]
			p.add(from[i], from[j], y, 0, part.Ref)
			p.add(from[i], to[j], -y, 0, part.Ref)
			p.add(to[i], from[j], -y, 0, part.Ref)
			p.add(to[i], to[j], y, 0, part.Ref)
		}
	}
	p.admit(d, s, 0, m.Cds, part.Ref)
	p.admit(g, s, 0, m.Cgs, part.Ref)
	p.admit(g, d, 0, m.Cgd, part.Ref)
	return nil
}

// workspace holds the dense matrices of one eigen-solve, reused from solve to
// solve (a large circuit's search solves hundreds of pencils of one size, and
// each solve would otherwise allocate six n×n matrices).
type workspace struct {
	g, c, m, a []float64
	lu         mat.LU
	wr, wi     []float64
	work       []float64
}

var workspaces = sync.Pool{New: func() any { return new(workspace) }}

// grow returns buf resized to n values (contents undefined).
func grow(buf []float64, n int) []float64 {
	if cap(buf) < n {
		return make([]float64, n)
	}
	return buf[:n]
}

// dense returns G and C (C scaled by w0), or their transposes, as dense
// matrices over the workspace's storage. Entries are summed in the order the
// pencil lists them.
func (p *pencil) dense(w0 float64, transpose bool, ws *workspace) (*mat.Dense, *mat.Dense) {
	n := p.n
	ws.g, ws.c = grow(ws.g, n*n), grow(ws.c, n*n)
	clear(ws.g)
	clear(ws.c)
	for _, e := range p.entries {
		k := e.i*n + e.j
		if transpose {
			k = e.j*n + e.i
		}
		ws.g[k] += e.g
		ws.c[k] += e.c * w0
	}
	return mat.NewDense(n, n, ws.g), mat.NewDense(n, n, ws.c)
}

// shifted forms A = (G + σ·w0·C)⁻¹·w0·C (or its transpose's analogue,
// (G + σ·w0·C)⁻ᵀ·w0·Cᵀ, whose right eigenvectors are the pencil's left ones)
// in the workspace and returns it with σ. A shift that makes M badly
// conditioned (a real pole within rounding of it) is moved and tried again.
func (p *pencil) shifted(w0 float64, transpose bool, ws *workspace) (*mat.Dense, float64, error) {
	n := p.n
	g, c := p.dense(w0, transpose, ws)
	ws.m, ws.a = grow(ws.m, n*n), grow(ws.a, n*n)
	for _, sigma := range []float64{1, 1.7, 0.43, 3.1, 0.19} {
		m := mat.NewDense(n, n, ws.m)
		m.Scale(sigma, c)
		m.Add(m, g)
		ws.lu.Factorize(m)
		if cond := ws.lu.Cond(); cond > 1e14 || math.IsNaN(cond) || math.IsInf(cond, 0) {
			continue
		}
		a := mat.NewDense(n, n, ws.a)
		if err := ws.lu.SolveTo(a, false, c); err != nil {
			continue
		}
		return a, sigma, nil
	}
	return nil, 0, errors.New("the nodal pencil is singular at every trial shift")
}

// eigenvalues returns the eigenvalues of the shifted-and-inverted pencil and
// σ. It makes the LAPACK call mat.Eigen makes for eigenvalues only (dgeev
// with balancing and the optimal workspace), on the workspace's storage, so
// the values are the same to the last bit.
func (p *pencil) eigenvalues(w0 float64) ([]complex128, float64, error) {
	ws := workspaces.Get().(*workspace)
	defer workspaces.Put(ws)
	a, sigma, err := p.shifted(w0, false, ws)
	if err != nil {
		return nil, 0, err
	}
	n := p.n
	ws.wr, ws.wi = grow(ws.wr, n), grow(ws.wi, n)
	raw := a.RawMatrix()
	query := []float64{0}
	lapack64.Geev(lapack.LeftEVNone, lapack.RightEVNone, raw, ws.wr, ws.wi, blas64.General{}, blas64.General{}, query, -1)
	ws.work = grow(ws.work, int(query[0]))
	if lapack64.Geev(lapack.LeftEVNone, lapack.RightEVNone, raw, ws.wr, ws.wi, blas64.General{}, blas64.General{}, ws.work, len(ws.work)) != 0 {
		return nil, 0, errors.New("the eigenvalue iteration did not converge")
	}
	vals := make([]complex128, n)
	for i := range vals {
		vals[i] = complex(ws.wr[i], ws.wi[i])
	}
	return vals, sigma, nil
}

// Participation ranks the parts by how much the pole moves when each part's
// admittance (its whole stamp: a transistor's rb, rπ, Cπ, Cμ and gm together)
// is scaled: with x and y the pencil's right and left null vectors at s,
// ∂s/∂α = −yᵀ·E_part(s)·x / (yᵀ·C·x), and a part's share is |yᵀ·E_part·x|
// over the sum for all parts. Shares add up to 1; the list is largest first.
func (r *Result) Participation(pl Pole) ([]Share, error) {
	pen := r.pen
	if pen == nil || pen.n == 0 {
		return nil, nil
	}
	x, err := pen.nullVector(pl.S, false)
	if err != nil {
		return nil, err
	}
	y, err := pen.nullVector(pl.S, true)
	if err != nil {
		return nil, err
	}
	by := map[string]complex128{}
	for _, e := range pen.entries {
		if e.owner == "" {
			continue
		}
		by[e.owner] += y[e.i] * complex(e.g, 0) * x[e.j]
		by[e.owner] += y[e.i] * pl.S * complex(e.c, 0) * x[e.j]
	}
	total := 0.0
	var out []Share
	for ref, v := range by {
		total += cmplx.Abs(v)
		out = append(out, Share{Part: ref, Share: cmplx.Abs(v)})
	}
	if total == 0 || math.IsNaN(total) {
		return nil, errors.New("no part takes part in the pole")
	}
	for i := range out {
		out[i].Share /= total
	}
	slices.SortFunc(out, func(a, b Share) int {
		if a.Share != b.Share {
			if a.Share > b.Share {
				return -1
			}
			return 1
		}
		if a.Part < b.Part {
			return -1
		}
		return 1
	})
	return out, nil
}

// Share is one part's share in a pole.
type Share struct {
	Part  string
	Share float64 // fraction of the pole's sensitivity, 0–1
}

// nullVector is the right (or, transposed, left) eigenvector of the pencil
// for the eigenvalue nearest s, from a second shift-and-invert with vectors.
func (p *pencil) nullVector(s complex128, transpose bool) ([]complex128, error) {
	w0 := cmplx.Abs(s)
	if w0 == 0 {
		w0 = 1
	}
	ws := new(workspace) // the vectors' solve keeps a: not pooled
	a, sigma, err := p.shifted(w0, transpose, ws)
	if err != nil {
		return nil, err
	}
	var eig mat.Eigen
	if !eig.Factorize(a, mat.EigenRight) {
		return nil, errors.New("the eigenvector iteration did not converge")
	}
	vals := eig.Values(nil)
	best, bd := -1, math.Inf(1)
	for i, l := range vals {
		if l == 0 {
			continue
		}
		si := complex(w0, 0) * (complex(sigma, 0) - 1/l)
		if d := cmplx.Abs(si - s); d < bd {
			best, bd = i, d
		}
	}
	if best < 0 {
		return nil, errors.New("no eigenvalue near the pole")
	}
	var v mat.CDense
	eig.VectorsTo(&v)
	x := make([]complex128, p.n)
	for i := range x {
		x[i] = v.At(i, best)
	}
	return x, nil
}

// Names lists the pencil's unknowns (nets, internal base nodes "Q1.b'",
// branch currents "L1.i", "T1.primary.i"), for tests.
func (r *Result) Names() []string { return slices.Clone(r.pen.names) }

// Admittance evaluates the pencil at s and returns the impedance matrix seen
// between the given nets and gnd with every termination in place (a port's
// own impedance included): Z[i][j] is the voltage at nets[i] per ampere into
// nets[j]. Tests compare it with the band analysis, which catches an
// assembly error in either.
func (r *Result) Impedance(s complex128, nets ...string) ([][]complex128, error) {
	pen := r.pen
	n := pen.n
	a := make([]complex128, n*n)
	for _, e := range pen.entries {
		a[e.i*n+e.j] += complex(e.g, 0) + s*complex(e.c, 0)
	}
	z := make([][]complex128, len(nets))
	for j, net := range nets {
		k, ok := pen.node[net]
		if !ok || k == ground {
			return nil, fmt.Errorf("net %q is not a node", net)
		}
		b := make([]complex128, n)
		b[k] = 1
		x, err := solve(a, b, n)
		if err != nil {
			return nil, err
		}
		for i, m := range nets {
			if len(z[i]) == 0 {
				z[i] = make([]complex128, len(nets))
			}
			z[i][j] = x[pen.node[m]]
		}
	}
	return z, nil
}

// solve is dense complex Gaussian elimination with partial pivoting (a copy
// of a is made).
func solve(a0, b0 []complex128, n int) ([]complex128, error) {
	a, b := slices.Clone(a0), slices.Clone(b0)
	for k := range n {
		p := k
		for i := k + 1; i < n; i++ {
			if cmplx.Abs(a[i*n+k]) > cmplx.Abs(a[p*n+k]) {
				p = i
			}
		}
		if a[p*n+k] == 0 {
			return nil, errors.New("singular pencil")
		}
		if p != k {
			for j := range n {
				a[k*n+j], a[p*n+j] = a[p*n+j], a[k*n+j]
			}
			b[k], b[p] = b[p], b[k]
		}
		for i := k + 1; i < n; i++ {
			m := a[i*n+k] / a[k*n+k]
			if m == 0 {
				continue
			}
			for j := k; j < n; j++ {
				a[i*n+j] -= m * a[k*n+j]
			}
			b[i] -= m * b[k]
		}
	}
	x := make([]complex128, n)
	for i := n - 1; i >= 0; i-- {
		v := b[i]
		for j := i + 1; j < n; j++ {
			v -= a[i*n+j] * x[j]
		}
		x[i] = v / a[i*n+i]
	}
	return x, nil
}

// solved memoises Find by its pencil: the worst-case search judges the
// stability items at many cases, and different items' walks (and the
// sensitivity phase, for a parameter already at the end the walk takes)
// meet at the same case, whose dense eigen-solve, O(n³), is the largest
// cost of a large circuit's search. A hit is checked entry by entry, so it
// returns what solving again would, exactly. Results are read-only.
var solved = memo{m: map[uint64][]memoised{}}

type memo struct {
	sync.Mutex
	m    map[uint64][]memoised
	size int
}

type memoised struct {
	r        *Result
	fLo, fHi float64
}

// memoCap bounds the memo; when it is full it starts afresh (a check goes
// through its circuits one by one, and a search's cases cluster).
const memoCap = 64

var seed = maphash.MakeSeed()

// hash digests everything Find's result depends on.
func (p *pencil) hash(fLo, fHi float64) uint64 {
	var h maphash.Hash
	h.SetSeed(seed)
	var b [8]byte
	word := func(v uint64) {
		for i := range b {
			b[i] = byte(v >> (8 * i))
		}
		h.Write(b[:])
	}
	word(uint64(p.n))
	word(math.Float64bits(fLo))
	word(math.Float64bits(fHi))
	for _, e := range p.entries {
		word(uint64(e.i)<<32 | uint64(uint32(e.j)))
		word(math.Float64bits(e.g))
		word(math.Float64bits(e.c))
		h.WriteString(e.owner)
	}
	for _, n := range p.names {
		h.WriteString(n)
		h.WriteByte(0)
	}
	return h.Sum64()
}

// same reports whether two pencils are identical.
func (p *pencil) same(q *pencil) bool {
	return p.n == q.n && p.centre == q.centre && slices.Equal(p.entries, q.entries) && slices.Equal(p.names, q.names)
}

func (m *memo) get(h uint64, pen *pencil, fLo, fHi float64) *Result {
	m.Lock()
	defer m.Unlock()
	for _, x := range m.m[h] {
		if x.fLo == fLo && x.fHi == fHi && x.r.pen.same(pen) {
			return x.r
		}
	}
	return nil
}

func (m *memo) put(h uint64, r *Result, fLo, fHi float64) {
	m.Lock()
	defer m.Unlock()
	if m.size >= memoCap {
		clear(m.m)
		m.size = 0
	}
	m.m[h] = append(m.m[h], memoised{r, fLo, fHi})
	m.size++
}
