package rules

import (
	"fmt"
	"math"

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
		Formula: "for a common-emitter stage (the collector not directly on an AC-ground or decoupled net): " +
			"V(emitter) ÷ V(feed rail), both measured from the return rail, >= min_fraction and <= max_fraction " +
			"(one item per bound; the finding reports the bound it violates); unit fraction",
		Source: "common practice, no published source (about a tenth of the supply across the emitter resistor)",
		Fix: "When one resistor returns the emitter to its rail and changing it moves the emitter voltage (a " +
			"base fed by current rather than held by a divider), the E24 value of it nearest one tenth, checked by " +
			"solving the operating point again at the case judged and at its opposite vertex (the one worst for " +
			"the other bound), so that it holds at both. Otherwise the emitter resistance for one tenth at the " +
			"present current, and the base voltage that goes with it.",
		Params: []engine.Param{
			{Name: "min_fraction", Unit: quantity.Ratio, Help: "smallest emitter voltage ÷ feed-rail voltage"},
			{Name: "max_fraction", Unit: quantity.Ratio, Help: "largest emitter voltage ÷ feed-rail voltage"},
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
	for _, part := range bjts(p) {
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
				MessageLater: func() string {
					m, l := approx2(fr, b.limit, quantity.Fraction)
					return fmt.Sprintf("%s drops %s across its emitter, %s of the %s feed, needs %s %s", part.Ref,
						quantity.Approx(ve, quantity.Volt), m, quantity.Approx(vf, quantity.Volt), b.word, l)
				}}
			if engine.Fails(fr, b.limit, b.cmp) {
				f.FixLater = func() (string, []engine.Change) { return emitterFix(p, tb, lo, hi) }
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
	return fmt.Sprintf("the emitter voltage follows the base here: move the base to about %s from the return rail "+
		"(a tenth of the feed, %s, plus VBE) and use about %s of emitter resistance (%s E24) to keep the present %s",
		quantity.Approx(emitterTarget*vf+q.VBE, quantity.Volt), quantity.Approx(emitterTarget*vf, quantity.Volt),
		quantity.Approx(want, quantity.Ohm), quantity.Approx(eseries.Nearest(want, eseries.E24), quantity.Ohm),
		quantity.Approx(q.IC, quantity.Ampere)+" collector current"), nil
}

func reverse(v []float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[len(v)-1-i] = x
	}
	return out
}
