package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// DecouplingReactance is not written yet: it is listed so that the shipped rule sets load.
var DecouplingReactance = &engine.Rule{
	ID: "decoupling.reactance",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_fraction", Unit: quantity.Ratio, Help: "largest reactance ÷ circuit impedance"},
			{Name: "min_ohms", Unit: quantity.Ohm, Help: "circuit impedance below which the net needs no help"},
		},
	},
}
