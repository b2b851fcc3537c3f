package picture

import (
	"math"
	"slices"
	"strconv"

	"headroom/checker/analysis"
	"headroom/checker/check"
	"headroom/checker/circuit"
	"headroom/checker/corners"
	"headroom/checker/filter"
	"headroom/checker/sweep"
	"headroom/checker/topology"
)

// SpreadPerDecade is how densely the worst-case ranges of the response are
// computed: each range costs a sweep at every corner analysed, so the
// spread uses a quarter of the sweep's own density.
const SpreadPerDecade = sweep.PerDecade / 4

// ResponseOf turns a sweep of c into the response drawing's input. With
// spread set (worst-case corners) it also finds each curve's range over the
// corner box at SpreadPerDecade points a decade and the band's three.
func ResponseOf(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, sw *sweep.Result, spread bool) *Response {
	r := &Response{Title: c.Name + ": response over the sweep", Band: c.Band, OutOnly: sw.OnePort == "out"}
	for _, p := range sw.Points {
		r.Freq = append(r.Freq, p.Frequency)
		r.Gain = append(r.Gain, orNaN(p.GainDB))
		r.Voltage = append(r.Voltage, orNaN(p.VoltageGainDB))
		r.Return = append(r.Return, p.ReturnLossDB)
		if sw.TwoPort {
			r.Mu = append(r.Mu, p.Mu)
		}
	}
	if !sw.TwoPort {
		r.Gain, r.Voltage = nil, nil
	}
	if spread && nominal != nil && nominal.AC != nil && len(r.Freq) > 1 {
		r.SpreadFreq = coarse(r.Freq, c.Band)
		r.Spread = spreadOf(c, topo, nominal, r.SpreadFreq)
	}
	return r
}

// coarse keeps every fourth frequency of the grid, its last and the band's
// three points.
func coarse(fs []float64, band [2]float64) []float64 {
	step := sweep.PerDecade / SpreadPerDecade
	var out []float64
	mid := math.Sqrt(band[0] * band[1])
	for i, f := range fs {
		if i%step == 0 || i == len(fs)-1 || f == band[0] || f == band[1] || f == mid {
			out = append(out, f)
		}
	}
	return out
}

var spreadKeys = []string{"gain", "voltage", "return", "mu"}

// spreadOf is the range of every curve at fs over the corner box, found by
// corners.Ranges with the sweep at fs as its figures.
func spreadOf(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, fs []float64) map[string][][2]float64 {
	q := func(cs *analysis.Case) map[string]float64 {
		out := map[string]float64{}
		if cs.AC == nil {
			return out
		}
		sw, err := sweep.RunAt(cs.AC, fs)
		if err != nil || len(sw.Points) != len(fs) {
			return out
		}
		for i, p := range sw.Points {
			k := strconv.Itoa(i)
			if p.GainDB != nil {
				out["gain."+k] = *p.GainDB
			}
			if p.VoltageGainDB != nil {
				out["voltage."+k] = *p.VoltageGainDB
			}
			out["return."+k] = p.ReturnLossDB
			if sw.TwoPort {
				out["mu."+k] = math.Min(p.Mu, 10*MuShown)
			}
		}
		return out
	}
	return rangesByKey(corners.Ranges(c, topo, nominal, q), len(fs))
}

// rangesByKey gathers corners.Ranges' "KEY.i" entries into one range per
// point for each of spreadKeys; a point without a range is NaN, a key
// without any is left out.
func rangesByKey(rg map[string][2]float64, n int) map[string][][2]float64 {
	out := map[string][][2]float64{}
	for _, key := range spreadKeys {
		var s [][2]float64
		any := false
		for i := range n {
			v, ok := rg[key+"."+strconv.Itoa(i)]
			if !ok {
				v = [2]float64{math.NaN(), math.NaN()}
			} else {
				any = true
			}
			s = append(s, v)
		}
		if any {
			out[key] = s
		}
	}
	return out
}

