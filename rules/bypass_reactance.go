package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BypassReactance is not written yet: it is listed so that the shipped rule sets load.
var BypassReactance = &engine.Rule{
	ID: "bypass.reactance",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_fraction", Unit: quantity.Ratio, Help: "largest reactance ÷ circuit impedance"},
		},
	},
}
