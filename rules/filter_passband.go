package rules

import (
	"fmt"
	"math"
	"strings"

	"headroom/checker/circuit"
	"headroom/checker/eseries"

	"headroom/checker/analysis"
	"headroom/checker/engine"
	"headroom/checker/filter"
	"headroom/checker/quantity"
)

// FilterPassband checks that a passive filter passes the whole band with
// little loss and little ripple.
var FilterPassband = &engine.Rule{
	ID:       "filter.passband",
	FixMoves: []string{engine.MoveGain}, // retuning a filter moves its loss across the band by design
	Doc: engine.Doc{
		Title: "a filter must pass the band with little loss and ripple",
		Why: "A band-pass filter in front of an amplifier adds its insertion loss to the noise figure and takes it " +
			"from the signal; a passband that has slipped (5 % capacitors, ±10 % cores) puts one band edge on the " +
			"filter's skirt, where the loss climbs by decibels for a few kilohertz.",
		Formula: "for a filter (an in and an out port, no transistor), each port terminated in its own impedance: " +
			"insertion loss IL(f) = −10·log10 of the transducer gain 4·RS/RL·|V_out/E|², at " +
			fmt.Sprint(filter.BandPoints) + " frequencies spread evenly on a log scale from the band's lowest to its highest; " +
			"max IL <= max_loss_db (bound \"loss\") and max IL − min IL <= max_ripple_db (bound \"ripple\"); unit dB; " +
			"the finding reports the worse bound. Parts without a q are lossless, and the finding says so.",
		Source: "insertion loss and transducer gain as in C. Bowick, RF Circuit Design, 2nd ed., ch. 2–3; the limits " +
			"(3 dB, 1 dB): common practice, no published source",
		Fix: "When the nominal passband is off the band: every capacitor scaled by (f_centre/f_band)², to preferred values, " +
			"which retunes a filter of fixed inductors and keeps its shape, offered when the whole circuit then passes. " +
			"Advice: where the passband sits in the case judged (centre and 3 dB bandwidth), and the parts ranked by how " +
			"far their tolerance moves the failing figure; make the first adjustable or of closer tolerance, or use " +
			"higher-Q inductors when the loss is the resonators' own.",
		Params: []engine.Param{
			{Name: "max_loss_db", Unit: quantity.Decibel, Help: "largest insertion loss across the band"},
			{Name: "max_ripple_db", Unit: quantity.Decibel, Help: "largest difference of insertion loss across the band"},
		},
	},
	PassiveOnly: true,
	Run:         runFilterPassband,
}

func runFilterPassband(p *engine.Pass) error {
	c := p.Circuit
	if p.A.AC == nil || !filter.Is(c) {
		return nil
	}
	pb, err := filter.Band(c, p.A.AC)
	if err != nil {
		return nil
	}
	lossless := ""
	if filter.Lossless(p.NominalCircuit) {
		lossless = "; no part has a q, so this is the response of ideal parts and real ones lose more"
	}
	items := []struct {
		bound    string
		measured float64
		limit    float64
		msg      string
		figure   func(filter.Passband) float64
	}{
		{"loss", pb.MaxLossDB, p.Param("max_loss_db"),
			fmt.Sprintf("the filter loses %s at %s, the most across the band (return loss %s there)%s",
				db(pb.MaxLossDB), hz(pb.Worst.Frequency), db(pb.Worst.ReturnLossDB), lossless),
			func(b filter.Passband) float64 { return b.MaxLossDB }},
		{"ripple", pb.RippleDB, p.Param("max_ripple_db"),
			fmt.Sprintf("the filter's loss varies by %s across the band (most %s at %s)%s",
				db(pb.RippleDB), db(pb.MaxLossDB), hz(pb.Worst.Frequency), lossless),
			func(b filter.Passband) float64 { return b.RippleDB }},
	}
	for _, it := range items {
		f := engine.Finding{Bound: it.bound, AtHz: pb.Worst.Frequency, HasMetric: true,
			Measured: it.measured, Limit: it.limit, Comparison: "<=", Unit: "dB", Message: it.msg}
		if engine.Fails(it.measured, it.limit, "<=") {
			f.FixForms = func() []engine.FixForm { return retune(p) }
			figure := it.figure
			f.FixLater = func() (string, []engine.Change) {
				return filterAdvice(p, func(cs *analysis.Case) (float64, bool) {
					if cs.AC == nil {
						return 0, false
					}
					b, err := filter.Band(cs.Circuit, cs.AC)
					return figure(b), err == nil
				}, quantity.Decibel, 0), nil
			}
		}
		p.Report(f)
	}
	return nil
}

