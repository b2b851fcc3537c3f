package rules

import (
	"fmt"
	"math"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/eseries"
	"headroom/checker/quantity"
)

// ValuesPreferred flags resistor and capacitor values that cannot be bought
// in the series their tolerance is sold in.
var ValuesPreferred = &engine.Rule{
	Static: true, // judges the file as written: the same at every corner
	ID:     "values.preferred",
	Doc: engine.Doc{
		Title: "resistor and capacitor values must be preferred values",
		Why: "Parts are made in the IEC 60063 series that go with their tolerance. A value outside them is a " +
			"typo, a calculation copied without rounding, or a part nobody stocks; a 1 % part may still take a " +
			"coarser value (4k7 is fine at 1 %).",
		Formula: "for each resistor and capacitor (not potentiometers), at its nominal value: the relative " +
			"distance |v − n| ÷ n to the nearest value n of the series for its tolerance (≤ 1 % E96, ≤ 2 % E48, " +
			"≤ 5 % E24, ≤ 10 % E12, else E6) or of any coarser series, <= max_deviation; unit fraction",
		Source: "IEC 60063:2015, preferred number series for resistors and capacitors (E3–E24 Table 1, E48–E192 " +
			"Table 2), with the conventional pairing of series and tolerance (common practice, no published source)",
		Fix: "The nearer of the two neighbouring series values (the smaller change: which side is safe depends " +
			"on the part's job, which this rule does not know), naming both neighbours.",
		Params: []engine.Param{
			{Name: "max_deviation", Unit: quantity.Fraction, Help: "largest relative distance to a preferred value"},
		},
	},
	Run: runValuesPreferred,
}

// preferredSeries are the series a part of tolerance tol may take: its own
// and every coarser one, coarsest first.
func preferredSeries(tol float64) []eseries.Series {
	finest := eseries.ForTolerance(tol)
	var out []eseries.Series
	for _, s := range []eseries.Series{eseries.E3, eseries.E6, eseries.E12, eseries.E24, eseries.E48, eseries.E96} {
		if s <= finest {
			out = append(out, s)
		}
	}
	return out
}

func runValuesPreferred(p *engine.Pass) error {
	limit := p.Param("max_deviation")
	// Nominal values: a corner's value is the file's value moved by its tolerance.
	for _, part := range p.NominalCircuit.Parts {
		if part.Kind != circuit.Resistor && part.Kind != circuit.Capacitor {
			continue
		}
		v := part.Value
		if !(v > 0) || math.IsInf(v, 0) {
			continue
		}
		u := quantity.Ohm
		if part.Kind == circuit.Capacitor {
			u = quantity.Farad
		}
		series := preferredSeries(part.Tolerance)
		dev := eseries.DeviationCoarse(v, part.Tolerance)
		if math.IsNaN(dev) {
			continue
		}
		near, lo, hi := v, 0.0, math.Inf(1)
		best := math.Inf(1)
		for _, s := range series {
			n := eseries.Nearest(v, s)
			if d := math.Abs(v-n) / n; d < best || d == best && n > near {
				best, near = d, n
			}
			l, h := eseries.Neighbours(v, s)
			lo, hi = math.Max(lo, l), math.Min(hi, h)
		}
		own := series[len(series)-1]
		f := engine.Finding{Part: part.Ref,
			HasMetric: true, Measured: dev, Limit: limit, Comparison: "<=", Unit: "fraction",
			Message: fmt.Sprintf("%s = %s is %s from the nearest preferred value for a %s part (%s, %s)", part.Ref,
				quantity.Approx(v, u), quantity.Approx(dev, quantity.Fraction), quantity.Format(part.Tolerance, quantity.Fraction),
				quantity.Approx(near, u), seriesOf(near, series))}
		if engine.Fails(dev, limit, "<=") {
			f.Fix = fmt.Sprintf("%s = %s (%s), the nearer of its neighbours %s and %s in %s and the coarser series",
				part.Ref, quantity.Format(near, u), seriesOf(near, series), quantity.Format(lo, u), quantity.Format(hi, u), own)
			f.Changes = []engine.Change{{Part: part.Ref, Key: "value", To: quantity.Code(near, u)}}
		}
		p.Report(f)
	}
	return nil
}

// seriesOf names the finest of series (coarsest first) that holds v.
func seriesOf(v float64, series []eseries.Series) string {
	for i := len(series) - 1; i >= 0; i-- {
		if eseries.Deviation(v, series[i]) == 0 {
			return series[i].String()
		}
	}
	return series[len(series)-1].String()
}
