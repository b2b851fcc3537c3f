package ac

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// Gmin is the conductance from every net to gnd (FORMAT.md §6). It keeps the
// nodal matrix regular and every impedance finite: a net with no other path
// to gnd reads about 1/Gmin = 1e12 Ω.
const Gmin = 1e-12

// minSection is the smallest resistance of a potentiometer section (FORMAT.md §6).
const minSection = 1e-3

// ground is the node index of gnd and of every net merged into it (a supply
// with zero impedance is AC ground).
const ground = -1

// branch is one incidence vector e_from − e_to of the nodal system; ground
// ends contribute nothing.
type branch struct{ from, to int }

// element is one admittance stamp Y += P·D·Pᵀ, where P's columns are the
// branches and D is the r×r admittance matrix among them. Two-terminal parts
// have one branch; a transformer has one per winding; a transistor has three
// (b–e, b–c and the controlled c–e branch, whose row of D holds gm).
type element struct {
	ref      string // part reference, "" for ports and supplies (never removed)
	branches []branch
	// kind says how D depends on the frequency, from the values in g, v
	// and x: values, not closures, so that a Plan's case writes them into a
	// copy of the network without an allocation apiece.
	kind admKind
	g    complex128 // admConst: the admittance
	v    [5]float64 // the values kind reads (see fill)
	x    []float64  // a transformer's inductances then resistances; a FET's Jacobian then Cds, Cgs, Cgd
}

// admKind is the form of an element's D.
type admKind uint8

const (
	admConst       admKind = iota // g
	admCapacitor                  // v: C, the series loss resistance
	admInductor                   // v: L, the series resistance
	admPot                        // v: the two sections' resistances
	admBJT                        // v: gπ, Cπ, Cμ, gm, rb (0: no internal base)
	admTransformer                // v: coupling k; x: L then R of each winding
	admFET                        // x: Jac row-major, Cds, Cgs, Cgd
)

// fill writes D at angular frequency w, row-major, into d (len r², every
// entry written): the sweeps call it at every frequency, into storage they
// reuse, so it must not allocate.
func (e *element) fill(w float64, d []complex128) error {
	v := &e.v
	switch e.kind {
	case admConst:
		d[0] = e.g
	case admCapacitor:
		y := complex(0, w*v[0])
		d[0] = y / (1 + y*complex(v[1], 0))
	case admInductor:
		d[0] = 1 / complex(v[1], w*v[0])
	case admPot:
		d[0], d[1], d[2], d[3] = complex(1/v[0], 0), 0, 0, complex(1/v[1], 0)
	case admBJT:
		gpi, cpi, cmu, gm, rb := v[0], v[1], v[2], v[3], v[4]
		if rb == 0 {
			copy(d, []complex128{
				complex(gpi, w*cpi), 0, 0,
				0, complex(0, w*cmu), 0,
				complex(gm, 0), 0, 0,
			})
			return nil
		}
		copy(d, []complex128{
			complex(gpi, w*cpi), 0, 0, 0,
			0, complex(0, w*cmu), 0, 0,
			complex(gm, 0), 0, 0, 0,
			0, 0, 0, complex(1/rb, 0),
		})
	case admTransformer:
		return transformerAdm(w, d, v[0], e.x)
	case admFET:
		j, cds, cgs, cgd := e.x[:9], e.x[9], e.x[10], e.x[11]
		copy(d, []complex128{
			complex(j[0], w*cds), complex(j[1], 0), complex(j[2], 0), 0,
			complex(j[3], 0), complex(j[4], w*cgs), complex(j[5], 0), 0,
			complex(j[6], 0), complex(j[7], 0), complex(j[8], 0), 0,
			0, 0, 0, complex(0, w*cgd),
		})
	}
	return nil
}

// network is a circuit reduced to nodes and admittance stamps, holding copies
// of every value it needs so that later edits of the circuit do not reach it.
type network struct {
	n     int            // number of nodes (nets that are not AC ground, and internal bases)
	nodes map[string]int // every net of the circuit, gnd included; ground for AC-ground nets
	inner map[string]int // transistor reference → node of its internal base b' (only when rb > 0)
	elems []element
	parts map[string]int // part reference → index in elems

	hasIn  bool    // an in port exists
	inNode int     // its net
	rs     float64 // its impedance RS, Ω
	source int     // index in elems of RS to gnd (-1 when the in net is AC ground)
	hasOut bool
	outNd  int
	rl     float64 // the out port's impedance RL, Ω
	load   int     // index in elems of RL to gnd (-1 when the out net is AC ground)
	gains  bool    // exactly one in and one out port
	centre float64 // the band's geometric centre, Hz: where a part's Q applies without q_freq

	// like is set while build writes a case's values into a copy of a
	// Plan's network: add then checks each element against the one there
	// (at index next) instead of appending.
	like bool
	next int
}

