package dc

import (
	"math"
	"testing"
)

// Published worked examples of bias networks. Each was solved by its author
// with a fixed VBE of 0.7 V and the Thevenin/KVL closed form. For each one the
// test (1) recomputes the printed answers from the printed figures with that
// closed form, which checks the transcription and finds the author's slips,
// and (2) solves the same network with the exact model, the transistor given
// VBE = 0.7 V at about the printed collector current, so that the exact model
// should reproduce the printed answers to their printed rounding. Where the
// printed answer is wrong, the test says so and checks the exact model
// against the corrected closed form instead.

// printed is one printed answer and how far its rounding lets it be off.
type printed struct {
	what  string
	value float64
	tol   float64 // absolute
	got   func(r *Result) float64
}

func checkPrinted(t *testing.T, r *Result, ps []printed) {
	t.Helper()
	for _, p := range ps {
		checkAbs(t, p.what+" (exact model against the printed answer)", p.got(r), p.value, p.tol)
	}
}

func volts(net string) func(*Result) float64 { return func(r *Result) float64 { return r.V[net] } }
func icOf(ref string) func(*Result) float64  { return func(r *Result) float64 { return r.BJTs[ref].IC } }
func ibOf(ref string) func(*Result) float64  { return func(r *Result) float64 { return r.BJTs[ref].IB } }
func ieOf(ref string) func(*Result) float64 {
	return func(r *Result) float64 { return r.BJTs[ref].IC + r.BJTs[ref].IB }
}
func vceOf(ref string) func(*Result) float64 {
	return func(r *Result) float64 { return r.BJTs[ref].VCE }
}

// Source: expertsmind.com, "Determine voltage at all nodes and current by all
// branches" (https://expertsmind.com/topic/bipolar-junction-transistor-construction/determine-voltage-at-all-nodes-and-current-by-all-branches-96239.aspx):
// 15 V, RB1 100k / RB2 50k, RE 3k, RC 5k, β = 100. Printed: IE 1.29 mA,
// IB 0.0128 mA, VB 4.57 V, VC 8.6 V. (The same figures are a well-known
// Sedra & Smith example, from memory.)
func TestPublishedDividerExpertsmind(t *testing.T) {
	const beta = 100.0
	vbb, rbb := 15*50e3/150e3, parallel(100e3, 50e3)
	ie := (vbb - 0.7) / (3e3 + rbb/(beta+1))
	checkAbs(t, "recomputed IE, mA", ie*1e3, 1.29, 0.005)
	checkAbs(t, "recomputed VB", 0.7+ie*3e3, 4.57, 0.005)
	checkAbs(t, "recomputed VC", 15-beta/(beta+1)*ie*5e3, 8.6, 0.05)

	c := newCircuit(25).supply("vcc", 15, 0).
		res("RB1", "vcc", "b", 100e3).res("RB2", "b", "gnd", 50e3).
		res("RC", "vcc", "c", 5e3).res("RE", "e", "gnd", 3e3).
		npn("Q1", "c", "b", "e", transistor(beta, 0.7, 1.28e-3)).c
	r := solve(t, c)
	checkPrinted(t, r, []printed{
		{"IE", 1.29e-3, 0.005e-3, ieOf("Q1")},
		{"IB", 0.0128e-3, 0.00005e-3, ibOf("Q1")},
		{"VB", 4.57, 0.005, volts("b")},
		{"VC", 8.6, 0.05, volts("c")},
	})
	checkKCL(t, c, r, 1e-9)
}

// Source: techwhiff.com, "For the circuit in figure 5 compute β, VCC, RB ..."
// (https://www.techwhiff.com/learn/for-the-circult-in-figure-5-compute-b-voc-re-vcc/442276),
// its divider part: 16 V, R1 62k / R2 9.1k, RE 0.68k, β = 80. Printed:
// VTH 2.0478 V, RTH 7.9353 kΩ, IB 21.388 µA. The page's substitution line
// reads "2.478 − 0.7", a typo: its result uses 2.0478. RC does not enter IB;
// 2.7 kΩ here is my choice, to keep the stage active.
func TestPublishedDividerTechwhiff(t *testing.T) {
	const beta = 80.0
	vth, rth := 16*9.1/71.1, parallel(62e3, 9.1e3)
	checkAbs(t, "recomputed VTH", vth, 2.0478, 0.00005)
	checkAbs(t, "recomputed RTH, kΩ", rth/1e3, 7.9353, 0.00005)
	ib := (vth - 0.7) / (rth + (beta+1)*680)
	checkAbs(t, "recomputed IB, µA", ib*1e6, 21.388, 0.001) // the page rounds VTH and RTH first

	c := newCircuit(25).supply("vcc", 16, 0).
		res("R1", "vcc", "b", 62e3).res("R2", "b", "gnd", 9.1e3).
		res("RC", "vcc", "c", 2.7e3).res("RE", "e", "gnd", 680).
		npn("Q1", "c", "b", "e", transistor(beta, 0.7, 1.711e-3)).c
	r := solve(t, c)
	// 21.388 µA is printed to 5 figures; the exact model's VBE sits within
	// 0.01 mV of 0.7 V here, so it must agree to 0.1 %.
	checkRel(t, "IB against the printed 21.388 µA", r.BJTs["Q1"].IB, 21.388e-6, 1e-3)
	checkKCL(t, c, r, 1e-9)
}

