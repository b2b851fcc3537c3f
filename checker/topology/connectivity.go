package topology

import (
	"fmt"
	"sort"
	"strings"

	"headroom/checker/circuit"
	"headroom/checker/spell"
)

// ProblemKind classifies a net.connectivity problem.
type ProblemKind string

// The wiring mistakes net.connectivity reports (RULES.md).
const (
	// SupplyShort: a supply net joined to gnd or another supply through
	// inductors or windings with no DC resistance.
	SupplyShort ProblemKind = "supply-short"
	// ZeroResistanceLoop: a loop made only of inductors or windings with no
	// DC resistance; its DC current is undefined.
	ZeroResistanceLoop ProblemKind = "zero-resistance-loop"
	// OneConnection: a net other than gnd with a single connection.
	OneConnection ProblemKind = "one-connection"
	// NoDCPath: a transistor terminal whose net reaches no rail through a DC
	// path (other than through that transistor).
	NoDCPath ProblemKind = "no-dc-path"
)

// Problem is one net.connectivity finding.
type Problem struct {
	Kind ProblemKind
	Net  string // the net concerned
	// Part is what the finding names and points at: the first part in file
	// order on Net; the supply's net for a SupplyShort (Supply set); the
	// first member in file order for a ZeroResistanceLoop; the port's name
	// (Port set) or the supply's net (Supply set) for a one-connection net
	// that no part touches.
	Part    string
	Supply  bool
	Port    bool
	Parts   []string // every part involved (windings as REF.WINDING), in file order
	Message string   // says what is wrong and what to do
}

func (t *Topology) findProblems() {
	t.Problems = append(t.Problems, t.supplyShorts()...)
	t.Problems = append(t.Problems, t.zeroLoops()...)
	single, ps := t.singleConnections()
	t.Problems = append(t.Problems, ps...)
	t.Problems = append(t.Problems, t.floatingTerminals(single)...)
}

// supplyShorts reports each supply whose net reaches another rail through
// zero-resistance inductors and windings, whatever the supply's impedance: a
// supply net held at gnd is a wiring mistake either way.
func (t *Topology) supplyShorts() []Problem {
	var out []Problem
	for _, s := range t.c.Supplies {
		if s == nil || s.Net == circuit.Gnd {
			continue
		}
		prev := map[string]int{s.Net: -1} // edge used to enter each net
		queue := []string{s.Net}
		hit := ""
		for len(queue) > 0 && hit == "" {
			n := queue[0]
			queue = queue[1:]
			for _, ei := range t.g.adj[n] {
				e := &t.g.edges[ei]
				m := e.other(n)
				if !e.zeroR {
					continue
				}
				if _, ok := prev[m]; ok {
					continue
				}
				prev[m] = ei
				if t.Rails[m] {
					hit = m
					break
				}
				queue = append(queue, m)
			}
		}
		if hit == "" {
			continue
		}
		var path []*edge
		for n := hit; prev[n] >= 0; {
			e := &t.g.edges[prev[n]]
			path = append(path, e)
			n = e.other(n)
		}
		to := "gnd"
		if hit != circuit.Gnd {
			to = "supply " + hit
		}
		labels := labelsInOrder(path)
		out = append(out, Problem{
			Kind: SupplyShort, Net: s.Net, Part: s.Net, Supply: true, Parts: labels,
			Message: fmt.Sprintf("supply %s is shorted to %s through %s, with no DC resistance: check %s nets",
				s.Net, to, joinAnd(labels), pick(len(labels) == 1, "its", "their")),
		})
	}
	return out
}

// zeroLoops reports every independent loop of zero-resistance inductors and
// windings: each branch that closes a loop in a spanning forest built in file
// order gives one problem, so fixing every report leaves no loop.
func (t *Topology) zeroLoops() []Problem {
	parent := map[string]string{}
	var find func(string) string
	find = func(n string) string {
		p, ok := parent[n]
		if !ok || p == n {
			return n
		}
		r := find(p)
		parent[n] = r
		return r
	}
	tree := map[string][]int{} // forest adjacency, edge indexes
	var out []Problem
	for ei := range t.g.edges {
		e := &t.g.edges[ei]
		if !e.zeroR {
			continue
		}
		ra, rb := find(e.a), find(e.b)
		if ra != rb {
			parent[ra] = rb
			tree[e.a] = append(tree[e.a], ei)
			tree[e.b] = append(tree[e.b], ei)
			continue
		}
		loop := append(t.treePath(tree, e.a, e.b), e)
		labels := labelsInOrder(loop)
		first := loop[0]
		for _, x := range loop {
			if x.order < first.order {
				first = x
			}
		}
		var msg string
		if len(labels) == 1 {
			msg = fmt.Sprintf("%s has both ends on net %s and no DC resistance, so its DC current is undefined: give it a resistance or correct its nets",
				labels[0], e.a)
		} else {
			msg = fmt.Sprintf("%s form a loop with no DC resistance, so its DC current is undefined: give one of them a resistance (its measured DC resistance)",
				joinAnd(labels))
		}
		out = append(out, Problem{Kind: ZeroResistanceLoop, Net: first.a, Part: first.part.Ref, Parts: labels, Message: msg})
	}
	return out
}

