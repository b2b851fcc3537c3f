package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BJTDissipation is not written yet: it is listed so that the shipped rule sets load.
var BJTDissipation = &engine.Rule{
	ID: "bjt.dissipation",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Ratio, Help: "largest dissipation ÷ derated pd"},
		},
	},
}
