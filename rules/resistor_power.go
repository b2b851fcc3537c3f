package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// ResistorPower is not written yet: it is listed so that the shipped rule sets load.
var ResistorPower = &engine.Rule{
	ID: "resistor.power",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Ratio, Help: "largest dissipation ÷ derated rating"},
			{Name: "knee", Unit: quantity.Celsius, Help: "ambient up to which the full rating holds"},
			{Name: "zero", Unit: quantity.Celsius, Help: "ambient at which the rating reaches zero"},
			{Name: "default_rating", Unit: quantity.Watt, Help: "rating assumed when a resistor gives none"},
		},
	},
}
