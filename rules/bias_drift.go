package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BiasDrift is not written yet: it is listed so that the shipped rule sets load.
var BiasDrift = &engine.Rule{
	ID: "bias.drift",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_fraction", Unit: quantity.Ratio, Help: "largest relative change of IC over the box, supplies at nominal"},
		},
	},
}
