package rules

import (
	"fmt"
	"math"
	"sort"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/eseries"
	"headroom/checker/quantity"
	"headroom/checker/topology"
)

// BiasDividerStiffness checks that a base divider carries enough current to
// hold the base voltage whatever the transistor's hFE.
var BiasDividerStiffness = &engine.Rule{
	ID: "bias.divider-stiffness",
	Doc: engine.Doc{
		Title: "a base divider must carry many times the base current",
		Why: "A divider holds the base voltage only while its own current dwarfs the base current; " +
			"otherwise the base current, which follows hFE and temperature, pulls the base voltage and the " +
			"collector current with it. The DC bias uses hFE; the high-frequency beta (ft/f) is for the AC input " +
			"impedance, not the bias.",
		Formula: "the summed current through the lower leg (the resistors, not potentiometer sections, directly " +
			"between the base net and the return rail) ÷ the base current IB, >= min_ratio; unit ratio. " +
			"A base with no lower leg (collector feedback, a base fed through a winding) is not judged; " +
			"the finding names the first lower-leg resistor in file order.",
		Source: "common practice, no published source (a stiff divider carries at least ten times the base " +
			"current; the figure circulates in tutorials and forums; textbook forms such as R1‖R2 ≤ β·RE/10, " +
			"quoted from memory, aim at the same)",
		Fix: "Lower-leg and upper-leg values (E24) that carry min_ratio × IB and keep the base voltage within 2 %: " +
			"R2 = VB/I2 with I2 a little above min_ratio × IB, R1 = (Vfeed − VB)/(I2 + IB), rounded to E24 pairs " +
			"that still meet the ratio, each pair checked by solving the operating point again at the case judged. " +
			"With more than one resistor in a leg, the exact values needed.",
		Params: []engine.Param{
			{Name: "min_ratio", Unit: quantity.Ratio, Help: "lower-leg current ÷ base current, at least"},
		},
	},
	Run: runDividerStiffness,
}

// dividerMargin is how far above min_ratio the first guess aims, so that
// rounding and the base current's shift with the base voltage leave the
// ratio met.
const dividerMargin = 1.05

// dividerSteps is how many E24 values of the lower leg, from the largest
// that meets the ratio downwards, the fix tries: E24 steps of the upper leg
// move the base voltage by up to 5 %, so a pair within 2 % may need a
// stiffer lower leg than the ratio alone asks for (12 steps: half a decade).
const dividerSteps = 12

// dividerVBTol is how far the base voltage may move under a fix (RULES.md).
const dividerVBTol = 0.02

func runDividerStiffness(p *engine.Pass) error {
	op := p.A.OP
	if op == nil {
		return nil
	}
	minRatio := p.Param("min_ratio")
	msgs := bjtFigs(p, 1)
	for part := range bjts(p) {
		tb := p.A.Topo.BJTs[part.Ref]
		q := op.BJTs[part.Ref]
		if tb == nil || q == nil || len(tb.LowerLeg) == 0 || !(q.IB > 0) {
			continue
		}
		il := 0.0
		for _, ref := range tb.LowerLeg {
			if dp := op.Parts[ref]; dp != nil {
				il += math.Abs(dp.Current)
			}
		}
		ratio := il / q.IB
		who := tb.LowerLeg[0]
		if len(tb.LowerLeg) > 1 {
			who = "the lower leg (" + refList(tb.LowerLeg) + ")"
		}
		f := engine.Finding{Part: tb.LowerLeg[0],
			HasMetric: true, Measured: ratio, Limit: minRatio, Comparison: ">=", Unit: "ratio",
			Messenger: msgs.Add(figs{part: part, s: who, v: [6]float64{ratio, minRatio}, say: func(m *figs) string {
				r, l := approx2(m.v[0], m.v[1], quantity.Ratio)
				return fmt.Sprintf("%s carries %sx the base current of %s, needs at least %sx", m.s, r, m.part.Ref, l)
			}})}
		if engine.Fails(ratio, minRatio, ">=") {
			f.FixLater = func() (string, []engine.Change) { return dividerFix(p, tb, minRatio) }
		}
		p.Report(f)
	}
	return nil
}