// Source: ques10.com, "For a npn transistor in CE mode voltage divider ..."
// (https://ques10.com/p/17708/for-a-npn-transistor-in-ce-mode-voltage-divider--1):
// split supplies +20 V / −20 V, R1 8.2k from +20 V to the base, R2 2.2k from
// the base to −20 V, RE 1.8k to −20 V, RC 2.7k to +20 V, β = 120. Printed:
// VTH −11.53 V, RTH 1.73 kΩ, IB 35.39 µA, IC 4.25 mA, VC 8.53 V, VB −11.59 V.
// The page rounds VTH to −11.53 V (exactly −11.538 V) before using it, so its
// IB is 0.1 % high and its VC 0.015 V low; the check allows for that.
// A second page on the same network, studyx.ai ("Example 4.20: determine VC
// and VB", https://studyx.ai/questions/4lglkus/example-4-20-determine-v-c-and-v-b-for-the-network-of-fig-4-55),
// prints VB ≈ −10 V: its own formula gives −11.54 V (−15.77 + 4.23, which it
// adds up as −14.2 + 4.2); it is wrong, and it also drops the base current.
func TestPublishedSplitSupplyQues10(t *testing.T) {
	const beta = 120.0
	i := 40 / 10.4e3
	vth, rth := i*2.2e3-20, parallel(8.2e3, 2.2e3)
	checkAbs(t, "recomputed VTH", vth, -11.53, 0.01)
	checkAbs(t, "recomputed RTH, kΩ", rth/1e3, 1.73, 0.005)
	ib := (vth + 20 - 0.7) / (rth + (beta+1)*1.8e3)
	checkRel(t, "recomputed IB", ib, 35.39e-6, 2e-3)

	c := newCircuit(25).supply("vcc", 20, 0).supply("vee", -20, 0).
		res("R1", "vcc", "b", 8.2e3).res("R2", "b", "vee", 2.2e3).
		res("RC", "vcc", "c", 2.7e3).res("RE", "e", "vee", 1.8e3).
		npn("Q1", "c", "b", "e", transistor(beta, 0.7, 4.25e-3)).c
	r := solve(t, c)
	checkPrinted(t, r, []printed{
		{"IB", 35.39e-6, 0.07e-6, ibOf("Q1")},
		{"IC", 4.25e-3, 0.01e-3, icOf("Q1")},
		{"VC", 8.53, 0.025, volts("c")},
		{"VB", -11.59, 0.015, volts("b")},
	})
	if d := math.Abs(r.V["b"] - (-10)); d < 1.5 {
		t.Errorf("VB = %.3f V; studyx.ai's −10 V is wrong by about 1.6 V, the model should not reproduce it", r.V["b"])
	}
	checkKCL(t, c, r, 1e-9)
}

// Source: scribd.com, "Vth análisis dc amplificador dc"
// (https://es.scribd.com/document/333037268/Vth-analisis-dc-amplificador-dc):
// 17 V, R1 150k / R2 22k, RE 2k, RC 3k, β = 244. Printed: VTH 2.1744 V,
// RTH 19.186 kΩ, IB 2.89602 µA, IC 706.5202 µA, VCE 13.46157 V.
func TestPublishedDividerScribdES(t *testing.T) {
	const beta = 244.0
	vth, rth := 17*22.0/172, parallel(150e3, 22e3)
	checkAbs(t, "recomputed VTH", vth, 2.1744, 0.00005)
	ib := (vth - 0.7) / (rth + (beta+1)*2e3)
	// The page carries VTH as 2.1744 V, so its IB is 0.01 % off the exact
	// 2.89564 µA.
	checkRel(t, "recomputed IB", ib, 2.89602e-6, 2e-4)

	c := newCircuit(25).supply("vcc", 17, 0).
		res("R1", "vcc", "b", 150e3).res("R2", "b", "gnd", 22e3).
		res("RC", "vcc", "c", 3e3).res("RE", "e", "gnd", 2e3).
		npn("Q1", "c", "b", "e", transistor(beta, 0.7, 706.5e-6)).c
	r := solve(t, c)
	checkRel(t, "IB", r.BJTs["Q1"].IB, 2.89602e-6, 5e-4)
	checkRel(t, "IC", r.BJTs["Q1"].IC, 706.5202e-6, 5e-4)
	checkRel(t, "VCE", r.BJTs["Q1"].VCE, 13.46157, 1e-4)
	checkKCL(t, c, r, 1e-9)
}

