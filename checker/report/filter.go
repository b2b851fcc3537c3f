package report

import (
	"fmt"
	"strings"

	"headroom/checker/filter"
	"headroom/checker/quantity"
)

// filterFigures is a filter's shape and passband and every tank's loaded
// resonance in the nominal case (docs/filters.md), computed once.
type filterFigures struct {
	isFilter bool
	shape    filter.Shape
	shapeErr error
	band     filter.Passband
	bandErr  error
	rejects  []filter.Point
	tanks    []filter.Tank
	res      []filter.Resonance
}

func (r *Report) filterData() *filterFigures {
	if r.filt != nil {
		return r.filt
	}
	ff := &filterFigures{}
	r.filt = ff
	c, cs := r.Circuit, r.Case
	if cs == nil || cs.AC == nil {
		return ff
	}
	ff.tanks, ff.res, _ = filter.Resonances(c, cs.Topo, cs.AC)
	if !filter.Is(c) {
		return ff
	}
	ff.isFilter = true
	ff.shape, ff.shapeErr = filter.Measure(c, cs.AC)
	ff.band, ff.bandErr = filter.Band(c, cs.AC)
	for _, rj := range c.Rejects {
		if pts, err := filter.Response(cs.AC, []float64{rj.Freq}); err == nil {
			ff.rejects = append(ff.rejects, pts[0])
		}
	}
	return ff
}

// sweepRows is how many of the sweep's points the text report shows.
const sweepRows = 25

func (r *Report) filterTables() []table {
	ff := r.filterData()
	var ts []table
	if len(ff.tanks) > 0 {
		title := "Tanks (resonance with the loading each sees)"
		if ff.isFilter {
			title = "Resonators (each with the others shorted, as a filter is aligned)"
		}
		tt := table{title: title,
			header: []string{"tank", "capacitors", "L", "C", "resonance", "loaded Q", "3 dB bandwidth"}}
		for i, t := range ff.tanks {
			res := ff.res[i]
			row := []string{t.Key(), strings.Join(t.Caps, ", "), v(t.L, quantity.Henry), v(t.C, quantity.Farad), "no peak", "-", "-"}
			if res.Hz > 0 {
				row[4] = v(res.Hz, quantity.Hertz)
			}
			if res.Found {
				row[5], row[6] = num(res.LoadedQ), v(res.BandwidthHz, quantity.Hertz)
			}
			tt.rows = append(tt.rows, row)
		}
		ts = append(ts, tt)
	}
	if !ff.isFilter {
		return ts
	}
	ft := table{title: "Filter", header: []string{"figure", "value"}}
	if ff.shapeErr == nil && ff.shape.Found {
		ft.rows = append(ft.rows, []string{"centre (3 dB points' geometric mean)", v(ff.shape.CenterHz, quantity.Hertz)},
			[]string{"3 dB bandwidth", v(ff.shape.BandwidthHz, quantity.Hertz)})
	} else {
		ft.rows = append(ft.rows, []string{"3 dB points", "not both within a decade of the band"})
	}
	if ff.shapeErr == nil {
		ft.rows = append(ft.rows, []string{"least loss", fixed2(ff.shape.PeakLossDB) + " dB at " + v(ff.shape.PeakHz, quantity.Hertz)})
	}
	if ff.bandErr == nil {
		b := ff.band
		ft.rows = append(ft.rows,
			[]string{"insertion loss across the band", fmt.Sprintf("%s dB at most (at %s), ripple %s dB", fixed2(b.MaxLossDB), v(b.Worst.Frequency, quantity.Hertz), fixed2(b.RippleDB))},
			[]string{"return loss across the band", fixed2(b.MinRLDB) + " dB at least"})
	}
	for i, p := range ff.rejects {
		ft.rows = append(ft.rows, []string{"loss at " + v(p.Frequency, quantity.Hertz),
			fmt.Sprintf("%s dB (wanted at least %s dB)", fixed2(p.InsertionLossDB), num(r.Circuit.Rejects[i].MinDB))})
	}
	if filter.Lossless(r.Circuit) {
		ft.rows = append(ft.rows, []string{"losses", "none modelled: no part has a q (docs/filters.md)"})
	}
	ts = append(ts, ft)
	if ff.shapeErr == nil && len(ff.shape.Sweep) > 0 {
		// The text shows an octave either side of the band; JSON has the
		// whole sweep, a decade either side.
		st := table{title: "Filter response (an octave either side of the band)", header: []string{"frequency", "insertion loss", "return loss"}}
		var near []filter.Point
		for _, p := range ff.shape.Sweep {
			if p.Frequency >= r.Circuit.Band[0]/2 && p.Frequency <= 2*r.Circuit.Band[1] {
				near = append(near, p)
			}
		}
		step := max(1, len(near)/sweepRows)
		for i := 0; i < len(near); i += step {
			p := near[i]
			st.rows = append(st.rows, []string{v(p.Frequency, quantity.Hertz), fixed2(p.InsertionLossDB) + " dB", fixed2(p.ReturnLossDB) + " dB"})
		}
		ts = append(ts, st)
	}
	return ts
}

