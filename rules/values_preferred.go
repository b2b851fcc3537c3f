package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// ValuesPreferred is not written yet: it is listed so that the shipped rule sets load.
var ValuesPreferred = &engine.Rule{
	ID: "values.preferred",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_deviation", Unit: quantity.Ratio, Help: "largest relative distance to a preferred value"},
		},
	},
}
