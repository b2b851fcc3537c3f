// Package report builds what `headroom report` shows: the nominal operating
// point, the band analysis, the roles of the reactive parts and, with
// worst-case corners, the range of the main figures over the corner box. One
// Report value is rendered as text, Markdown or JSON (FORMAT.md §5).
package report

import (
	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/linearity"
	"headroom/checker/noise"
	"headroom/checker/poles"
	"headroom/checker/sweep"
)

// Report is everything `report` prints about one circuit.
type Report struct {
	Circuit *circuit.Circuit
	Case    *analysis.Case // the nominal case
	// Ranges holds, with worst-case corners, the [lo, hi] of each main figure
	// over the box, keyed like "Q1.ic" or "band.0.gain_db"; nil for nominal.
	Ranges map[string][2]float64
	// Pictures are the drawings the Markdown and HTML forms embed (or link);
	// none for text and JSON.
	Pictures []Picture

	stabDone bool
	poles    *poles.Result
	sweep    *sweep.Result

	noiseDone bool
	noisePts  [3]noise.Point // valid only where Valid

	// MinVCE is the rule set's signal.swing min_vce, V (negative or NaN:
	// DefaultMinVCE).
	MinVCE  float64
	linDone bool
	lin     *linearity.Result

	filt *filterFigures // filter.go, once
}

// noise is the nominal case's noise at the band points, computed once.
func (r *Report) noise() [3]noise.Point {
	if !r.noiseDone {
		r.noiseDone = true
		r.noisePts = noiseOf(r.Case)
	}
	return r.noisePts
}

// noiseOf is a case's noise at its band points; every point invalid when
// the case has no band analysis or the noise analysis fails.
func noiseOf(cs *analysis.Case) [3]noise.Point {
	var pts [3]noise.Point
	if cs.AC == nil || cs.OP == nil || !cs.AC.HasGain {
		return pts
	}
	got, err := noise.Band(cs.Circuit, cs.OP, cs.AC)
	if err != nil {
		return pts
	}
	return got
}

// Quantities are the figures whose range over the box the report shows:
// each BJT's IC, VCE and dissipation, and each band point's gain, input
// return loss and noise figure. Missing figures (no operating point, no ports) are left out.
func Quantities(cs *analysis.Case) map[string]float64 {
	q := map[string]float64{}
	if cs.OP != nil {
		for ref, b := range cs.OP.BJTs {
			q[ref+".ic"], q[ref+".vce"], q[ref+".power"] = b.IC, b.VCE, b.Power
		}
		for ref, f := range cs.OP.FETs {
			q[ref+".id"], q[ref+".vds"], q[ref+".power"] = f.ID, f.VDS, f.Power
		}
	}
	if cs.AC != nil {
		for i, bp := range cs.AC.Band {
			if bp.GainDB != nil {
				q[bandKey(i, "gain_db")] = *bp.GainDB
			}
			if cs.AC.HasInput {
				q[bandKey(i, "return_loss_db")] = bp.ReturnLossDB
			}
		}
		for i, p := range noiseOf(cs) {
			if p.Valid {
				q[bandKey(i, "nf_db")] = p.NFDB
			}
		}
	}
	return q
}

func bandKey(i int, name string) string {
	return "band." + string(rune('0'+i)) + "." + name
}
