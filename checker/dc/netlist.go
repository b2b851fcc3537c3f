package dc

import (
	"fmt"
	"math"
	"strings"
	"sync"

	"headroom/checker/circuit"
)

// Physical constants, exact in the SI since 2019 (REFERENCES.md §3).
const (
	Boltzmann  = 1.380649e-23    // J/K
	Charge     = 1.602176634e-19 // C
	zeroC      = 273.15          // K at 0 °C
	gminModel  = 1e-12           // S from every net to gnd (FORMAT.md §6)
	minPotSide = 1e-3            // Ω, the least a potentiometer section may be
	betaR      = 1.0             // reverse beta (FORMAT.md §6)
)

// ThermalVoltage is k·T/q at tempC in °C, with the exact SI constants.
func ThermalVoltage(tempC float64) float64 {
	return Boltzmann * (tempC + zeroC) / Charge
}

// SaturationCurrent is the Ebers–Moll IS that FORMAT.md §6 derives from a
// datasheet's VBE at ic_ref and 25 °C: IS = ic_ref / e^(VBEref/VT) with
// VBEref = vbe − 0.002·(T − 25), so VBE at constant current falls 2 mV/°C.
func SaturationCurrent(p *circuit.BJTParams, tempC float64) float64 {
	vt := ThermalVoltage(tempC)
	vbeRef := p.VBE - 0.002*(tempC-25)
	return p.ICRef / math.Exp(vbeRef/vt)
}

// gnd is the unknown index of the reference net: it has no row.
const gnd = -1

// conductance is a linear resistor between two unknowns (either may be gnd).
type conductance struct {
	a, b int
	g    float64
	seq  int // place among the conductances and branches in compile order (refill checks it)
}

// source is a branch whose current is an unknown of its own (number row),
// flowing from p through the branch to m: V(p) − V(m) − r·I = e. It models an
// ideal or nearly ideal supply, a zero-resistance winding (r = e = 0), and
// any resistance below branchBelow: stamping 1 mΩ as 1000 S on the diagonal
// would drown the 1e-12 S that is all that holds a floating cluster of such
// parts, while as a branch it keeps every node row well scaled.
type source struct {
	p, m int
	e    float64 // V at full source strength (0 for a short)
	r    float64 // Ω, series resistance (0 for an ideal source or short)
	row  int
	seq  int // as conductance.seq
}

// branchBelow is the resistance under which a part becomes a branch.
const branchBelow = 1.0 // Ω

// norton is the current a supply behind an impedance injects into its net at
// full source strength.
type norton struct {
	n int
	i float64 // A
}

// bjt is one transistor with the Newton state of its junctions.
type bjt struct {
	ref     string
	c, b, e int     // the junctions' nodes: b is the internal base b' when rb > 0
	bp      int     // the base pin's node (b itself when rb = 0)
	pol     float64 // +1 NPN, −1 PNP
	is      float64 // A
	betaF   float64
	vcrit   float64 // V, where the junction limiting starts
	vbe     float64 // V, forward sense, the point the last stamp was taken at
	vbc     float64
	moved   float64 // V, the largest junction change of the last iteration
	limited bool    // whether the last iteration limited a junction
}

// netlist is a circuit compiled to index form: everything Newton's loop needs,
// with no maps and no strings on the hot path.
type netlist struct {
	names   []string // net name of each node unknown; an internal base has its base pin's
	index   map[string]int
	nets    int // the circuit's nets (all but gnd): node unknowns 0 … nets−1
	nodes   int // node unknowns: the nets, then one internal base per transistor with rb > 0; branch currents follow them
	size    int // all unknowns
	vt      float64
	tempC   float64
	conds   []conductance
	sources []source
	nortons []norton
	bjts    []bjt
	fets    []fet // fet.go
	// what each branch row belongs to, for messages: a part ref, REF.WINDING,
	// "REF:a" or "REF:b" for a potentiometer section, or "supply NET".
	branchOwner []string
	branchOf    map[string]int // owner → unknown index of its current
	// adds counts the conductances and branches compile added (their seq).
	adds int
	// pinned: a transistor junction lies on a loop of supplies and
	// zero-resistance parts, so that the supplies' values decide whether
	// it is overdriven (forcedJunction); a Plan then compiles every case.
	pinned bool
}

// addCond appends a conductance g between a and b.
func (nl *netlist) addCond(a, b int, g float64) {
	nl.conds = append(nl.conds, conductance{a, b, g, nl.adds})
	nl.adds++
}

func invalid(part, format string, args ...any) *Failure {
	return &Failure{Reason: part + ": " + fmt.Sprintf(format, args...), Part: part, Cause: Invalid, Parts: []string{part}}
}

