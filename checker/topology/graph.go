package topology

import "headroom/checker/circuit"

// edgeKind says what a branch of the net graph is made of; the walks of
// RULES.md differ only in which kinds they may cross.
type edgeKind int

const (
	eResistor  edgeKind = iota // a resistor
	ePot                       // one section of a potentiometer (a–wiper or wiper–b)
	eCapacitor                 // a capacitor (never part of a DC path)
	eInductor                  // an inductor
	eWinding                   // one winding of a transformer
	ePort                      // a port's impedance, from its net to gnd
	eCE                        // a transistor's collector–emitter path
)

// edge is one branch between two nets.
type edge struct {
	kind  edgeKind
	a, b  string
	part  *circuit.Part // nil for a port
	order int           // file order: the part's index, ports after every part
	label string        // what a message calls it: "R1", "T1.primary", "port in"
	zeroR bool          // an inductor or winding with no DC resistance
}

func (e *edge) other(n string) string {
	if e.a == n {
		return e.b
	}
	return e.a
}

// dc reports whether the edge belongs to a DC path (RULES.md): everything
// but a capacitor.
func (e *edge) dc() bool { return e.kind != eCapacitor }

// inductive reports whether the edge is an inductor or a winding.
func (e *edge) inductive() bool { return e.kind == eInductor || e.kind == eWinding }

// graph is the circuit as nets joined by edges.
type graph struct {
	edges []edge
	adj   map[string][]int // net → indexes into edges
}

func buildGraph(c *circuit.Circuit) *graph {
	g := &graph{adj: map[string][]int{}}
	add := func(e edge) {
		g.edges = append(g.edges, e)
		i := len(g.edges) - 1
		g.adj[e.a] = append(g.adj[e.a], i)
		if e.b != e.a {
			g.adj[e.b] = append(g.adj[e.b], i)
		}
	}
	for i, p := range c.Parts {
		if p == nil {
			continue
		}
		switch p.Kind {
		case circuit.Resistor, circuit.Capacitor, circuit.Inductor:
			if len(p.Nets) != 2 {
				continue
			}
			e := edge{a: p.Nets[0], b: p.Nets[1], part: p, order: i, label: p.Ref}
			switch p.Kind {
			case circuit.Resistor:
				e.kind = eResistor
			case circuit.Capacitor:
				e.kind = eCapacitor
			default:
				e.kind = eInductor
				e.zeroR = p.Resistance == 0
			}
			add(e)
		case circuit.Potentiometer:
			if len(p.Nets) != 3 {
				continue
			}
			add(edge{kind: ePot, a: p.Nets[0], b: p.Nets[1], part: p, order: i, label: p.Ref})
			add(edge{kind: ePot, a: p.Nets[1], b: p.Nets[2], part: p, order: i, label: p.Ref})
		case circuit.Transformer:
			for _, w := range p.Windings {
				if w == nil {
					continue
				}
				add(edge{kind: eWinding, a: w.Nets[0], b: w.Nets[1], part: p, order: i,
					label: p.Ref + "." + w.Name, zeroR: w.Resistance == 0})
			}
		case circuit.NPN, circuit.PNP, circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
			if len(p.Nets) < 3 {
				continue
			}
			add(edge{kind: eCE, a: p.Nets[0], b: p.Nets[2], part: p, order: i, label: p.Ref})
		}
	}
	for i, pt := range c.Ports {
		if pt == nil {
			continue
		}
		add(edge{kind: ePort, a: pt.Net, b: circuit.Gnd, order: len(c.Parts) + i, label: "port " + pt.Name})
	}
	return g
}

// walk visits every net reachable from start over the edges that cross
// accepts, continuing onward from a reached net only when expand allows it
// (the start is always left). It returns the nets reached, start first, in
// breadth-first order; that order is deterministic because adjacency lists
// follow file order.
func (g *graph) walk(start string, cross func(*edge) bool, expand func(net string) bool) []string {
	seen := map[string]bool{start: true}
	order := []string{start}
	for i := 0; i < len(order); i++ {
		n := order[i]
		if i > 0 && !expand(n) {
			continue
		}
		for _, ei := range g.adj[n] {
			e := &g.edges[ei]
			if !cross(e) {
				continue
			}
			m := e.other(n)
			if !seen[m] {
				seen[m] = true
				order = append(order, m)
			}
		}
	}
	return order
}
