package corners

import (
	"slices"
	"sort"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/topology"
)

// NearLimit is the margin the search promises its result for: for every
// item that fails or reaches this fraction of its limit at the worst vertex
// (measured ÷ limit for a "<=" rule, limit ÷ measured for a ">=" rule) it
// reports that vertex, within 0.1 %, as measured against a brute force over
// every vertex (generated_bruteforce_test.go).
const NearLimit = 0.25

// searchFrom is where the search on past the sensitivity vertex starts: an
// item that fails or reaches this fraction of its limit at the case found so
// far is refined; items farther from their limit keep that case. It is below
// NearLimit because the sensitivity vertex can fall short of the worst one
// by more than the item's distance to the margin (a coupling capacitor's
// ratio, whose limit moves with the case, read 0.22 there and 0.27 at the
// worst vertex).
const searchFrom = 0.2

// maxRounds bounds the local search: each round steps every walk one flip
// (or one escape) further, so a figure that keeps getting worse stops after
// this many rounds.
const maxRounds = 10

// beam is how many cases per item the local search walks on from in each
// round: the few worst improving neighbours, not only the worst one.
const beam = 3

// escapes is how many times a walk that no single flip makes worse tries
// the moves of escape before it ends. A walk whose worst case stays short
// of NearLimit does not escape: the margin the search promises is not in
// question for its item, and escapes cost it the most analyses of all.
const escapes = 1

// maxPairs bounds the parameters escape pairs: the live parameters whose
// single flip moved the figure most at the case escaped from, at most this
// many (10 pairs of flips from a vertex). With four, every worst vertex of
// the 500 generated circuits was still found, but one more item of the 500
// further ones (-generated 1000, a return loss) missed its; with three,
// three items of the first 500 did.
const maxPairs = 5

// maxProbes bounds escape's probes of the parameters that did not move the
// item at nominal: they are probed only when there are at most this many
// (every box of up to 12 parameters). A probe sets every parameter, so it
// shares its analysis with no other item's request; on a larger box the
// probes are left out and a figure that switches what it measures can still
// be reported short of its worst vertex.
const maxProbes = 12

// probeTol is how much a probe must move the figure for the parameters it
// sets to join the walk: a tenth of the 0.1 % the search promises, so that
// a parameter that moves a figure by a few parts in 10⁶ (a capacitor far
// from the net a decoupling capacitor's limit is measured on) does not enter
// the reported corner.
const probeTol = 1e-4

