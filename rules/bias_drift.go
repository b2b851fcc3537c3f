package rules

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// BiasDrift measures how far each collector current wanders over the corner
// box, which is what a stiff divider and emitter degeneration are for.
var BiasDrift = &engine.Rule{
	ID: "bias.drift",
	Doc: engine.Doc{
		Title: "collector current must stay near nominal over tolerances, hFE spread and temperature",
		Why: "A stage is designed for one collector current: its gain, input impedance, noise and dissipation " +
			"all follow it. Part tolerances, the hFE spread of the type and VBE's fall with temperature move that " +
			"current; this rule measures by how much, directly, rather than through the divider and emitter rules " +
			"that are meant to keep it small. Supplies are held at nominal: a supply's own range moves the current " +
			"by design, and the other rules judge what that does.",
		Formula: "over the worst-case box with every supply at nominal: IC(corner) ÷ IC(nominal) − 1 (bound " +
			"\"up\") and 1 − IC(corner) ÷ IC(nominal) (bound \"down\"), each <= max_fraction; unit fraction. " +
			"Judged only with worst-case corners; the finding reports the worse direction. A change below " +
			"one part in 10⁶ of IC counts as none (the DC solution's last digits). A cascode's upper device, whose emitter " +
			"only the lower device's collector feeds, carries the same current and is reported once, with the lower one.",
		Source: "common practice, no published source (the figure a designer accepts for a small-signal " +
			"stage's current spread)",
		Fix: "Advice: the parameter of the corner that alone moves IC the most, by name, and what reduces its " +
			"effect — for hFE a stiffer base divider or more emitter degeneration, for the ambient a larger " +
			"emitter voltage (VBE falls about 2 mV per °C), for a resistor a closer tolerance.",
		Params: []engine.Param{
			{Name: "max_fraction", Unit: quantity.Fraction, Help: "largest relative change of IC over the box, supplies at nominal"},
		},
	},
	Run:          runBiasDrift,
	NeedsCorners: true,
	HoldSupplies: true,
}

// driftFloor is the relative change of IC below which a case counts as
// nominal. The metric is zero at nominal, so the worst-case search would
// otherwise take the last digits of the DC solution (a parameter with no
// effect on IC, such as a collector resistor in a model without Early effect)
// as a move. One part in 10⁶ of IC is FORMAT.md §6's own threshold for a
// parameter that moves a metric, and ten times the DC solver's step tolerance.
const driftFloor = 1e-6

func runBiasDrift(p *engine.Pass) error {
	op, nomOP := p.A.OP, p.Nominal.OP
	if op == nil || nomOP == nil {
		return nil
	}
	limit := p.Param("max_fraction")
	msgs := bjtFigs(p, 1)
	for part := range bjts(p) {
		q, qn := op.BJTs[part.Ref], nomOP.BJTs[part.Ref]
		if q == nil || qn == nil || !(qn.IC > 0) {
			continue
		}
		if tb := p.A.Topo.BJTs[part.Ref]; tb != nil && tb.Stacked != "" {
			continue // a cascode's upper device carries the current of the one below: reported there, once
		}
		r := q.IC / qn.IC
		if math.Abs(r-1) < driftFloor {
			r = 1 // solver noise: a parameter that does not move IC must not enter the corner
		}
		ic, icNom := q.IC, qn.IC
		above := "" // the cascode device stacked on this one, if any
		for other := range bjts(p) {
			if tb := p.A.Topo.BJTs[other.Ref]; tb != nil && tb.Stacked == part.Ref {
				above = other.Ref
			}
		}
		msg := msgs.Add(figs{part: part, s: above, v: [6]float64{r, limit, ic, icNom}, say: func(m *figs) string {
			r, limit, ic, icNom := m.v[0], m.v[1], m.v[2], m.v[3]
			who := m.part.Ref + "'s collector current"
			if m.s != "" {
				who = fmt.Sprintf("the collector current of %s (and of %s above it, which carries it)", m.part.Ref, m.s)
			}
			way := "above"
			if r < 1 {
				way = "below"
			}
			d, l := approx2(math.Abs(r-1), limit, quantity.Fraction)
			return fmt.Sprintf("%s is %s %s nominal (%s against %s) with the supplies held, allows %s",
				who, d, way, quantity.Approx(ic, quantity.Ampere), quantity.Approx(icNom, quantity.Ampere), l)
		}})
		for _, b := range []struct {
			bound    string
			measured float64
		}{{"up", r - 1}, {"down", 1 - r}} {
			f := engine.Finding{Part: part.Ref, Bound: b.bound,
				HasMetric: true, Measured: b.measured, Limit: limit, Comparison: "<=", Unit: "fraction",
				Messenger: msg}
			if engine.Fails(b.measured, limit, "<=") {
				ref, ic, up := part.Ref, qn.IC, b.bound == "up"
				f.FixLater = func() (string, []engine.Change) { return driftFix(p, ref, ic, up), nil }
			}
			p.Report(f)
		}
	}
	return nil
}

