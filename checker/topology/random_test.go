package topology

import (
	"fmt"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"

	"headroom/checker/circuit"
)

// randomCircuit wires parts of every kind at random among a few nets, so
// that odd topologies (self-loops, parallel parts, floating nets, shorts)
// turn up often.
func randomCircuit(r *rand.Rand) *ckt {
	nets := []string{"gnd", "vcc", "vee", "n1", "n2", "n3", "n4", "n5", "n6"}
	net := func() string { return nets[r.IntN(len(nets))] }
	b := newCkt().supply("vcc", 12)
	if r.IntN(2) == 0 {
		b.supply("vee", -6)
	}
	if r.IntN(2) == 0 {
		b.port("in", net(), "in")
	}
	for i := 0; i < 4+r.IntN(10); i++ {
		ref := fmt.Sprintf("X%d", i)
		switch r.IntN(8) {
		case 0, 1:
			b.r("R"+ref, net(), net())
		case 2:
			b.cap("C"+ref, net(), net())
		case 3:
			if r.IntN(2) == 0 {
				b.l0("L"+ref, net(), net())
			} else {
				b.l("L"+ref, net(), net())
			}
		case 4:
			b.pot("RV"+ref, net(), net(), net())
		case 5:
			b.xfmr("T"+ref, float64(r.IntN(2)), "p", net(), net(), "s", net(), net())
		case 6:
			b.npn("Q"+ref, net(), net(), net())
		case 7:
			b.pnp("Q"+ref, net(), net(), net())
		}
	}
	return b
}

// bruteInductive enumerates every simple DC path from q's collector to a
// rail (ending at the first rail, avoiding q itself and q's own base and
// emitter nets unless they are rails) and returns the inductive part, first
// in file order, that lies on one — the definition, checked the slow way.
func bruteInductive(topo *Topology, self *circuit.Part, q *BJT) string {
	if topo.Rails[q.Collector] {
		return ""
	}
	on := map[int]bool{}
	visited := map[string]bool{q.Collector: true}
	var path []int
	var dfs func(n string)
	dfs = func(n string) {
		for _, ei := range topo.g.adj[n] {
			e := &topo.g.edges[ei]
			if !e.dc() || (e.kind == eCE && e.part == self) {
				continue
			}
			m := e.other(n)
			if visited[m] || (!topo.Rails[m] && (m == q.Base || m == q.Emitter)) {
				continue
			}
			path = append(path, ei)
			if topo.Rails[m] {
				for _, pi := range path {
					on[pi] = true
				}
			} else {
				visited[m] = true
				dfs(m)
				visited[m] = false
			}
			path = path[:len(path)-1]
		}
	}
	dfs(q.Collector)
	best := -1
	for ei := range on {
		if topo.g.edges[ei].inductive() && (best < 0 || ei < best) {
			best = ei
		}
	}
	if best < 0 {
		return ""
	}
	return topo.g.edges[best].label
}

// Random circuits: Analyze never panics, is deterministic, keeps RULES.md's
// invariants, and its inductive-feed search agrees with brute force.
func TestRandomCircuits(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	roles := []string{Coupling, Decoupling, Bypass, Tuning, Choke}
	for i := 0; i < 3000; i++ {
		c := randomCircuit(r).c
		topo := Analyze(c)
		again := Analyze(c)
		if !reflect.DeepEqual(topo.Problems, again.Problems) || !reflect.DeepEqual(topo.Roles, again.Roles) ||
			!reflect.DeepEqual(topo.BJTs, again.BJTs) {
			t.Fatalf("circuit %d: two runs differ", i)
		}
		for _, p := range c.Parts {
			switch p.Kind {
			case circuit.Capacitor, circuit.Inductor:
				if !slices.Contains(roles, topo.Roles[p.Ref]) {
					t.Fatalf("circuit %d: %s has role %q", i, p.Ref, topo.Roles[p.Ref])
				}
				if p.Kind == circuit.Capacitor && (topo.Roles[p.Ref] == Choke) {
					t.Fatalf("circuit %d: capacitor %s is a choke", i, p.Ref)
				}
			case circuit.NPN, circuit.PNP:
				q := topo.BJTs[p.Ref]
				if q == nil {
					t.Fatalf("circuit %d: no facts for %s", i, p.Ref)
				}
				for _, rail := range []string{q.ReturnRail, q.FeedRail} {
					if rail != "" && !topo.Rails[rail] {
						t.Fatalf("circuit %d: %s has non-rail %q", i, p.Ref, rail)
					}
				}
				if q.FeedRail != "" && q.FeedRail == q.ReturnRail {
					t.Fatalf("circuit %d: %s feeds from its return rail", i, p.Ref)
				}
				for _, ref := range q.LowerLeg {
					n := c.Part(ref).Nets
					if c.Part(ref).Kind != circuit.Resistor || !(n[0] == q.Base && n[1] == q.ReturnRail || n[1] == q.Base && n[0] == q.ReturnRail) {
						t.Fatalf("circuit %d: %s lower leg %s is not base to return rail", i, p.Ref, ref)
					}
				}
				if want := bruteInductive(topo, p, q); q.FeedInductor != want || q.InductiveFeed != (want != "") {
					t.Fatalf("circuit %d: %s inductive feed %q, brute force %q\n%s", i, p.Ref, q.FeedInductor, want, dump(c))
				}
			}
		}
	}
}

func dump(c *circuit.Circuit) string {
	s := ""
	for _, p := range c.Parts {
		s += fmt.Sprintf("%s %s %v", p.Ref, p.Kind, p.Nets)
		for _, w := range p.Windings {
			s += fmt.Sprintf(" %s%v", w.Name, w.Nets)
		}
		s += "\n"
	}
	return s
}
