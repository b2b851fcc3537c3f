package rules

import (
	"math"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/eseries"
	"headroom/checker/quantity"
)

// Helpers shared by the bias rules (bias.divider-stiffness,
// bias.collector-headroom, bias.emitter-fraction, bias.drift). Their fixes
// are found by solving the operating point again with candidate values, so a
// change is offered only when the model says it works at the case judged.

// sense is +1 for an NPN and −1 for a PNP: a voltage measured from the
// return rail times sense reads as it would in the NPN mirror image.
func sense(k circuit.Kind) float64 {
	if k == circuit.PNP {
		return -1
	}
	return 1
}

// otherNet is the net at the far end of a two-terminal part from net, "" when
// the part does not touch net.
func otherNet(part *circuit.Part, net string) string {
	if len(part.Nets) != 2 {
		return ""
	}
	switch net {
	case part.Nets[0]:
		return part.Nets[1]
	case part.Nets[1]:
		return part.Nets[0]
	}
	return ""
}

// resistorsOn lists the resistors (not potentiometers) with a terminal on
// net, in file order, each once.
func resistorsOn(c *circuit.Circuit, net string) []*circuit.Part {
	var out []*circuit.Part
	for _, part := range c.Parts {
		if part.Kind == circuit.Resistor && otherNet(part, net) != "" {
			out = append(out, part)
		}
	}
	return out
}

// caseFactor is a part's value in the case judged ÷ its nominal value: 1 at
// nominal, 1 ± tolerance at a corner. Fixes divide a value needed in the case
// by it to get the nominal value to write in the file.
func caseFactor(p *engine.Pass, ref string) float64 {
	cp, np := p.Circuit.Part(ref), p.NominalCircuit.Part(ref)
	if cp == nil || np == nil || np.Value <= 0 || cp.Value <= 0 {
		return 1
	}
	return cp.Value / np.Value
}

// solveWith solves the case's operating point again with the parts named in
// values given new nominal values, each moved by that part's deviation in the
// case, so that a candidate fix is judged at the same corner as the finding.
// It reports false when no operating point is found.
func solveWith(p *engine.Pass, values map[string]float64) (*dc.Result, bool) {
	c := p.Circuit.Clone()
	for ref, v := range values {
		part := c.Part(ref)
		if part == nil {
			return nil, false
		}
		part.Value = v * caseFactor(p, ref)
	}
	op, err := dc.Solve(c)
	if err != nil || op == nil {
		return nil, false
	}
	return op, true
}

// e24Walk lists up to n E24 values starting at the E24 value nearest start
// on the side given by up (the smallest ≥ start when up, else the largest ≤
// start), then stepping further in that direction.
func e24Walk(start float64, up bool, n int) []float64 {
	if !(start > 0) || math.IsInf(start, 0) {
		return nil
	}
	var out []float64
	v := eseries.RoundDown(start, eseries.E24)
	if up {
		v = eseries.RoundUp(start, eseries.E24)
	}
	for i := 0; i < n && v > 0 && !math.IsInf(v, 0) && !math.IsNaN(v); i++ {
		out = append(out, v)
		lo, hi := eseries.Neighbours(v, eseries.E24)
		if up {
			v = hi
		} else {
			v = lo
		}
	}
	return out
}

// netV is a net's DC voltage in an operating point (gnd is 0).
func netV(op *dc.Result, net string) float64 {
	if net == circuit.Gnd {
		return 0
	}
	return op.V[net]
}

// refList joins part references for a message: "R2" or "R2, R5".
func refList(refs []string) string {
	s := ""
	for i, r := range refs {
		if i > 0 {
			s += ", "
		}
		s += r
	}
	return s
}

// opposite is the case's mirror vertex: every parameter the case moved from
// nominal is put at the other end of its range (a part's value, a core's AL,
// an hFE, a supply, the ambient); the rest stay nominal. For a metric that is
// monotonic in each parameter, the vertex worst for one bound of a two-bound
// rule is the opposite of the vertex worst for the other, so a fix checked
// at both holds at both. values are new nominal values, moved as in solveWith.
func opposite(p *engine.Pass, values map[string]float64) (*dc.Result, bool) {
	c := p.NominalCircuit.Clone()
	for i, np := range p.NominalCircuit.Parts {
		cp := p.Circuit.Part(np.Ref)
		if cp == nil {
			continue
		}
		d := c.Parts[i]
		if np.Value > 0 && cp.Value != np.Value {
			d.Value = 2*np.Value - cp.Value
		}
		if np.AL > 0 && cp.AL != np.AL {
			d.AL = 2*np.AL - cp.AL
		}
		if np.BJT != nil && cp.BJT != nil && cp.BJT.NominalHFE() != np.BJT.NominalHFE() {
			if cp.BJT.NominalHFE() < np.BJT.NominalHFE() {
				d.BJT.HFETyp = np.BJT.HFEMax
			} else {
				d.BJT.HFETyp = np.BJT.HFEMin
			}
		}
		if v, ok := values[np.Ref]; ok {
			d.Value = v * (2 - caseFactor(p, np.Ref))
		}
	}
	for i, ns := range p.NominalCircuit.Supplies {
		if cs := p.Circuit.Supply(ns.Net); cs != nil && cs.Volts != ns.Volts {
			if cs.Volts > ns.Volts {
				c.Supplies[i].Volts = min(ns.Range[0], ns.Range[1])
			} else {
				c.Supplies[i].Volts = max(ns.Range[0], ns.Range[1])
			}
		}
	}
	if a, na := p.Circuit.Ambient.Nominal, p.NominalCircuit.Ambient; a != na.Nominal {
		if a > na.Nominal {
			c.Ambient.Nominal = na.Lo
		} else {
			c.Ambient.Nominal = na.Hi
		}
	}
	op, err := dc.Solve(c)
	if err != nil || op == nil {
		return nil, false
	}
	return op, true
}

// approx2 writes a measured value and its limit to three significant figures,
// or more (up to six) where three would print them alike: "1.3769 V" against
// "1.377 V", not "1.38 V" against "1.38 V".
func approx2(a, b float64, u quantity.Unit) (string, string) {
	for n := 3; ; n++ {
		x, y := quantity.Format(quantity.Round(a, n), u), quantity.Format(quantity.Round(b, n), u)
		if x != y || n == 6 || a == b {
			return x, y
		}
	}
}
