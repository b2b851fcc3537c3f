package corners

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"strings"
	"sync/atomic"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/topology"
)

// moveTol is how much a metric must move for a parameter to count: one part
// in 10⁶ (FORMAT.md §6).
const moveTol = 1e-6

// item is one judged thing (rule, part, bound) during the search.
type item struct {
	best   engine.Finding
	corner map[string]float64 // where best was found
	nom    *engine.Finding    // the item at nominal, nil when nominal did not judge it
	dirs   []int8             // per parameter: +1 high end hurts, −1 low end, 0 no effect
	state  []int8             // the case best was found at: per parameter −1 low, 0 nominal, +1 high
	hold   bool               // supplies stay nominal for this item
	wide   bool               // engine.Rule.Wide: walked from the other wide items' cases too
}

// Worst judges every item at the most adverse case of the box and returns
// one finding per item (failing or not, as engine.Evaluate does). Messages
// are written only for the cases reported.
func Worst(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, cfg *engine.Config) ([]engine.Finding, error) {
	return search(c, topo, nominal, cfg, true)
}

// search is Worst, with the local search of refine when local is set (tests
// turn it off to measure what it changes).
func search(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, cfg *engine.Config, local bool) ([]engine.Finding, error) {
	box := Box(c)
	fs, err := engine.Measure(nominal, nominal, cfg)
	if err != nil {
		return nil, err
	}
	hold, wide := map[string]bool{}, map[string]bool{}
	for _, r := range cfg.Rules {
		hold[r.ID], wide[r.ID] = r.HoldSupplies, r.Wide
	}
	items := map[engine.Key]*item{}
	var order []engine.Key
	get := func(f *engine.Finding) *item {
		k := engine.KeyOf(f)
		it := items[k]
		if it == nil {
			it = &item{best: *f, corner: map[string]float64{}, dirs: make([]int8, len(box)), state: make([]int8, len(box)), hold: hold[f.Rule], wide: wide[f.Rule]}
			items[k] = it
			order = append(order, k)
		}
		return it
	}
	for i := range fs {
		it := get(&fs[i])
		it.nom = &fs[i]
	}

	// One analysis per parameter, at its high end: the sign of each item's
	// change gives the adverse end.
	err = inOrder(len(box), func(i int, buf []engine.Finding) ([]engine.Finding, error) {
		cc := variant(c)
		box[i].set(cc, box[i].Hi)
		return engine.MeasureAppend(buf, nominal.Vary(cc), nominal, cfg)
	}, func(i int, hi []engine.Finding) {
		p := box[i]
		var corner map[string]float64 // shared by the items whose worst this case is
		for j := range hi {
			f := &hi[j]
			it := get(f)
			if it.hold && p.holdsSupply {
				continue
			}
			if it.nom != nil && f.HasMetric && it.nom.HasMetric && moved(f, it.nom) {
				switch {
				case engine.Worse(f, it.nom):
					it.dirs[i] = +1
				case engine.Worse(it.nom, f):
					it.dirs[i] = -1
				}
			}
			if engine.Worse(f, &it.best) {
				if corner == nil {
					corner = map[string]float64{p.Key: p.Hi}
				}
				it.best, it.corner = *f, corner
				clear(it.state)
				it.state[i] = +1
			}
		}
	})
	if err != nil {
		return nil, err
	}

	// Judge each item at its vertex; items wanting the same vertex share it.
	vertices := map[string][]engine.Key{}
	var vorder []string
	for _, k := range order {
		it := items[k]
		sig := signature(it.dirs)
		if !strings.ContainsAny(sig, "+-") {
			continue
		}
		if _, ok := vertices[sig]; !ok {
			vorder = append(vorder, sig)
		}
		vertices[sig] = append(vertices[sig], k)
	}
	err = inOrder(len(vorder), func(v int, buf []engine.Finding) ([]engine.Finding, error) {
		keys := vertices[vorder[v]]
		return engine.MeasureAppend(buf, nominal.Vary(at(c, box, items[keys[0]].dirs)), nominal, only(cfg, rulesOf(keys)))
	}, func(v int, vf []engine.Finding) {
		keys := vertices[vorder[v]]
		dirs := items[keys[0]].dirs
		corner := cornerOf(box, dirs)
		at := make(map[engine.Key]*engine.Finding, len(keys)) // the items judged here
		for _, k := range keys {
			at[k] = nil
		}
		for j := range vf {
			k := engine.KeyOf(&vf[j])
			if _, ok := at[k]; ok {
				at[k] = &vf[j] // a key's last finding, as a map of all of them kept
			}
		}
		for _, k := range keys {
			it := items[k]
			if f := at[k]; f != nil && !engine.Worse(&it.best, f) {
				it.best, it.corner = *f, corner
				copy(it.state, dirs)
			}
		}
	})
	if err != nil {
		return nil, err
	}

	if local {
		if err := refine(c, topo, nominal, cfg, box, items, order); err != nil {
			return nil, err
		}
	}

	out := make([]engine.Finding, 0, len(order))
	for _, k := range order {
		it := items[k]
		f := it.best
		f.ResolveMessage()
		f.Corner = it.corner
		f.CornerText = Describe(box, it.corner)
		out = append(out, f)
	}
	return out, nil
}