// errShape reports a circuit not wired as a Plan's (or whose values change
// its network's shape, as a supply's impedance becoming zero would).
var errShape = errors.New("the circuit is not wired as the plan's")

// build turns a circuit and its operating point into a network. With like
// set (a Plan's network) it builds a copy of like with c's values, sharing
// like's numbering and branches, or fails with errShape when c's network
// would not have like's shape.
func build(c *circuit.Circuit, op *dc.Result, like *network) (*network, error) {
	for _, s := range c.Supplies {
		if !(s.Impedance >= 0) || math.IsInf(s.Impedance, 0) {
			return nil, fmt.Errorf("supply %s: impedance %g is not a finite value ≥ 0", s.Net, s.Impedance)
		}
	}
	var nw *network
	if like != nil {
		cp := *like
		nw = &cp
		nw.elems = slices.Clone(like.elems)
		nw.source, nw.load, nw.centre = -1, -1, c.BandCentre()
		nw.hasIn, nw.hasOut, nw.like, nw.next = false, false, true, 0
	} else {
		nw = &network{parts: make(map[string]int, len(c.Parts)), source: -1, load: -1, centre: c.BandCentre(),
			elems: make([]element, 0, len(c.Supplies)+len(c.Ports)+len(c.Parts))}
		acGround := map[string]bool{}
		for _, s := range c.Supplies {
			if s.Impedance == 0 {
				acGround[s.Net] = true
			}
		}
		nw.nodes, nw.inner, nw.n = numbering(c, acGround)
	}
	err := nw.fill(c, op)
	if err == nil && nw.like && nw.next != len(nw.elems) {
		err = errShape
	}
	nw.like = false
	if err != nil {
		return nil, err
	}
	return nw, nil
}

// fill adds c's supplies, ports and parts.
func (nw *network) fill(c *circuit.Circuit, op *dc.Result) error {
	node := func(net string) int {
		if i, ok := nw.nodes[net]; ok || !nw.like {
			return i
		}
		return -2 // a net the plan's numbering does not know: matches no branch
	}

	for _, s := range c.Supplies {
		if s.Impedance > 0 {
			if nw.addConductance("", 1/s.Impedance, branch{node(s.Net), ground}) == nil {
				return errShape
			}
		}
	}

	ins, outs := 0, 0
	for _, p := range c.Ports {
		if !positive(p.Impedance) {
			return fmt.Errorf("port %s: impedance %g is not a positive finite value", p.Name, p.Impedance)
		}
		br := branch{node(p.Net), ground}
		at := nw.at()
		switch {
		case p.Direction == "in" && ins == 0:
			ins++
			nw.hasIn, nw.inNode, nw.rs = true, node(p.Net), p.Impedance
			if nw.inNode != ground {
				nw.source = at
			}
			// left out of the base matrix, see freq
		case p.Direction == "out" && outs == 0:
			outs++
			nw.hasOut, nw.outNd, nw.rl = true, node(p.Net), p.Impedance
			if nw.outNd != ground {
				nw.load = at
			}
		default:
			if p.Direction == "in" {
				ins++
			} else if p.Direction == "out" {
				outs++
			}
		}
		if nw.addConductance("", 1/p.Impedance, br) == nil {
			return errShape
		}
	}
	nw.gains = ins == 1 && outs == 1

	for _, p := range c.Parts {
		if err := nw.addPart(p, op, node); err != nil {
			if err == errShape {
				return err
			}
			return fmt.Errorf("part %s: %w", p.Ref, err)
		}
	}
	return nil
}

// at is the index the next element takes.
func (nw *network) at() int {
	if nw.like {
		return nw.next
	}
	return len(nw.elems)
}

