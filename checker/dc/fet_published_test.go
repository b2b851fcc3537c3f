package dc

import (
	"math"
	"testing"

	"headroom/checker/circuit"
)

// Published self-bias worked examples of a JFET (REFERENCES-2.md §5.2, each
// source named beside its test). For each: (1) the test recomputes the
// printed answer with the textbook closed form — VGS = VG − ID·RS and
// ID = IDSS(1 − VGS/VP)², the quadratic's root with VP < VGS ≤ 0 — which
// checks the transcription and finds the printed slips; (2) the exact model
// (docs/fet.md) solves the same network and must agree with the recomputed
// values to their last printed digit.

func jfetFigures(idss, vp float64) *circuit.FETParams {
	a := math.Abs(vp)
	return &circuit.FETParams{IDSSMin: idss, IDSSMax: idss, VPMin: a, VPMax: a, IDSS: idss, VP: a,
		VDSMax: 30, PD: 0.35, TjMax: 150}
}

func (b *builder) njfet(ref, d, g, s string, f *circuit.FETParams) *builder {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.NJFET, FET: f, Nets: []string{d, g, s}})
}

func (b *builder) pjfet(ref, d, g, s string, f *circuit.FETParams) *builder {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.PJFET, FET: f, Nets: []string{d, g, s}})
}

// selfBiasID is the textbook root: with u = 1 − VGS/VP and VGS = VG − ID·RS,
// ID = IDSS·u² is a quadratic in ID; the root kept has VP < VGS ≤ VG.
func selfBiasID(idss, vp, vg, rs float64) float64 {
	// ID = IDSS(1 − (VG − ID·RS)/VP)²; let a = RS/VP, c0 = 1 − VG/VP:
	// ID = IDSS(c0 + a·ID)² → IDSS·a²·ID² + (2·IDSS·a·c0 − 1)·ID + IDSS·c0² = 0.
	a, c0 := rs/vp, 1-vg/vp
	qa, qb, qc := idss*a*a, 2*idss*a*c0-1, idss*c0*c0
	d := math.Sqrt(qb*qb - 4*qa*qc)
	for _, id := range []float64{(-qb - d) / (2 * qa), (-qb + d) / (2 * qa)} {
		if vgs := vg - id*rs; vgs > vp && id > 0 && id < idss {
			return id
		}
	}
	return math.NaN()
}

type jfetExample struct {
	name               string
	idss, vp, rs, rd   float64
	vdd, vg            float64 // vg: the gate's Thevenin voltage (0 for self bias)
	id, vgs, vds       float64 // the recomputed values of REFERENCES-2.md §5.2
	tolID, tolV, tolDS float64 // their last printed digit, half
}

func runJFETExample(t *testing.T, ex jfetExample) *Result {
	t.Helper()
	id := selfBiasID(ex.idss, ex.vp, ex.vg, ex.rs)
	checkAbs(t, ex.name+": closed-form ID", id, ex.id, ex.tolID)
	checkAbs(t, ex.name+": closed-form VGS", ex.vg-id*ex.rs, ex.vgs, ex.tolV)
	checkAbs(t, ex.name+": closed-form VDS", ex.vdd-id*(ex.rs+ex.rd), ex.vds, ex.tolDS)
	b := newCircuit(25).supply("vdd", ex.vdd, 0).
		res("RD", "vdd", "d", ex.rd).res("RS", "s", "gnd", ex.rs)
	if ex.vg != 0 {
		b.supply("vgg", ex.vg, 0).res("RG", "vgg", "g", 1e6)
	} else {
		b.res("RG", "g", "gnd", 1e6)
	}
	c := b.njfet("Q1", "d", "g", "s", jfetFigures(ex.idss, ex.vp)).c
	r := solve(t, c)
	q := r.FETs["Q1"]
	checkAbs(t, ex.name+": model ID", q.ID, ex.id, ex.tolID)
	checkAbs(t, ex.name+": model VGS", q.VGS, ex.vgs, ex.tolV)
	checkAbs(t, ex.name+": model VDS", q.VDS, ex.vds, ex.tolDS)
	if q.Region != "saturation" {
		t.Errorf("%s: region %s, want saturation", ex.name, q.Region)
	}
	return r
}

