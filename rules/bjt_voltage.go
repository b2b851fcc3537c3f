package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BJTVoltage is not written yet: it is listed so that the shipped rule sets load.
var BJTVoltage = &engine.Rule{
	ID: "bjt.voltage",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Ratio, Help: "largest peak collector voltage ÷ vceo"},
			{Name: "inductive_swing", Unit: quantity.Ratio, Help: "peak ÷ supply span for an inductively fed collector"},
		},
	},
}