func positive(x float64) bool { return x > 0 && !math.IsInf(x, 0) }

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// compile builds the index form of c and checks the zero-resistance topology.
func compile(c *circuit.Circuit) (*netlist, *Failure) {
	nl := &netlist{branchOf: map[string]int{}}
	nl.tempC = c.Ambient.Nominal
	if !finite(nl.tempC) || nl.tempC+zeroC <= 0 {
		return nil, &Failure{Reason: fmt.Sprintf("ambient %g °C is not a temperature", nl.tempC), Cause: Invalid}
	}
	nl.vt = ThermalVoltage(nl.tempC)
	nl.names, nl.index = netIndex(c)
	nl.nets = len(nl.names)
	nl.nodes = nl.nets
	// A transistor with a base spreading resistance has an internal base
	// node; numbering them after the nets keeps the shared numbering of
	// the nets, and a transistor without rb adds no unknown at all.
	for _, p := range c.Parts {
		if p != nil && p.Kind.IsBJT() && p.BJT != nil && p.BJT.RB != 0 && len(p.Nets) == 3 {
			if nl.nodes == nl.nets {
				nl.names = nl.names[:nl.nets:nl.nets] // the numbering is shared: append to a copy
			}
			nl.names = append(nl.names, p.Nets[1])
			nl.nodes++
		}
	}
	w := &walker{nl: nl, shorts: newShortFinder(nl.nodes), inner: nl.nets}
	if f := w.walk(c); f != nil {
		return nil, f
	}
	nl.size = nl.nodes + len(nl.sources)
	if f := w.shorts.forcedJunction(nl); f != nil {
		return nil, f
	}
	return nl, nil
}

// potSections splits a potentiometer's track at its wiper (FORMAT.md §6).
func potSections(p *circuit.Part) (ra, rb float64, ok bool) {
	if !positive(p.Value) || !(p.Setting >= 0 && p.Setting <= 1) {
		return 0, 0, false
	}
	ra = math.Max(p.Value*(1-p.Setting), minPotSide)
	rb = math.Max(p.Value*p.Setting, minPotSide)
	return ra, rb, true
}

func newBJT(p *circuit.Part, tempC, vt float64) (bjt, *Failure) {
	b := p.BJT
	if b == nil {
		return bjt{}, invalid(p.Ref, "no transistor figures")
	}
	hfe := b.NominalHFE()
	if !positive(hfe) || !positive(b.ICRef) || !positive(b.VBE) {
		return bjt{}, invalid(p.Ref, "hFE %g, vbe %g V, ic_ref %g A do not make a transistor", hfe, b.VBE, b.ICRef)
	}
	is := SaturationCurrent(b, tempC)
	if !positive(is) {
		return bjt{}, invalid(p.Ref, "saturation current %g A from vbe %g V at %g °C", is, b.VBE, tempC)
	}
	q := bjt{ref: p.Ref, pol: 1, is: is, betaF: hfe}
	if p.Kind == circuit.PNP {
		q.pol = -1
	}
	q.vcrit = vt * math.Log(vt/(math.Sqrt2*is))
	return q, nil
}

// shortFinder keeps the forest of zero-resistance edges (ideal supplies,
// inductors and windings without resistance). An edge that closes a cycle
// makes the MNA matrix singular; the cycle is what the user must fix.
type shortFinder struct {
	parent []int // union-find over nodes, gnd at index n
	edges  []shortEdge
}

type shortEdge struct {
	a, b   int
	emf    float64 // V(a) − V(b), fixed by the edge
	owner  string
	supply bool
}

// shortLoop is a cycle of zero-resistance edges.
type shortLoop struct {
	edges []shortEdge
}

func newShortFinder(n int) *shortFinder {
	p := make([]int, n+1)
	for i := range p {
		p[i] = i
	}
	return &shortFinder{parent: p}
}

func (s *shortFinder) slot(i int) int {
	if i == gnd {
		return len(s.parent) - 1
	}
	return i
}

func (s *shortFinder) find(i int) int {
	for s.parent[i] != i {
		s.parent[i] = s.parent[s.parent[i]]
		i = s.parent[i]
	}
	return i
}

// add records an edge, or returns the loop it closes.
func (s *shortFinder) add(a, b int, emf float64, owner string, supply bool) *shortLoop {
	e := shortEdge{s.slot(a), s.slot(b), emf, owner, supply}
	ra, rb := s.find(e.a), s.find(e.b)
	if ra == rb {
		path := s.path(e.a, e.b)
		return &shortLoop{edges: append(path, e)}
	}
	s.parent[ra] = rb
	s.edges = append(s.edges, e)
	return nil
}

// path finds the forest edges from a to b (they are known to be connected).
func (s *shortFinder) path(a, b int) []shortEdge {
	if a == b {
		return nil
	}
	prev := map[int]int{a: -1} // slot → index of the edge that reached it
	queue := []int{a}
	for len(queue) > 0 {
		v := queue[0]
		queue = queue[1:]
		if v == b {
			break
		}
		for i, e := range s.edges {
			var w int
			switch v {
			case e.a:
				w = e.b
			case e.b:
				w = e.a
			default:
				continue
			}
			if _, seen := prev[w]; !seen {
				prev[w] = i
				queue = append(queue, w)
			}
		}
	}
	var out []shortEdge
	for v := b; v != a; {
		i, ok := prev[v]
		if !ok || i < 0 {
			break
		}
		e := s.edges[i]
		out = append(out, e)
		if e.a == v {
			v = e.b
		} else {
			v = e.a
		}
	}
	return out
}

