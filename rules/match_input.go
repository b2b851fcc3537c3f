package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// MatchInput is not written yet: it is listed so that the shipped rule sets load.
var MatchInput = &engine.Rule{
	ID: "match.input",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "min_db", Unit: quantity.Ratio, Help: "smallest input return loss over the band, dB"},
		},
	},
}
