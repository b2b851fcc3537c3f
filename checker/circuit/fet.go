package circuit

import "math"

// The field-effect kinds (docs/fet.md): junction FETs of either channel and
// the n-channel dual-gate MOSFET (a cascode of two square-law halves).
const (
	NJFET          Kind = "njfet"
	PJFET          Kind = "pjfet"
	DualGateMOSFET Kind = "dual-gate-mosfet"
)

// IsFET reports whether k is a field-effect transistor.
func (k Kind) IsFET() bool { return k == NJFET || k == PJFET || k == DualGateMOSFET }

// FETParams are a field-effect transistor's figures after library and
// inline values are merged. Every figure is a magnitude: an n-channel part's
// pinch-off voltage of −2 V is stored as VP 2, and so is a p-channel part's
// +2 V; the polarity is the part's Kind.
type FETParams struct {
	IDSSMin, IDSSMax float64 // A, the sheet's IDSS range
	IDSSTyp          float64 // A, 0 when the sheet gives none
	VPMin, VPMax     float64 // V, |pinch-off| range (VGS(off)), VPMin ≤ VPMax
	VPTyp            float64 // V, 0 when the sheet gives none
	VDSMax           float64 // V, drain-source rating
	PD               float64 // W at 25 °C ambient
	TjMax            float64 // °C: the dissipation rating reaches zero here
	Ciss             float64 // F, input capacitance Cgs + Cgd (0 = not given)
	Crss             float64 // F, reverse transfer capacitance, used as Cgd
	Coss             float64 // F, output capacitance Cds + Cgd (0 = not given)

	// IDSS and VP are the values the model uses for this case: nominal as
	// loaded, moved together along the spread by the worst-case search.
	IDSS float64 // A
	VP   float64 // V, magnitude
}

// NominalIDSS is idss_typ when given, else √(min·max).
func (f *FETParams) NominalIDSS() float64 {
	if f.IDSSTyp > 0 {
		return f.IDSSTyp
	}
	return math.Sqrt(f.IDSSMin * f.IDSSMax)
}

// NominalVP is vp_typ when given, else √(min·max), a magnitude.
func (f *FETParams) NominalVP() float64 {
	if f.VPTyp > 0 {
		return f.VPTyp
	}
	return math.Sqrt(f.VPMin * f.VPMax)
}

// VPFor is the pinch-off magnitude that goes with idss along the spread: the
// two move to the same end together (docs/fet.md, "Worst case"), VP
// piecewise linear in IDSS through (min, min), (nominal, nominal) and
// (max, max).
func (f *FETParams) VPFor(idss float64) float64 {
	in, vn := f.NominalIDSS(), f.NominalVP()
	switch {
	case idss <= f.IDSSMin:
		return f.VPMin
	case idss >= f.IDSSMax:
		return f.VPMax
	case idss <= in:
		if in == f.IDSSMin {
			return vn
		}
		return f.VPMin + (vn-f.VPMin)*(idss-f.IDSSMin)/(in-f.IDSSMin)
	default:
		if f.IDSSMax == in {
			return vn
		}
		return vn + (f.VPMax-vn)*(idss-in)/(f.IDSSMax-in)
	}
}

// Cgd is the gate-drain capacitance, crss.
func (f *FETParams) Cgd() float64 { return f.Crss }

// Cgs is ciss − crss (never below 0).
func (f *FETParams) Cgs() float64 { return math.Max(f.Ciss-f.Crss, 0) }

// Cds is coss − crss (never below 0; 0 when coss is not given).
func (f *FETParams) Cds() float64 { return math.Max(f.Coss-f.Crss, 0) }