// failure words the loop for the user.
func (l *shortLoop) failure(names []string) *Failure {
	var supplies, parts []string
	for _, e := range l.edges {
		if e.supply {
			supplies = append(supplies, strings.TrimPrefix(e.owner, "supply "))
		} else {
			parts = append(parts, e.owner)
		}
	}
	f := &Failure{Cause: Connectivity, Parts: parts}
	if len(parts) > 0 {
		f.Part = parts[0]
	}
	through := ""
	if len(parts) > 0 {
		through = " through " + strings.Join(parts, ", ") + " (no DC resistance)"
	}
	switch len(supplies) {
	case 0:
		f.Reason = "a loop of zero-resistance inductors or windings has no defined DC current: " +
			strings.Join(parts, ", ") + "; give one of them a resistance"
		if len(parts) == 1 {
			f.Reason = parts[0] + " has both ends on one net and no DC resistance, so its DC current is undefined; give it a resistance"
		}
		if e := l.edges[0]; e.a < len(names) {
			f.Net = names[e.a]
		}
	case 1:
		f.Net = supplies[0]
		if supplies[0] == circuit.Gnd {
			f.Reason = "a supply on gnd is shorted by definition"
		} else {
			f.Reason = "supply " + supplies[0] + " is shorted to gnd" + through
		}
	default:
		f.Net = supplies[0]
		f.Reason = "supplies " + strings.Join(supplies, " and ") + " are shorted together" + through
	}
	return f
}

// potentials gives every slot its voltage relative to the root of its
// zero-resistance component (differences within a component are fixed by
// the sources on it; between components they mean nothing).
func (s *shortFinder) potentials() []float64 {
	pot := make([]float64, len(s.parent))
	seen := make([]bool, len(s.parent))
	adj := make([][]int, len(s.parent)) // slot → indices of its edges
	for i, e := range s.edges {
		adj[e.a] = append(adj[e.a], i)
		adj[e.b] = append(adj[e.b], i)
	}
	for root := range pot {
		if seen[root] {
			continue
		}
		seen[root] = true
		stack := []int{root}
		for len(stack) > 0 {
			v := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			for _, i := range adj[v] {
				e := s.edges[i]
				w, p := e.b, pot[v]-e.emf
				if e.b == v {
					w, p = e.a, pot[v]+e.emf
				}
				if !seen[w] {
					seen[w], pot[w] = true, p
					stack = append(stack, w)
				}
			}
		}
	}
	return pot
}

// forcedJunction finds a transistor junction held forward by supplies and
// zero-resistance parts alone, at more than the model can carry (expMax·VT):
// its current would be unbounded, and no iteration can find it.
func (s *shortFinder) forcedJunction(nl *netlist) *Failure {
	if len(s.edges) == 0 {
		return nil
	}
	pot := s.potentials()
	for _, q := range nl.bjts {
		b := s.slot(q.b)
		for _, j := range []struct {
			name  string
			other int
		}{{"base-emitter", s.slot(q.e)}, {"base-collector", s.slot(q.c)}} {
			if s.find(b) != s.find(j.other) {
				continue
			}
			nl.pinned = true
			if v := q.pol * (pot[b] - pot[j.other]); v > expMax*nl.vt {
				return &Failure{Cause: Overdriven, Part: q.ref, Parts: []string{q.ref},
					Reason: fmt.Sprintf("the %s junction of %s is held forward at %.3g V by supplies and zero-resistance parts alone, "+
						"so nothing limits its current", j.name, q.ref, v)}
			}
		}
	}
	return nil
}

// indexed is one memoised numbering of the nets: sorted names and name →
// index, both read-only.
type indexed struct {
	names []string
	index map[string]int
}

// netIndexes memoises netIndex by the nets a circuit names: the worst-case
// search solves hundreds of cases of one circuit, whose values differ but
// whose nets do not.
var netIndexes = struct {
	sync.Mutex
	m map[string]indexed
}{m: map[string]indexed{}}

// netIndex numbers c's nets (all but gnd) in name order. The slice and the
// map are shared: read them, never write them.
func netIndex(c *circuit.Circuit) ([]string, map[string]int) {
	key := c.WiringKey()
	netIndexes.Lock()
	got, ok := netIndexes.m[key]
	netIndexes.Unlock()
	if ok {
		return got.names, got.index
	}
	names := c.Nets()
	index := make(map[string]int, len(names))
	for i, n := range names {
		index[n] = i
	}
	netIndexes.Lock()
	if len(netIndexes.m) >= 16 {
		clear(netIndexes.m) // other circuits: a check goes through them one by one
	}
	netIndexes.m[key] = indexed{names, index}
	netIndexes.Unlock()
	return names, index
}
