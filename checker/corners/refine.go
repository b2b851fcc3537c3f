package corners

import (
	"slices"
	"sort"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/topology"
)

// NearLimit is how close to its limit an item must come before the search
// looks past the vertex its sensitivities point to: an item whose worst case
// so far reaches this fraction of its limit (measured ÷ limit for a "<="
// rule, limit ÷ measured for a ">=" rule), or fails, is refined. Items far
// from their limit keep the sensitivity vertex.
const NearLimit = 0.25

// maxRounds bounds the local search: each round steps every walk one flip
// further, so a figure that keeps getting worse stops after this many flips.
const maxRounds = 8

// beam is how many cases per item the local search walks on from in each
// round: the few worst improving neighbours, not only the worst one.
const beam = 3

// refine is the local search that closes the sensitivity method's blind spot.
// The one-sided sensitivity at nominal can point the wrong way for a figure
// that is not monotonic in a parameter (a return loss passing through a
// match, a loaded winding that switches, a dissipation that peaks inside the
// box, a stability margin), so for every item near its limit the search
// tries every neighbour of the case it reported — each of the item's live
// parameters (those that moved it at nominal, or that its case sets) flipped
// to its other end, or moved from nominal to either end — and walks on from
// the few neighbours that make the figure worse, until none does.
//
// Cost: the neighbours of different items are packed into shared analyses
// wherever their live parameters agree (an item's figure does not depend on
// the parameters that did not move it), so a round costs about as many
// analyses as the busiest stage has neighbours, not the sum over stages;
// every item whose case changed is then judged once more at exactly its case
// (items at one case share it). At most maxRounds rounds.
func refine(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, cfg *engine.Config,
	box []Param, items map[engine.Key]*item, order []engine.Key) error {
	var walks []*walk
	want := map[engine.Key]bool{}
	for _, k := range order {
		it := items[k]
		if !it.best.HasMetric || !near(&it.best) {
			continue
		}
		w := &walk{key: k, it: it, frontier: [][]int8{it.state}, figure: []engine.Finding{it.best},
			seen: map[string]engine.Finding{signature(it.state): it.best}}
		for i := range box {
			if (it.dirs[i] != 0 || it.state[i] != 0) && !(it.hold && box[i].holdsSupply) {
				w.live = append(w.live, i)
			}
		}
		walks = append(walks, w)
		want[k] = true
	}
	walks = append(walks, wideStarts(walks, items, order)...)
	changed := map[engine.Key]item{} // the items the walk moved, with where they started
	for round := 0; round < maxRounds && len(walks) > 0; round++ {
		var reqs []request
		for _, w := range walks {
			if w.start != nil {
				if _, ok := w.seen[signature(w.start)]; !ok {
					reqs = append(reqs, request{w, w.start})
					w.seen[signature(w.start)] = engine.Finding{} // queued
				}
				continue
			}
			for _, st := range w.frontier {
				for _, nb := range w.neighbours(st) {
					if _, ok := w.seen[signature(nb)]; !ok {
						reqs = append(reqs, request{w, nb})
						w.seen[signature(nb)] = engine.Finding{} // queued
					}
				}
			}
		}
		cases, where := pack(reqs, len(box))
		err := inOrder(len(cases), func(v int, buf []engine.Finding) ([]engine.Finding, error) {
			ids := map[string]bool{}
			for _, r := range where[v] {
				ids[r.w.key.Rule] = true
			}
			return engine.MeasureAppend(buf, nominal.Vary(at(c, box, cases[v])), nominal, only(cfg, ids))
		}, func(v int, fs []engine.Finding) {
			got := make(map[engine.Key]engine.Finding, len(want))
			for j := range fs {
				if k := engine.KeyOf(&fs[j]); want[k] {
					got[k] = fs[j]
				}
			}
			for _, r := range where[v] {
				if f, ok := got[r.w.key]; ok {
					r.w.seen[signature(r.nb)] = f
				} else {
					delete(r.w.seen, signature(r.nb))
				}
			}
		})
		if err != nil {
			return err
		}
		var next []*walk
		for _, w := range walks {
			start := *w.it
			if w.step() {
				if _, ok := changed[w.key]; !ok {
					changed[w.key] = start
				}
			}
			if w.left > 0 {
				w.left--
				if w.left == 0 {
					w.frontier = nil
				}
			}
			if len(w.frontier) > 0 {
				next = append(next, w)
			}
		}
		walks = next
	}
	return settle(c, topo, nominal, cfg, box, items, order, changed)
}