// inOrder runs measure for cases 0 … n−1 and hands each case's findings to
// use, in case order, so that the search's outcome does not depend on
// scheduling. With GOMAXPROCS above one the cases are analysed on that many
// goroutines, a few cases ahead of use; measure must then be safe to run
// concurrently (an analysis reads the circuit, topology, nominal case and
// configuration it shares with the others). A finding slice handed to use
// is reused for a later case: use copies what it keeps. The error is the
// first in case order.
func inOrder(n int, measure func(i int, buf []engine.Finding) ([]engine.Finding, error), use func(i int, fs []engine.Finding)) error {
	analysed.Add(int64(n))
	workers := min(runtime.GOMAXPROCS(0), n)
	if workers <= 1 {
		var buf []engine.Finding
		for i := 0; i < n; i++ {
			fs, err := measure(i, buf[:0])
			if err != nil {
				return err
			}
			use(i, fs)
			buf = fs
		}
		return nil
	}
	type result struct {
		fs  []engine.Finding
		err error
	}
	results := make([]chan result, n)
	for i := range results {
		results[i] = make(chan result, 1)
	}
	ahead := 2 * workers
	slots := make(chan struct{}, ahead)                     // a slot per case in flight or waiting for use
	free := make(chan []engine.Finding, ahead)              // slices use is done with
	ctx, cancel := context.WithCancel(context.Background()) // stops the workers when use is done
	defer cancel()
	var next atomic.Int64
	for range workers {
		go func() {
			for {
				// Take a slot before a case number, so that the cases in
				// flight are always the next ones use waits for.
				select {
				case slots <- struct{}{}:
				case <-ctx.Done():
					return
				}
				i := int(next.Add(1) - 1)
				if i >= n {
					<-slots
					return
				}
				var buf []engine.Finding
				select {
				case buf = <-free:
				default:
				}
				fs, err := measure(i, buf[:0])
				results[i] <- result{fs, err}
			}
		}()
	}
	for i := 0; i < n; i++ {
		r := <-results[i]
		if r.err != nil {
			return r.err
		}
		use(i, r.fs)
		select {
		case free <- r.fs:
		default:
		}
		<-slots
	}
	return nil
}

// analysed counts the cases the searches of this process have analysed (each
// an analysis of the circuit at one case, judged by some rules): the
// benchmarks report it per search, a cost that does not vary with the
// machine's load.
var analysed atomic.Int64

// moved reports whether a metric moved by more than one part in 10⁶. The
// scale is the larger of the figure and its limit, so that a metric that is
// zero at nominal (bias.drift) is not moved by solver noise.
func moved(a, b *engine.Finding) bool { return movedBy(a, b, moveTol) }

// movedBy is moved with a tolerance of its own.
func movedBy(a, b *engine.Finding, tol float64) bool {
	scale := math.Max(math.Max(math.Abs(a.Measured), math.Abs(b.Measured)), math.Max(math.Abs(a.Limit), math.Abs(b.Limit)))
	return math.Abs(a.Measured-b.Measured) > tol*scale || rel(a.Limit, b.Limit) > tol
}

func rel(a, b float64) float64 {
	d := math.Abs(a - b)
	if s := math.Max(math.Abs(a), math.Abs(b)); s > 0 {
		return d / s
	}
	return d
}

func signature(dirs []int8) string {
	var b strings.Builder
	for _, d := range dirs {
		b.WriteByte("-0+"[d+1])
	}
	return b.String()
}

// Describe writes a corner for people, in box order: part values as their
// deviation from nominal ("R1 -5 %"), hFE, AL, supply volts and the ambient.
func Describe(box []Param, corner map[string]float64) string {
	var parts []string
	for _, p := range box {
		v, ok := corner[p.Key]
		if !ok {
			continue
		}
		switch {
		case p.vpFor != nil:
			parts = append(parts, fmt.Sprintf("%s IDSS %s (|VP| %s)", strings.TrimSuffix(p.Key, ".idss"),
				quantity.Format(v, quantity.Ampere), quantity.Format(p.vpFor(v), quantity.Volt)))
		case strings.HasSuffix(p.Key, ".hfe"):
			parts = append(parts, fmt.Sprintf("%s hFE %s", strings.TrimSuffix(p.Key, ".hfe"), quantity.Format(v, quantity.Ratio)))
		case p.Tolerance:
			name := p.Key
			if strings.HasSuffix(name, ".al") {
				name = strings.TrimSuffix(name, ".al") + " AL"
			}
			parts = append(parts, fmt.Sprintf("%s %+.3g %%", name, (v/p.Nom-1)*100))
		case p.Key == "ambient":
			parts = append(parts, "ambient "+quantity.Format(v, quantity.Celsius))
		default:
			parts = append(parts, p.Key+" "+quantity.Format(v, p.Unit))
		}
	}
	return strings.Join(parts, ", ")
}
