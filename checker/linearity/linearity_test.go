package linearity

import (
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// vt300 is k·T/q at 300 K, the convention of REFERENCES-2 §3 (25.852 mV).
const vt300 = 1.380649e-23 * 300 / 1.602176634e-19

// The closed form against the computed vectors of REFERENCES-2 §3.3 ([C],
// 300 K): the loop amplitude at the intercept and its power across 50 Ω.
func TestLoopIIP3Vectors(t *testing.T) {
	for _, v := range []struct{ r, mv, dbm float64 }{
		{0, 73.12, -12.72}, {0.25, 161.57, -5.83}, {1, 292.48, -0.68},
		{3.868, 667.64, 6.49}, {10, 2029.77, 16.15}, {38.68, 13174.97, 32.39},
	} {
		a := LoopIIP3(vt300, v.r)
		if math.Abs(a*1e3-v.mv) > 0.01*v.mv/100+0.01 {
			t.Errorf("R′ %g: %.2f mV, want %.2f", v.r, a*1e3, v.mv)
		}
		if p := 10 * math.Log10(a*a/(2*50)/1e-3); math.Abs(p-v.dbm) > 0.006 {
			t.Errorf("R′ %g: %.3f dBm on 50 ohm, want %.2f", v.r, p, v.dbm)
		}
	}
	// Near the null the floor keeps it finite.
	if a := LoopIIP3(vt300, 0.5); math.IsInf(a, 0) || math.IsNaN(a) {
		t.Errorf("at the null: %g", a)
	}
}

// The 1 dB compression of a constant-current-biased junction: Gm/gm =
// 2·I1(x)/(x·I0(x)) falls to 10^(−1/20) at x = ccCompression (K. K. Clarke,
// D. T. Hess, 1971, from memory; REFERENCES-2 §3.3 gives x = 1.0083 and
// Gm/gm 0.8928 at x = 1, [C]). The Bessel functions are summed here from
// their series.
func TestConstantCurrentCompression(t *testing.T) {
	bessel := func(n int, x float64) float64 {
		s, term := 0.0, math.Pow(x/2, float64(n))/math.Gamma(float64(n+1))
		for k := 0; k < 40; k++ {
			s += term
			term *= (x / 2) * (x / 2) / float64((k+1)*(k+1+n))
		}
		return s
	}
	ratio := func(x float64) float64 { return 2 * bessel(1, x) / (x * bessel(0, x)) }
	if r := ratio(1); math.Abs(r-0.8928) > 5e-5 {
		t.Errorf("Gm/gm at x = 1: %.5f, want 0.8928", r)
	}
	if r := 20 * math.Log10(ratio(ccCompression)); math.Abs(r+1) > 2e-3 {
		t.Errorf("at x = %g: %.4f dB, want −1", ccCompression, r)
	}
	// The pure cubic's 9.64 dB between IIP3 and P1dB (REFERENCES-2 §3.1, [C]).
	if g := -20 * math.Log10(cubic1dB); math.Abs(g-9.64) > 0.01 {
		t.Errorf("IIP3 − P1dB of a pure cubic %.3f dB, want 9.64", g)
	}
}

// stage is a common-emitter transistor driven at its base by the supply
// vin (an ideal voltage source), with re from emitter to gnd and 100 ohm
// from vcc to the collector, at 300 K.
func stage(vb, re float64) *circuit.Circuit {
	c := &circuit.Circuit{Name: "two-tone", Band: [2]float64{1e6, 2e6},
		Ambient: circuit.Ambient{Nominal: 26.85, Lo: 26.85, Hi: 26.85},
		Supplies: []*circuit.Supply{{Net: "vcc", Volts: 12, Range: [2]float64{12, 12}},
			{Net: "vin", Volts: vb, Range: [2]float64{vb, vb}}}}
	c.Parts = []*circuit.Part{
		{Ref: "RC", Kind: circuit.Resistor, Nets: []string{"vcc", "c"}, Value: 100},
		{Ref: "Q1", Kind: circuit.NPN, Nets: []string{"c", "vin", "e"},
			BJT: &circuit.BJTParams{FT: 300e6, HFEMin: 100, HFEMax: 100, VBE: 0.7, ICRef: 10e-3, PD: 1, TjMax: 150, VCEO: 40}},
	}
	if re > 0 {
		c.Parts = append(c.Parts, &circuit.Part{Ref: "RE", Kind: circuit.Resistor, Nets: []string{"e", "gnd"}, Value: re})
	} else {
		c.Parts[1].Nets[2] = "gnd"
	}
	return c
}

// twoTone drives the stage's base with VB + A·(cos 8θ + cos 9θ) over 64
// samples of the nonlinear DC model (the stage is memoryless at DC) and
// returns the collector current's fundamental and lower third-order product
// (bin 7 = 2·8 − 9) amplitudes.
func twoTone(t *testing.T, vb, re, a float64) (fund, im3 float64) {
	const n = 64
	var x1, x3 complex128
	for k := range n {
		th := 2 * math.Pi * float64(k) / n
		op, err := dc.Solve(stage(vb+a*(math.Cos(8*th)+math.Cos(9*th)), re))
		if err != nil {
			t.Fatal(err)
		}
		ic := op.BJTs["Q1"].ICf
		x1 += complex(ic, 0) * cmplx.Exp(complex(0, -8*th))
		x3 += complex(ic, 0) * cmplx.Exp(complex(0, -7*th))
	}
	return 2 * cmplx.Abs(x1) / n, 2 * cmplx.Abs(x3) / n
}

// A two-tone computation on checker/dc's nonlinear model of one stage
// against the closed form: the implied intercept A·√(fund/IM3) agrees with
// LoopIIP3 to 1 dB (it agrees far better; REFERENCES-2 §3.3's own two-tone
// check gives 73.13 mV at R′ 0 and 665.75 mV at R′ 3.868, [C]).
func TestTwoToneAgainstClosedForm(t *testing.T) {
	for _, v := range []struct{ vb, re, a float64 }{
		{0.7, 0, 1e-3},         // bare junction at about 10 mA
		{0.8, 10, 10e-3},       // about 10 mA into 10 ohm: R′ near 3.9
		{0.8 + 0.2, 33, 30e-3}, // heavier degeneration
	} {
		op, err := dc.Solve(stage(v.vb, v.re))
		if err != nil {
			t.Fatal(err)
		}
		q := op.BJTs["Q1"]
		// Base current ignored by the closed form, but RE carries IE:
		// the degeneration the junction sees is gm·RE·IE/IC.
		r := q.ICf / op.VT * v.re * (1 + 1/q.HFE)
		want := LoopIIP3(op.VT, r)
		fund, im3 := twoTone(t, v.vb, v.re, v.a)
		got := v.a * math.Sqrt(fund/im3)
		if d := 20 * math.Log10(got/want); math.Abs(d) > 1 {
			t.Errorf("RE %g ohm (R′ %.3f): two-tone intercept %.2f mV, closed form %.2f mV (%.2f dB)", v.re, r, got*1e3, want*1e3, d)
		} else {
			t.Logf("RE %g ohm, IC %.3g mA (R′ %.3f): two-tone %.2f mV, closed form %.2f mV (%.3f dB)", v.re, q.ICf*1e3, r, got*1e3, want*1e3, d)
		}
	}
}

// degenerated is a common-emitter stage whose base follows the in net (50
// ohm port, 1 mF coupling), biased by a divider, RE unbypassed, RC into a 50 ohm out port
// through a large capacitor, with no transistor capacitance worth speaking
// of at 1 MHz.
func degenerated(re float64) *circuit.Circuit {
	part := func(ref string, k circuit.Kind, v float64, nets ...string) *circuit.Part {
		return &circuit.Part{Ref: ref, Kind: k, Value: v, Nets: nets}
	}
	return &circuit.Circuit{Name: "ce", Band: [2]float64{1e6, 1e6},
		Ambient:  circuit.Ambient{Nominal: 26.85, Lo: 26.85, Hi: 26.85},
		Supplies: []*circuit.Supply{{Net: "vcc", Volts: 12, Range: [2]float64{12, 12}}},
		Ports: []*circuit.Port{{Name: "in", Net: "in", Direction: "in", Impedance: 50, Matched: true},
			{Name: "out", Net: "out", Direction: "out", Impedance: 50, Matched: true}},
		Parts: []*circuit.Part{
			part("C1", circuit.Capacitor, 1e-3, "in", "b"), part("R1", circuit.Resistor, 10e3, "vcc", "b"), part("R2", circuit.Resistor, 2.2e3, "b", "gnd"),
			part("RE", circuit.Resistor, re, "e", "gnd"), part("RC", circuit.Resistor, 470, "vcc", "c"),
			part("C2", circuit.Capacitor, 1e-3, "c", "out"),
			{Ref: "Q1", Kind: circuit.NPN, Nets: []string{"c", "b", "e"},
				BJT: &circuit.BJTParams{FT: 1e12, HFEMin: 1e4, HFEMax: 1e4, VBE: 0.7, ICRef: 10e-3, PD: 1, TjMax: 150, VCEO: 40}},
		}}
}

// Referred to the in port: the base is the in net, so the loop drive is the
// port's voltage and the intercept in dBm is that of LoopIIP3 across 50 ohm
// (β 10⁴ makes the base current's share negligible). The swing limits are
// the hand forms of a degenerated stage (base current ignored): per volt at
// the base the emitter current is 1/(re + RE), the junction swings re/(re +
// RE), the collector–emitter voltage (RC ∥ RL + RE)/(re + RE); the room is
// VCE − min_vce down, vceo − VCE up, and IC of current, reached at a base
// swing of VT·(1 + gm·RE).
func TestStageReferredToPort(t *testing.T) {
	for _, re := range []float64{220, 470} {
		c := degenerated(re)
		cs, err := analyse(c)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Analyze(c, cs.Topo, cs.OP, cs.AC, 0.3)
		if err != nil {
			t.Fatal(err)
		}
		q := cs.OP.BJTs["Q1"]
		if q.Region != "active" || len(res.Stages) != 1 {
			t.Fatalf("RE %g: Q1 %s, %d stages", re, q.Region, len(res.Stages))
		}
		st := res.Stages[0]
		gm := q.ICf / cs.OP.VT
		r := gm * re
		if !st.HasIntercept || math.Abs(st.Degeneration-r) > 1e-6*r {
			t.Fatalf("RE %g: %+v, want R′ %g", re, st, r)
		}
		a := LoopIIP3(cs.OP.VT, r)
		if want := 10 * math.Log10(a*a/100/1e-3); math.Abs(st.IIP3DBm-want) > 0.05 {
			t.Errorf("RE %g: IIP3 %.3f dBm, want %.3f", re, st.IIP3DBm, want)
		}
		if want := 10*math.Log10(a*a/100/1e-3) + 20*math.Log10(cubic1dB); math.Abs(st.IP1dBDBm-want) > 0.05 {
			t.Errorf("RE %g: IP1dB %.3f dBm, want %.3f", re, st.IP1dBDBm, want)
		}
		rL := 470.0 * 50 / 520
		hc := (rL + re) / (1/gm + re)
		down := (q.VCEf - 0.3) / hc
		up := (40 - q.VCEf) / hc
		cut := cs.OP.VT * (1 + r)
		v := math.Min(down, math.Min(up, cut))
		if want := 10 * math.Log10(v*v/100/1e-3); math.Abs(st.MaxInputDBm-want) > 0.05 {
			t.Errorf("RE %g: max input %.3f dBm (%s), want %.3f (down %.3g, up %.3g, cut-off %.3g V)", re, st.MaxInputDBm, st.Limit, want, down, up, cut)
		}
		if res.IIP3DBm != st.IIP3DBm || res.MaxInputRef != "Q1" {
			t.Errorf("totals %+v", res)
		}
	}
}

func analyse(c *circuit.Circuit) (*analysis.Case, error) {
	cs := analysis.Run(c, nil)
	if cs.OPErr != nil {
		return nil, cs.OPErr
	}
	return cs, cs.ACErr
}

// At the IM3 null (gm·RE = 1/2) the closed form is floored and reports a
// finite intercept, below what the memoryless DC model gives there: the
// floor errs on the safe side (the null moves with the baseband impedance
// in a real stage, which the DC model cannot show).
func TestNullIsFlooredSafely(t *testing.T) {
	checked := 0
	for _, re := range []float64{1.70, 1.75, 1.80, 1.85, 1.90} {
		op, err := dc.Solve(stage(0.7, re))
		if err != nil {
			t.Fatal(err)
		}
		q := op.BJTs["Q1"]
		r := q.ICf / op.VT * re * (1 + 1/q.HFE)
		if math.Abs(1-2*r) >= nullFloor {
			continue
		}
		checked++
		fund, im3 := twoTone(t, 0.7, re, 1e-3)
		got := 1e-3 * math.Sqrt(fund/im3)
		if want := LoopIIP3(op.VT, r); got < want {
			t.Errorf("R′ %.4f: two-tone %.1f mV below the floored closed form %.1f mV", r, got*1e3, want*1e3)
		}
	}
	if checked == 0 {
		t.Error("no emitter resistor put the stage at the null")
	}
}

// A common-base stage driven at its emitter through a large capacitor: the
// emitter sees RE ∥ RS to AC ground (the source is part of the loop), so
// R′ = gm·(RE ∥ 50 Ω), and the junction swings the whole emitter voltage,
// which is the in net's: the intercept at the in port is the loop's
// LoopIIP3/(1 + R′) (handbook small-signal analysis of the grounded-base
// stage, common practice).
func TestCommonBaseStage(t *testing.T) {
	part := func(ref string, k circuit.Kind, v float64, nets ...string) *circuit.Part {
		return &circuit.Part{Ref: ref, Kind: k, Value: v, Nets: nets}
	}
	c := &circuit.Circuit{Name: "cb", Band: [2]float64{1e6, 1e6},
		Ambient:  circuit.Ambient{Nominal: 26.85, Lo: 26.85, Hi: 26.85},
		Supplies: []*circuit.Supply{{Net: "vcc", Volts: 12, Range: [2]float64{12, 12}}},
		Ports: []*circuit.Port{{Name: "in", Net: "in", Direction: "in", Impedance: 50, Matched: true},
			{Name: "out", Net: "out", Direction: "out", Impedance: 50, Matched: true}},
		Parts: []*circuit.Part{
			part("R1", circuit.Resistor, 10e3, "vcc", "b"), part("R2", circuit.Resistor, 2.2e3, "b", "gnd"),
			{Ref: "CB", Kind: circuit.Capacitor, Value: 1e-3, Nets: []string{"b", "gnd"}, Role: "bypass"},
			part("C1", circuit.Capacitor, 1e-3, "in", "e"), part("RE", circuit.Resistor, 680, "e", "gnd"),
			part("RC", circuit.Resistor, 470, "vcc", "c"), part("C2", circuit.Capacitor, 1e-3, "c", "out"),
			{Ref: "Q1", Kind: circuit.NPN, Nets: []string{"c", "b", "e"},
				BJT: &circuit.BJTParams{FT: 1e12, HFEMin: 1e4, HFEMax: 1e4, VBE: 0.7, ICRef: 10e-3, PD: 1, TjMax: 150, VCEO: 40}},
		}}
	cs, err := analyse(c)
	if err != nil {
		t.Fatal(err)
	}
	if got := cs.Topo.BJTs["Q1"].Config; got != "common base" {
		t.Fatalf("configuration %q", got)
	}
	res, err := Analyze(c, cs.Topo, cs.OP, cs.AC, 0.3)
	if err != nil || len(res.Stages) != 1 || !res.Stages[0].HasIntercept {
		t.Fatalf("%v %+v", err, res)
	}
	st := res.Stages[0]
	gm := cs.OP.BJTs["Q1"].ICf / cs.OP.VT
	r := gm * 680 * 50 / 730
	if math.Abs(st.Degeneration-r) > 1e-3*r {
		t.Errorf("R′ %g, want %g", st.Degeneration, r)
	}
	v := LoopIIP3(cs.OP.VT, r) / (1 + r)
	if want := 10 * math.Log10(v*v/100/1e-3); math.Abs(st.IIP3DBm-want) > 0.05 {
		t.Errorf("IIP3 %.3f dBm, want %.3f", st.IIP3DBm, want)
	}
}
