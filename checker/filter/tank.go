package filter

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/topology"
)

// Tank is an inductor or transformer winding with one or more capacitors
// across it (the ends of a rail count as one: a capacitor from the collector
// to gnd is across an inductor from the collector to the supply).
type Tank struct {
	Ref     string // the inductor or transformer
	Winding string // the winding's name, "" for an inductor
	Nets    [2]string
	Caps    []string // the capacitors across it, file order
	L, C    float64  // nominal inductance and the capacitors' sum, H and F
	// Pos is where findings about the tank point: the part's line.
	Pos circuit.Pos
}

// Key is the tank's name in findings and reports: REF or REF.winding.
func (t Tank) Key() string {
	if t.Winding == "" {
		return t.Ref
	}
	return t.Ref + "." + t.Winding
}

// Tanks lists the tanks of c in file order: every inductor the topology
// gave the tuning role, and every transformer winding, with a capacitor
// across it.
func Tanks(c *circuit.Circuit, topo *topology.Topology) []Tank {
	end := func(n string) string {
		if topo.Rails[n] {
			return circuit.Gnd
		}
		return n
	}
	same := func(a, b [2]string) bool {
		a0, a1, b0, b1 := end(a[0]), end(a[1]), end(b[0]), end(b[1])
		return a0 != a1 && ((a0 == b0 && a1 == b1) || (a0 == b1 && a1 == b0))
	}
	across := func(nets [2]string) ([]string, float64) {
		var refs []string
		sum := 0.0
		for _, p := range c.Parts {
			if p.Kind == circuit.Capacitor && len(p.Nets) == 2 && same(nets, [2]string{p.Nets[0], p.Nets[1]}) {
				refs = append(refs, p.Ref)
				sum += p.Value
			}
		}
		return refs, sum
	}
	var out []Tank
	for _, p := range c.Parts {
		switch {
		case p.Kind == circuit.Inductor && len(p.Nets) == 2 && topo.Roles[p.Ref] == topology.Tuning:
			nets := [2]string{p.Nets[0], p.Nets[1]}
			if caps, sum := across(nets); len(caps) > 0 {
				out = append(out, Tank{Ref: p.Ref, Nets: nets, Caps: caps, L: p.Inductance(), C: sum, Pos: p.Pos})
			}
		case p.Kind == circuit.Transformer:
			for _, w := range p.Windings {
				if caps, sum := across(w.Nets); len(caps) > 0 {
					out = append(out, Tank{Ref: p.Ref, Winding: w.Name, Nets: w.Nets, Caps: caps,
						L: p.AL * w.Turns * w.Turns, C: sum, Pos: p.Pos})
				}
			}
		}
	}
	return out
}

// Resonance is a tank with the loading it sees: the impedance between its
// nets with the whole circuit in place peaks at Hz, and falls to 1/√2 of
// the peak at the two frequencies BandwidthHz apart; LoadedQ = Hz/BandwidthHz.
type Resonance struct {
	Hz, LoadedQ, BandwidthHz float64
	PeakOhm                  float64 // |Z| at Hz
	// Found is false when no peak lies within a factor of 4 of the tank's
	// own 1/(2π√(LC)) (the peak nearest it is taken: within a factor 1.5
	// when there is one), or its 3 dB points were not both found (LoadedQ
	// and BandwidthHz are then 0).
	Found bool
}

// Resonate finds the tank's loaded resonance in r.
func Resonate(r *ac.Result, t Tank) (Resonance, error) {
	var res Resonance
	if !(t.L > 0) || !(t.C > 0) {
		return res, fmt.Errorf("tank %s: no inductance or capacitance", t.Key())
	}
	f0 := 1 / (2 * math.Pi * math.Sqrt(t.L*t.C))
	mag := func(f float64) float64 {
		z, err := r.Impedance(f, t.Nets[0], t.Nets[1])
		if err != nil {
			return math.NaN()
		}
		return cmplx.Abs(z)
	}
	// First within a factor 1.5 of the tank's own resonance (the loading
	// seldom pulls it further), then, when the impedance still rises at an
	// end or a 3 dB point lies beyond (a loaded Q below about 2), from a
	// quarter to four times it; steps of 7 % either way, so a loaded Q down
	// to about 7 shows as a peak between grid points.
	var err error
	for _, span := range []struct {
		k float64
		n int
	}{{1.5, 13}, {4, 41}} {
		var peak bool
		var got Resonance
		if got, peak, err = resonateOver(mag, LogGrid(f0/span.k, f0*span.k, span.n)); err != nil {
			return res, fmt.Errorf("tank %s: %w", t.Key(), err)
		}
		if peak && (got.Found || !res.Found) {
			res = got
		}
		if res.Found {
			break
		}
	}
	return res, nil
}

