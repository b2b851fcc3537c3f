package rules

import (
	"fmt"

	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// FETBiasSpread checks that a FET's bias network — above all the self-bias
// source resistor — holds the drain current near its design value for any
// part of the type: IDSS and VP spread 2.5–10:1 within one type number.
var FETBiasSpread = &engine.Rule{
	ID: "fet.bias-spread",
	CheckParams: func(ps map[string]float64) (string, string) {
		if ps["min_ratio"] >= 1 || ps["max_ratio"] <= 1 {
			return "max_ratio", "the window must hold the nominal current: min_ratio below 1 and max_ratio above 1"
		}
		return "", ""
	},
	Doc: engine.Doc{
		Title: "the self-bias network must hold a FET's drain current near its design value across the IDSS/VP spread",
		Why: "A JFET's IDSS and pinch-off voltage spread by 2.5–10:1 within one type: a stage set up with the part on the " +
			"bench is far off with the next one from the bag. A source resistor (self bias) feeds the current back " +
			"against that spread; a gate held at a fixed voltage with the source on its rail does not.",
		Formula: "ID at the case judged ÷ ID at nominal (IDSS and VP typical, every other value nominal) >= min_ratio and " +
			"<= max_ratio (unit ratio; one item per bound, the finding reports the one violated). With corners the case " +
			"moves IDSS and VP together to either end of their ranges (docs/fet.md) with the rest of the box.",
		Source: "self bias VGS = −ID·RS and the Shockley square law (D. De, Basic Electronics, 2010, ch. 7); IDSS and VP spread " +
			"2.5–10:1 within one type (makers' datasheets, e.g. the J310's 24–60 mA); the 0.5–2× window is common practice, no published source",
		Fix: "advice: a larger source resistor (with a divider raising the gate so the nominal current stays) narrows the " +
			"spread; or select parts by measured IDSS",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "smallest ID ÷ nominal ID over the spread"},
			{Name: "max_ratio", Unit: quantity.Ratio, Help: "largest ID ÷ nominal ID over the spread"},
		},
	},
	Run: runFETBiasSpread,
}

func runFETBiasSpread(p *engine.Pass) error {
	op := p.A.OP
	if op == nil || p.Nominal == nil || p.Nominal.OP == nil {
		return nil
	}
	lo, hi := p.Param("min_ratio"), p.Param("max_ratio")
	for part := range fets(p) {
		q, qn := op.FETs[part.Ref], p.Nominal.OP.FETs[part.Ref]
		if q == nil || qn == nil || !(qn.ID > 0) {
			continue
		}
		r := q.ID / qn.ID
		for _, b := range []struct {
			bound, cmp, word string
			limit            float64
		}{{"min", ">=", "at least", lo}, {"max", "<=", "at most", hi}} {
			f := engine.Finding{Part: part.Ref, Bound: b.bound, HasMetric: true, Measured: r, Limit: b.limit,
				Comparison: b.cmp, Unit: "ratio",
				MessageLater: func() string {
					return fmt.Sprintf("%s draws %s with IDSS %s and |VP| %s, %s× its nominal %s, needs %s %s×", part.Ref,
						quantity.Approx(q.ID, quantity.Ampere), quantity.Approx(q.IDSS, quantity.Ampere), quantity.Approx(q.VP, quantity.Volt),
						quantity.Approx(r, quantity.Ratio), quantity.Approx(qn.ID, quantity.Ampere), b.word, quantity.Approx(b.limit, quantity.Ratio))
				}}
			if engine.Fails(r, b.limit, b.cmp) {
				f.Fix = fmt.Sprintf("raise %s's source resistor, with a gate divider lifting the gate to keep the nominal current, so the source "+
					"voltage, not the part, sets ID; or select parts by measured IDSS", part.Ref)
			}
			p.Report(f)
		}
	}
	return nil
}