// db writes a level in dB to three figures.
func db(v float64) string { return quantity.Approx(quantity.Round(v, 3), quantity.Decibel) }

// filterAdvice says where the passband sits in the case judged and which
// parts' tolerances move the figure most; with short > 0 (the figure's
// shortfall), it says when no single tolerance could make it up.
func filterAdvice(p *engine.Pass, figure func(*analysis.Case) (float64, bool), u quantity.Unit, short float64) string {
	c := p.Circuit
	var s string
	if shape, err := filter.Measure(c, p.A.AC); err == nil && shape.Found {
		s = fmt.Sprintf("In the case judged the passband is centred at %s with a 3 dB bandwidth of %s (the band is %s to %s, centre %s). ",
			hz(shape.CenterHz), hz(shape.BandwidthHz), hz(c.Band[0]), hz(c.Band[1]), hz(c.BandCentre()))
	}
	ms := spread(p, figure)
	if t := spreadText(ms, u, 3); t != "" {
		s += t
		if short > 0 && math.Abs(ms[0].delta) < short {
			s += fmt.Sprintf("; no one tolerance makes up the %s missing: more resonators, a narrower passband or "+
				"higher-Q parts", quantity.Approx(quantity.Round(short, 3), u))
		} else {
			s += ": make the first adjustable (a trimmer) or of closer tolerance"
		}
	} else {
		s += "No part's tolerance moves it: change the design (resonator Q, coupling, or end loading)"
	}
	return s
}

// retune is the concrete fix for a filter whose nominal passband is off the
// band: every capacitor scaled by (f_now/f_band)², which moves a filter of
// fixed inductors to f_band and keeps its shape (each coupling and node
// capacitance scales alike), each rounded to the nearest preferred value of
// its tolerance. The whole-circuit check decides whether it is offered.
func retune(p *engine.Pass) []engine.FixForm {
	nom := p.Nominal
	if nom == nil || nom.AC == nil {
		return nil
	}
	shape, err := filter.Measure(nom.Circuit, nom.AC)
	fb := nom.Circuit.BandCentre()
	if err != nil || !shape.Found || math.Abs(shape.CenterHz/fb-1) < 0.002 {
		return nil
	}
	k := (shape.CenterHz / fb) * (shape.CenterHz / fb)
	var changes []engine.Change
	var said []string
	for _, part := range p.NominalCircuit.Parts {
		if part.Kind != circuit.Capacitor || !(part.Value > 0) {
			continue
		}
		v := eseries.Nearest(part.Value*k, eseries.ForTolerance(part.Tolerance))
		if v == part.Value {
			continue
		}
		changes = append(changes, engine.Change{Part: part.Ref, Key: "value", To: quantity.Code(v, quantity.Farad)})
		said = append(said, part.Ref+" = "+quantity.Approx(v, quantity.Farad))
	}
	if len(changes) == 0 {
		return nil
	}
	return []engine.FixForm{{Changes: changes, Text: fmt.Sprintf("retune: %s (every capacitor scaled by (%s/%s)² = %s, "+
		"to preferred values) moves the nominal passband's centre from %s towards the band's", strings.Join(said, ", "),
		hz(shape.CenterHz), hz(fb), quantity.Approx(quantity.Round(k, 4), quantity.Ratio), hz(shape.CenterHz))}}
}
