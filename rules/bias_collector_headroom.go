package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BiasCollectorHeadroom is not written yet: it is listed so that the shipped rule sets load.
var BiasCollectorHeadroom = &engine.Rule{
	ID: "bias.collector-headroom",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "min_volts", Unit: quantity.Volt, Help: "smallest collector–emitter voltage"},
		},
	},
}