func orNaN(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// ItemsOf turns a check's judged items into the margin chart's rows.
func ItemsOf(js []check.Judged) []Item {
	out := make([]Item, 0, len(js))
	for _, j := range js {
		f := j.Worst
		if f == nil {
			f = j.Nominal
		}
		it := Item{Rule: f.Rule, Part: f.Part, Bound: f.Bound, Comparison: f.Comparison, HasMetric: f.HasMetric,
			Failing: j.Failing, Waived: j.Waived, Severity: j.Severity.String()}
		if j.Nominal != nil && j.Nominal.HasMetric {
			it.Nominal, it.HasNominal = [2]float64{j.Nominal.Measured, j.Nominal.Limit}, true
		}
		if j.Worst != nil && j.Worst.HasMetric {
			it.Worst, it.HasWorst = [2]float64{j.Worst.Measured, j.Worst.Limit}, true
		}
		out = append(out, it)
	}
	return out
}

// TransistorsOf is every transistor with an operating point, in file
// order, its pd derated for the hottest ambient of the circuit's range
// (whole up to 25 °C, linearly to nothing at tj_max, as its datasheet
// derates it), and, when ranges holds them (report.Quantities' keys), its
// corner spread.
func TransistorsOf(c *circuit.Circuit, cs *analysis.Case, ranges map[string][2]float64) []Transistor {
	var out []Transistor
	if cs == nil || cs.OP == nil {
		return nil
	}
	amb := math.Max(c.Ambient.Nominal, c.Ambient.Hi)
	derate := func(pd, tjMax float64) float64 {
		if !(pd > 0) {
			return 0
		}
		if amb > 25 && tjMax > 25 {
			return pd * math.Max(0, math.Min(1, (tjMax-amb)/(tjMax-25)))
		}
		return pd
	}
	for _, p := range c.Parts {
		var t Transistor
		var vk, ik string
		switch q, f := cs.OP.BJTs[p.Ref], cs.OP.FETs[p.Ref]; {
		case q != nil && p.BJT != nil:
			b := p.BJT
			t = Transistor{Ref: p.Ref, VCE: math.Abs(q.VCE), IC: math.Abs(q.IC), ICMax: b.ICMax, VCEO: b.VCEO, PD: derate(b.PD, b.TjMax)}
			vk, ik = ".vce", ".ic"
		case f != nil && p.FET != nil:
			fp := p.FET
			t = Transistor{Ref: p.Ref, FET: true, VCE: math.Abs(f.VDS), IC: math.Abs(f.ID), ICMax: fp.IDSSMax, VCEO: fp.VDSMax, PD: derate(fp.PD, fp.TjMax)}
			vk, ik = ".vds", ".id"
		default:
			continue
		}
		t.Ambient = amb
		vr, ok1 := ranges[p.Ref+vk]
		ir, ok2 := ranges[p.Ref+ik]
		if ok1 && ok2 {
			t.HasSpread = true
			t.VCESpread = magnitudes(vr)
			t.ICSpread = magnitudes(ir)
		}
		if !(t.VCE > 0 && t.IC > 0) {
			continue // cut off or hard saturated: no point on log axes
		}
		out = append(out, t)
	}
	return out
}

func magnitudes(r [2]float64) [2]float64 {
	a, b := math.Abs(r[0]), math.Abs(r[1])
	return [2]float64{math.Min(a, b), math.Max(a, b)}
}

// FilterDensity is how many picture points lie between two neighbours of
// the filter's shape sweep (filter.Measure's grid, which report lists):
// the picture draws that grid's points and FilterDensity − 1 between each
// pair, so a narrow passband is drawn smoothly and the report's points
// lie on the curve.
const FilterDensity = 4

// FilterResponseOf draws a passive filter (filter.Is) over a range suited
// to it: from half the band's low edge, or a fifth below the lowest
// rejection frequency, to twice its high edge, or a quarter above the
// highest rejection frequency. With spread it also finds the curves'
// ranges over the corner box at the shape sweep's points in that range,
// the band's three and the rejection frequencies.
func FilterResponseOf(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, spread bool) (*Response, error) {
	r := &Response{Title: c.Name + ": filter response", Band: c.Band, Filter: true}
	if nominal == nil || nominal.AC == nil {
		return nil, errorString("no band analysis")
	}
	lo, hi := c.Band[0]/2, c.Band[1]*2
	mid := math.Sqrt(c.Band[0] * c.Band[1])
	extra := []float64{c.Band[0], mid, c.Band[1]}
	for _, rj := range c.Rejects {
		lo, hi = math.Min(lo, rj.Freq/1.25), math.Max(hi, rj.Freq*1.25)
		extra = append(extra, rj.Freq)
		r.Rejects = append(r.Rejects, Reject{Freq: rj.Freq, MinDB: rj.MinDB})
	}
	// The shape sweep's grid, continued past its ends when the range is
	// wider, FilterDensity times as dense.
	g0, g1 := c.Band[0]/10, c.Band[1]*10
	steps := float64((filter.SweepPoints - 1) * FilterDensity)
	at := func(k int) float64 { return g0 * math.Pow(g1/g0, float64(k)/steps) }
	k0 := int(math.Floor(steps * math.Log(lo/g0) / math.Log(g1/g0)))
	k1 := int(math.Ceil(steps * math.Log(hi/g0) / math.Log(g1/g0)))
	var fs, coarse []float64
	for k := k0; k <= k1; k++ {
		fs = append(fs, at(k))
		if k%FilterDensity == 0 {
			coarse = append(coarse, at(k))
		}
	}
	fs = sortedUnion(fs, extra)
	pts, err := filter.Response(nominal.AC, fs)
	if err != nil {
		return nil, err
	}
	for _, p := range pts {
		r.Freq = append(r.Freq, p.Frequency)
		r.Gain = append(r.Gain, -p.InsertionLossDB)
		r.Return = append(r.Return, p.ReturnLossDB)
	}
	if spread {
		r.SpreadFreq = sortedUnion(coarse, extra)
		r.Spread = filterSpread(c, topo, nominal, r.SpreadFreq)
	}
	return r, nil
}

func sortedUnion(a, b []float64) []float64 {
	out := append(slices.Clone(a), b...)
	slices.Sort(out)
	return slices.Compact(out)
}

// filterSpread is the range of the transducer gain and the return loss at
// fs over the corner box, found by corners.Ranges.
func filterSpread(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, fs []float64) map[string][][2]float64 {
	q := func(cs *analysis.Case) map[string]float64 {
		out := map[string]float64{}
		if cs.AC == nil {
			return out
		}
		pts, err := filter.Response(cs.AC, fs)
		if err != nil {
			return out
		}
		for i, p := range pts {
			k := strconv.Itoa(i)
			out["gain."+k] = -p.InsertionLossDB
			out["return."+k] = p.ReturnLossDB
		}
		return out
	}
	return rangesByKey(corners.Ranges(c, topo, nominal, q), len(fs))
}