// TBC 2102 Ex 6.15 (REFERENCES-2.md §5.2, [S]): IDSS 16 mA, VP −4 V,
// RS = RD = 500 Ω, VDD 18 V: ID 4.0000 mA, VGS −2.0000 V, VDS 14.000 V, the
// clean test vector.
func TestPublishedJFETCleanVector(t *testing.T) {
	runJFETExample(t, jfetExample{name: "TBC 2102 Ex 6.15", idss: 16e-3, vp: -4, rs: 500, rd: 500, vdd: 18,
		id: 4.0000e-3, vgs: -2.0000, vds: 14.000, tolID: 5e-9, tolV: 5e-5, tolDS: 5e-4})
}

// De Ex 7-26, p.330 (TBC 181), REFERENCES-2.md §5.2 [S]: IDSS 20 mA, VP −4 V,
// RS 0.5 k, RD 5 k, VDD 30 V. Printed roots 14.9 and 4.3 mA, VGS −2.15 V,
// VDS 6.35 V (comment) and 6.33 V (output): both VDS are slips; the
// recomputed VDS is 6.386 V.
func TestPublishedJFETDe726(t *testing.T) {
	ex := jfetExample{name: "De Ex 7-26", idss: 20e-3, vp: -4, rs: 500, rd: 5e3, vdd: 30,
		id: 4.2934e-3, vgs: -2.1467, vds: 6.386, tolID: 5e-8, tolV: 5e-5, tolDS: 5e-4}
	runJFETExample(t, ex)
	// The other root of the printed quadratic, rejected because ID > IDSS
	// puts VGS below VP.
	a, c0 := ex.rs/ex.vp, 1.0
	qa, qb, qc := ex.idss*a*a, 2*ex.idss*a*c0-1, ex.idss*c0*c0
	other := (-qb + math.Sqrt(qb*qb-4*qa*qc)) / (2 * qa)
	checkAbs(t, "De Ex 7-26: rejected root, mA", other*1e3, 14.9066, 5e-5)
	for _, slip := range []float64{6.35, 6.33} {
		if math.Abs(ex.vds-slip) < 0.03 {
			t.Errorf("printed VDS %g should differ from the recomputed %g", slip, ex.vds)
		}
	}
}

// De Ex 7-27, p.331 (TBC 181), REFERENCES-2.md §5.2 [S]: IDSS 3 mA,
// VP −2.4 V, RS 1 k, RD 10 k, VDD 20 V. Printed ID 1.01 mA, VGS −1.01 V,
// VDS 8.01 V (a slip: 1.09 typed for 1.01), Av 14.5. Recomputed VDS 8.907 V,
// gm 1.4495 mS.
func TestPublishedJFETDe727(t *testing.T) {
	r := runJFETExample(t, jfetExample{name: "De Ex 7-27", idss: 3e-3, vp: -2.4, rs: 1e3, rd: 10e3, vdd: 20,
		id: 1.0085e-3, vgs: -1.0085, vds: 8.907, tolID: 5e-8, tolV: 5e-5, tolDS: 5e-4})
	q := r.FETs["Q1"]
	// gm = (2/|VP|)·√(ID·IDSS) (REFERENCES-2.md §5.1, TBC 181 Ex 7-27 code).
	gm := 2 / 2.4 * math.Sqrt(q.ID*3e-3)
	checkAbs(t, "De Ex 7-27: gm, mS", gm*1e3, 1.4495, 5e-5)
	checkAbs(t, "De Ex 7-27: Av = gm·RD", gm*10e3, 14.5, 0.05)
	if math.Abs(q.VDS-8.01) < 0.5 {
		t.Errorf("the printed VDS 8.01 V is a slip; the model gives %g", q.VDS)
	}
}