// dividerFix designs a stiffer divider at the case judged.
func dividerFix(p *engine.Pass, tb *topology.BJT, minRatio float64) (string, []engine.Change) {
	op := p.A.OP
	q := op.BJTs[tb.Ref]
	s := sense(tb.Kind)
	vret := netV(op, tb.ReturnRail)
	vb := s * (netV(op, tb.Base) - vret) // base voltage from the return rail, NPN sense
	ib := q.IB
	i2 := minRatio * dividerMargin * ib

	// The upper leg: resistors from the base net towards the feed — to a
	// supply, a decoupled rail behind its resistor, or the collector — that
	// is, anywhere but the return rail and the emitter. The feed voltage is
	// that net's; the candidates are solved again, so a feed that moves with
	// the design (a collector) is judged as it really moves.
	var upper []*circuit.Part
	for _, r := range resistorsOn(p.Circuit, tb.Base) {
		if o := otherNet(r, tb.Base); o != tb.ReturnRail && o != tb.Emitter {
			upper = append(upper, r)
		}
	}
	r2Need := vb / i2 // total lower leg at the case
	if len(tb.LowerLeg) != 1 || len(upper) != 1 || !(vb > 0) {
		return fmt.Sprintf("the lower leg needs at most %s in all (it would carry %sx the base current of %s at %s); "+
			"change the upper leg with it to keep the base voltage",
			quantity.Approx(r2Need, quantity.Ohm), quantity.Approx(minRatio*dividerMargin, quantity.Ratio),
			tb.Ref, quantity.Approx(netV(op, tb.Base), quantity.Volt)), nil
	}
	r1, r2 := upper[0], p.Circuit.Part(tb.LowerLeg[0])
	vf := s * (netV(op, otherNet(r1, tb.Base)) - vret)
	if !(vf > vb) {
		return fmt.Sprintf("the lower leg %s needs at most %s to carry %sx the base current; "+
			"change %s with it to keep the base voltage", r2.Ref, quantity.Approx(r2Need, quantity.Ohm),
			quantity.Approx(minRatio*dividerMargin, quantity.Ratio), r1.Ref), nil
	}
	f1, f2 := caseFactor(p, r1.Ref), caseFactor(p, r2.Ref)
	r1Exact := (vf - vb) / (i2 + ib) / f1
	r2Exact := r2Need / f2

	type pair struct{ r1, r2, err float64 }
	var tries []pair
	for _, c2 := range e24Walk(r2Exact, false, dividerSteps) {
		i := vb / (c2 * f2)
		need := (vf - vb) / (i + ib) / f1
		var cands []pair
		for _, c1 := range []float64{eseries.RoundDown(need, eseries.E24), eseries.RoundUp(need, eseries.E24)} {
			// Predicted base voltage with IB held: the Thevenin source of the new pair.
			a, b := c1*f1, c2*f2
			v := (vf*b - ib*a*b) / (a + b)
			cands = append(cands, pair{c1, c2, math.Abs(v/vb - 1)})
		}
		sort.SliceStable(cands, func(i, j int) bool { return cands[i].err < cands[j].err })
		tries = append(tries, cands...)
	}
	for _, t := range tries {
		op2, ok := solveWith(p, map[string]float64{r1.Ref: t.r1, r2.Ref: t.r2})
		if !ok {
			continue
		}
		q2 := op2.BJTs[tb.Ref]
		dp := op2.Parts[r2.Ref]
		if q2 == nil || dp == nil || !(q2.IB > 0) {
			continue
		}
		vb2 := s * (netV(op2, tb.Base) - netV(op2, tb.ReturnRail))
		ratio2 := math.Abs(dp.Current) / q2.IB
		if ratio2 < minRatio || math.Abs(vb2/vb-1) > dividerVBTol {
			continue
		}
		where := ""
		if p.A != p.Nominal {
			where = " at the worst case"
		}
		return fmt.Sprintf("%s = %s and %s = %s (E24) keep the base near %s and carry %sx the base current%s",
				r1.Ref, quantity.Approx(t.r1, quantity.Ohm), r2.Ref, quantity.Approx(t.r2, quantity.Ohm),
				quantity.Approx(netV(op2, tb.Base), quantity.Volt), quantity.Approx(ratio2, quantity.Ratio), where),
			[]engine.Change{
				{Part: r1.Ref, Key: "value", To: quantity.Code(t.r1, quantity.Ohm)},
				{Part: r2.Ref, Key: "value", To: quantity.Code(t.r2, quantity.Ohm)},
			}
	}
	return fmt.Sprintf("%s ≈ %s and %s ≈ %s would carry %sx the base current at the same base voltage; "+
		"no nearby E24 pair keeps the base within 2 %%, so use these exact values (or E96)",
		r1.Ref, quantity.Approx(r1Exact, quantity.Ohm), r2.Ref, quantity.Approx(r2Exact, quantity.Ohm),
		quantity.Approx(minRatio*dividerMargin, quantity.Ratio)), nil
}
