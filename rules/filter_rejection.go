package rules

import (
	"fmt"

	"headroom/checker/analysis"
	"headroom/checker/engine"
	"headroom/checker/filter"
	"headroom/checker/quantity"
)

// FilterRejection checks that a filter stops the frequencies the circuit
// names.
var FilterRejection = &engine.Rule{
	ID: "filter.rejection",
	Doc: engine.Doc{
		Title: "a filter must stop the frequencies the circuit names",
		Why: "A band-pass filter is there to keep strong signals outside the band (a broadcast band, the next amateur " +
			"band, a harmonic) out of the amplifier and mixer behind it. Its skirt is set by the resonators' coupling " +
			"and Q, and moves with their tolerances.",
		Formula: "for a filter (an in and an out port, no transistor), at each [circuit] reject entry: the insertion " +
			"loss IL(freq) = −10·log10 of the transducer gain, each port terminated in its own impedance, >= min_db; unit dB",
		Source: "insertion loss as in C. Bowick, RF Circuit Design, 2nd ed., ch. 3; the figures wanted are the circuit's own",
		Fix: "Advice: the parts ranked by how far their tolerance moves the loss at that frequency; more resonators or " +
			"a narrower passband when no tolerance is to blame.",
	},
	PassiveOnly: true,
	Run:         runFilterRejection,
}

func runFilterRejection(p *engine.Pass) error {
	c := p.Circuit
	if p.A.AC == nil || !filter.Is(c) {
		return nil
	}
	for _, r := range c.Rejects {
		r := r
		pts, err := filter.Response(p.A.AC, []float64{r.Freq})
		if err != nil {
			return nil
		}
		freq := r.Freq
		f := engine.Finding{Part: r.Name(), Pos: r.Pos, AtHz: freq, HasMetric: true,
			Measured: pts[0].InsertionLossDB, Limit: r.MinDB, Comparison: ">=", Unit: "dB",
			Message: fmt.Sprintf("the filter loses %s at %s, which it must stop by at least %s",
				db(pts[0].InsertionLossDB), hz(freq), db(r.MinDB))}
		if engine.Fails(f.Measured, f.Limit, ">=") {
			f.FixLater = func() (string, []engine.Change) {
				return filterAdvice(p, func(cs *analysis.Case) (float64, bool) {
					if cs.AC == nil {
						return 0, false
					}
					q, err := filter.Response(cs.AC, []float64{freq})
					return q[0].InsertionLossDB, err == nil
				}, quantity.Decibel, r.MinDB-f.Measured), nil
			}
		}
		p.Report(f)
	}
	return nil
}
