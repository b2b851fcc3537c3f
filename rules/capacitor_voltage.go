package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// CapacitorVoltage is not written yet: it is listed so that the shipped rule sets load.
var CapacitorVoltage = &engine.Rule{
	ID: "capacitor.voltage",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Ratio, Help: "largest DC voltage ÷ rating"},
		},
	},
}
