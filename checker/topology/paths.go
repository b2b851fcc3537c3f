package topology

import (
	"sort"

	"headroom/checker/circuit"
)

// inductiveFeed returns the first inductor or winding, in file order, that
// lies on a simple DC path from q's collector to a rail which avoids q's own
// base and emitter nets (unless they are rails, where a path may end) and q
// itself; "" when there is none.
//
// A walk that may revisit nets is not enough: an inductor hanging off the
// collector into a capacitor (collector–L–C–output) is reachable by walking
// there and back, yet carries no DC. So the question is asked as a flow: the
// inductor (u, v) lies on a simple path from the collector s to the rails T
// exactly when two vertex-disjoint paths join {u, v} to {s, T}, which a unit
// vertex-capacity flow of value 2 finds (Menger's theorem). All rails are
// merged into T, so a path ends at the first rail it meets.
func (t *Topology) inductiveFeed(self *circuit.Part, q *BJT) string {
	if t.Rails[q.Collector] {
		return ""
	}
	cross := func(e *edge) bool { return e.dc() && !(e.kind == eCE && e.part == self) }
	excluded := func(n string) bool { return n != q.Collector && (n == q.Base || n == q.Emitter) && !t.Rails[n] }
	// Only the nets the collector reaches without crossing a rail or an
	// excluded net can carry such a path; numbering just those keeps the
	// work local to the stage.
	const rail = 0 // T
	id := map[string]int{}
	var edges []int
	seenEdge := map[int]bool{}
	for _, n := range t.g.walk(q.Collector, cross, func(n string) bool { return !t.Rails[n] && !excluded(n) }) {
		if t.Rails[n] || excluded(n) {
			continue
		}
		id[n] = len(id) + 1
		for _, ei := range t.g.adj[n] {
			if !seenEdge[ei] && cross(&t.g.edges[ei]) {
				seenEdge[ei] = true
				edges = append(edges, ei)
			}
		}
	}
	sort.Ints(edges) // file order
	node := func(n string) int {
		if t.Rails[n] {
			return rail
		}
		if i, ok := id[n]; ok {
			return i
		}
		return -1
	}
	type arc struct{ x, y, edge int }
	var arcs []arc
	var cands []int
	for _, ei := range edges {
		e := &t.g.edges[ei]
		x, y := node(e.a), node(e.b)
		if x < 0 || y < 0 || x == y {
			continue
		}
		arcs = append(arcs, arc{x, y, ei})
		if e.inductive() {
			cands = append(cands, len(arcs)-1)
		}
	}
	if len(cands) == 0 {
		return ""
	}
	s := node(q.Collector)
	// Edges are in file order, so the first inductor found is the one named.
	for _, ci := range cands {
		c := arcs[ci]
		f := newFlow(len(id) + 1)
		for i, a := range arcs {
			if i != ci {
				f.join(a.x, a.y, rail)
			}
		}
		if f.twoDisjoint(c.x, c.y, s, rail) {
			return t.g.edges[c.edge].label
		}
	}
	return ""
}

// flow is a unit-capacity network on split vertices: node i becomes in 2i
// and out 2i+1 joined by capacity 1, so that paths share no vertex.
type flow struct {
	n   int // vertices including source and sink
	adj [][]int
	to  []int
	cap []int
}

func newFlow(nodes int) *flow {
	f := &flow{n: 2*nodes + 2}
	f.adj = make([][]int, f.n)
	for i := 0; i < nodes; i++ {
		f.arc(2*i, 2*i+1)
	}
	return f
}

func (f *flow) arc(x, y int) {
	f.adj[x] = append(f.adj[x], len(f.to))
	f.to, f.cap = append(f.to, y), append(f.cap, 1)
	f.adj[y] = append(f.adj[y], len(f.to))
	f.to, f.cap = append(f.to, x), append(f.cap, 0)
}

// join adds an undirected branch between nodes x and y; the sink-only node
// end is entered but never left.
func (f *flow) join(x, y, end int) {
	if x != end { // leave x, enter y
		f.arc(2*x+1, 2*y)
	}
	if y != end { // leave y, enter x
		f.arc(2*y+1, 2*x)
	}
}

// twoDisjoint reports whether vertex-disjoint paths join u and v to s and
// end (in either pairing).
func (f *flow) twoDisjoint(u, v, s, end int) bool {
	src, sink := f.n-2, f.n-1
	f.arc(src, 2*u)
	f.arc(src, 2*v)
	f.arc(2*s+1, sink)
	f.arc(2*end+1, sink)
	for k := 0; k < 2; k++ {
		if !f.augment(src, sink) {
			return false
		}
	}
	return true
}

// augment finds one augmenting path by breadth-first search and pushes a
// unit along it.
func (f *flow) augment(src, sink int) bool {
	prev := make([]int, f.n) // arc used to enter each vertex, -1 unseen
	for i := range prev {
		prev[i] = -1
	}
	queue := []int{src}
	prev[src] = -2
	for len(queue) > 0 && prev[sink] == -1 {
		x := queue[0]
		queue = queue[1:]
		for _, a := range f.adj[x] {
			y := f.to[a]
			if f.cap[a] > 0 && prev[y] == -1 {
				prev[y] = a
				queue = append(queue, y)
			}
		}
	}
	if prev[sink] == -1 {
		return false
	}
	for y := sink; y != src; {
		a := prev[y]
		f.cap[a]--
		f.cap[a^1]++
		y = f.to[a^1]
	}
	return true
}
