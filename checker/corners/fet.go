package corners

import (
	"headroom/checker/circuit"
	"headroom/checker/quantity"
)

// appendFET adds a FET's spread to the box: one parameter, keyed REF.idss,
// that moves IDSS over its range and the pinch-off voltage with it to the
// same end (circuit.FETParams.VPFor). IDSS and VP are not independent in a
// real part — both grow with the channel's thickness and doping, so a part
// with a high IDSS has a large |VP| — and a box that paired the highest
// IDSS with the smallest |VP| would judge parts no maker ships
// (docs/fet.md, "Worst case").
func appendFET(ps []Param, i int, p *circuit.Part) []Param {
	f := p.FET
	if f == nil || !(f.IDSSMax > f.IDSSMin) {
		return ps
	}
	return append(ps, Param{Key: p.Ref + ".idss", Nom: f.IDSS, Lo: f.IDSSMin, Hi: f.IDSSMax, Unit: quantity.Ampere,
		vpFor: f.VPFor,
		set: func(c *circuit.Circuit, v float64) {
			x := own(c, i)
			g := *x.FET
			g.IDSS, g.VP = v, g.VPFor(v)
			x.FET = &g
		}})
}
