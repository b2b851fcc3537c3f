package rules

import (
	"fmt"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BJTFtHeadroom asks for a transistor whose ft leaves gain to spare at the
// top of the band.
var BJTFtHeadroom = &engine.Rule{
	ID:       "bjt.ft-headroom",
	FixMoves: []string{engine.MoveGain}, // its fix restores the gain the part costs
	Doc: engine.Doc{
		Title: "the transistor's ft must lie well above the highest band frequency",
		Why: "Above its beta cut-off a transistor's current gain falls as ft ÷ f. Run close to ft it has little gain left, " +
			"and its input impedance, set by that falling beta and by Cπ, is poorly defined and spreads from part to part.",
		Formula: "ft ÷ highest band frequency >= min_ratio (unit ratio); ft is the datasheet's guaranteed minimum.",
		Source: "common practice; β(f) ≈ ft/f is the hybrid-π result (3× to 5× is the figure in circulation, 10× is " +
			"comfortable for HF gain stages)",
		Fix: "change device to the library transistor of the same polarity that meets the rule with the least change in its " +
			"other figures; where none does, the minimum ft",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "ft ÷ highest band frequency, at least"},
		},
	},
	Run: runBJTFtHeadroom,
	// ft and the band are not varied by the corner box: the worst case is
	// the nominal one.
	Static: true,
}

func runBJTFtHeadroom(p *engine.Pass) error {
	minRatio, fHigh := p.Param("min_ratio"), p.Circuit.Band[1]
	if !(fHigh > 0) {
		return nil
	}
	for part := range bjts(p) {
		b := part.BJT
		if b == nil || !(b.FT > 0) {
			continue
		}
		ratio := b.FT / fHigh
		f := engine.Finding{Part: part.Ref, HasMetric: true, Measured: ratio, Limit: minRatio,
			Comparison: ">=", Unit: "ratio",
			MessageLater: func() string {
				return fmt.Sprintf("%s's ft of %s is %s× the highest band frequency %s (its beta there is about that ratio), needs at least %s×",
					part.Ref, quantity.Approx(b.FT, quantity.Hertz), quantity.Approx(ratio, quantity.Ratio),
					quantity.Approx(fHigh, quantity.Hertz), quantity.Approx(minRatio, quantity.Ratio))
			}}
		if engine.Fails(ratio, minRatio, ">=") {
			laterWithForms(&f, func(forms *[]engine.FixForm) (string, []engine.Change) { return ftFix(p, part, fHigh, minRatio, forms) })
		}
		p.Report(f)
	}
	return nil
}

func ftFix(p *engine.Pass, part *circuit.Part, fHigh, minRatio float64, forms *[]engine.FixForm) (string, []engine.Change) {
	ch, blocked := swapDevice(p, part, []string{"ft"}, minRatio, ">=", func(b *circuit.BJTParams, _ *dc.BJT) float64 {
		return b.FT / fHigh
	})
	if ch != nil {
		return deviceFix(p, part, ch, func(ch *deviceChoice) string {
			return fmt.Sprintf("(ft %s) gives %s×", quantity.Approx(ch.Params.FT, quantity.Hertz), quantity.Approx(ch.Metric, quantity.Ratio))
		}, forms)
	}
	return noDevice(part, blocked) + fmt.Sprintf("use a transistor with ft of at least %s",
		quantity.Approx(roundUp3(minRatio*fHigh), quantity.Hertz)), nil
}
