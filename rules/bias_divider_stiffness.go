package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BiasDividerStiffness is not written yet: it is listed so that the shipped rule sets load.
var BiasDividerStiffness = &engine.Rule{
	ID: "bias.divider-stiffness",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "lower-leg current ÷ base current, at least"},
		},
	},
}
