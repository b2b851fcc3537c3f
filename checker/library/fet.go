package library

import (
	"fmt"
	"math"

	"headroom/checker/circuit/tomlfile"
	"headroom/checker/quantity"
)

// FET is a library field-effect transistor (docs/fet.md). A figure of 0 was
// not given. Currents and the pinch-off voltage are stored as magnitudes;
// the file writes vp with the sign of its polarity (negative for an
// n-channel part).
type FET struct {
	Name             string
	Polarity         string  // "njfet" | "pjfet" | "dual-gate-mosfet"
	IDSSMin, IDSSMax float64 // A
	IDSSTyp          float64 // A, 0 = not given
	VPMin, VPMax     float64 // V, magnitudes, VPMin ≤ VPMax
	VPTyp            float64 // V, magnitude, 0 = not given
	VDSMax           float64 // V
	PD               float64 // W at 25 °C ambient
	TjMax            float64 // °C
	Ciss, Crss, Coss float64 // F
	File             string
	Pos              tomlfile.Pos
}

// FETKeys are the figure keys a field-effect transistor accepts, in a
// library file and inline in a circuit.
var FETKeys = []string{"idss", "idss_typ", "vp", "vp_typ", "vds_max", "pd", "tj_max", "ciss", "crss", "coss"}

// FETPolarities are the kinds a [fets] entry may have.
var FETPolarities = []string{"njfet", "pjfet", "dual-gate-mosfet"}

func readFET(t *tomlfile.Table) *FET {
	t.Allow(append([]string{"polarity"}, FETKeys...)...)
	f := &FET{Name: t.Name, File: t.Doc().File, Pos: t.Pos}
	pol, ok := t.String("polarity", true)
	if ok && pol != "njfet" && pol != "pjfet" && pol != "dual-gate-mosfet" {
		t.Errorf(t.ValPos("polarity"), `%s polarity: expected "njfet", "pjfet" or "dual-gate-mosfet", got %q`, t.What, pol)
	}
	f.Polarity = pol
	ReadFETFigures(t, pol, f)
	return f
}

// ReadFETFigures reads the FET figures present in t into f, leaving the
// others alone (so inline figures override a library entry). vp and vp_typ
// must carry the sign of the polarity: negative for an n-channel part
// (njfet, dual-gate-mosfet), positive for a pjfet.
func ReadFETFigures(t *tomlfile.Table, polarity string, f *FET) {
	pos := func(key string, u quantity.Unit, dst *float64) {
		if v, ok := t.Quantity(key, u, tomlfile.Positive); ok {
			*dst = v
		}
	}
	if r, ok := t.Pair("idss", quantity.Ampere, tomlfile.Positive); ok {
		f.IDSSMin, f.IDSSMax = math.Min(r[0], r[1]), math.Max(r[0], r[1])
	}
	pos("idss_typ", quantity.Ampere, &f.IDSSTyp)
	wantNeg := polarity != "pjfet"
	sign := func(key string, v float64, at tomlfile.Pos) bool {
		if (v < 0) != wantNeg {
			want := "negative for an n-channel part"
			if !wantNeg {
				want = "positive for a p-channel part"
			}
			t.Errorf(at, "%s %s: the pinch-off voltage %s has the wrong sign for a %s (%s)",
				t.What, key, quantity.Format(v, quantity.Volt), polarity, want)
			return false
		}
		return true
	}
	if r, ok := t.Pair("vp", quantity.Volt, tomlfile.NonZero); ok {
		if sign("vp", r[0], t.ElemPos("vp", 0)) && sign("vp", r[1], t.ElemPos("vp", 1)) {
			a, b := math.Abs(r[0]), math.Abs(r[1])
			f.VPMin, f.VPMax = math.Min(a, b), math.Max(a, b)
		}
	}
	if v, ok := t.Quantity("vp_typ", quantity.Volt, tomlfile.NonZero); ok && sign("vp_typ", v, t.ValPos("vp_typ")) {
		f.VPTyp = math.Abs(v)
	}
	if v, ok := t.Quantity("vds_max", quantity.Volt, tomlfile.NonZero); ok {
		f.VDSMax = math.Abs(v)
	}
	pos("pd", quantity.Watt, &f.PD)
	readTjMax(t, &f.TjMax)
	for _, c := range []struct {
		key string
		dst *float64
	}{{"ciss", &f.Ciss}, {"crss", &f.Crss}, {"coss", &f.Coss}} {
		if v, ok := t.Quantity(c.key, quantity.Farad, tomlfile.NonNegative); ok {
			*c.dst = v
		}
	}
}

// TypOutside names a typical figure that lies outside its range, or "".
func (f *FET) TypOutside() string {
	switch {
	case f.IDSSTyp > 0 && f.IDSSMax > 0 && (f.IDSSTyp < f.IDSSMin || f.IDSSTyp > f.IDSSMax):
		return fmt.Sprintf("idss_typ %s lies outside idss [%s, %s]", quantity.Format(f.IDSSTyp, quantity.Ampere),
			quantity.Format(f.IDSSMin, quantity.Ampere), quantity.Format(f.IDSSMax, quantity.Ampere))
	case f.VPTyp > 0 && f.VPMax > 0 && (f.VPTyp < f.VPMin || f.VPTyp > f.VPMax):
		return fmt.Sprintf("|vp_typ| %s lies outside |vp| [%s, %s]", quantity.Format(f.VPTyp, quantity.Volt),
			quantity.Format(f.VPMin, quantity.Volt), quantity.Format(f.VPMax, quantity.Volt))
	}
	return ""
}
