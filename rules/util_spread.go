package rules

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// Helpers shared by the filter and tank rules (tank.tuning, filter.passband,
// filter.rejection): which parts' tolerances move a failing figure most.

// mover is one part's effect on a figure: the figure with the part at the
// high end of its tolerance less the figure with it at the low end (for a
// core's Q range, its two ends), every other value as in the case judged.
type mover struct {
	key   string  // REF, REF.al or REF.q
	tol   string  // "±5 %", "Q 150 to 250"
	delta float64 // the figure's change across the part's range, in its unit
}

// spread moves each part with a spread across its range in copies of the
// case judged (p.Circuit), nominal values from p.NominalCircuit, analyses
// each copy again and measures it with figure; it returns the parts whose
// range changes the figure, largest change first. figure reports false
// when it cannot be measured in a copy (the part is then left out). The
// copies are wired as the nominal circuit, so they are analysed as the
// worst-case search's cases are (p.Nominal.Vary: the same figures as a
// fresh analysis, without building the netlist again).
func spread(p *engine.Pass, figure func(*analysis.Case) (float64, bool)) []mover {
	cs, nom, nominal := p.Circuit, p.NominalCircuit, p.Nominal
	var out []mover
	try := func(ref, key, tol string, edit func(p *circuit.Part, end float64)) {
		var v [2]float64
		for i, end := range []float64{-1, 1} {
			c := cs.Clone()
			part := c.Part(ref)
			if part == nil {
				return
			}
			edit(part, end)
			x, ok := figure(nominal.Vary(c))
			if !ok {
				return
			}
			v[i] = x
		}
		if d := v[1] - v[0]; d != 0 && !math.IsNaN(d) {
			out = append(out, mover{key, tol, d})
		}
	}
	pct := func(t float64) string { return "±" + quantity.Approx(t, quantity.Fraction) }
	for _, p := range nom.Parts {
		p := p
		switch {
		case p.Kind == circuit.Inductor && p.Turns > 0 || p.Kind == circuit.Transformer:
			if t := p.ALTolerance; t > 0 {
				try(p.Ref, p.Ref+".al", "AL "+pct(t), func(q *circuit.Part, end float64) { q.AL = p.AL * (1 + end*t) })
			}
		case p.Kind == circuit.Resistor || p.Kind == circuit.Capacitor || p.Kind == circuit.Inductor:
			if t := p.Tolerance; t > 0 {
				try(p.Ref, p.Ref, pct(t), func(q *circuit.Part, end float64) { q.Value = p.Value * (1 + end*t) })
			}
		}
		if r := p.QRange; r[1] > r[0] && r[0] > 0 {
			try(p.Ref, p.Ref+".q", fmt.Sprintf("Q %g to %g", r[0], r[1]), func(q *circuit.Part, end float64) {
				q.Q = r[0]
				if end > 0 {
					q.Q = r[1]
				}
			})
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return math.Abs(out[i].delta) > math.Abs(out[j].delta) })
	return out
}

// spreadText names the first n movers: "C2 (±5 %) moves it over 120 kHz,
// L1.al (AL ±10 %) by 80 kHz"; "" when there are none.
func spreadText(ms []mover, u quantity.Unit, n int) string {
	if len(ms) == 0 {
		return ""
	}
	var parts []string
	for i, m := range ms {
		if i == n {
			break
		}
		by := quantity.Approx(quantity.Round(math.Abs(m.delta), 3), u)
		if i == 0 {
			parts = append(parts, fmt.Sprintf("%s (%s) moves it over %s", m.key, m.tol, by))
		} else {
			parts = append(parts, fmt.Sprintf("%s (%s) by %s", m.key, m.tol, by))
		}
	}
	return "Across its range, with the rest as in the case judged, " + strings.Join(parts, ", ")
}
