package rules

import (
	"fmt"
	"math"
	"strconv"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/topology"
)

// Helpers shared by the margin rules (resistor.power, bjt.dissipation,
// bjt.current, bjt.voltage, capacitor.voltage) and bjt.ft-headroom.

// resistorRatings are the standard power ratings a fix may name, in watts.
var resistorRatings = []float64{0.125, 0.25, 0.5, 1, 2, 3, 5, 10}

// capacitorRatings are the standard working voltages a fix may name, in volts.
var capacitorRatings = []float64{16, 25, 50, 63, 100, 200, 500}

// derating is the fraction of a rating left at ambient (°C): 1 up to knee,
// falling linearly to 0 at zero, and 0 beyond. This is the straight-line
// curve of IEC 60115-1 for resistors (knee = rated ambient, zero = upper
// category temperature) and of transistor datasheets (knee 25 °C, zero at
// tj_max). A curve whose zero does not lie above its knee has no slope: the
// rating is whole up to the knee and gone beyond it.
func derating(ambient, knee, zero float64) float64 {
	switch {
	case ambient <= knee:
		return 1
	case ambient >= zero:
		return 0
	}
	return (zero - ambient) / (zero - knee)
}

// nextStandard is the smallest value of list (ascending) at or above need;
// false when need is above them all.
func nextStandard(need float64, list []float64) (float64, bool) {
	for _, v := range list {
		if v >= need {
			return v, true
		}
	}
	return 0, false
}

// roundUp3 rounds v up to three significant figures, so that a value named
// in a fix is never short of what is needed.
func roundUp3(v float64) float64 {
	if v <= 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return v
	}
	e := math.Pow(10, math.Floor(math.Log10(v))-2)
	r := math.Ceil(v/e*(1-1e-12)) * e
	return quantity.Round(r, 3)
}

// ratingText writes a standard rating as people write it on a part ("0.25 W",
// "63 V"); ratingCode the same as a circuit file takes it ("0.25W", "63V").
func ratingText(v float64, unit string) string {
	return strconv.FormatFloat(v, 'g', -1, 64) + " " + unit
}

func ratingCode(v float64, unit string) string {
	return strconv.FormatFloat(v, 'g', -1, 64) + unit
}

// pct writes a load as a percentage to three figures ("92.5 %").
func pct(x float64) string { return quantity.Approx(x, quantity.Fraction) }

// temp writes an ambient ("85 °C").
func temp(c float64) string { return quantity.Approx(c, quantity.Celsius) }

// runsHot is the caution appended to a message whose part is loaded past
// its absolute rating: such a part overheats, whatever the rule's severity.
func runsHot(absolute float64) string {
	if absolute > 1 {
		return "; past its absolute rating, it may run hot"
	}
	return ""
}

// zeroRating reports an item whose rating has fallen to nothing at the
// case's ambient: no metric, always an error (FORMAT.md §6).
func zeroRating(p *engine.Pass, ref, what string, ambient, zero float64, fix string) {
	p.Report(engine.Finding{Part: ref, Absolute: 2,
		Message: fmt.Sprintf("%s's %s rating is zero at %s ambient (its derating reaches zero at %s): any dissipation overloads it",
			ref, what, temp(ambient), temp(zero)),
		Fix: fix})
}

// railVolts is a rail's EMF at the case judged: the supply's volts in
// p.Circuit (a worst-case corner may move them), 0 for gnd. The topology's
// own RailEMF reads the circuit it was built from, which is nominal.
func railVolts(p *engine.Pass, net string) float64 {
	if s := p.Circuit.Supply(net); s != nil {
		return s.Volts
	}
	return 0
}

// dcSpan is the span between a transistor's feed and return rails at the
// case judged: what its collector sees at cut-off; false when either rail is
// missing.
func dcSpan(p *engine.Pass, tb *topology.BJT) (float64, bool) {
	if tb == nil || tb.FeedRail == "" || tb.ReturnRail == "" {
		return 0, false
	}
	return math.Abs(railVolts(p, tb.FeedRail) - railVolts(p, tb.ReturnRail)), true
}

// bjtDerating is the fraction of a transistor's pd left at ambient: whole up
// to 25 °C, linearly to zero at tj_max.
func bjtDerating(b *circuit.BJTParams, ambient float64) float64 {
	return derating(ambient, 25, b.TjMax)
}

// roundDown3 rounds v down to three significant figures, for a largest
// allowed value named in a fix.
func roundDown3(v float64) float64 {
	if v <= 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return v
	}
	e := math.Pow(10, math.Floor(math.Log10(v))-2)
	r := math.Floor(v/e*(1+1e-12)) * e
	return quantity.Round(r, 3)
}

// icAdvice names the largest collector current that meets a rule: allowed
// is the limit at the case judged, where the transistor carries icCase. In a
// worst-case run it is scaled back to nominal (the nominal IC times allowed ÷
// icCase, rounded down to three figures), so that the nominal design lands
// this case inside the limit; the case's own figure follows in brackets.
func icAdvice(p *engine.Pass, ref string, icCase, allowed float64) string {
	v := allowed
	if p.Corners && p.Nominal != nil && p.Nominal.OP != nil && icCase > 0 {
		if qn := p.Nominal.OP.BJTs[ref]; qn != nil {
			v = qn.IC * allowed / icCase
		}
	}
	s := quantity.Approx(roundDown3(v), quantity.Ampere) + " nominal"
	if v != allowed {
		s += " (" + quantity.Approx(roundDown3(allowed), quantity.Ampere) + " at the worst case)"
	}
	return s
}

// kneeBelowZero checks that a derating curve falls from its knee to its zero
// point: a zero at or below the knee leaves no curve to follow.
func kneeBelowZero(ps map[string]float64) (string, string) {
	if ps["zero"] <= ps["knee"] {
		return "zero", "the rating must reach zero above the knee: zero must be a higher temperature than knee"
	}
	return "", ""
}
