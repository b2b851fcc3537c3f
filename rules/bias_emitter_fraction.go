package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BiasEmitterFraction is not written yet: it is listed so that the shipped rule sets load.
var BiasEmitterFraction = &engine.Rule{
	ID: "bias.emitter-fraction",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "min_fraction", Unit: quantity.Ratio, Help: "smallest emitter voltage ÷ feed-rail voltage"},
			{Name: "max_fraction", Unit: quantity.Ratio, Help: "largest emitter voltage ÷ feed-rail voltage"},
		},
	},
}
