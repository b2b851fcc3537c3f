package rules

import (
	"fmt"
	"math"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/eseries"
	"headroom/checker/quantity"
	"headroom/checker/topology"
)

// BiasEmitterFraction checks that a common-emitter stage drops a sensible
// share of its supply across the emitter resistance.
var BiasEmitterFraction = &engine.Rule{
	ID: "bias.emitter-fraction",
	CheckParams: func(ps map[string]float64) (string, string) {
		if ps["min_fraction"] >= ps["max_fraction"] {
			return "max_fraction", "the window is empty: max_fraction must be larger than min_fraction"
		}
		return "", ""
	},
	Doc: engine.Doc{
		Title: "a common-emitter stage must drop about a tenth of its supply across the emitter",
		Why: "The emitter voltage is what holds the collector current against VBE, which falls about 2 mV per °C: " +
			"with too little of it the bias drifts with temperature and from part to part; with too much the " +
			"stage wastes supply that the collector swing needs.",
		Formula: "for a common-emitter stage (the collector not directly on an AC-ground or decoupled net, the base not " +
			"held at AC ground; followers and common-base stages are not judged): " +
			"V(emitter) ÷ V(feed rail), both measured from the return rail, >= min_fraction and <= max_fraction " +
			"(one item per bound; the finding reports the bound it violates); unit fraction",
		Source: "common practice, no published source (about a tenth of the supply across the emitter resistor)",
		Fix: "When one resistor returns the emitter to its rail and changing it moves the emitter voltage (a " +
			"base fed by current rather than held by a divider), the E24 value of it nearest one tenth, checked by " +
			"solving the operating point again at the case judged and at its opposite vertex (the one worst for " +
			"the other bound), so that it holds at both. Otherwise the emitter resistance for one tenth at the " +
			"present current, and the base voltage that goes with it.",
		Params: []engine.Param{
			{Name: "min_fraction", Unit: quantity.Fraction, Help: "smallest emitter voltage ÷ feed-rail voltage"},
			{Name: "max_fraction", Unit: quantity.Fraction, Help: "largest emitter voltage ÷ feed-rail voltage"},
		},
	},
	Run: runEmitterFraction,
}

// emitterTarget is the fraction the fix aims at.
const emitterTarget = 0.1

// emitterFraction is V(emitter) ÷ V(feed rail), both from the return rail;
// false where the feed rail sits at the return rail's voltage.
func emitterFraction(op *dc.Result, tb *topology.BJT) (float64, bool) {
	vret := netV(op, tb.ReturnRail)
	den := netV(op, tb.FeedRail) - vret
	if den == 0 || math.IsNaN(den) {
		return 0, false
	}
	return (netV(op, tb.Emitter) - vret) / den, true
}

func runEmitterFraction(p *engine.Pass) error {
	op := p.A.OP
	if op == nil {
		return nil
	}
	lo, hi := p.Param("min_fraction"), p.Param("max_fraction")
	msgs := bjtFigs(p, 2)
	for part := range bjts(p) {
		tb := p.A.Topo.BJTs[part.Ref]
		if tb == nil || !tb.CommonEmitter || tb.ReturnRail == "" || tb.FeedRail == "" {
			continue
		}
		fr, ok := emitterFraction(op, tb)
		if !ok {
			continue
		}
		ve := math.Abs(netV(op, tb.Emitter) - netV(op, tb.ReturnRail))
		vf := math.Abs(netV(op, tb.FeedRail) - netV(op, tb.ReturnRail))
		for _, b := range []struct {
			bound, cmp, word string
			limit            float64
		}{{"min", ">=", "at least", lo}, {"max", "<=", "at most", hi}} {
			f := engine.Finding{Part: part.Ref, Bound: b.bound,
				HasMetric: true, Measured: fr, Limit: b.limit, Comparison: b.cmp, Unit: "fraction",
				Messenger: msgs.Add(figs{part: part, s: b.word, v: [6]float64{fr, b.limit, ve, vf}, say: func(m *figs) string {
					fr, l := approx2(m.v[0], m.v[1], quantity.Fraction)
					return fmt.Sprintf("%s drops %s across its emitter, %s of the %s feed, needs %s %s", m.part.Ref,
						quantity.Approx(m.v[2], quantity.Volt), fr, quantity.Approx(m.v[3], quantity.Volt), m.s, l)
				}})}
			if engine.Fails(fr, b.limit, b.cmp) {
				f.FixLater = func() (string, []engine.Change) { return emitterFix(p, tb, lo, hi) }
				f.FixForms = func() []engine.FixForm { return baseForm(p, tb, lo, hi) }
			}
			p.Report(f)
		}
	}
	return nil
}

