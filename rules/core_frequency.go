package rules

import (
	"headroom/checker/engine"
)

// CoreFrequency is not written yet: it is listed so that the shipped rule sets load.
var CoreFrequency = &engine.Rule{
	ID: "core.frequency",
	Doc: engine.Doc{
		Title:  "not written yet",
		Params: []engine.Param{},
	},
}
