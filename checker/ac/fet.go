package ac

import (
	"fmt"
	"math"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// FET is a field-effect transistor's small-signal model (docs/fet.md): the
// DC model linearised at the operating point, with the sheet's
// capacitances. Cgs = ciss − crss, Cgd = crss, Cds = coss − crss (0 when
// coss is not given).
type FET struct {
	GM  float64 // S, ∂ID/∂VGS (gate 1 for a dual gate, the internal node followed)
	GDS float64 // S, ∂ID/∂VDS (0 in saturation: no channel-length modulation)
	Cgs float64 // F
	Cgd float64 // F
	Cds float64 // F
	// FT is gm/(2π·Ciss), Hz: where the current gain of the stage with its
	// drain shorted falls to one (0 when ciss is not given).
	FT float64
	// Jac is the DC model's Jacobian at the operating point: rows the
	// currents into drain, gate and gate 2, columns VDS, VGS and VG2S.
	Jac [3][3]float64
}

// fetModel reads a FET's small-signal figures.
func fetModel(p *circuit.Part, op *dc.Result) (*FET, error) {
	if p.FET == nil {
		return nil, fmt.Errorf("no FET figures")
	}
	if op == nil || op.FETs[p.Ref] == nil {
		return nil, fmt.Errorf("no operating point for the FET")
	}
	f, q := p.FET, op.FETs[p.Ref]
	for _, c := range []float64{f.Ciss, f.Crss, f.Coss} {
		if !(c >= 0) || math.IsInf(c, 0) {
			return nil, fmt.Errorf("capacitance %g out of range", c)
		}
	}
	for _, row := range q.Jac {
		for _, v := range row {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("operating point not usable")
			}
		}
	}
	m := &FET{GM: q.Jac[0][1], GDS: q.Jac[0][0], Cgs: f.Cgs(), Cgd: f.Cgd(), Cds: f.Cds(), Jac: q.Jac}
	if f.Ciss > 0 {
		m.FT = m.GM / (2 * math.Pi * f.Ciss)
	}
	return m, nil
}

// addFET stamps the linearised FET: the Jacobian of the DC model among the
// branches drain–source, gate–source and gate 2–source, with Cgs across
// gate–source, Cds across drain–source and Cgd on a fourth branch,
// gate–drain. Gate 2's own capacitance is not modelled (it is AC-grounded
// in every stage the kind is meant for).
func (nw *network) addFET(p *circuit.Part, op *dc.Result, node func(string) int) error {
	m, err := fetModel(p, op)
	if err != nil {
		return err
	}
	j := op.FETs[p.Ref].Jac
	d, g, s := node(p.Nets[0]), node(p.Nets[1]), node(p.Nets[2])
	g2 := ground
	if p.Kind == circuit.DualGateMOSFET {
		g2 = node(p.Nets[3])
	}
	e := nw.add(p.Ref, admFET, branch{d, s}, branch{g, s}, branch{g2, s}, branch{g, d})
	if e == nil {
		return errShape
	}
	e.x = []float64{j[0][0], j[0][1], j[0][2], j[1][0], j[1][1], j[1][2], j[2][0], j[2][1], j[2][2], m.Cds, m.Cgs, m.Cgd}
	return nil
}