// emitterFix looks for the E24 emitter resistor nearest one tenth; failing
// that, it says what the emitter and base need.
func emitterFix(p *engine.Pass, tb *topology.BJT, lo, hi float64) (string, []engine.Change) {
	op := p.A.OP
	ers := resistorsOn(p.Circuit, tb.Emitter)
	if len(ers) == 1 && otherNet(ers[0], tb.Emitter) == tb.ReturnRail {
		re := ers[0]
		nom := p.NominalCircuit.Part(re.Ref).Value
		// The fraction rises with the emitter resistor, at this case and at
		// its opposite vertex (the one worst for the other bound); a fix must
		// hold at both. The best value puts their mean at a tenth: bisect two
		// decades either side of the present value for that crossing.
		vals := append(reverse(e24Walk(nom, false, 49)), e24Walk(nom*1.0001, true, 48)...)
		type both struct{ c, o float64 }
		memo := map[int]*both{}
		at := func(i int) *both {
			if r, ok := memo[i]; ok {
				return r
			}
			var r *both
			values := map[string]float64{re.Ref: vals[i]}
			if op2, ok := solveWith(p, values); ok {
				if fc, ok := emitterFraction(op2, tb); ok {
					if op3, ok := opposite(p, values); ok {
						if fo, ok := emitterFraction(op3, tb); ok {
							r = &both{fc, fo}
						}
					}
				}
			}
			memo[i] = r
			return r
		}
		mean := func(r *both) float64 { return (r.c + r.o) / 2 }
		a, b := 0, len(vals)-1
		ra, rb := at(a), at(b)
		if ra != nil && rb != nil && mean(ra) < emitterTarget && mean(rb) >= emitterTarget {
			for b-a > 1 {
				m := (a + b) / 2
				rm := at(m)
				if rm == nil {
					break
				}
				if mean(rm) >= emitterTarget {
					b = m
				} else {
					a = m
				}
			}
			best, bestErr := -1, math.Inf(1)
			for i := a - 1; i <= b+1; i++ {
				if i < 0 || i >= len(vals) || vals[i] == nom {
					continue
				}
				r := at(i)
				if r == nil || r.c < lo || r.c > hi || r.o < lo || r.o > hi {
					continue
				}
				if e := max(math.Abs(r.c-emitterTarget), math.Abs(r.o-emitterTarget)); e < bestErr {
					best, bestErr = i, e
				}
			}
			if best >= 0 {
				r := at(best)
				text := fmt.Sprintf("%s = %s (E24) puts %s of the feed across the emitter", re.Ref,
					quantity.Approx(vals[best], quantity.Ohm), quantity.Approx(r.c, quantity.Fraction))
				if r.o != r.c {
					text += fmt.Sprintf(" at this corner and %s at the opposite one", quantity.Approx(r.o, quantity.Fraction))
				}
				return text, []engine.Change{{Part: re.Ref, Key: "value", To: quantity.Code(vals[best], quantity.Ohm)}}
			}
		}
	}
	// Advice: the emitter resistance for a tenth at the present current.
	q := op.BJTs[tb.Ref]
	vf := math.Abs(netV(op, tb.FeedRail) - netV(op, tb.ReturnRail))
	ie := q.IC + q.IB
	if !(ie > 0) {
		return fmt.Sprintf("set the emitter voltage near %s (a tenth of the feed) once the stage conducts",
			quantity.Approx(emitterTarget*vf, quantity.Volt)), nil
	}
	want := emitterTarget * vf / ie
	where := "nominal"
	if p.A != p.Nominal {
		where = "at the worst case"
	}
	return fmt.Sprintf("the emitter voltage follows the base here: move the base to about %s from the return rail "+
		"(a tenth of the feed, %s, plus VBE) and use about %s of emitter resistance (%s E24) to keep the present %s",
		quantity.Approx(emitterTarget*vf+q.VBE, quantity.Volt), quantity.Approx(emitterTarget*vf, quantity.Volt),
		quantity.Approx(want, quantity.Ohm), quantity.Approx(eseries.Nearest(want, eseries.E24), quantity.Ohm),
		quantity.Approx(q.IC, quantity.Ampere)+" collector current ("+where+")"), nil
}

