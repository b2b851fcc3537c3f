package rules

import (
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// CouplingReactance is not written yet: it is listed so that the shipped rule sets load.
var CouplingReactance = &engine.Rule{
	ID: "coupling.reactance",
	Doc: engine.Doc{
		Title: "not written yet",
		Params: []engine.Param{
			{Name: "max_ohms", Unit: quantity.Ohm, Help: "reactance ceiling"},
			{Name: "max_fraction", Unit: quantity.Ratio, Help: "largest reactance ÷ circuit impedance"},
		},
	},
}
