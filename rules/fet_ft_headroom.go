package rules

import (
	"fmt"
	"math"

	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// FETFtHeadroom asks for a FET whose transition frequency at its operating
// point leaves gain to spare at the top of the band.
var FETFtHeadroom = &engine.Rule{
	ID: "fet.ft-headroom",
	Doc: engine.Doc{
		Title: "the FET's transition frequency gm/(2π·ciss) must lie well above the highest band frequency",
		Why: "A FET's gate is a capacitance: its current gain falls as fT ÷ f, with fT = gm/(2π·Ciss) set by the bias. A " +
			"stage run close to fT has little gain left and an input that the gate capacitance, not the design, defines.",
		Formula: "gm ÷ (2π·ciss) ÷ highest band frequency >= min_ratio (unit ratio); gm = ∂ID/∂VGS at the operating point " +
			"(docs/fet.md). Not judged for a part without ciss.",
		Source: "fT = gm/(2π·Cgs) is the textbook transition frequency of a FET (Cgs + Cgd = ciss here, the conservative " +
			"choice); the ratio is common practice, as for bjt.ft-headroom",
		Fix: "advice: more drain current (gm grows as √ID), or a FET with less input capacitance",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "fT ÷ highest band frequency, at least"},
		},
	},
	Run: runFETFtHeadroom,
}

func runFETFtHeadroom(p *engine.Pass) error {
	op := p.A.OP
	minRatio, fHigh := p.Param("min_ratio"), p.Circuit.Band[1]
	if op == nil || !(fHigh > 0) {
		return nil
	}
	for part := range fets(p) {
		q, f := op.FETs[part.Ref], part.FET
		if q == nil || !(f.Ciss > 0) {
			continue
		}
		gm := q.Jac[0][1]
		ft := gm / (2 * math.Pi * f.Ciss)
		ratio := ft / fHigh
		fd := engine.Finding{Part: part.Ref, HasMetric: true, Measured: ratio, Limit: minRatio, Comparison: ">=", Unit: "ratio",
			MessageLater: func() string {
				return fmt.Sprintf("%s's fT at its bias, gm %s S ÷ (2π × %s), is %s, %s× the highest band frequency %s, needs at least %s×",
					part.Ref, quantity.Approx(gm, quantity.Ratio), quantity.Approx(f.Ciss, quantity.Farad), quantity.Approx(ft, quantity.Hertz),
					quantity.Approx(ratio, quantity.Ratio), quantity.Approx(fHigh, quantity.Hertz), quantity.Approx(minRatio, quantity.Ratio))
			}}
		if engine.Fails(ratio, minRatio, ">=") {
			fd.Fix = fmt.Sprintf("raise %s's gm to %s S (more drain current), or use a FET with ciss below %s", part.Ref,
				quantity.Approx(minRatio*fHigh*2*math.Pi*f.Ciss, quantity.Ratio), quantity.Approx(gm/(2*math.Pi*minRatio*fHigh), quantity.Farad))
		}
		p.Report(fd)
	}
	return nil
}
