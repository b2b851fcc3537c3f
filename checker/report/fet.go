package report

import (
	"headroom/checker/ac"
	"headroom/checker/dc"
	"headroom/checker/quantity"
)

// fetJSON fills a FET's entry of `report --format json` (docs/fet.md): the
// drain current, gate-source and drain-source voltages in the device's
// forward sense, gm, dissipation and region; with corners, the ranges of
// id, vds and power.
func (r *Report) fetJSON(e map[string]any, ref string, f *dc.FET, a *ac.Result) {
	e["id"], e["vgs"], e["vds"] = quantity.Finite(f.ID), quantity.Finite(f.VGS), quantity.Finite(f.VDS)
	e["power"], e["region"] = quantity.Finite(f.Power), f.Region
	if a != nil && a.FETs[ref] != nil {
		e["gm"] = quantity.Finite(a.FETs[ref].GM)
	}
	if r.Ranges != nil {
		e["ranges"] = r.rangesOf(ref, "id", "vds", "power")
	}
}

// rangesOf is a transistor's "ranges" entry: each key's [lo, hi] over the box.
func (r *Report) rangesOf(ref string, keys ...string) map[string][2]float64 {
	rg := map[string][2]float64{}
	for _, k := range keys {
		if v, ok := r.Ranges[ref+"."+k]; ok {
			rg[k] = [2]float64{quantity.Finite(v[0]), quantity.Finite(v[1])}
		}
	}
	return rg
}

// fetTable is the report's table of field-effect transistors.
func (r *Report) fetTable(op *dc.Result, a *ac.Result) table {
	t := table{title: "Field-effect transistors", header: []string{"part", "device", "region", "ID", "VDS", "VGS", "IDSS", "|VP|", "dissipation", "gm"}}
	for _, p := range r.Circuit.Parts {
		f := op.FETs[p.Ref]
		if f == nil {
			continue
		}
		row := []string{p.Ref, p.Device, f.Region, r.ranged(p.Ref+".id", f.ID, quantity.Ampere),
			r.ranged(p.Ref+".vds", f.VDS, quantity.Volt), v(f.VGS, quantity.Volt), v(f.IDSS, quantity.Ampere),
			v(f.VP, quantity.Volt), r.ranged(p.Ref+".power", f.Power, quantity.Watt), ""}
		if a != nil && a.FETs[p.Ref] != nil {
			row[9] = v(a.FETs[p.Ref].GM, quantity.Ratio) + " S"
		}
		t.rows = append(t.rows, row)
	}
	return t
}