// add appends an element of the given kind over br and remembers it under
// its reference; the caller writes its values. Building a Plan's case
// (nw.like), it checks the element already there instead, and returns nil
// when that one differs in reference, kind or branches. br is copied.
func (nw *network) add(ref string, kind admKind, br ...branch) *element {
	if nw.like {
		if nw.next == len(nw.elems) {
			return nil
		}
		e := &nw.elems[nw.next]
		if e.ref != ref || e.kind != kind || !slices.Equal(e.branches, br) {
			return nil
		}
		nw.next++
		return e
	}
	if ref != "" {
		nw.parts[ref] = len(nw.elems)
	}
	nw.elems = append(nw.elems, element{ref: ref, branches: slices.Clone(br), kind: kind})
	return &nw.elems[len(nw.elems)-1]
}

// addConductance appends a constant real admittance g over one branch.
func (nw *network) addConductance(ref string, g float64, br branch) *element {
	e := nw.add(ref, admConst, br)
	if e != nil {
		e.g = complex(g, 0)
	}
	return e
}

// admBlock returns one r×r slice per element, all cut from one block, for
// admittances to write into.
func (nw *network) admBlock() [][]complex128 {
	total := 0
	for _, e := range nw.elems {
		total += len(e.branches) * len(e.branches)
	}
	buf := make([]complex128, total)
	d := make([][]complex128, len(nw.elems))
	for i, e := range nw.elems {
		r2 := len(e.branches) * len(e.branches)
		d[i], buf = buf[:r2:r2], buf[r2:]
	}
	return d
}

// netCount is how many nets each kind with a Nets list must have.
var netCount = map[circuit.Kind]int{circuit.Resistor: 2, circuit.Capacitor: 2, circuit.Inductor: 2,
	circuit.Potentiometer: 3, circuit.NPN: 3, circuit.PNP: 3,
	circuit.NJFET: 3, circuit.PJFET: 3, circuit.DualGateMOSFET: 4}

// addPart adds one part's small-signal stamp (FORMAT.md §6).
func (nw *network) addPart(p *circuit.Part, op *dc.Result, node func(string) int) error {
	if k, ok := netCount[p.Kind]; ok && len(p.Nets) != k {
		return fmt.Errorf("%s needs %d nets, has %d", p.Kind, k, len(p.Nets))
	}
	var e *element
	switch p.Kind {
	case circuit.Resistor:
		if !positive(p.Value) {
			return fmt.Errorf("resistance %g is not a positive finite value", p.Value)
		}
		e = nw.addConductance(p.Ref, 1/p.Value, branch{node(p.Nets[0]), node(p.Nets[1])})
	case circuit.Capacitor:
		c := p.Value
		if !positive(c) {
			return fmt.Errorf("capacitance %g is not a positive finite value", c)
		}
		rq := p.QLoss(0, c, nw.centre) // the unloaded Q as a series resistance
		if e = nw.add(p.Ref, admCapacitor, branch{node(p.Nets[0]), node(p.Nets[1])}); e != nil {
			e.v = [5]float64{c, rq}
		}
	case circuit.Inductor:
		l, r := p.Inductance(), p.Resistance
		if !positive(l) {
			return fmt.Errorf("inductance %g is not a positive finite value", l)
		}
		if !(r >= 0) || math.IsInf(r, 0) {
			return fmt.Errorf("resistance %g is not a finite value ≥ 0", r)
		}
		r += p.QLoss(l, 0, nw.centre)
		if e = nw.add(p.Ref, admInductor, branch{node(p.Nets[0]), node(p.Nets[1])}); e != nil {
			e.v = [5]float64{l, r}
		}
	case circuit.Potentiometer:
		if !positive(p.Value) || !(p.Setting >= 0 && p.Setting <= 1) {
			return fmt.Errorf("value %g or setting %g out of range", p.Value, p.Setting)
		}
		ra := math.Max(p.Value*(1-p.Setting), minSection)
		rb := math.Max(p.Value*p.Setting, minSection)
		a, wiper, b := node(p.Nets[0]), node(p.Nets[1]), node(p.Nets[2])
		if e = nw.add(p.Ref, admPot, branch{a, wiper}, branch{wiper, b}); e != nil {
			e.v = [5]float64{ra, rb}
		}
	case circuit.Transformer:
		return nw.addTransformer(p, node)
	case circuit.NPN, circuit.PNP:
		return nw.addBJT(p, op, node, nw.inner)
	case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
		return nw.addFET(p, op, node)
	default:
		return fmt.Errorf("kind %q has no small-signal model", p.Kind)
	}
	if e == nil {
		return errShape
	}
	return nil
}