// resonateOver finds the greatest of mag on grid, refines it by golden
// section, and finds the 1/√2 points either side by bisection; peak is
// false when mag is greatest at an end of the grid.
func resonateOver(mag func(float64) float64, grid []float64) (res Resonance, peak bool, err error) {
	zs := make([]float64, len(grid))
	best := 0
	for i, f := range grid {
		zs[i] = mag(f)
		if math.IsNaN(zs[i]) {
			return res, false, fmt.Errorf("no impedance at %g Hz", f)
		}
		if zs[i] > zs[best] {
			best = i
		}
	}
	if best == 0 || best == len(grid)-1 {
		return res, false, nil // the impedance rises to the end of the search: no peak
	}
	// 27 golden steps take the 14 % bracket to about 3e-7.
	res.Hz = goldenN(grid[best-1], grid[best+1], 27, func(f float64) float64 { return -mag(f) })
	res.PeakOhm = mag(res.Hz)
	if res.PeakOhm < zs[best] {
		res.Hz, res.PeakOhm = grid[best], zs[best]
	}
	edge := res.PeakOhm / math.Sqrt2
	side := func(dir int) (float64, bool) {
		for j := best + dir; j >= 0 && j < len(grid); j += dir {
			if zs[j] < edge {
				in, out := grid[j-dir], grid[j]
				if j-dir == best {
					in = res.Hz
				}
				for range 26 { // the step of 7 % down to about 1e-9: the bandwidth of a Q of 1000 to 1e-6
					mid := math.Sqrt(in * out)
					if mag(mid) < edge {
						out = mid
					} else {
						in = mid
					}
				}
				return math.Sqrt(in * out), true
			}
		}
		return 0, false
	}
	f1, ok1 := side(-1)
	f2, ok2 := side(+1)
	if ok1 && ok2 && f2 > f1 {
		res.Found = true
		res.BandwidthHz = f2 - f1
		res.LoadedQ = res.Hz / res.BandwidthHz
	}
	return res, true, nil
}

// Resonances resonates every tank of c in r, in Tanks' order. In a filter
// (Is) the resonators pull each other and the impedance across one has a
// peak for every pole, so each is resonated as a coupled-resonator filter is
// aligned (M. Dishal, Proc. IRE 1949): with every other tank's ends shorted
// (a 1 mΩ resistor from each of its nets to gnd). A resonator then rings at
// its node frequency, and an end resonator's loaded Q is the end Q_E = q·Q_BW
// of the k–q design tables.
func Resonances(c *circuit.Circuit, topo *topology.Topology, r *ac.Result) ([]Tank, []Resonance, error) {
	tanks := Tanks(c, topo)
	out := make([]Resonance, len(tanks))
	passive := Is(c)
	for i, t := range tanks {
		rt := r
		if passive {
			var err error
			if rt, err = shorted(c, tanks, i); err != nil {
				return tanks, out, err
			}
		}
		var err error
		if out[i], err = Resonate(rt, t); err != nil {
			return tanks, out, err
		}
	}
	return tanks, slices.Clip(out), nil
}

// shorted analyses c with every tank but tanks[keep] shorted to gnd.
func shorted(c *circuit.Circuit, tanks []Tank, keep int) (*ac.Result, error) {
	d := c.Clone()
	done := map[string]bool{circuit.Gnd: true}
	for _, n := range tanks[keep].Nets {
		done[n] = true // never short the tank judged
	}
	for j, t := range tanks {
		if j == keep {
			continue
		}
		for _, n := range t.Nets {
			if done[n] || c.Supply(n) != nil {
				continue
			}
			done[n] = true
			d.Parts = append(d.Parts, &circuit.Part{Ref: fmt.Sprintf("short-%d-%s", j, n), Kind: circuit.Resistor,
				Value: 1e-3, Nets: []string{n, circuit.Gnd}})
		}
	}
	return ac.Analyze(d, nil)
}