// Source: malvino.com, "Voltage-divider Bias" answer
// (http://www.malvino.com/cansolve/biasans2.html): 10 V, R1 10k / R2 2.2k,
// RE 1k, RC 3.6k, VBE 0.7 V. Printed: VB 1.78 V, VE 1.08 V, VC 6.14 V. The
// answer page states no β; its figures are the exact Thevenin solution with
// β = 100 (my inference: a stiff-divider estimate would give 1.80, 1.10, 6.04).
// studyx.ai solves the same figures with the stiff-divider estimate
// (https://studyx.ai/questions/4lgjlm8/calculate-the-operation-point-for-the-vdb-circuit-given-vcc-10v-r1-10k-r2-2-2k-rc-3-6k-re):
// VB 1.8 V, IE 1.1 mA, VC 6.04 V. That is an approximation: with any finite
// β the base current loads the divider (RTH 1.8 kΩ against βRE 100 kΩ moves
// VC by 0.1 V).
func TestPublishedDividerMalvino(t *testing.T) {
	const beta = 100.0
	vth, rth := 10*2.2/12.2, parallel(10e3, 2.2e3)
	ib := (vth - 0.7) / (rth + (beta+1)*1e3)
	checkAbs(t, "recomputed VB", vth-ib*rth, 1.78, 0.005)
	checkAbs(t, "recomputed VC", 10-beta*ib*3.6e3, 6.14, 0.005)

	c := newCircuit(25).supply("vcc", 10, 0).
		res("R1", "vcc", "b", 10e3).res("R2", "b", "gnd", 2.2e3).
		res("RC", "vcc", "c", 3.6e3).res("RE", "e", "gnd", 1e3).
		npn("Q1", "c", "b", "e", transistor(beta, 0.7, 1.07e-3)).c
	r := solve(t, c)
	checkPrinted(t, r, []printed{
		{"VB", 1.78, 0.005, volts("b")},
		{"VE", 1.08, 0.005, volts("e")},
		{"VC", 6.14, 0.005, volts("c")},
	})
	if d := r.V["c"] - 6.04; d < 0.08 {
		t.Errorf("VC = %.3f V; the stiff-divider estimate 6.04 V should be about 0.1 V low", r.V["c"])
	}
	checkKCL(t, c, r, 1e-9)
}

// Source: malvino.com, "Two-supply Emitter Bias" answer
// (http://www.malvino.com/cansolve/biasans4.html): RB 51k base to gnd,
// RE 7.5k to −15 V, RC 4.7k to +15 V, β = 100, VBE 0.7 V. Printed: VB −902 mV,
// VE −1.6 V, VC 6.69 V.
func TestPublishedTwoSupplyMalvino(t *testing.T) {
	const beta = 100.0
	ie := (15 - 0.7) / (7.5e3 + 51e3/(beta+1))
	checkAbs(t, "recomputed VB", -ie/(beta+1)*51e3, -0.902, 0.0005)
	checkAbs(t, "recomputed VC", 15-beta/(beta+1)*ie*4.7e3, 6.69, 0.005)

	c := newCircuit(25).supply("vcc", 15, 0).supply("vee", -15, 0).
		res("RB", "b", "gnd", 51e3).res("RE", "e", "vee", 7.5e3).res("RC", "vcc", "c", 4.7e3).
		npn("Q1", "c", "b", "e", transistor(beta, 0.7, 1.77e-3)).c
	r := solve(t, c)
	checkPrinted(t, r, []printed{
		{"VB", -0.902, 0.0005, volts("b")},
		{"VE", -1.6, 0.005, volts("e")},
		{"VC", 6.69, 0.005, volts("c")},
	})
	checkKCL(t, c, r, 1e-9)
}