// walk is one item's local search.
type walk struct {
	key      engine.Key
	it       *item
	live     []int                     // the parameters that may move the item
	frontier [][]int8                  // the cases to walk on from
	figure   []engine.Finding          // the item's finding at each frontier case
	seen     map[string]engine.Finding // cases judged (or queued) for this item
	walked   map[string]bool           // cases already walked from
	start    []int8                    // a case to be judged and walked on from first, nil once it is
	left     int                       // rounds left to a walk with a budget of its own, 0 without
}

// wideRounds is the budget of a Wide item's walk from another item's case:
// the round that judges the start and two steps on, each to the worst flip
// only (the extra walks must not multiply the search's cost).
const wideRounds = 3

// maxWideLive bounds the extra walks to items of at most this many live
// parameters (a one- or two-stage amplifier's box): each step of a walk
// judges a flip of every live parameter, each flip a sweep or a pole solve,
// which on a large circuit would cost more than the rest of the search.
const maxWideLive = 32

// wideStarts are the extra walks of Wide items: each also walks on from
// every case where another Wide item is worst (the stability margins follow
// one loop, so where one is worst is a good place to look for the other),
// as a walk of its own so that its beam is its own, for wideRounds rounds.
// The walk's live parameters include those the start sets.
func wideStarts(walks []*walk, items map[engine.Key]*item, order []engine.Key) []*walk {
	var out []*walk
	for _, w := range walks {
		if !w.it.wide {
			continue
		}
		for _, k := range order {
			o := items[k]
			if o == w.it || !o.wide || signature(o.state) == signature(w.it.state) {
				continue
			}
			st := append([]int8(nil), o.state...)
			x := &walk{key: w.key, it: w.it, start: st, seen: map[string]engine.Finding{}, left: wideRounds}
			for i := range st {
				if st[i] != 0 || slices.Contains(w.live, i) {
					x.live = append(x.live, i)
				}
			}
			if len(x.live) <= maxWideLive {
				out = append(out, x)
			}
		}
	}
	return out
}

// neighbours are the cases one step from st over the walk's live parameters:
// each one set at its other end, each one at nominal at either end.
func (w *walk) neighbours(st []int8) [][]int8 {
	var out [][]int8
	for _, i := range w.live {
		for _, end := range [2]int8{-1, +1} {
			if end == st[i] {
				continue
			}
			nb := append([]int8(nil), st...)
			nb[i] = end
			out = append(out, nb)
		}
	}
	return out
}

// step moves the frontier on to the few neighbours that are worse than the
// case they neighbour, keeping the item's worst case; it reports whether
// the item's worst case changed.
func (w *walk) step() bool {
	if w.walked == nil {
		w.walked = map[string]bool{}
	}
	if st := w.start; st != nil { // the start was judged this round
		w.start = nil
		f, ok := w.seen[signature(st)]
		if !ok || !f.HasMetric {
			return false // no frontier: the walk ends
		}
		w.frontier, w.figure = [][]int8{st}, []engine.Finding{f}
		if engine.Worse(&f, &w.it.best) && moved(&f, &w.it.best) {
			w.it.best, w.it.state = f, st
			return true
		}
		return false
	}
	changed := false
	var cands [][]int8
	var figs []engine.Finding
	for j, st := range w.frontier {
		w.walked[signature(st)] = true
		for _, nb := range w.neighbours(st) {
			sig := signature(nb)
			f, ok := w.seen[sig]
			if !ok || !f.HasMetric || w.walked[sig] || !engine.Worse(&f, &w.figure[j]) || !moved(&f, &w.figure[j]) {
				continue
			}
			w.walked[sig] = true
			cands, figs = append(cands, nb), append(figs, f)
			if engine.Worse(&f, &w.it.best) && moved(&f, &w.it.best) {
				w.it.best, w.it.state = f, nb
				changed = true
			}
		}
	}
	idx := make([]int, len(cands))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return engine.Worse(&figs[idx[a]], &figs[idx[b]]) })
	w.frontier, w.figure = w.frontier[:0], w.figure[:0]
	width := beam
	if w.left > 0 {
		width = 1 // a walk from another item's case follows its worst flip only
	}
	for _, i := range idx[:min(width, len(idx))] {
		w.frontier, w.figure = append(w.frontier, cands[i]), append(w.figure, figs[i])
	}
	return changed
}

// request is one case one walk wants judged.
type request struct {
	w  *walk
	nb []int8
}

