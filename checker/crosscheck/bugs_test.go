package crosscheck

// Disagreements with FORMAT.md §6 that the comparison found, each as the
// smallest circuit that shows it. These tests fail until checker/ac or
// checker/dc is fixed; the random comparisons step around the affected
// circuits (and count them) so that they keep testing everything else.

import (
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// reversedBuffer is a 20 m buffer stage (invented for the test) whose
// transistor was fitted the wrong way round: the collector pad carries the
// emitter resistor and the emitter pad the collector load. The base-collector
// junction is then forward-biased and the base-emitter junction reversed, so
// the Ebers–Moll collector current of FORMAT.md §6, in the device's forward
// sense, is negative (reverse-active operation).
func reversedBuffer() *circuit.Circuit {
	c := &circuit.Circuit{
		Name:    "20 m buffer, transistor fitted backwards",
		Band:    [2]float64{14.0e6, 14.35e6},
		Ambient: circuit.Ambient{Nominal: 25, Lo: 25, Hi: 25},
	}
	c.Supplies = []*circuit.Supply{{Net: "vcc", Volts: 12, Range: [2]float64{12, 12}}}
	c.Ports = []*circuit.Port{
		{Name: "in", Net: "rf_in", Direction: "in", Impedance: 50, Matched: true},
		{Name: "out", Net: "rf_out", Direction: "out", Impedance: 50, Matched: true},
	}
	q := &circuit.BJTParams{FT: 300e6, HFEMin: 100, HFEMax: 300, VBE: 0.65, ICRef: 10e-3,
		PD: 0.625, TjMax: 150, ICMax: 0.2, VCEO: 40, Cob: 4e-12}
	c.Parts = []*circuit.Part{
		{Ref: "C1", Kind: circuit.Capacitor, Value: 100e-9, Nets: []string{"rf_in", "base"}},
		{Ref: "R1", Kind: circuit.Resistor, Value: 47e3, Nets: []string{"vcc", "base"}},
		{Ref: "R2", Kind: circuit.Resistor, Value: 10e3, Nets: []string{"base", circuit.Gnd}},
		{Ref: "R3", Kind: circuit.Resistor, Value: 1e3, Nets: []string{"vcc", "coll"}},
		{Ref: "R4", Kind: circuit.Resistor, Value: 470, Nets: []string{"emit", circuit.Gnd}},
		{Ref: "C2", Kind: circuit.Capacitor, Value: 100e-9, Nets: []string{"coll", "rf_out"}},
		// Fitted backwards: collector lead on the emitter network and vice versa.
		{Ref: "Q1", Kind: circuit.NPN, Nets: []string{"emit", "base", "coll"}, BJT: q},
	}
	return c
}

// TestBugGmOfReverseConductingTransistor: FORMAT.md §6 sets gm = IC/VT and
// "0 when IC ≤ 0", IC being the Ebers–Moll collector current it defines just
// above (signed; dc.BJT.ICf, whose doc says the AC model needs its sign).
// ac.hybridPi uses dc.BJT.IC, the magnitude, so a transistor conducting in
// reverse gets gm = |IC|/VT, an rπ and a Cπ, and the band figures of the
// whole stage change (here it becomes a forward amplifier it is not).
func TestBugGmOfReverseConductingTransistor(t *testing.T) {
	c := reversedBuffer()
	op, err := dc.Solve(c)
	if err != nil {
		t.Fatalf("dc.Solve: %v", err)
	}
	ref, err := refSolveDC(c)
	if err != nil {
		t.Fatalf("reference DC: %v", err)
	}
	// Precondition, from the reference: the forward-sense IC is negative by
	// far more than any rounding (milliamperes).
	if ref.BJT["Q1"].ICf > -1e-4 {
		t.Fatalf("reference IC of the reversed transistor is %g A, expected clearly negative", ref.BJT["Q1"].ICf)
	}
	if d := math.Abs(op.BJTs["Q1"].ICf - ref.BJT["Q1"].ICf); d > relTol*math.Abs(ref.BJT["Q1"].ICf) {
		t.Fatalf("dc ICf %g A, reference %g A: the DC points differ, this test is about AC", op.BJTs["Q1"].ICf, ref.BJT["Q1"].ICf)
	}
	r, err := ac.Analyze(c, op)
	if err != nil {
		t.Fatalf("ac.Analyze: %v", err)
	}
	b := r.BJTs["Q1"]
	// FORMAT.md §6: gm = 0 when IC ≤ 0; rπ = βF/gm is then open (ac reports
	// it as 0); Cπ = max(gm/(2π·ft) − Cμ, 0) = 0.
	if b.GM != 0 || b.Rpi != 0 || b.Cpi != 0 {
		t.Errorf("Q1 conducts in reverse (ICf = %.4g A): want gm = 0, rπ open (0), Cπ = 0; got gm = %.4g S, rπ = %.4g Ω, Cπ = %.4g F",
			op.BJTs["Q1"].ICf, b.GM, b.Rpi, b.Cpi)
	}
	// The consequence at the ports, against the reference's analysis.
	rac, err := refAnalyze(c, ref)
	if err != nil {
		t.Fatalf("reference AC: %v", err)
	}
	for k := range rac.Zin {
		want, got := rac.Zin[k], r.Band[k].InputImpedance
		if cmplx.Abs(want-got) > relTol*cmplx.Abs(want) {
			t.Errorf("band[%d] input impedance %.5g, reference %.5g", k, got, want)
		}
		if g, w := r.Band[k].GainDB, rac.GainDB[k]; g != nil && w != nil && math.Abs(*g-*w) > floorDB {
			t.Errorf("band[%d] gain %.3f dB, reference %.3f dB", k, *g, *w)
		}
	}
}
