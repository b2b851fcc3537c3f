package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// npn3904 is 2N3904-like: hFE 100–300, fT 300 MHz, Cob 4 pF (REFERENCES.md
// §6.2), VBE 0.65 V at 10 mA as in FORMAT.md §3's library example.
func npn3904() *circuit.BJTParams {
	return &circuit.BJTParams{FT: 300e6, HFEMin: 100, HFEMax: 300, VBE: 0.65, ICRef: 10e-3,
		PD: 0.625, TjMax: 150, ICMax: 0.2, VCEO: 40, Cob: 4e-12}
}

// The same common-emitter stage as TestCommonEmitterInput, its operating point
// found by dc.Solve: the AC figures follow from the IC and hFE it reports
// through the hand-solved hybrid-π network (ceExpected), and the input stays
// close to R1 ‖ R2 ‖ β·re (REFERENCES §9–10).
func TestEndToEndCommonEmitter(t *testing.T) {
	n := ceStage(circuit.NPN, 100e3, 150e3)
	p := npn3904()
	p.Cob = 0
	n.c.Parts = append(n.c.Parts, &circuit.Part{Ref: "Q1", Kind: circuit.NPN, Nets: []string{"coll", "base", "emit"}, BJT: p})
	n.c.Ambient = circuit.Ambient{Nominal: 25, Lo: 25, Hi: 25}
	op, err := dc.Solve(n.c)
	if err != nil {
		t.Fatalf("dc.Solve: %v", err)
	}
	q := op.BJTs["Q1"]
	// Divider 12 V·4.7/31.7 = 1.78 V, less VBE ≈ 0.6 V across 470 Ω: IC ≈ 2.4 mA.
	if q.IC < 2e-3 || q.IC > 3e-3 {
		t.Fatalf("IC = %g, want about 2.4 mA", q.IC)
	}
	res, err := Analyze(n.c, op)
	if err != nil {
		t.Fatal(err)
	}
	gm := q.IC / vt(298.15)
	near(t, "gm = IC/VT", res.BJTs["Q1"].GM, gm, 1e-12)
	re := vt(298.15) / (q.IC + q.IB)
	approx := cmplx.Abs(par(ohm(27e3), ohm(4.7e3), ohm(q.HFE*re)))
	for _, bp := range res.Band {
		zin, av := ceExpected(bp.Frequency, gm, q.HFE, p.FT)
		nearZ(t, "Zin", bp.InputImpedance, zin, 1e-6)
		nearAbs(t, "voltage gain", *bp.VoltageGainDB, av, 1e-5)
		near(t, "|Zin| ≈ R1‖R2‖β·re", cmplx.Abs(bp.InputImpedance), approx, 0.02)
	}
}

// chain is an n-stage 20 m amplifier: each stage a 2N3904-like common-emitter
// stage with a 6k8/1k2 divider, 100 Ω emitter resistor bypassed by 100 nF, and
// a 12:4-turn transformer as collector load, fed from the rail through its own
// 22 Ω / 100 nF decoupling filter, whose secondary feeds the next stage
// through 10 nF; the supply has 0.5 Ω and a 100 nF decoupling capacitor.
// Demo values of my own, for the benchmark and the end-to-end run.
func chain(stages int) *circuit.Circuit {
	c := &circuit.Circuit{Name: fmt.Sprintf("%d-stage 20 m amplifier", stages), Band: [2]float64{14e6, 14.35e6},
		Ambient:  circuit.Ambient{Nominal: 25, Lo: 25, Hi: 25},
		Supplies: []*circuit.Supply{{Net: "vcc", Volts: 12, Range: [2]float64{12, 12}, Impedance: 0.5}},
		Ports: []*circuit.Port{{Name: "in", Net: "rf_in", Direction: "in", Impedance: 50, Matched: true},
			{Name: "out", Net: fmt.Sprintf("o%d", stages), Direction: "out", Impedance: 50}},
	}
	add := func(p *circuit.Part) { c.Parts = append(c.Parts, p) }
	two := func(kind circuit.Kind, ref, a, b string, v float64) {
		add(&circuit.Part{Ref: ref, Kind: kind, Nets: []string{a, b}, Value: v})
	}
	two(circuit.Capacitor, "CD", "vcc", "gnd", 100e-9)
	prev := "rf_in"
	for i := 1; i <= stages; i++ {
		b, e, col, o := fmt.Sprintf("b%d", i), fmt.Sprintf("e%d", i), fmt.Sprintf("c%d", i), fmt.Sprintf("o%d", i)
		v := fmt.Sprintf("v%d", i)
		two(circuit.Resistor, fmt.Sprintf("RD%d", i), "vcc", v, 22)
		two(circuit.Capacitor, fmt.Sprintf("CD%d", i), v, "gnd", 100e-9)
		two(circuit.Capacitor, fmt.Sprintf("C%d", i), prev, b, 10e-9)
		two(circuit.Resistor, fmt.Sprintf("R%da", i), "vcc", b, 6800)
		two(circuit.Resistor, fmt.Sprintf("R%db", i), b, "gnd", 1200)
		two(circuit.Resistor, fmt.Sprintf("RE%d", i), e, "gnd", 100)
		two(circuit.Capacitor, fmt.Sprintf("CE%d", i), e, "gnd", 100e-9)
		add(&circuit.Part{Ref: fmt.Sprintf("Q%d", i), Kind: circuit.NPN, Nets: []string{col, b, e}, BJT: npn3904()})
		add(&circuit.Part{Ref: fmt.Sprintf("T%d", i), Kind: circuit.Transformer, AL: 360.4e-9, Coupling: 0.98,
			Windings: []*circuit.Winding{
				{Name: "primary", Turns: 12, Nets: [2]string{v, col}, Resistance: 0.1},
				{Name: "secondary", Turns: 4, Nets: [2]string{o, "gnd"}, Resistance: 0.05},
			}})
		prev = o
	}
	return c
}

// A ten-stage chain end to end: dc.Solve then Analyze, every figure finite,
// and each stage's gm = IC/VT as FORMAT.md §6 defines it.
func TestEndToEndChain(t *testing.T) {
	c := chain(10)
	op, err := dc.Solve(c)
	if err != nil {
		t.Fatalf("dc.Solve: %v", err)
	}
	res, err := Analyze(c, op)
	if err != nil {
		t.Fatal(err)
	}
	for ref, q := range op.BJTs {
		near(t, ref+" gm", res.BJTs[ref].GM, q.IC/vt(298.15), 1e-12)
	}
	for _, bp := range res.Band {
		if bp.GainDB == nil || math.IsNaN(*bp.GainDB) || math.IsInf(*bp.GainDB, 0) || !finite(bp.InputImpedance) {
			t.Errorf("band point %+v", bp)
		}
	}
	if len(res.Parts) != 31 || len(res.Windings) != 10 {
		t.Errorf("%d reactive parts, %d transformers; want 31, 10", len(res.Parts), len(res.Windings))
	}
}

// BenchmarkAnalyze measures one analysis (three band frequencies and every
// part's circuit impedance) of chains of 1, 2 and 10 stages.
func BenchmarkAnalyze(b *testing.B) {
	for _, stages := range []int{1, 2, 10} {
		c := chain(stages)
		op, err := dc.Solve(c)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("stages=%d", stages), func(b *testing.B) {
			for b.Loop() {
				if _, err := Analyze(c, op); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