// addTransformer stamps the windings' admittance matrix, the inverse of
// Z = R + jωL with Lii = AL·Ni² and Lij = k·√(Li·Lj), every dot at the
// winding's first net. Z is regular for 0 < k < 1 and ω > 0, zero-resistance
// windings included.
func (nw *network) addTransformer(p *circuit.Part, node func(string) int) error {
	m := len(p.Windings)
	if m < 2 {
		return fmt.Errorf("a transformer needs two or more windings, has %d", m)
	}
	if !(p.Coupling > 0 && p.Coupling < 1) {
		return fmt.Errorf("coupling %g is not inside (0, 1)", p.Coupling)
	}
	lr := make([]float64, 2*m) // the inductances, then the resistances
	l, r := lr[:m], lr[m:]
	var brBuf [4]branch
	br := brBuf[:0]
	for i, w := range p.Windings {
		l[i] = p.AL * w.Turns * w.Turns
		r[i] = w.Resistance
		if !positive(l[i]) {
			return fmt.Errorf("winding %s: inductance %g is not a positive finite value", w.Name, l[i])
		}
		if !(r[i] >= 0) || math.IsInf(r[i], 0) {
			return fmt.Errorf("winding %s: resistance %g is not a finite value ≥ 0", w.Name, r[i])
		}
		r[i] += p.QLoss(l[i], 0, nw.centre)
		br = append(br, branch{node(w.Nets[0]), node(w.Nets[1])})
	}
	e := nw.add(p.Ref, admTransformer, br...)
	if e == nil {
		return errShape
	}
	e.v[0], e.x = p.Coupling, lr
	return nil
}

// transformerAdm writes a transformer's D at w: Z inverted (see
// addTransformer), from the coupling k and the windings' inductances and
// resistances lr.
func transformerAdm(w float64, d []complex128, k float64, lr []float64) error {
	m := len(lr) / 2
	l, r := lr[:m], lr[m:]
	var zBuf [16]complex128 // up to four windings without allocating
	z := zBuf[:0]
	if m*m > len(zBuf) {
		z = make([]complex128, 0, m*m)
	}
	z = z[:m*m]
	for i := range m {
		for j := range m {
			lij := k * math.Sqrt(l[i]*l[j])
			if i == j {
				lij = l[i]
			}
			z[i*m+j] = complex(0, w*lij)
		}
		z[i*m+i] += complex(r[i], 0)
	}
	return invertInto(d, z, m)
}

// addBJT stamps the hybrid-π model at the operating point: rπ and Cπ from
// the internal base b' to emitter, Cμ from b' to collector, gm·vb'e from
// collector to emitter, and rb from the base pin to b'. Without rb, b' is
// the base pin and the stamp is the three-branch one. A PNP's small-signal
// model is the same as an NPN's.
func (nw *network) addBJT(p *circuit.Part, op *dc.Result, node func(string) int, inner map[string]int) error {
	h, err := hybridPi(p, op)
	if err != nil {
		return err
	}
	c, b, e := node(p.Nets[0]), node(p.Nets[1]), node(p.Nets[2])
	rb := p.BJT.RB
	var el *element
	if rb == 0 {
		el = nw.add(p.Ref, admBJT, branch{b, e}, branch{b, c}, branch{c, e})
	} else {
		bi, ok := inner[p.Ref]
		if !positive(rb) || !ok {
			return fmt.Errorf("base resistance rb %g is not a finite value ≥ 0", rb)
		}
		// Branches b'–e, b'–c, c–e as above, and b–b' for rb.
		el = nw.add(p.Ref, admBJT, branch{bi, e}, branch{bi, c}, branch{c, e}, branch{b, bi})
	}
	if el == nil {
		return errShape
	}
	el.v = [5]float64{h.gpi, h.Cpi, h.Cmu, h.GM, rb}
	return nil
}

// pi is a transistor's linearised model.
type pi struct {
	GM, gpi, Rpi, Cpi, Cmu, FT float64
}