// driftMove is one parameter the case moved from nominal.
type driftMove struct {
	name   string                   // for people: "Q1 hFE 100 (nominal 173)"
	kind   string                   // "hfe", "ambient", "value", "al", "supply"
	ref    string                   // the part, for a value
	apply  func(c *circuit.Circuit) // puts the case's value into a nominal clone
	effect float64                  // IC ÷ IC(nominal) − 1 with this parameter alone
}

// driftMoves lists what differs between the case and nominal.
func driftMoves(p *engine.Pass) []*driftMove {
	var ms []*driftMove
	for i, np := range p.NominalCircuit.Parts {
		cp := p.Circuit.Part(np.Ref)
		if cp == nil {
			continue
		}
		i := i
		if np.Value > 0 && cp.Value != np.Value {
			v := cp.Value
			ms = append(ms, &driftMove{name: fmt.Sprintf("%s %+.3g %%", np.Ref, (v/np.Value-1)*100), kind: "value", ref: np.Ref,
				apply: func(c *circuit.Circuit) { c.Parts[i].Value = v }})
		}
		if np.AL > 0 && cp.AL != np.AL {
			v := cp.AL
			ms = append(ms, &driftMove{name: fmt.Sprintf("%s AL %+.3g %%", np.Ref, (v/np.AL-1)*100), kind: "al", ref: np.Ref,
				apply: func(c *circuit.Circuit) { c.Parts[i].AL = v }})
		}
		if np.BJT != nil && cp.BJT != nil && cp.BJT.NominalHFE() != np.BJT.NominalHFE() {
			v := cp.BJT.NominalHFE()
			ms = append(ms, &driftMove{name: fmt.Sprintf("%s hFE %s (nominal %s)", np.Ref,
				quantity.Approx(v, quantity.Ratio), quantity.Approx(np.BJT.NominalHFE(), quantity.Ratio)), kind: "hfe", ref: np.Ref,
				apply: func(c *circuit.Circuit) { c.Parts[i].BJT.HFETyp = v }})
		}
	}
	for i, ns := range p.NominalCircuit.Supplies {
		if cs := p.Circuit.Supply(ns.Net); cs != nil && cs.Volts != ns.Volts {
			i, v := i, cs.Volts
			ms = append(ms, &driftMove{name: ns.Net + " " + quantity.Approx(v, quantity.Volt), kind: "supply",
				apply: func(c *circuit.Circuit) { c.Supplies[i].Volts = v }})
		}
	}
	if a, na := p.Circuit.Ambient.Nominal, p.NominalCircuit.Ambient.Nominal; a != na {
		ms = append(ms, &driftMove{name: fmt.Sprintf("ambient %s (nominal %s)", quantity.Approx(a, quantity.Celsius),
			quantity.Approx(na, quantity.Celsius)), kind: "ambient",
			apply: func(c *circuit.Circuit) { c.Ambient.Nominal = a }})
	}
	return ms
}

// driftFix names the parameter that alone moves IC most in the failing
// direction, found by solving nominal with each moved parameter alone.
func driftFix(p *engine.Pass, ref string, icNom float64, up bool) string {
	ms := driftMoves(p)
	for _, m := range ms {
		c := p.NominalCircuit.Clone()
		m.apply(c)
		op, err := dc.Solve(c)
		if err != nil || op == nil || op.BJTs[ref] == nil {
			m.effect = math.NaN()
			continue
		}
		m.effect = op.BJTs[ref].IC/icNom - 1
	}
	sign := 1.0
	if !up {
		sign = -1
	}
	var ranked []*driftMove
	for _, m := range ms {
		if !math.IsNaN(m.effect) && sign*m.effect > 0 {
			ranked = append(ranked, m)
		}
	}
	sort.SliceStable(ranked, func(i, j int) bool { return sign*ranked[i].effect > sign*ranked[j].effect })
	if len(ranked) == 0 {
		return "no single parameter of the corner moves the collector current this way alone: " +
			"stiffen the base divider and raise the emitter voltage, which reduce every contribution"
	}
	m := ranked[0]
	var b strings.Builder
	fmt.Fprintf(&b, "the dominant parameter is %s: alone it moves %s's collector current by %+.3g %%", m.name, ref, m.effect*100)
	if len(ranked) > 1 {
		fmt.Fprintf(&b, " (next: %s, %+.3g %%)", ranked[1].name, ranked[1].effect*100)
	}
	switch m.kind {
	case "hfe":
		b.WriteString("; make the bias independent of hFE: a stiffer base divider (see bias.divider-stiffness) " +
			"or more emitter degeneration (a larger emitter voltage)")
	case "ambient":
		b.WriteString("; VBE falls about 2 mV per °C: a larger emitter voltage makes that a smaller share of it")
	case "value":
		fmt.Fprintf(&b, "; give %s a closer tolerance, or bias the stage so that it depends on %s less", m.ref, m.ref)
	case "al":
		fmt.Fprintf(&b, "; %s's inductance should not set a DC current: check its DC resistance", m.ref)
	case "supply":
		b.WriteString("; regulate that supply or derive the bias from a stable reference")
	}
	return b.String()
}