// jsonFilter is the filter's figures in the report's JSON.
type jsonFilter struct {
	CenterHz        *float64       `json:"center_hz"`
	BandwidthHz     *float64       `json:"bandwidth_hz"`
	InsertionLossDB float64        `json:"insertion_loss_db"` // the most across the band
	RippleDB        float64        `json:"ripple_db"`
	ReturnLossDB    float64        `json:"return_loss_db"` // the least across the band
	PeakHz          float64        `json:"peak_hz"`
	PeakLossDB      float64        `json:"peak_loss_db"`
	Lossless        bool           `json:"lossless"`
	Band            []jsonFilterPt `json:"band"`
	Rejects         []jsonReject   `json:"rejects"`
	Sweep           []jsonFilterPt `json:"sweep"`
}

type jsonFilterPt struct {
	Frequency       float64 `json:"frequency"`
	InsertionLossDB float64 `json:"insertion_loss_db"`
	ReturnLossDB    float64 `json:"return_loss_db"`
}

type jsonReject struct {
	Frequency       float64 `json:"frequency"`
	InsertionLossDB float64 `json:"insertion_loss_db"`
	MinDB           float64 `json:"min_db"`
}

func filterPoints(ps []filter.Point) []jsonFilterPt {
	out := make([]jsonFilterPt, len(ps))
	for i, p := range ps {
		out[i] = jsonFilterPt{quantity.Finite(p.Frequency), quantity.Finite(p.InsertionLossDB), quantity.Finite(p.ReturnLossDB)}
	}
	return out
}

// filterJSON adds the tanks' resonance to their parts (a winding's to the
// winding) and returns the filter section, nil for a circuit that is not a
// filter.
func (r *Report) filterJSON(parts map[string]map[string]any) *jsonFilter {
	ff := r.filterData()
	for i, t := range ff.tanks {
		res := ff.res[i]
		e := parts[t.Ref]
		if e == nil {
			continue
		}
		if t.Winding != "" {
			if ws, ok := e["windings"].(map[string]any); ok {
				if we, ok := ws[t.Winding].(map[string]any); ok {
					e = we
				}
			}
		}
		if res.Hz > 0 {
			e["resonance_hz"] = quantity.Finite(res.Hz)
		}
		if res.Found {
			e["loaded_q"] = quantity.Finite(res.LoadedQ)
		}
	}
	if !ff.isFilter || ff.bandErr != nil || ff.shapeErr != nil {
		return nil
	}
	jf := &jsonFilter{InsertionLossDB: quantity.Finite(ff.band.MaxLossDB), RippleDB: quantity.Finite(ff.band.RippleDB),
		ReturnLossDB: quantity.Finite(ff.band.MinRLDB), PeakHz: quantity.Finite(ff.shape.PeakHz),
		PeakLossDB: quantity.Finite(ff.shape.PeakLossDB), Lossless: filter.Lossless(r.Circuit),
		Band: filterPoints(ff.band.Points), Sweep: filterPoints(ff.shape.Sweep), Rejects: []jsonReject{}}
	if ff.shape.Found {
		c, b := quantity.Finite(ff.shape.CenterHz), quantity.Finite(ff.shape.BandwidthHz)
		jf.CenterHz, jf.BandwidthHz = &c, &b
	}
	for i, p := range ff.rejects {
		jf.Rejects = append(jf.Rejects, jsonReject{quantity.Finite(p.Frequency), quantity.Finite(p.InsertionLossDB), r.Circuit.Rejects[i].MinDB})
	}
	return jf
}
