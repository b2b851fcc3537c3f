package report

import (
	"fmt"
	"headroom/checker/noise"
	"math"

	"headroom/checker/poles"
	"headroom/checker/quantity"
	"headroom/checker/sweep"
)

// maxPoles is how many poles nearest the imaginary axis the text and
// Markdown reports list.
const maxPoles = 5

// stability is the nominal case's poles and wide sweep, computed once; nil
// parts where the analysis could not run (no band analysis, an eigen-solver
// failure, no port).
func (r *Report) stability() (*poles.Result, *sweep.Result) {
	if r.stabDone {
		return r.poles, r.sweep
	}
	r.stabDone = true
	cs := r.Case
	if cs == nil || cs.AC == nil {
		return nil, nil
	}
	if p, err := poles.Find(r.Circuit, cs.AC); err == nil {
		r.poles = p
	}
	if s, err := sweep.Run(r.Circuit, cs.AC); err == nil && (s.TwoPort || s.OnePort != "") {
		r.sweep = s
	}
	return r.poles, r.sweep
}

// stabilityTables are the people-facing stability sections.
func (r *Report) stabilityTables() []table {
	pr, sw := r.stability()
	// A circuit without a transistor cannot oscillate: its poles are the
	// filter's resonances, and μ says nothing its loss tables do not.
	passive := !r.Circuit.HasTransistor()
	var ts []table
	if pr != nil {
		title := "Stability: poles nearest the imaginary axis"
		if passive {
			title = "Natural frequencies: poles nearest the imaginary axis (passive, cannot oscillate)"
		}
		pt := table{title: title, header: []string{"frequency", "real part", "damping ζ", "verdict"}}
		for i, p := range pr.Poles {
			if i == maxPoles {
				break
			}
			verdict := "decays"
			if p.Growing() {
				verdict = fmt.Sprintf("GROWS %.3g dB/µs: oscillates", p.GrowthDBPerMicrosecond())
			} else if p.Damping == 0 {
				verdict = "on the axis"
			}
			f := v(p.Freq(), quantity.Hertz)
			if p.Freq() == 0 {
				f = "0 Hz (real)"
			}
			pt.rows = append(pt.rows, []string{f, fmt.Sprintf("%.4g /s", real(p.S)), num(p.Damping), verdict})
		}
		if len(pt.rows) > 0 {
			ts = append(ts, pt)
		}
	}
	if sw == nil || len(sw.Points) == 0 || passive {
		return ts
	}
	lo, hi := sw.Points[0].Frequency, sw.Points[len(sw.Points)-1].Frequency
	if sw.TwoPort {
		st := table{title: fmt.Sprintf("Stability: two-port in → out (sweep %s to %s)", v(lo, quantity.Hertz), v(hi, quantity.Hertz)),
			header: []string{"frequency", "μ", "K", "|Δ|", "gain", "return loss"}}
		row := func(label string, p sweep.Point) []string {
			g := "no path"
			if p.GainDB != nil {
				g = fmt.Sprintf("%.2f dB", *p.GainDB)
			}
			return []string{label, num(p.Mu), num(p.K), num(p.Delta), g, fmt.Sprintf("%.2f dB", p.ReturnLossDB)}
		}
		for _, f := range r.bandFreqs() {
			if p, ok := pointAt(sw, f); ok {
				st.rows = append(st.rows, row(v(f, quantity.Hertz), p))
			}
		}
		if p, ok := pointAt(sw, sw.MuMinHz); ok {
			st.rows = append(st.rows, row("least μ, at "+v(sw.MuMinHz, quantity.Hertz), p))
		}
		ts = append(ts, st)
		return ts
	}
	st := table{title: fmt.Sprintf("Stability: one port (%s), sweep %s to %s", sw.OnePort, v(lo, quantity.Hertz), v(hi, quantity.Hertz)),
		header: []string{"frequency", "impedance into the port"}}
	for _, f := range append(r.bandFreqs(), sw.ReMinHz) {
		if p, ok := pointAt(sw, f); ok {
			st.rows = append(st.rows, []string{v(f, quantity.Hertz), complexText(p.PortZ) + " ohm"})
		}
	}
	st.rows[len(st.rows)-1][0] = "least resistance, at " + v(sw.ReMinHz, quantity.Hertz)
	ts = append(ts, st)
	return ts
}

func (r *Report) bandFreqs() []float64 {
	b := r.Circuit.Band
	return []float64{b[0], math.Sqrt(b[0] * b[1]), b[1]}
}

// pointAt is the sweep point at f (the grid holds the band's points).
func pointAt(sw *sweep.Result, f float64) (sweep.Point, bool) {
	for _, p := range sw.Points {
		if p.Frequency == f {
			return p, true
		}
	}
	return sweep.Point{}, false
}

type jsonPole struct {
	RealPerS float64 `json:"real_per_s"`
	FreqHz   float64 `json:"freq_hz"`
}

type jsonStability struct {
	Poles   []jsonPole `json:"poles"`
	MuMin   *float64   `json:"mu_min"`
	MuMinHz *float64   `json:"mu_min_hz"`
}

type jsonSweep struct {
	Frequency    float64  `json:"frequency"`
	GainDB       *float64 `json:"gain_db"`
	VoltageDB    *float64 `json:"voltage_gain_db,omitempty"`
	ReturnLossDB float64  `json:"return_loss_db"`
	Mu           *float64 `json:"mu"`
	NFDB         *float64 `json:"nf_db,omitempty"` // where the source reaches the out port
}

// stabilityJSON fills the report's stability and sweep members.
func (r *Report) stabilityJSON() (*jsonStability, []jsonSweep) {
	pr, sw := r.stability()
	if pr == nil && sw == nil {
		return nil, nil
	}
	st := &jsonStability{Poles: []jsonPole{}}
	if pr != nil {
		for _, p := range pr.Poles {
			st.Poles = append(st.Poles, jsonPole{quantity.Finite(real(p.S)), quantity.Finite(p.Freq())})
		}
	}
	swp := []jsonSweep{}
	if sw != nil {
		if sw.TwoPort {
			m, hz := quantity.Finite(sw.MuMin), quantity.Finite(sw.MuMinHz)
			st.MuMin, st.MuMinHz = &m, &hz
		}
		for _, p := range sw.Points {
			j := jsonSweep{Frequency: quantity.Finite(p.Frequency), GainDB: finp(p.GainDB), VoltageDB: finp(p.VoltageGainDB), ReturnLossDB: quantity.Finite(p.ReturnLossDB)}
			if sw.TwoPort {
				m := quantity.Finite(p.Mu)
				j.Mu = &m
			}
			if cs := r.Case; cs.AC != nil && cs.AC.HasGain {
				if np, err := noise.At(r.Circuit, cs.OP, cs.AC, p.Frequency); err == nil && np.Valid {
					j.NFDB = finp(&np.NFDB)
				}
			}
			swp = append(swp, j)
		}
	}
	return st, swp
}