// TBC 135 Ex 7.4, REFERENCES-2.md §5.2 [S]: IDSS 6 mA, VP −6 V, RS 1.6 k,
// RD 2.2 k, VDD 12 V: ID 1.7340 mA, VGS −2.7744 V, VDS 5.411 V, gm 1.0752 mS.
func TestPublishedJFETTBC135Ex74(t *testing.T) {
	r := runJFETExample(t, jfetExample{name: "TBC 135 Ex 7.4", idss: 6e-3, vp: -6, rs: 1.6e3, rd: 2.2e3, vdd: 12,
		id: 1.7340e-3, vgs: -2.7744, vds: 5.411, tolID: 5e-8, tolV: 5e-5, tolDS: 5e-4})
	q := r.FETs["Q1"]
	checkAbs(t, "TBC 135 Ex 7.4: gm, mS", 2/6.0*math.Sqrt(q.ID*6e-3)*1e3, 1.0752, 5e-5)
}

// TBC 135 Ex 7.5, REFERENCES-2.md §5.2 [S]: divider 400 k / 90 k from 18 V
// (VGG 3.306 V), IDSS 12 mA, VP −5 V, RS = RD = 2 k: ID 2.9199 mA,
// VGS −2.5336 V, VDS 6.321 V. The divider itself is built here.
func TestPublishedJFETTBC135Ex75(t *testing.T) {
	vgg := 18 * 90e3 / 490e3
	checkAbs(t, "TBC 135 Ex 7.5: VGG", vgg, 3.306, 5e-4)
	id := selfBiasID(12e-3, -5, vgg, 2e3)
	checkAbs(t, "TBC 135 Ex 7.5: closed-form ID, mA", id*1e3, 2.9199, 5e-5)
	c := newCircuit(25).supply("vdd", 18, 0).res("R1", "vdd", "g", 400e3).res("R2", "g", "gnd", 90e3).
		res("RD", "vdd", "d", 2e3).res("RS", "s", "gnd", 2e3).
		njfet("Q1", "d", "g", "s", jfetFigures(12e-3, -5)).c
	q := solve(t, c).FETs["Q1"]
	checkAbs(t, "TBC 135 Ex 7.5: model ID, mA", q.ID*1e3, 2.9199, 5e-5)
	checkAbs(t, "TBC 135 Ex 7.5: model VGS", q.VGS, -2.5336, 5e-5)
	checkAbs(t, "TBC 135 Ex 7.5: model VDS", q.VDS, 6.321, 5e-4)
}

// TBC 991 Ex 7.7, REFERENCES-2.md §5.2 [S]: VDD 24 V, VGG taken as 10 V (the
// book's rounding of the 12 M / 8.57 M divider), IDSS 4 mA, VP −2 V, RS 3 k,
// RD 910 Ω. Printed 9ID² − 73ID + 144 = 0, ID 3.39 mA, VGS −0.17 V (from the
// rounded ID); recomputed ID 3.3866 mA, VGS −0.1597 V, VDS 10.758 V. The
// book's rejected root 4.72 mA has ID > IDSS.
func TestPublishedJFETTBC991Ex77(t *testing.T) {
	runJFETExample(t, jfetExample{name: "TBC 991 Ex 7.7", idss: 4e-3, vp: -2, rs: 3e3, rd: 910, vdd: 24, vg: 10,
		id: 3.3866e-3, vgs: -0.1597, vds: 10.758, tolID: 5e-8, tolV: 5e-5, tolDS: 5e-4})
	// The printed quadratic in mA: 9ID² − 73ID + 144 = 0.
	d := math.Sqrt(73*73 - 4*9*144)
	checkAbs(t, "TBC 991 Ex 7.7: printed quadratic, kept root", (73-d)/18, 3.3866, 5e-5)
	checkAbs(t, "TBC 991 Ex 7.7: printed quadratic, rejected root", (73+d)/18, 4.72, 5e-3)
}