// hybridPi linearises a transistor at op (FORMAT.md §6): gm = IC/VT (0 when
// IC ≤ 0), rπ = βF/gm (open when gm = 0), Cμ = cob, Cπ = max(gm/(2π·ft) − Cμ, 0).
func hybridPi(p *circuit.Part, op *dc.Result) (pi, error) {
	if p.BJT == nil {
		return pi{}, fmt.Errorf("no transistor figures")
	}
	if op == nil || op.BJTs[p.Ref] == nil {
		return pi{}, fmt.Errorf("no operating point for the transistor")
	}
	q := op.BJTs[p.Ref]
	if !positive(op.VT) {
		return pi{}, fmt.Errorf("thermal voltage %g is not a positive finite value", op.VT)
	}
	if !positive(q.HFE) || math.IsNaN(q.ICf) || math.IsInf(q.ICf, 0) {
		return pi{}, fmt.Errorf("operating point IC %g, hFE %g is not usable", q.ICf, q.HFE)
	}
	if !positive(p.BJT.FT) || !(p.BJT.Cob >= 0) || math.IsInf(p.BJT.Cob, 0) {
		return pi{}, fmt.Errorf("ft %g or cob %g out of range", p.BJT.FT, p.BJT.Cob)
	}
	h := pi{Cmu: p.BJT.Cob, FT: p.BJT.FT}
	// IC in the device's forward sense: a transistor conducting in reverse
	// has gm = 0 (FORMAT.md §6), not the gm of its current's magnitude.
	if q.ICf > 0 {
		h.GM = q.ICf / op.VT
		h.gpi = h.GM / q.HFE
		h.Rpi = q.HFE / h.GM
		h.Cpi = math.Max(h.GM/(2*math.Pi*p.BJT.FT)-h.Cmu, 0)
	}
	return h, nil
}

// positive reports a finite value above zero.
func positive(x float64) bool { return x > 0 && !math.IsInf(x, 0) }

// stamp adds D (r×r, times sign) over the branches into y.
func stamp(y *sparse, br []branch, d []complex128, sign complex128) {
	r := len(br)
	for i, bi := range br {
		for j, bj := range br {
			v := d[i*r+j] * sign
			if v == 0 {
				continue
			}
			if bi.from != ground {
				if bj.from != ground {
					y.add(bi.from, bj.from, v)
				}
				if bj.to != ground {
					y.sub(bi.from, bj.to, v)
				}
			}
			if bi.to != ground {
				if bj.from != ground {
					y.sub(bi.to, bj.from, v)
				}
				if bj.to != ground {
					y.add(bi.to, bj.to, v)
				}
			}
		}
	}
}

// span widens each row's span lo[i] … hi[i] to the entries stamp would touch
// for D over the branches.
func span(lo, hi []int, br []branch, d []complex128) {
	r := len(br)
	widen := func(i, j int) {
		if i != ground && j != ground {
			lo[i], hi[i] = min(lo[i], j), max(hi[i], j)
		}
	}
	for i, bi := range br {
		for j, bj := range br {
			if d[i*r+j] == 0 {
				continue
			}
			widen(bi.from, bj.from)
			widen(bi.from, bj.to)
			widen(bi.to, bj.from)
			widen(bi.to, bj.to)
		}
	}
}

// refs appends to idx (empty, the caller's buffer) the sorted,
// de-duplicated element indices of the named parts.
func (nw *network) refs(idx []int, removed []string) ([]int, error) {
	// a query removes a part or two: a linear search beats a set
	for _, ref := range removed {
		i, ok := nw.parts[ref]
		if !ok {
			return nil, fmt.Errorf("no part %q in the circuit", ref)
		}
		if !slices.Contains(idx, i) {
			idx = append(idx, i)
		}
	}
	sort.Ints(idx)
	return idx, nil
}

// numbered is one memoised numbering: net → node (ground for gnd and the
// AC-ground nets), transistor → node of its internal base, both read-only,
// and the number of nodes.
type numbered struct {
	nodes map[string]int
	inner map[string]int
	n     int
}

// numberings memoises numbering by the circuit's structure: the worst-case
// search analyses hundreds of cases of one circuit, whose values differ but
// whose nets and connections do not.
var numberings = struct {
	sync.Mutex
	m map[string]numbered
}{m: map[string]numbered{}}