// baseForm is the fix's second form, for a base held by a two-resistor
// divider: move the base voltage and the emitter resistor together, so
// that the emitter gets its share of the feed and the nominal collector
// current stays where it is. The divider keeps its Thévenin resistance (its
// stiffness); E24 neighbours of the three computed values are solved at the
// case judged and at its opposite vertex, and the one nearest the aim that
// holds at both, with the nominal current closest to today's, is offered.
func baseForm(p *engine.Pass, tb *topology.BJT, lo, hi float64) []engine.FixForm {
	nc := p.NominalCircuit
	nop := p.Nominal.OP
	if nop == nil || len(tb.LowerLeg) != 1 {
		return nil
	}
	q := nop.BJTs[tb.Ref]
	if q == nil || !(q.IC > 0) {
		return nil
	}
	ers := resistorsOn(nc, tb.Emitter)
	if len(ers) != 1 || otherNet(ers[0], tb.Emitter) != tb.ReturnRail {
		return nil
	}
	re, r2 := ers[0], nc.Part(tb.LowerLeg[0])
	var r1 *circuit.Part
	for _, r := range resistorsOn(nc, tb.Base) {
		if otherNet(r, tb.Base) == tb.FeedRail {
			if r1 != nil {
				return nil // two upper legs: no single divider to move
			}
			r1 = r
		}
	}
	if r1 == nil || r2 == nil || len(resistorsOn(nc, tb.Base)) != 2 {
		return nil
	}
	// The aim: a tenth, kept a tenth of the window inside it; in a
	// worst-case run, where the corners spread the fraction, aims further
	// into the window are tried until one holds at both corners.
	margin := 0.1 * (hi - lo)
	first := min(max(emitterTarget, lo+margin), hi-margin)
	for k := 0; k < 8; k++ {
		aim := first + float64(k)*(hi-margin-first)/8
		if f := baseFormAt(p, tb, lo, hi, aim, q, re, r1, r2); f != nil {
			return f
		}
	}
	return nil
}

// baseFormAt is baseForm for one aimed fraction.
func baseFormAt(p *engine.Pass, tb *topology.BJT, lo, hi, aim float64, q *dc.BJT, re, r1, r2 *circuit.Part) []engine.FixForm {
	nc, nop := p.NominalCircuit, p.Nominal.OP
	vfeed := math.Abs(netV(nop, tb.FeedRail) - netV(nop, tb.ReturnRail))
	ie := q.IC + q.IB
	ve := aim * vfeed
	reWant := ve / ie
	rth := r1.Value * r2.Value / (r1.Value + r2.Value)
	vth := ve + math.Abs(q.VBE) + q.IB*rth // from the return rail
	if !(vth > 0 && vth < vfeed) {
		return nil
	}
	r1Want, r2Want := rth*vfeed/vth, rth*vfeed/(vfeed-vth)
	near := func(v float64) []float64 {
		a, b := eseries.RoundDown(v, eseries.E24), eseries.RoundUp(v, eseries.E24)
		if a == b {
			return []float64{a}
		}
		return []float64{a, b}
	}
	type cand struct {
		v1, v2, ve    float64
		fc, fo, drift float64
	}
	var best *cand
	for _, v1 := range near(r1Want) {
		for _, v2 := range near(r2Want) {
			for _, v3 := range near(reWant) {
				values := map[string]float64{r1.Ref: v1, r2.Ref: v2, re.Ref: v3}
				op2, ok := solveWith(p, values)
				if !ok {
					continue
				}
				fc, ok := emitterFraction(op2, tb)
				if !ok || fc < lo || fc > hi {
					continue
				}
				fo := fc
				if p.A != p.Nominal {
					op3, ok := opposite(p, values)
					if !ok {
						continue
					}
					if fo, ok = emitterFraction(op3, tb); !ok || fo < lo || fo > hi {
						continue
					}
				}
				// The nominal current with these values.
				c := nc.Clone()
				c.Part(r1.Ref).Value, c.Part(r2.Ref).Value, c.Part(re.Ref).Value = v1, v2, v3
				opn, err := dc.Solve(c)
				if err != nil || opn == nil || opn.BJTs[tb.Ref] == nil {
					continue
				}
				drift := math.Abs(opn.BJTs[tb.Ref].IC-q.IC) / q.IC
				cd := &cand{v1, v2, v3, fc, fo, drift}
				score := func(c *cand) float64 { return max(math.Abs(c.fc-aim), math.Abs(c.fo-aim))/aim + c.drift }
				if best == nil || score(cd) < score(best) {
					best = cd
				}
			}
		}
	}
	if best == nil {
		return nil
	}
	text := fmt.Sprintf("move the base with the emitter: %s = %s, %s = %s and %s = %s (E24) put %s of the feed across "+
		"the emitter and keep %s's nominal collector current near %s", r1.Ref, quantity.Approx(best.v1, quantity.Ohm),
		r2.Ref, quantity.Approx(best.v2, quantity.Ohm), re.Ref, quantity.Approx(best.ve, quantity.Ohm),
		quantity.Approx(best.fc, quantity.Fraction), tb.Ref, quantity.Approx(q.IC, quantity.Ampere))
	if best.fo != best.fc {
		text += fmt.Sprintf(" (%s at the opposite corner)", quantity.Approx(best.fo, quantity.Fraction))
	}
	var changes []engine.Change
	for _, c := range []struct {
		part *circuit.Part
		v    float64
	}{{r1, best.v1}, {r2, best.v2}, {re, best.ve}} {
		if c.v != c.part.Value {
			changes = append(changes, engine.Change{Part: c.part.Ref, Key: "value", To: quantity.Code(c.v, quantity.Ohm)})
		}
	}
	return []engine.FixForm{{Text: text, Changes: changes}}
}

func reverse(v []float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[len(v)-1-i] = x
	}
	return out
}