// A p-channel JFET mirrors every sign: the clean vector of TBC 2102 Ex 6.15
// with a negative supply reads the same magnitudes.
func TestPJFETMirrorsClean(t *testing.T) {
	c := newCircuit(25).supply("vdd", -18, 0).res("RD", "vdd", "d", 500).res("RS", "s", "gnd", 500).
		res("RG", "g", "gnd", 1e6).pjfet("Q1", "d", "g", "s", jfetFigures(16e-3, 4)).c
	q := solve(t, c).FETs["Q1"]
	checkAbs(t, "p-channel ID", q.ID, 4e-3, 5e-9)
	checkAbs(t, "p-channel VGS (forward sense)", q.VGS, -2, 5e-6)
	checkAbs(t, "p-channel VDS (forward sense)", q.VDS, 14, 5e-6)
	checkAbs(t, "source voltage", solve(t, c).V["s"], -2, 5e-6)
}

// The channel is symmetric (docs/fet.md): a JFET wired with drain and
// source exchanged runs with VDS < 0 and must settle at the same node
// voltages as the part wired the right way round — the clean vector of
// TBC 2102 Ex 6.15, ID 4 mA, V(s) 2 V, V(d) 16 V.
func TestJFETReversedIsSymmetric(t *testing.T) {
	build := func(d, s string) *circuit.Circuit {
		return newCircuit(25).supply("vdd", 18, 0).res("RD", "vdd", "d", 500).res("RS", "s", "gnd", 500).
			njfet("Q1", d, "gnd", s, jfetFigures(16e-3, -4)).c
	}
	fwd, rev := solve(t, build("d", "s")), solve(t, build("s", "d"))
	for _, net := range []string{"d", "s"} {
		checkAbs(t, "reversed part, net "+net, rev.V[net], fwd.V[net], 1e-9)
	}
	checkAbs(t, "V(s)", fwd.V["s"], 2, 1e-8)
	q := rev.FETs["Q1"]
	checkAbs(t, "reversed part: ID (drain to source, negative)", q.ID, -4e-3, 1e-11)
	checkAbs(t, "reversed part: VDS", q.VDS, -14, 1e-8)
}

// A dual gate is the cascode of two identical square-law halves (docs/fet.md):
// with gate 1 at the source (VG1S = 0), IDSS 10 mA and VP −1 V,
//   - gate 2 at +4 V lifts the internal node until half 1 saturates: ID is
//     half 1's IDSS, 10 mA, the sheet's figure, and gm = 2·IDSS/|VP| = 20 mS;
//   - gate 2 at the source: half 1 in triode at vm, half 2 saturated at
//     VGS2 = −vm: 2vm − vm² = (1 − vm)² gives vm = 1 − 1/√2 and ID = IDSS/2
//     exactly (hand algebra, the model's definition).
func TestDualGateSetsTheGain(t *testing.T) {
	f := jfetFigures(10e-3, -1)
	build := func(g2 string) *circuit.Circuit {
		return newCircuit(25).supply("vdd", 10, 0).supply("vg2", 4, 0).res("RD", "vdd", "d", 10).
			part(&circuit.Part{Ref: "Q1", Kind: circuit.DualGateMOSFET, FET: f, Nets: []string{"d", "gnd", "gnd", g2}}).c
	}
	full := solve(t, build("vg2")).FETs["Q1"]
	checkAbs(t, "ID at VG2S 4 V", full.ID, 10e-3, 1e-11)
	checkAbs(t, "gm at VG2S 4 V", full.Jac[0][1], 20e-3, 1e-9)
	half := solve(t, build("gnd")).FETs["Q1"]
	checkAbs(t, "ID at VG2S 0 V", half.ID, 5e-3, 1e-11)
	checkAbs(t, "internal node at VG2S 0 V", half.VM, 1-1/math.Sqrt2, 1e-9)
	if half.Jac[0][1] >= full.Jac[0][1] {
		t.Errorf("gm with gate 2 low %g should be below %g", half.Jac[0][1], full.Jac[0][1])
	}
}