// numbering numbers the nets of c, and the internal base of every
// transistor with rb > 0, in order's order; the AC-ground nets and gnd are
// ground. The maps are shared: read them, never write them.
func numbering(c *circuit.Circuit, acGround map[string]bool) (map[string]int, map[string]int, int) {
	// The key holds everything order reads: the wiring, which supplies are
	// AC ground, and which parts have an internal base.
	var k strings.Builder
	k.WriteString(c.WiringKey())
	k.WriteByte('#')
	for _, s := range c.Supplies {
		if acGround[s.Net] {
			k.WriteByte('g')
		} else {
			k.WriteByte('-')
		}
	}
	k.WriteByte('#')
	for i, p := range c.Parts {
		if hasInner(p) {
			k.WriteString(strconv.Itoa(i))
			k.WriteByte(',')
		}
	}
	key := k.String()
	numberings.Lock()
	got, ok := numberings.m[key]
	numberings.Unlock()
	if ok {
		return got.nodes, got.inner, got.n
	}
	nodes := map[string]int{circuit.Gnd: ground}
	inner := map[string]int{}
	n := 0
	for _, v := range order(c, acGround) {
		if v.part != nil {
			inner[v.part.Ref] = n
		} else {
			nodes[v.net] = n
		}
		n++
	}
	for net := range acGround {
		nodes[net] = ground
	}
	numberings.Lock()
	if len(numberings.m) >= 16 {
		clear(numberings.m) // other circuits: a check goes through them one by one
	}
	numberings.m[key] = numbered{nodes, inner, n}
	numberings.Unlock()
	return nodes, inner, n
}

// hasInner reports whether p is a transistor with an internal base node
// (rb > 0, or a value addBJT will refuse).
func hasInner(p *circuit.Part) bool {
	return p.Kind.IsBJT() && p.BJT != nil && p.BJT.RB != 0 && len(p.Nets) == 3
}

// vertex is one node to be numbered: a net, or a transistor's internal base.
type vertex struct {
	net  string
	part *circuit.Part
}

// order numbers the nets that are not AC ground, and the internal bases,
// by reverse Cuthill–McKee on the graph of nodes that share a part, so that
// the nodal matrix is banded and its factorisation fills in little (a chain
// of stages stays a chain). An internal base counts as one more end of its
// transistor.
func order(c *circuit.Circuit, acGround map[string]bool) []vertex {
	names := c.Nets() // ties are broken by name, that is by index; internal bases come after
	nets := make([]vertex, len(names), len(names)+len(c.Parts))
	idx := make(map[string]int, len(names))
	for i, n := range names {
		idx[n] = i
		nets[i] = vertex{net: n}
	}
	innerOf := make([]int, len(c.Parts))
	for i, p := range c.Parts {
		innerOf[i] = -1
		if hasInner(p) {
			innerOf[i] = len(nets)
			nets = append(nets, vertex{part: p})
		}
	}
	skip := make([]bool, len(nets))
	for i, v := range nets {
		skip[i] = v.part == nil && acGround[v.net]
	}
	adj := make([][]int, len(nets))
	var ends []int
	for pi, p := range c.Parts {
		ends = ends[:0]
		for _, n := range p.PartNets() {
			if i, ok := idx[n]; ok && !skip[i] {
				ends = append(ends, i)
			}
		}
		if innerOf[pi] >= 0 {
			ends = append(ends, innerOf[pi])
		}
		for _, a := range ends {
			for _, b := range ends {
				if b != a {
					adj[a] = append(adj[a], b)
				}
			}
		}
	}
	for i := range adj {
		slices.Sort(adj[i])
		adj[i] = slices.Compact(adj[i])
	}
	degree := func(n int) int { return len(adj[n]) }
	seen := make([]bool, len(nets))
	out := make([]vertex, 0, len(nets))
	var queue, next []int
	for {
		start := -1
		for i := range nets {
			if !seen[i] && !skip[i] && (start < 0 || degree(i) < degree(start)) {
				start = i
			}
		}
		if start < 0 {
			break
		}
		seen[start] = true
		queue = append(queue[:0], start)
		for len(queue) > 0 {
			n := queue[0]
			queue = queue[1:]
			out = append(out, nets[n])
			next = next[:0]
			for _, m := range adj[n] {
				if !seen[m] {
					seen[m] = true
					next = append(next, m)
				}
			}
			slices.SortFunc(next, func(a, b int) int {
				if da, db := degree(a), degree(b); da != db {
					return da - db
				}
				return a - b
			})
			queue = append(queue, next...)
		}
	}
	slices.Reverse(out)
	return out
}
