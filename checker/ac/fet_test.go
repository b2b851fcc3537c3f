package ac

import (
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

func fetCircuit(parts ...*circuit.Part) *circuit.Circuit {
	c := &circuit.Circuit{Name: "fet", Band: [2]float64{1e6, 2e6}, Ambient: circuit.Ambient{Nominal: 25, Lo: 25, Hi: 25},
		Supplies: []*circuit.Supply{{Net: "vdd", Volts: 18, Range: [2]float64{18, 18}}},
		Ports: []*circuit.Port{{Name: "in", Net: "in", Direction: "in", Impedance: 50, Matched: true},
			{Name: "out", Net: "out", Direction: "out", Impedance: 1e6, Matched: true}}}
	c.Parts = parts
	return c
}

func part(ref string, k circuit.Kind, v float64, nets ...string) *circuit.Part {
	return &circuit.Part{Ref: ref, Kind: k, Value: v, Tolerance: 0.05, Nets: nets}
}

// A common-source stage at the operating point of TBC 2102 Ex 6.15
// (REFERENCES-2.md §5.2: IDSS 16 mA, VP −4 V, RS = RD = 500 Ω, VDD 18 V,
// ID 4 mA, VGS −2 V). gm = (2·IDSS/|VP|)(1 − VGS/VP) = 4 mS (REFERENCES-2.md
// §5.1); with RS bypassed and no FET capacitance the voltage gain is
// gm·(RD ‖ RL) and the input the gate resistor (handbook formula).
func TestFETCommonSourceGain(t *testing.T) {
	f := &circuit.FETParams{IDSSMin: 16e-3, IDSSMax: 16e-3, VPMin: 4, VPMax: 4, IDSS: 16e-3, VP: 4, VDSMax: 30, PD: 1, TjMax: 150}
	c := fetCircuit(
		part("C1", circuit.Capacitor, 1, "in", "g"), part("RG", circuit.Resistor, 1e6, "g", "gnd"),
		part("RS", circuit.Resistor, 500, "s", "gnd"), part("CS", circuit.Capacitor, 1, "s", "gnd"),
		part("RD", circuit.Resistor, 500, "vdd", "d"), part("C2", circuit.Capacitor, 1, "d", "out"),
		&circuit.Part{Ref: "Q1", Kind: circuit.NJFET, Nets: []string{"d", "g", "s"}, FET: f})
	op, err := dc.Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Analyze(c, op)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "gm", res.FETs["Q1"].GM, 4e-3, 1e-6)
	if res.FETs["Q1"].GDS > 1e-15 { // only the reverse-biased gate-drain diode
		t.Errorf("gds in saturation = %g, want 0 (no channel-length modulation)", res.FETs["Q1"].GDS)
	}
	av := 4e-3 * (500 * 1e6 / (500 + 1e6))
	for _, bp := range res.Band {
		nearAbs(t, "voltage gain, dB", *bp.VoltageGainDB, 20*math.Log10(av), 1e-4)
		near(t, "input resistance", cmplx.Abs(bp.InputImpedance), 1e6, 1e-3)
	}
}

// The common-gate input resistance is 1/gm (REFERENCES-2.md §5.1: "Rin ≈
// 1/gm"): the same stage driven at its source, gate grounded, Cgs and Cgd
// given, seen at a frequency where ωCgs ≪ gm.
func TestFETCommonGateInput(t *testing.T) {
	f := &circuit.FETParams{IDSSMin: 16e-3, IDSSMax: 16e-3, VPMin: 4, VPMax: 4, IDSS: 16e-3, VP: 4, VDSMax: 30, PD: 1, TjMax: 150,
		Ciss: 7.5e-12, Crss: 2.5e-12}
	c := fetCircuit(
		part("C1", circuit.Capacitor, 1, "in", "s"), part("RS", circuit.Resistor, 500, "s", "gnd"),
		part("RD", circuit.Resistor, 500, "vdd", "d"), part("C2", circuit.Capacitor, 1, "d", "out"),
		&circuit.Part{Ref: "Q1", Kind: circuit.NJFET, Nets: []string{"d", "gnd", "s"}, FET: f})
	op, err := dc.Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Analyze(c, op)
	if err != nil {
		t.Fatal(err)
	}
	zin := cmplx.Abs(res.Band[0].InputImpedance)
	want := 1 / (4e-3 + 1/500.0) // 1/gm ‖ RS
	near(t, "common-gate input, 1/gm ‖ RS", zin, want, 1e-3)
	near(t, "fT = gm/(2π·ciss)", res.FETs["Q1"].FT, 4e-3/(2*math.Pi*7.5e-12), 1e-9)
	near(t, "Cgs = ciss − crss", res.FETs["Q1"].Cgs, 5e-12, 1e-12)
}
