package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// ChokeReactance is not written yet: it is listed so that the shipped rule sets load.
var ChokeReactance = &engine.Rule{
	ID: "choke.reactance",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "reactance ÷ circuit impedance, at least"},
		},
	},
}
