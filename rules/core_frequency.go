package rules

import (
	"fmt"
	"sort"
	"strings"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/library"
	"headroom/checker/quantity"
)

// CoreFrequency checks that a wound part's core material is meant for the
// band it works in.
var CoreFrequency = &engine.Rule{
	Static: true, // judges the file as written: the same at every corner
	ID:     "core.frequency",
	Doc: engine.Doc{
		Title: "a core must be used within its material's frequency range",
		Why: "A ferrite's permeability holds only up to a frequency that falls as its permeability rises, and " +
			"its losses climb well before that; a powdered-iron core has too little permeability to be useful far " +
			"below its range. Outside the range the inductance and losses the design assumes are not there.",
		Formula: "for an inductor or transformer on a library core that gives f_range: the band's lowest " +
			"frequency >= the range's low end (bound \"low\") and its highest <= the range's high end (bound " +
			"\"high\"); the finding reports the worse edge; unit Hz",
		Source: "the core maker's stated frequency range for the material (f_range in the part library)",
		Fix:    "Advice: a core from the library whose range covers the band, the same size first.",
	},
	Run: runCoreFrequency,
}

func runCoreFrequency(p *engine.Pass) error {
	c := p.Circuit
	lib := c.Library
	if lib == nil {
		return nil
	}
	lo, hi := c.Band[0], c.Band[1]
	for _, part := range c.Parts {
		if part.Core == "" || part.Kind != circuit.Inductor && part.Kind != circuit.Transformer {
			continue
		}
		core := lib.Cores[part.Core]
		if core == nil || !(core.FRange[1] > 0) {
			continue
		}
		r := core.FRange
		rangeText := quantity.Approx(r[0], quantity.Hertz) + " to " + quantity.Approx(r[1], quantity.Hertz)
		items := []struct {
			bound, cmp    string
			measured, lim float64
			text          string
		}{
			{"low", ">=", lo, r[0], fmt.Sprintf("the band starts at %s, below", quantity.Approx(lo, quantity.Hertz))},
			{"high", "<=", hi, r[1], fmt.Sprintf("the band reaches %s, above", quantity.Approx(hi, quantity.Hertz))},
		}
		for _, it := range items {
			f := engine.Finding{Part: part.Ref, Bound: it.bound,
				HasMetric: true, Measured: it.measured, Limit: it.lim, Comparison: it.cmp, Unit: "Hz",
				Message: fmt.Sprintf("%s's core %s is meant for %s: %s its range", part.Ref, part.Core, rangeText, it.text)}
			if engine.Fails(it.measured, it.lim, it.cmp) {
				f.Fix = coreAdvice(lib, part.Core, lo, hi)
			}
			p.Report(f)
		}
	}
	return nil
}

// coreAdvice names library cores whose range covers the band, those of the
// same geometry (the name up to its permeability) first.
func coreAdvice(lib *library.Library, name string, lo, hi float64) string {
	geometry := name
	if i := strings.LastIndex(name, "-"); i > 0 {
		geometry = name[:i]
	}
	var same, other []string
	for n, core := range lib.Cores {
		if n == name || !(core.FRange[1] > 0) || core.FRange[0] > lo || core.FRange[1] < hi {
			continue
		}
		if strings.HasPrefix(n, geometry+"-") {
			same = append(same, n)
		} else {
			other = append(other, n)
		}
	}
	sort.Strings(same)
	sort.Strings(other)
	all := append(same, other...)
	band := quantity.Approx(lo, quantity.Hertz) + " to " + quantity.Approx(hi, quantity.Hertz)
	if len(all) == 0 {
		return "no library core covers " + band + ": choose a material whose maker rates it for the band, " +
			"and add it to a library with its f_range"
	}
	if len(all) > 4 {
		all = all[:4]
	}
	return "use a core material meant for " + band + " (then recompute the turns for the inductance): " +
		strings.Join(all, ", ")
}
