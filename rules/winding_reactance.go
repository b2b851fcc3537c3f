package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// WindingReactance is not written yet: it is listed so that the shipped rule sets load.
var WindingReactance = &engine.Rule{
	ID: "winding.reactance",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "loaded winding's reactance ÷ termination, at least"},
		},
	},
}
