package rules

import (
	"fmt"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/topology"
)

// BiasCollectorHeadroom checks that the collector sits far enough above the
// emitter for the signal to swing without the stage saturating.
var BiasCollectorHeadroom = &engine.Rule{
	ID: "bias.collector-headroom",
	Doc: engine.Doc{
		Title: "the collector must sit clear of saturation",
		Why: "The signal swings the collector around its quiescent voltage; a stage biased close to saturation " +
			"clips the negative-going peaks long before the supply limits it, and its collector–base capacitance " +
			"and gain change with the swing.",
		Formula: "VCE at the operating point (the device's forward sense: positive for a forward-active NPN or PNP), " +
			">= min_volts; unit V",
		Source: "common practice, no published source (a volt or two clear of VCE(sat), which is a few tenths " +
			"of a volt for small-signal transistors)",
		Fix: "Lower the collector-feed resistor by the drop it must lose (ΔV ÷ its current, rounded down to E24), " +
			"or else raise the emitter resistor (less collector current, less drop in the feed); each candidate is " +
			"checked by solving the operating point again. With a choke or winding feed, lower the base voltage " +
			"by the missing volts instead.",
		Params: []engine.Param{
			{Name: "min_volts", Unit: quantity.Volt, Help: "smallest collector–emitter voltage"},
		},
	},
	Run: runCollectorHeadroom,
}

// headroomMargin is how far above min_volts the first guess aims.
const headroomMargin = 1.1

func runCollectorHeadroom(p *engine.Pass) error {
	op := p.A.OP
	if op == nil {
		return nil
	}
	minV := p.Param("min_volts")
	msgs := bjtFigs(p, 1)
	for part := range bjts(p) {
		q := op.BJTs[part.Ref]
		tb := p.A.Topo.BJTs[part.Ref]
		if q == nil || tb == nil {
			continue
		}
		vce := q.VCEf
		f := engine.Finding{Part: part.Ref,
			HasMetric: true, Measured: q.VCEf, Limit: minV, Comparison: ">=", Unit: "V",
			Messenger: msgs.Add(figs{part: part, v: [6]float64{vce, minV}, say: func(m *figs) string {
				v, l := approx2(m.v[0], m.v[1], quantity.Volt)
				return fmt.Sprintf("%s has %s from collector to emitter, needs at least %s", m.part.Ref, v, l)
			}})}
		if engine.Fails(q.VCEf, minV, ">=") {
			f.FixLater = func() (string, []engine.Change) { return headroomFix(p, tb, minV) }
		}
		p.Report(f)
	}
	return nil
}

// vceAfter solves again with one part's nominal value replaced and returns
// the transistor's forward VCE.
func vceAfter(p *engine.Pass, ref string, v float64, bjt string) (float64, bool) {
	op, ok := solveWith(p, map[string]float64{ref: v})
	if !ok || op.BJTs[bjt] == nil {
		return 0, false
	}
	return op.BJTs[bjt].VCEf, true
}

// headroomFix tries the collector-feed resistor, then the emitter resistor.
func headroomFix(p *engine.Pass, tb *topology.BJT, minV float64) (string, []engine.Change) {
	op := p.A.OP
	vce := op.BJTs[tb.Ref].VCEf
	short := minV - vce // volts missing

	// A single resistor on the collector net towards the feed (not to the
	// base or emitter nets: collector feedback is a different circuit).
	var feed []*circuit.Part
	for _, r := range resistorsOn(p.Circuit, tb.Collector) {
		if o := otherNet(r, tb.Collector); o != tb.Base && o != tb.Emitter {
			feed = append(feed, r)
		}
	}
	if len(feed) == 1 {
		rc := feed[0]
		nom := p.NominalCircuit.Part(rc.Ref).Value
		if dp := op.Parts[rc.Ref]; dp != nil && dp.Current != 0 {
			i := dp.Current
			if i < 0 {
				i = -i
			}
			drop := (minV*headroomMargin - vce) / i // ohms to take out, at the case
			if want := (rc.Value - drop) / caseFactor(p, rc.Ref); want > 0 {
				for _, v := range e24Walk(want, false, 4) {
					if got, ok := vceAfter(p, rc.Ref, v, tb.Ref); ok && got >= minV {
						return fmt.Sprintf("lower %s from %s to %s (E24): VCE rises to %s", rc.Ref,
								quantity.Approx(nom, quantity.Ohm), quantity.Approx(v, quantity.Ohm), quantity.Approx(got, quantity.Volt)),
							[]engine.Change{{Part: rc.Ref, Key: "value", To: quantity.Code(v, quantity.Ohm)}}
					}
				}
			}
		}
	}

	// The emitter resistor, when one resistor alone returns the emitter:
	// raising it lowers the current and so the drop in the collector feed.
	ers := resistorsOn(p.Circuit, tb.Emitter)
	if len(ers) == 1 && len(feed) > 0 && otherNet(ers[0], tb.Emitter) == tb.ReturnRail {
		re := ers[0]
		nom := p.NominalCircuit.Part(re.Ref).Value
		for _, v := range e24Walk(nom*1.0001, true, 24) {
			if got, ok := vceAfter(p, re.Ref, v, tb.Ref); ok && got >= minV {
				return fmt.Sprintf("raise %s from %s to %s (E24): less collector current leaves VCE at %s", re.Ref,
						quantity.Approx(nom, quantity.Ohm), quantity.Approx(v, quantity.Ohm), quantity.Approx(got, quantity.Volt)),
					[]engine.Change{{Part: re.Ref, Key: "value", To: quantity.Code(v, quantity.Ohm)}}
			}
		}
	}
	return fmt.Sprintf("VCE is %s short: lower the base voltage by about that much (the emitter follows the base), "+
		"or take that drop out of the collector feed", quantity.Approx(short, quantity.Volt)), nil
}
