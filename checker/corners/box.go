// Package corners finds, for every item a rule judges, the most adverse case
// in the corner box of FORMAT.md §6: part tolerances, core AL tolerances,
// hFE spread, supply ranges and the ambient range.
//
// Method: one extra analysis per parameter, at the high end of its range,
// tells each judged item which end of that parameter hurts it (the sign of a
// one-sided finite-difference sensitivity); the item is then judged at the
// vertex made of all its adverse ends. Items that want the same vertex share
// one analysis. For a metric monotonic in each parameter this is the worst
// vertex of the box; items near their limit are then searched on from there
// (refine.go), and the README gives how close the result comes to a
// brute-force search, measured.
package corners

import (
	"slices"

	"headroom/checker/circuit"
	"headroom/checker/quantity"
)

// variant returns a copy of c for one case of the box: the lists of parts
// and supplies are its own, their entries still c's. A Param's set replaces
// the entry it changes with a copy first (own, ownBJT, ownSupply), so c is
// never touched and the parts a case leaves alone are not copied. The
// analyses and rules only read a circuit; a rule that edits one (a fix)
// makes its own deep Clone.
func variant(c *circuit.Circuit) *circuit.Circuit {
	d := *c
	d.Parts = slices.Clone(c.Parts)
	d.Supplies = slices.Clone(c.Supplies)
	return &d
}

// own replaces part i of c with a copy and returns it.
func own(c *circuit.Circuit, i int) *circuit.Part {
	x := *c.Parts[i]
	c.Parts[i] = &x
	return &x
}

// ownBJT is own for a transistor's figures.
func ownBJT(c *circuit.Circuit, i int) *circuit.BJTParams {
	p := own(c, i)
	b := *p.BJT
	p.BJT = &b
	return &b
}

// ownSupply is own for supply i.
func ownSupply(c *circuit.Circuit, i int) *circuit.Supply {
	x := *c.Supplies[i]
	c.Supplies[i] = &x
	return &x
}

// Param is one dimension of the box.
type Param struct {
	Key         string  // the corner key of FORMAT.md §5: REF, REF.hfe, REF.al, REF.q, a supply net, "ambient"
	Nom, Lo, Hi float64 // the nominal value and the range
	Unit        quantity.Unit
	Tolerance   bool                       // the range is nominal ± a tolerance (shown as a percentage)
	vpFor       func(idss float64) float64 // REF.idss: the pinch-off voltage that moves with it (fet.go)
	set         func(c *circuit.Circuit, v float64)
	holdsSupply bool // a supply's range (bias.drift holds these at nominal)
}

// Box lists the parameters of c that can move, in a fixed order: parts in
// file order (value or AL, a core's Q range, then hFE), supplies, ambient.
func Box(c *circuit.Circuit) []Param {
	var ps []Param
	for i, p := range c.Parts {
		i := i
		switch p.Kind {
		case circuit.Resistor, circuit.Capacitor, circuit.Potentiometer:
			u := quantity.Ohm
			if p.Kind == circuit.Capacitor {
				u = quantity.Farad
			}
			ps = appendTol(ps, p.Ref, p.Value, p.Tolerance, u, func(c *circuit.Circuit, v float64) { own(c, i).Value = v })
		case circuit.Inductor:
			if p.Turns > 0 {
				ps = appendTol(ps, p.Ref+".al", p.AL, p.ALTolerance, quantity.Henry, func(c *circuit.Circuit, v float64) { own(c, i).AL = v })
			} else {
				ps = appendTol(ps, p.Ref, p.Value, p.Tolerance, quantity.Henry, func(c *circuit.Circuit, v float64) { own(c, i).Value = v })
			}
		case circuit.Transformer:
			ps = appendTol(ps, p.Ref+".al", p.AL, p.ALTolerance, quantity.Henry, func(c *circuit.Circuit, v float64) { own(c, i).AL = v })
		}
		if q := p.QRange; q[1] > q[0] && q[0] > 0 {
			// A Q from a library core's typical range (docs/filters.md).
			ps = append(ps, Param{Key: p.Ref + ".q", Nom: p.Q, Lo: q[0], Hi: q[1], Unit: quantity.Ratio,
				set: func(c *circuit.Circuit, v float64) { own(c, i).Q = v }})
		}
		switch p.Kind {
		case circuit.NPN, circuit.PNP:
			b := p.BJT
			if b != nil && b.HFEMax > b.HFEMin {
				ps = append(ps, Param{Key: p.Ref + ".hfe", Nom: b.NominalHFE(), Lo: b.HFEMin, Hi: b.HFEMax,
					Unit: quantity.Ratio, set: func(c *circuit.Circuit, v float64) { ownBJT(c, i).HFETyp = v }})
			}
		case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
			ps = appendFET(ps, i, p)
		}
	}
	for i, s := range c.Supplies {
		i := i
		lo, hi := s.Range[0], s.Range[1]
		if lo > hi {
			lo, hi = hi, lo
		}
		if hi > lo {
			ps = append(ps, Param{Key: s.Net, Nom: s.Volts, Lo: lo, Hi: hi, holdsSupply: true, Unit: quantity.Volt,
				set: func(c *circuit.Circuit, v float64) { ownSupply(c, i).Volts = v }})
		}
	}
	if a := c.Ambient; a.Hi > a.Lo {
		ps = append(ps, Param{Key: "ambient", Nom: a.Nominal, Lo: a.Lo, Hi: a.Hi,
			Unit: quantity.Celsius, set: func(c *circuit.Circuit, v float64) { c.Ambient.Nominal = v }})
	}
	return ps
}

func appendTol(ps []Param, key string, nom, tol float64, u quantity.Unit, set func(*circuit.Circuit, float64)) []Param {
	if nom <= 0 || tol <= 0 {
		return ps
	}
	return append(ps, Param{Key: key, Nom: nom, Lo: nom * (1 - tol), Hi: nom * (1 + tol), Unit: u,
		Tolerance: true, set: set})
}