// refine is the local search that closes the sensitivity method's blind spot.
// The one-sided sensitivity at nominal can point the wrong way for a figure
// that is not monotonic in a parameter (a return loss passing through a
// match, a loaded winding that switches, a dissipation that peaks inside the
// box, a stability margin), so for every item near its limit the search
// tries every neighbour of the case it reported — each of the item's live
// parameters (those that moved it at nominal, or that its case sets) flipped
// to its other end, or moved from nominal to either end — and walks on from
// the few neighbours that make the figure worse. Where none does, it tries
// the moves of escape once and walks on from those that make it worse. Each
// item is also walked from the case opposite its reported one (opposite).
// A stability item (Wide) does neither: its extra walks are wideStarts'.
//
// Cost: the requests of different items are packed into shared analyses
// wherever their live parameters agree (an item's figure does not depend on
// the parameters that did not move it), so a round costs about as many
// analyses as the busiest stage asks for, not the sum over stages; every
// item whose case changed is then judged once more at exactly its case
// (items at one case share it). At most maxRounds rounds. Per round a walk
// of k live parameters asks for at most 2·k·beam flips, or, once and only
// when its worst case reached NearLimit, for escape's 4·C(maxPairs, 2) = 40
// pairs (10 from a vertex) and, when probing, 2 probes and the walk's worst
// case judged exactly (3 analyses shared with no other); the walk from the
// opposite case asks for its start and 2·k flips.
func refine(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, cfg *engine.Config,
	box []Param, items map[engine.Key]*item, order []engine.Key) error {
	var walks []*walk
	want := map[engine.Key]bool{}
	for _, k := range order {
		it := items[k]
		if !it.best.HasMetric || !nearLimit(&it.best, searchFrom) {
			continue
		}
		w := &walk{key: k, it: it, frontier: [][]int8{it.state}, figure: []engine.Finding{it.best},
			seen: map[string]engine.Finding{signature(it.state): it.best}, base: it.state, baseFig: it.best}
		if !it.wide {
			w.escapes = escapes
		}
		for i := range box {
			if (it.dirs[i] != 0 || it.state[i] != 0) && !(it.hold && box[i].holdsSupply) {
				w.live = append(w.live, i)
			} else if !(it.hold && box[i].holdsSupply) {
				w.dead = append(w.dead, i)
			}
		}
		walks = append(walks, w)
		want[k] = true
	}
	walks = append(walks, append(opposite(walks), wideStarts(walks, items, order)...)...)
	changed := map[engine.Key]item{} // the items the walk moved, with where they started
	for round := 0; round < maxRounds && len(walks) > 0; round++ {
		var reqs []request
		for _, w := range walks {
			reqs = w.requests(reqs)
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
					r.w.seen[r.sig] = f
				} else {
					delete(r.w.seen, r.sig)
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
			if len(w.frontier) == 0 && w.escapes > 0 && nearLimit(&w.baseFig, NearLimit) {
				w.escapes--
				w.escaping = true
			}
			if len(w.frontier) > 0 || w.escaping {
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
	dead     []int                     // the others (escape probes them)
	frontier [][]int8                  // the cases to walk on from
	figure   []engine.Finding          // the item's finding at each frontier case
	seen     map[string]engine.Finding // cases judged (or queued) for this item
	walked   map[string]bool           // cases already walked from
	start    []int8                    // a case to be judged and walked on from first, nil once it is
	left     int                       // rounds left to a walk with a budget of its own, 0 without
	escapes  int                       // escapes left
	escaping bool                      // this round judges the moves of escape from base
	moves    [][]int8                  // those moves
	probed   []bool                    // per move, whether it is a probe of the dead parameters
	base     []int8                    // the worst case this walk has judged
	baseFig  engine.Finding            // the item there
}

// wideRounds is the budget of a Wide item's walk from another item's case:
// the round that judges the start and two steps on, each to the worst flip
// only (the extra walks must not multiply the search's cost).
const wideRounds = 3

// oppositeRounds is the budget of the walk from the opposite case: the round
// that judges the start and one step on, to its worst flip. Like every walk
// from a start of its own (wideRounds too), it steps on only from a start
// that fails or reaches NearLimit: the margin the search promises is not in
// question at a start farther from the limit.
const oppositeRounds = 2

// maxWideLive bounds the extra walks to items of at most this many live
// parameters (a one- or two-stage amplifier's box): each step of a walk
// judges a flip of every live parameter, each flip a sweep or a pole solve,
// which on a large circuit would cost more than the rest of the search.
const maxWideLive = 32

// opposite are the extra walks from the case opposite each item's reported
// one: every live parameter the case sets at its other end, every other
// live one at the end its sensitivity says does not hurt. A figure that
// bends back over the box (one concave in some combination of the
// parameters, as the impedance a choke shunts can be) is worst at one of
// two opposite ends of that combination, and the sensitivities at nominal
// point to only one of them; the walk from the opposite case flips back
// the parameter the figure depends on most (oppositeRounds).
func opposite(walks []*walk) []*walk {
	var out []*walk
	for _, w := range walks {
		if w.it.wide {
			continue // its extra walks are wideStarts'
		}
		st := make([]int8, len(w.it.state))
		for _, i := range w.live {
			switch {
			case w.it.state[i] != 0:
				st[i] = -w.it.state[i]
			default:
				st[i] = -w.it.dirs[i]
			}
		}
		out = append(out, &walk{key: w.key, it: w.it, live: slices.Clone(w.live), start: st, seen: map[string]engine.Finding{}, left: oppositeRounds})
	}
	return out
}

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

// requests appends the cases the walk wants judged this round, each once.
func (w *walk) requests(reqs []request) []request {
	ask := func(nb []int8, fix []int, sig string) {
		if _, ok := w.seen[sig]; ok {
			return
		}
		w.seen[sig] = engine.Finding{} // queued
		reqs = append(reqs, request{w, nb, fix, sig})
	}
	switch {
	case w.start != nil:
		ask(w.start, w.live, signature(w.start))
	case w.escaping:
		w.escape()
		all := append(slices.Clip(w.live), w.dead...) // judged at exactly the case
		if w.probing() {
			ask(w.base, all, exact(w.base))
		}
		for j, nb := range w.moves {
			fix := w.live
			if w.probed[j] {
				fix = all
			}
			ask(nb, fix, signature(nb))
		}
	default:
		for _, st := range w.frontier {
			for _, nb := range w.neighbours(st) {
				ask(nb, w.live, signature(nb))
			}
		}
	}
	return reqs
}

// neighbours are the cases one step from st over the walk's live parameters:
// each one set at its other end, each one at nominal at either end.
func (w *walk) neighbours(st []int8) [][]int8 {
	var out [][]int8
	for _, i := range w.live {
		out = flips(out, st, i)
	}
	return out
}

// flips appends st with parameter i moved to each end it is not at.
func flips(out [][]int8, st []int8, i int) [][]int8 {
	for _, end := range [2]int8{-1, +1} {
		if end != st[i] {
			nb := append([]int8(nil), st...)
			nb[i] = end
			out = append(out, nb)
		}
	}
	return out
}

// escape lists the moves out of a case no single flip makes worse, from the
// walk's worst case: pairs of flips of the live parameters that moved the
// figure most there (a ridge, where two parameters pull the figure's
// argument opposite ways and each alone overshoots it: a dissipation that
// peaks inside the box, a return loss through a match), and probes of the
// parameters that did not move the item at nominal, all of them at their
// low ends and all at their high ends (a figure that switches what it
// measures, as the loaded winding does, can depend on them after the
// switch), when probing says so. A probe is not a case the walk goes to
// (it would set parameters that do not move the figure, and the corner
// reported lists only those that do): one that moves
// the figure makes them live, and the walk goes on from its worst case
// over them too. With the probes the walk's worst case is judged once more
// at exactly that case, for them to be compared with.
func (w *walk) escape() {
	w.moves, w.probed = w.moves[:0], w.probed[:0]
	b := w.base
	type eff struct {
		i int
		d float64
	}
	var effs []eff
	for _, i := range w.live {
		d := 0.0
		for _, nb := range flips(nil, b, i) {
			if f, ok := w.seen[signature(nb)]; ok && f.HasMetric && moved(&f, &w.baseFig) {
				d = max(d, rel(f.Measured, w.baseFig.Measured))
			}
		}
		if d > 0 {
			effs = append(effs, eff{i, d})
		}
	}
	sort.SliceStable(effs, func(a, b int) bool { return effs[a].d > effs[b].d })
	effs = effs[:min(len(effs), maxPairs)]
	for a := range effs {
		for _, one := range flips(nil, b, effs[a].i) {
			for _, e := range effs[a+1:] {
				for _, nb := range flips(nil, one, e.i) {
					w.moves, w.probed = append(w.moves, nb), append(w.probed, false)
				}
			}
		}
	}
	if w.probing() {
		for _, end := range [2]int8{-1, +1} {
			nb := slices.Clone(b)
			for _, p := range w.dead {
				nb[p] = end
			}
			w.moves, w.probed = append(w.moves, nb), append(w.probed, true)
		}
	}
}

// probing reports whether escape probes the walk's dead parameters: only
// when there are at most maxProbes of them and the walk's worst case is
// bent. A figure that switches what it measures shows it on the way there:
// the switch makes the figure worse at an end its sensitivity at nominal
// called the harmless one.
func (w *walk) probing() bool {
	return len(w.dead) > 0 && len(w.dead) <= maxProbes && w.bent()
}

// bent reports whether the walk's worst case sets a live parameter other
// than at the end where the item's sensitivity at nominal says it hurts.
func (w *walk) bent() bool {
	for _, i := range w.live {
		if w.it.dirs[i] != 0 && w.base[i] != w.it.dirs[i] {
			return true
		}
	}
	return false
}

// step moves the frontier on to the few neighbours (or moves of escape) that
// are worse than the case they come from, keeping the item's worst case; it
// reports whether the item's worst case changed.
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
		w.base, w.baseFig = st, f
		if nearLimit(&f, NearLimit) { // else the start is not worth a step
			w.frontier, w.figure = [][]int8{st}, []engine.Finding{f}
		}
		if engine.Worse(&f, &w.it.best) && moved(&f, &w.it.best) {
			w.it.best, w.it.state = f, st
			return true
		}
		return false
	}
	changed, again := false, false
	var cands [][]int8
	var figs []engine.Finding
	consider := func(nb []int8, from *engine.Finding) {
		sig := signature(nb)
		f, ok := w.seen[sig]
		if !ok || !f.HasMetric || w.walked[sig] || !engine.Worse(&f, from) || !moved(&f, from) {
			return
		}
		w.walked[sig] = true
		cands, figs = append(cands, nb), append(figs, f)
		if engine.Worse(&f, &w.baseFig) && moved(&f, &w.baseFig) {
			w.base, w.baseFig = nb, f
		}
		if engine.Worse(&f, &w.it.best) && moved(&f, &w.it.best) {
			w.it.best, w.it.state = f, nb
			changed = true
		}
	}
	if w.escaping {
		w.escaping = false
		if f, ok := w.seen[exact(w.base)]; ok && f.HasMetric && moved(&f, &w.baseFig) {
			// The walk's worst case was judged at a packed case that set a
			// parameter it depends on: judge the escape against the exact
			// figure, and keep that as the item's if it was the item's worst.
			if signature(w.it.state) == signature(w.base) {
				w.it.best, changed = f, true
			}
			w.baseFig = f
		}
		from := w.baseFig
		for j, nb := range w.moves {
			if !w.probed[j] {
				consider(nb, &from)
			} else if f, ok := w.seen[signature(nb)]; ok && f.HasMetric && movedBy(&f, &from, probeTol) {
				again = true // a dead parameter moves the item here
			}
		}
		if again {
			w.live, w.dead = append(w.live, w.dead...), nil
			delete(w.walked, signature(w.base))
		}
	} else {
		for j, st := range w.frontier {
			w.walked[signature(st)] = true
			for _, nb := range w.neighbours(st) {
				consider(nb, &w.figure[j])
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
		width = 1 // a walk from another case follows its worst flip only
	}
	for _, i := range idx[:min(width, len(idx))] {
		w.frontier, w.figure = append(w.frontier, cands[i]), append(w.figure, figs[i])
	}
	if again { // walk on from the worst case too, now over every parameter
		w.frontier, w.figure = append(w.frontier, w.base), append(w.figure, w.baseFig)
	}
	return changed
}

// request is one case one walk wants judged.
type request struct {
	w   *walk
	nb  []int8
	fix []int  // the parameters the case must set as nb does: the walk's live ones (a probe: all)
	sig string // where the walk keeps the finding: nb's signature, or exact's
}

// exact is where a walk keeps its item's finding at exactly st, every
// parameter outside the walk's live ones at st's value. A packed case leaves
// them to other walks, and an item whose figure turns out to depend on one
// of them (a loaded winding that switched) was judged there at a case a
// little different from st.
func exact(st []int8) string { return signature(st) + "=" }

// pack places the requests into as few cases as it can, first fit: a request
// fits a case that sets each of its fixed parameters as the request does or
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
				for _, i := range r.fix {
					cases[v][i], fixed[v][i] = r.nb[i], true
				}
				where[v] = append(where[v], r)
				placed = true
				break
			}
		}
		if !placed {
			cs, fx := make([]int8, n), make([]bool, n)
			for _, i := range r.fix {
				cs[i], fx[i] = r.nb[i], true
			}
			cases, fixed, where = append(cases, cs), append(fixed, fx), append(where, []request{r})
		}
	}
	return cases, where
}

func fits(r request, cs []int8, fixed []bool) bool {
	for _, i := range r.fix {
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
func near(f *engine.Finding) bool { return nearLimit(f, NearLimit) }

// nearLimit reports whether a finding fails or reaches the fraction frac of
// its limit.
func nearLimit(f *engine.Finding, frac float64) bool {
	if f.Failing() {
		return true
	}
	ref := *f
	switch f.Comparison {
	case "<=":
		ref.Measured = f.Limit * frac
	default:
		ref.Measured = f.Limit / frac
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