// treePath returns the forest edges on the path from a to b (nil when a == b).
func (t *Topology) treePath(tree map[string][]int, a, b string) []*edge {
	prev := map[string]int{a: -1}
	queue := []string{a}
	for len(queue) > 0 {
		n := queue[0]
		queue = queue[1:]
		if n == b {
			break
		}
		for _, ei := range tree[n] {
			m := t.g.edges[ei].other(n)
			if _, ok := prev[m]; !ok {
				prev[m] = ei
				queue = append(queue, m)
			}
		}
	}
	var path []*edge
	for n := b; prev[n] >= 0; {
		e := &t.g.edges[prev[n]]
		path = append(path, e)
		n = e.other(n)
	}
	return path
}

// singleConnections reports every net other than gnd with one connection,
// and returns the set of them.
func (t *Topology) singleConnections() (map[string]bool, []Problem) {
	single := map[string]bool{}
	type found struct {
		p     Problem
		order int
	}
	var fs []found
	for _, n := range t.nets() {
		ts := t.touches[n]
		if n == circuit.Gnd || len(ts) != 1 {
			continue
		}
		single[n] = true
		term := ts[0]
		p := Problem{Kind: OneConnection, Net: n, Part: term.Ref, Port: term.Port, Supply: term.Supply}
		if !term.Port && !term.Supply {
			p.Parts = []string{describePart(term)}
		}
		p.Message = fmt.Sprintf("net %s has only one connection (%s): connect it to the rest of the circuit or correct the net name", n, describe(term))
		if s := t.closestNet(n); s != "" {
			p.Message += fmt.Sprintf(" (did you mean %s?)", s)
		}
		fs = append(fs, found{p, term.Order})
	}
	sort.SliceStable(fs, func(i, j int) bool { return fs[i].order < fs[j].order })
	out := make([]Problem, len(fs))
	for i, f := range fs {
		out[i] = f.p
	}
	return single, out
}

// floatingTerminals reports, once per net, transistor terminals whose net
// reaches no rail through a DC path that avoids that transistor. A net
// already reported as having one connection is not reported again.
func (t *Topology) floatingTerminals(skip map[string]bool) []Problem {
	var nets []string
	who := map[string][]string{}
	for _, p := range t.c.Parts {
		if p == nil || !(p.Kind.IsBJT() || p.Kind.IsFET()) || len(p.Nets) < 3 {
			continue
		}
		for j, n := range p.Nets {
			if skip[n] || len(t.dcRails(n, p)) > 0 {
				continue
			}
			if _, ok := who[n]; !ok {
				nets = append(nets, n)
			}
			who[n] = append(who[n], p.Ref+" "+pinName(p.Kind, j))
		}
	}
	var out []Problem
	for _, n := range nets {
		out = append(out, Problem{
			Kind: NoDCPath, Net: n, Part: t.FirstPartOn(n), Parts: refsOf(who[n]),
			Message: fmt.Sprintf("%s (net %s) has no DC path to a supply or gnd: add a resistor, choke or winding from %s towards a rail (capacitors pass no DC)",
				joinAnd(who[n]), n, n),
		})
	}
	return out
}

// closestNet suggests the net a one-connection net was probably meant to be:
// the nearest other net (gnd included) by edit distance, ignoring case, within
// a third of the name's length (at least 1, at most spell.MaxDistance); "" when none is that close.
func (t *Topology) closestNet(n string) string {
	limit := min(max(len(n)/3, 1), spell.MaxDistance)
	best, bestD := "", limit+1
	for _, m := range t.nets() {
		if m == n || len(t.touches[m]) < 2 && m != circuit.Gnd { // a candidate is a net in use
			continue
		}
		if d := spell.Distance(strings.ToLower(n), strings.ToLower(m)); d < bestD {
			best, bestD = m, d
		}
	}
	return best
}

// describe names a connection for a message: "R1", "Q1 base", "T1.primary",
// "port in", "supply vcc".
func describe(term Terminal) string {
	switch {
	case term.Port:
		return "port " + term.Ref
	case term.Supply:
		return "supply " + term.Ref
	case term.Kind.IsBJT() || term.Kind.IsFET():
		return term.Ref + " " + term.Pin
	case term.Kind == circuit.Potentiometer:
		return term.Ref + " " + term.Pin
	}
	return describePart(term)
}

func describePart(term Terminal) string {
	if term.Winding != "" {
		return term.Ref + "." + term.Winding
	}
	return term.Ref
}

// labelsInOrder lists the edges' labels in file order, without repeats.
func labelsInOrder(es []*edge) []string {
	s := append([]*edge(nil), es...)
	sort.SliceStable(s, func(i, j int) bool { return s[i].order < s[j].order })
	var out []string
	seen := map[string]bool{}
	for _, e := range s {
		if !seen[e.label] {
			seen[e.label] = true
			out = append(out, e.label)
		}
	}
	return out
}

// refsOf turns "Q1 base" descriptions into their references, without repeats.
func refsOf(ds []string) []string {
	var out []string
	for _, d := range ds {
		r, _, _ := strings.Cut(d, " ")
		if len(out) == 0 || out[len(out)-1] != r {
			out = append(out, r)
		}
	}
	return out
}

// joinAnd writes a list as "A", "A and B" or "A, B and C".
func joinAnd(s []string) string {
	switch len(s) {
	case 0:
		return ""
	case 1:
		return s[0]
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

func pick(c bool, a, b string) string {
	if c {
		return a
	}
	return b
}
