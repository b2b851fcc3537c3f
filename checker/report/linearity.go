package report

import (
	"fmt"

	"headroom/checker/linearity"
	"headroom/checker/quantity"
)

// DefaultMinVCE is the least VCE the collector may swing down to when the
// caller does not set Report.MinVCE: signal.swing's default.
const DefaultMinVCE = 0.3

// linearity is the nominal case's signal-handling figures, computed once
// (nil when the circuit has no in port or no band analysis).
func (r *Report) linearity() *linearity.Result {
	if !r.linDone {
		r.linDone = true
		cs := r.Case
		minVCE := r.MinVCE
		if !(minVCE >= 0) {
			minVCE = DefaultMinVCE
		}
		if res, err := linearity.Analyze(r.Circuit, cs.Topo, cs.OP, cs.AC, minVCE); err == nil {
			r.lin = res
		}
	}
	return r.lin
}

// linearityTable lists each transistor's intercept, compression and swing
// room, and the in port's totals.
func (r *Report) linearityTable() []table {
	res := r.linearity()
	if res == nil || len(res.Stages) == 0 {
		return nil
	}
	t := table{title: "Signal handling at the in port", header: []string{"part", "configuration", "gm·|ZE|", "IIP3", "input P1dB", "largest input", "set by"}}
	for _, st := range res.Stages {
		row := []string{st.Ref, st.Config, num(st.Degeneration), "-", "-", "-", "-"}
		if st.HasIntercept {
			row[3], row[4] = dbm(st.IIP3DBm), dbm(st.IP1dBDBm)
		}
		if st.HasSwing {
			row[5], row[6] = dbm(st.MaxInputDBm), limitText[st.Limit]
		}
		t.rows = append(t.rows, row)
	}
	tot := []string{"stage", "", "", "-", "-", "-", ""}
	if res.HasIntercept {
		tot[3], tot[4] = dbm(res.IIP3DBm), dbm(res.IP1dBDBm)
	}
	if res.HasSwing {
		tot[5], tot[6] = dbm(res.MaxInputDBm), res.MaxInputRef
		if c := r.Circuit; c.HasMaxLevel {
			tot[6] += fmt.Sprintf("; max_level %s", dbm(c.MaxLevel))
		}
	}
	t.rows = append(t.rows, tot)
	return []table{t}
}

var limitText = map[string]string{"vce": "VCE room", "vceo": "VCEO", "cut-off": "cut-off"}

func dbm(x float64) string { return fixed2(x) + " dBm" }

// jsonLinearity is the report's "linearity" object.
type jsonLinearity struct {
	IIP3DBm     *float64 `json:"iip3_dbm"`
	IP1dBDBm    *float64 `json:"ip1db_dbm"`
	MaxInputDBm *float64 `json:"max_input_dbm,omitempty"`
}

// linearityJSON is the in port's totals; nil without an in port or band
// analysis. max_input_dbm is there only when the circuit gives max_level.
func (r *Report) linearityJSON() *jsonLinearity {
	res := r.linearity()
	if res == nil {
		return nil
	}
	var j jsonLinearity
	if res.HasIntercept {
		j.IIP3DBm, j.IP1dBDBm = finp(&res.IIP3DBm), finp(&res.IP1dBDBm)
	}
	if res.HasSwing && r.Circuit.HasMaxLevel {
		j.MaxInputDBm = finp(&res.MaxInputDBm)
	}
	return &j
}

// maxNoiseRows bounds the noise-contribution table.
const maxNoiseRows = 8

// noiseTable lists, at the band centre, the source's and the largest
// parts' shares of the output noise; shares below 0.05 % and past the
// first maxNoiseRows go into one last row.
func (r *Report) noiseTable() []table {
	p := r.noise()[1]
	if !p.Valid {
		return nil
	}
	total := p.Source
	for _, x := range p.Parts {
		total += x.Power
	}
	t := table{title: "Noise at " + v(p.Frequency, quantity.Hertz) + ": shares of the output noise", header: []string{"source", "noise", "share"}}
	t.rows = append(t.rows, []string{"in port (source resistance at 290 K)", "thermal", pct1(p.Source / total)})
	rest := 0.0
	for i, x := range p.Parts {
		if i < maxNoiseRows && x.Power >= 5e-4*total {
			t.rows = append(t.rows, []string{x.Ref, x.Source, pct1(x.Power / total)})
		} else {
			rest += x.Power
		}
	}
	if rest >= 5e-4*total {
		t.rows = append(t.rows, []string{"the rest", "", pct1(rest / total)})
	}
	return []table{t}
}

func pct1(f float64) string { return fmt.Sprintf("%.1f %%", 100*f) }