// Source: scribd.com, "LAB5" (https://scribd.com/document/475833368/LAB5),
// collector feedback: 21 V, RB 680k collector to base, RC 4.2k, emitter
// grounded, β = 100, VBE 0.7 V. Printed: IB = (VCC − VBE)/(RB + β·RC)
// = 18.45 µA, IC 1.875 mA, VCE 13.251 V. Two remarks: the formula uses β·RC
// where KVL gives (β+1)·RC (RC carries IC + IB), an approximation 0.4 % high;
// and 100 × 18.45 µA is 1.845 mA, so the printed 1.875 mA is a slip (its VCE,
// 21 − 1.845·4.2 = 13.251, used the right product).
func TestPublishedCollectorFeedbackLab5(t *testing.T) {
	const beta = 100.0
	approx := 20.3 / (680e3 + beta*4.2e3)
	checkAbs(t, "recomputed printed IB, µA", approx*1e6, 18.45, 0.005)
	checkAbs(t, "recomputed printed VCE", 21-beta*approx*4.2e3, 13.251, 0.002) // the page rounds IC to 1.845 mA first
	if math.Abs(beta*approx-1.875e-3) < 0.02e-3 {
		t.Errorf("β·IB = %.4g A; the printed 1.875 mA should be a slip", beta*approx)
	}

	c := newCircuit(25).supply("vcc", 21, 0).
		res("RC", "vcc", "c", 4.2e3).res("RB", "c", "b", 680e3).
		npn("Q1", "c", "b", "gnd", transistor(beta, 0.7, 1.84e-3)).c
	r := solve(t, c)
	q := r.BJTs["Q1"]
	exact := (21 - q.VBE) / (680e3 + (beta+1)*4.2e3)
	checkRel(t, "IB against the exact closed form", q.IB, exact, 1e-3)
	checkRel(t, "IB against the printed approximation", q.IB, 18.45e-6, 5e-3)
	checkRel(t, "VCE against the printed answer", q.VCE, 13.251, 5e-3)
	checkKCL(t, c, r, 1e-9)
}

// Source: itecnotes.com, "Electronic – PNP transistor circuit"
// (https://itecnotes.com/electrical/electronic-pnp-transistor-circuit/): a PNP
// on a −20 V rail, R1 100k rail to base, R2 30k base to gnd, RE 500 Ω emitter
// to gnd, RC 2k collector to the rail, β = 110. Printed (and confirmed by the
// accepted answer): VB −4.62 V, RTH 23.1 kΩ, IE 7.49 mA, VC −5.02 V,
// VCE −1.1 V. That answer is wrong: it adds VBE to the Thevenin voltage
// instead of subtracting it ((−4.62 − 0.7)/… instead of (4.62 − 0.7)/…) and
// then uses VE = VB + 0.7 inconsistently with its IE. The closed form gives
// IE = (4.615 − 0.7)/(500 + 23077/111) = 5.53 mA, VC −9.04 V, VCE −6.27 V.
func TestPublishedPNPItecnotesIsWrong(t *testing.T) {
	const beta = 110.0
	vth, rth := -20*30/130.0, parallel(100e3, 30e3)
	checkAbs(t, "recomputed VB", vth, -4.62, 0.005)
	checkAbs(t, "recomputed RTH, kΩ", rth/1e3, 23.1, 0.05)
	wrong := (-vth + 0.7) / (500 + rth/beta)
	checkAbs(t, "the page's arithmetic, mA", wrong*1e3, 7.49, 0.005)

	c := newCircuit(25).supply("vneg", -20, 0).
		res("R1", "vneg", "b", 100e3).res("R2", "b", "gnd", 30e3).
		res("RE", "e", "gnd", 500).res("RC", "c", "vneg", 2e3).
		pnp("Q1", "c", "b", "e", transistor(beta, 0.7, 5.5e-3)).c
	r := solve(t, c)
	q := r.BJTs["Q1"]
	ie := (-vth - q.VBE) / (500 + rth/(beta+1))
	checkRel(t, "IE against the corrected closed form", q.IC+q.IB, ie, 1e-3)
	checkAbs(t, "VC", r.V["c"], -20+beta/(beta+1)*ie*2e3, 0.01)
	checkAbs(t, "VCE (magnitude)", q.VCE, 6.27, 0.01)
	if math.Abs(q.IC+q.IB-7.49e-3) < 1e-3 {
		t.Errorf("IE = %.4g A reproduces the page's wrong 7.49 mA", q.IC+q.IB)
	}
	if q.Region != "active" {
		t.Errorf("region %s: the corrected stage is active, not near saturation as the page's VCE −1.1 V suggests", q.Region)
	}
	checkKCL(t, c, r, 1e-9)
}
