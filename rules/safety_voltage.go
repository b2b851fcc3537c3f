package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// SafetyVoltage is not written yet: it is listed so that the shipped rule sets load.
var SafetyVoltage = &engine.Rule{
	ID: "safety.voltage",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_volts", Unit: quantity.Volt, Help: "largest span between rail EMFs"},
		},
	},
}
