package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BJTCurrent is not written yet: it is listed so that the shipped rule sets load.
var BJTCurrent = &engine.Rule{
	ID: "bjt.current",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Ratio, Help: "largest IC ÷ ic_max"},
		},
	},
}
