package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BJTFtHeadroom is not written yet: it is listed so that the shipped rule sets load.
var BJTFtHeadroom = &engine.Rule{
	ID: "bjt.ft-headroom",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "ft ÷ highest band frequency, at least"},
		},
	},
}
