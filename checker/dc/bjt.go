package dc

import "math"

// expMax bounds the exponent of a junction: beyond it the exponential is
// continued by its tangent, so a wild Newton step cannot overflow. A real
// operating point never gets near it (e^80 times any IS is kiloamperes).
const expMax = 80

// junctionExp returns e^(v/vt) and its derivative with respect to v.
func junctionExp(v, vt float64) (e, de float64) {
	x := v / vt
	if x > expMax {
		m := math.Exp(expMax)
		return m * (1 + x - expMax), m / vt
	}
	e = math.Exp(x)
	return e, e / vt
}

// emPoint is the forward-sense collector and base current of a transistor at
// one pair of junction voltages, with their partial derivatives.
type emPoint struct {
	ic, ib           float64 // A
	dicDvbe, dicDvbc float64 // S
	dibDvbe, dibDvbc float64 // S
}

// eval is the Ebers–Moll transport model of FORMAT.md §6 in the forward sense:
//
//	IC = IS(e^(VBE/VT) − e^(VBC/VT)) − (IS/βR)(e^(VBC/VT) − 1)
//	IB = (IS/βF)(e^(VBE/VT) − 1) + (IS/βR)(e^(VBC/VT) − 1)
func (q *bjt) eval(vbe, vbc, vt float64) (p emPoint) {
	ebe, debe := junctionExp(vbe, vt)
	ebc, debc := junctionExp(vbc, vt)
	is := q.is
	p.ic = is*(ebe-ebc) - is/betaR*(ebc-1)
	p.ib = is/q.betaF*(ebe-1) + is/betaR*(ebc-1)
	p.dicDvbe = is * debe
	p.dicDvbc = -is*debc - is/betaR*debc
	p.dibDvbe = is / q.betaF * debe
	p.dibDvbc = is / betaR * debc
	return p
}

// limitJunction is the junction-voltage limiting that classic circuit-simulation programs
// apply to a pn junction between Newton iterations: above the critical
// voltage a step is shortened to follow the logarithm of the current, and a
// step far into reverse bias is shortened too. It returns the voltage to
// linearise at and whether it differs from vnew.
func limitJunction(vnew, vold, vt, vcrit float64) (float64, bool) {
	if vnew > vcrit && math.Abs(vnew-vold) > 2*vt {
		if vold > 0 {
			arg := 1 + (vnew-vold)/vt
			if arg > 0 {
				return vold + vt*math.Log(arg), true
			}
			return vcrit, true
		}
		return vt * math.Log(vnew/vt), true
	}
	if vnew < 0 {
		floor := 2*vold - 1
		if vold > 0 {
			floor = -vold - 1
		}
		if vnew < floor {
			return floor, true
		}
	}
	return vnew, false
}
