package corners

import (
	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/topology"
)

// Ranges returns, for every figure q gives, its [lowest, highest] value over
// the box, found as Worst finds adverse cases: one analysis per parameter at
// its high end gives each figure's direction, then each figure is evaluated
// at its low and its high vertex (figures sharing a vertex share the analysis).
func Ranges(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, q func(*analysis.Case) map[string]float64) map[string][2]float64 {
	box := Box(c)
	nom := q(nominal)
	dirs := map[string][]int8{}
	out := map[string][2]float64{}
	for k, x := range nom {
		dirs[k] = make([]int8, len(box))
		out[k] = [2]float64{x, x}
	}
	widen := func(vals map[string]float64) {
		for k, x := range vals {
			r, ok := out[k]
			if !ok {
				continue
			}
			out[k] = [2]float64{min(r[0], x), max(r[1], x)}
		}
	}
	for i, p := range box {
		cc := variant(c)
		p.set(cc, p.Hi)
		hi := q(nominal.Vary(cc))
		widen(hi)
		for k, x := range hi {
			if d, ok := dirs[k]; ok && rel(x, nom[k]) > moveTol {
				if x > nom[k] {
					d[i] = +1
				} else {
					d[i] = -1
				}
			}
		}
	}
	done := map[string]map[string]float64{}
	for k, d := range dirs {
		for _, sign := range []int8{+1, -1} {
			sig := signature(scale(d, sign))
			vals, ok := done[sig]
			if !ok {
				if !hasMove(d) {
					continue
				}
				cc := variant(c)
				for i, p := range box {
					switch d[i] * sign {
					case +1:
						p.set(cc, p.Hi)
					case -1:
						p.set(cc, p.Lo)
					}
				}
				vals = q(nominal.Vary(cc))
				done[sig] = vals
			}
			if x, ok := vals[k]; ok {
				r := out[k]
				out[k] = [2]float64{min(r[0], x), max(r[1], x)}
			}
		}
	}
	return out
}

func scale(d []int8, s int8) []int8 {
	out := make([]int8, len(d))
	for i, x := range d {
		out[i] = x * s
	}
	return out
}

func hasMove(d []int8) bool {
	for _, x := range d {
		if x != 0 {
			return true
		}
	}
	return false
}