// pack places the requests into as few cases as it can, first fit: a request
// fits a case that sets each of its live parameters as the request does or
// leaves it free. Parameters no request constrains stay at nominal. It
// returns the cases and, for each, the requests it serves.
func pack(reqs []request, n int) ([][]int8, [][]request) {
	var cases [][]int8
	var fixed [][]bool
	var where [][]request
	for _, r := range reqs {
		placed := false
		for v := range cases {
			if fits(r, cases[v], fixed[v]) {
				for _, i := range r.w.live {
					cases[v][i], fixed[v][i] = r.nb[i], true
				}
				where[v] = append(where[v], r)
				placed = true
				break
			}
		}
		if !placed {
			cs, fx := make([]int8, n), make([]bool, n)
			for _, i := range r.w.live {
				cs[i], fx[i] = r.nb[i], true
			}
			cases, fixed, where = append(cases, cs), append(fixed, fx), append(where, []request{r})
		}
	}
	return cases, where
}

func fits(r request, cs []int8, fixed []bool) bool {
	for _, i := range r.w.live {
		if fixed[i] && cs[i] != r.nb[i] {
			return false
		}
	}
	return true
}

// settle judges every item whose case the local search changed once more at
// exactly that case (a packed analysis also set other items' parameters),
// items at one case sharing the analysis, and records the case; an item
// whose exact figure there is not worse than where it started goes back.
func settle(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, cfg *engine.Config,
	box []Param, items map[engine.Key]*item, order []engine.Key, changed map[engine.Key]item) error {
	byCase := map[string][]engine.Key{}
	var sigs []string
	for _, k := range order {
		if _, ok := changed[k]; !ok {
			continue
		}
		sig := signature(items[k].state)
		if _, ok := byCase[sig]; !ok {
			sigs = append(sigs, sig)
		}
		byCase[sig] = append(byCase[sig], k)
	}
	return inOrder(len(sigs), func(v int, buf []engine.Finding) ([]engine.Finding, error) {
		keys := byCase[sigs[v]]
		return engine.MeasureAppend(buf, nominal.Vary(at(c, box, items[keys[0]].state)), nominal, only(cfg, rulesOf(keys)))
	}, func(v int, fs []engine.Finding) {
		keys := byCase[sigs[v]]
		state := items[keys[0]].state
		corner := cornerOf(box, state)
		for _, k := range keys {
			it, start := items[k], changed[k]
			it.best, it.state, it.corner = start.best, start.state, start.corner
			for j := range fs {
				if engine.KeyOf(&fs[j]) == k && engine.Worse(&fs[j], &start.best) {
					it.best, it.state, it.corner = fs[j], state, corner
				}
			}
		}
	})
}

// only is cfg restricted to the rules with the given ids: a case analysed
// for a few items runs only their rules, not every rule of the set (the
// stability sweep, a few hundred factorisations, above all). Rules judge a
// case independently of each other, so the items' findings are the same.
func only(cfg *engine.Config, ids map[string]bool) *engine.Config {
	sub := *cfg
	sub.Rules = make([]*engine.Rule, 0, len(ids))
	for _, r := range cfg.Rules {
		if ids[r.ID] {
			sub.Rules = append(sub.Rules, r)
		}
	}
	return &sub
}

// rulesOf is the set of the items' rule ids.
func rulesOf(keys []engine.Key) map[string]bool {
	ids := make(map[string]bool, len(keys))
	for _, k := range keys {
		ids[k.Rule] = true
	}
	return ids
}

// near reports whether a finding fails or comes within NearLimit of its limit.
func near(f *engine.Finding) bool {
	if f.Failing() {
		return true
	}
	ref := *f
	switch f.Comparison {
	case "<=":
		ref.Measured = f.Limit * NearLimit
	default:
		ref.Measured = f.Limit / NearLimit
	}
	return !engine.Worse(&ref, f)
}

// at is the circuit at a case of the box.
func at(c *circuit.Circuit, box []Param, state []int8) *circuit.Circuit {
	cc := variant(c)
	for i, p := range box {
		switch state[i] {
		case +1:
			p.set(cc, p.Hi)
		case -1:
			p.set(cc, p.Lo)
		}
	}
	return cc
}

// cornerOf lists the parameters a case sets, as FORMAT.md §5's corner map.
func cornerOf(box []Param, state []int8) map[string]float64 {
	corner := map[string]float64{}
	for i, p := range box {
		switch state[i] {
		case +1:
			corner[p.Key] = p.Hi
		case -1:
			corner[p.Key] = p.Lo
		}
	}
	return corner
}
