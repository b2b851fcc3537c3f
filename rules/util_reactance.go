package rules

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/eseries"
	"headroom/checker/quantity"
)

// The reactance rules (coupling, bypass, decoupling, choke, winding) share
// what is here: the lowest band frequency, capacitor groups, and fixes
// rounded up to E12.

// reactanceFixSeries is the series a reactance fix rounds to (RULES.md: "rounded up to
// E12").
const reactanceFixSeries = eseries.E12

// reactanceMargin lifts a computed requirement by a few ulps' worth before it is
// rounded up, so that a requirement that lands on a series value within
// floating-point error still passes when the engine recomputes the metric.
const reactanceMargin = 1 + 1e-9

// omegaLow is the angular frequency of the lowest band frequency, where
// every reactance rule judges: a series capacitor or a shunt inductance does
// the most harm at the bottom of the band.
func omegaLow(c *circuit.Circuit) float64 { return 2 * math.Pi * c.Band[0] }

// roundUpE12 is the smallest E12 value at or above v, or 0 when there is
// none (v not positive and finite, or beyond the largest float).
func roundUpE12(v float64) float64 {
	r := eseries.RoundUp(v, reactanceFixSeries)
	if math.IsNaN(r) || math.IsInf(r, 0) {
		return 0
	}
	return r
}

// capGroup is the set of capacitors of one role that share both nets: they
// act as one capacitor, so they are judged as one (RULES.md, reactance rules).
type capGroup struct {
	Parts []*circuit.Part // the case's parts, in file order; Parts[0] names the finding
	A, B  string          // the nets, as the first part writes them
	names []string        // the parts' references, for Impedance's removed list

	one     [1]*circuit.Part // storage for a group of one part
	oneName [1]string
}

// first is the part the finding names and the fix changes.
func (g *capGroup) first() *circuit.Part { return g.Parts[0] }

// refs lists the group's references, for Impedance's removed list.
func (g *capGroup) refs() []string { return g.names }

// capacitance is the group's capacitance at the case judged: the sum of the
// case's values (at a corner the circuit already holds the corner values).
func (g *capGroup) capacitance() float64 {
	s := 0.0
	for _, p := range g.Parts {
		s += p.Value
	}
	return s
}

// name is how messages call the group: "C1", or "C1 with C2 (together 20 nF)".
func (g *capGroup) name() string {
	if len(g.Parts) == 1 {
		return g.first().Ref
	}
	return fmt.Sprintf("%s with %s (together %s)", g.first().Ref, strings.Join(g.refs()[1:], ", "),
		quantity.Approx(g.capacitance(), quantity.Farad))
}

// capacitorGroups gathers the capacitors of the given role (explicit or
// found by the topology) into groups by their unordered pair of nets, in the
// file order of each group's first part. A capacitor with both ends on one
// net is left out: nothing is across it.
func capacitorGroups(p *engine.Pass, role string) []capGroup {
	n := 0
	for _, part := range p.Circuit.Parts {
		if isGrouped(p, part, role) {
			n++
		}
	}
	if n == 0 {
		return nil
	}
	// One block for the groups (the reactance rules gather them at every
	// case of a worst-case search); a group's first part and name are kept
	// in the group itself, and the rare second part of a group copies them.
	groups := make([]capGroup, 0, n)
	for _, part := range p.Circuit.Parts {
		if !isGrouped(p, part, role) {
			continue
		}
		a, b := part.Nets[0], part.Nets[1]
		if g := groupOn(groups, a, b); g != nil {
			g.Parts = append(g.Parts, part)
			g.names = append(g.names, part.Ref)
			continue
		}
		groups = append(groups, capGroup{A: a, B: b, one: [1]*circuit.Part{part}, oneName: [1]string{part.Ref}})
		g := &groups[len(groups)-1]
		g.Parts, g.names = g.one[:], g.oneName[:]
	}
	return groups
}

// isGrouped reports whether part is a capacitor of role with something
// across it (two nets, not the same one).
func isGrouped(p *engine.Pass, part *circuit.Part, role string) bool {
	return part.Kind == circuit.Capacitor && len(part.Nets) == 2 && p.A.Topo.Roles[part.Ref] == role && part.Nets[0] != part.Nets[1]
}

// groupOn is the group across nets a and b in either order, or nil.
func groupOn(gs []capGroup, a, b string) *capGroup {
	for i := range gs {
		if g := &gs[i]; g.A == a && g.B == b || g.A == b && g.B == a {
			return g
		}
	}
	return nil
}

// groupImpedance is |the impedance the rest of the circuit presents across
// the group| at the lowest band frequency, with every capacitor of the group
// removed. ok is false when it cannot be had or is not a positive finite
// number (nothing to judge against).
func groupImpedance(p *engine.Pass, g *capGroup) (z float64, ok bool) {
	zc, err := p.A.AC.Impedance(p.Circuit.Band[0], g.A, g.B, g.refs()...)
	if err != nil {
		return 0, false
	}
	z = cmplx.Abs(zc)
	return z, z > 0 && !math.IsInf(z, 0) && !math.IsNaN(z)
}

// capacitorFix is the fix for a capacitor group whose reactance at the lowest
// frequency must come down to maxX. The whole requirement goes on the first
// part; the others stay. The new value is nominal, chosen so that the group
// meets maxX at the case judged: the first part's case value is its nominal
// value times caseRatio (1 at nominal, 1 − tolerance at the adverse corner),
// so the requirement is scaled by nominal/case before it is rounded up to E12.
func capacitorFix(p *engine.Pass, g *capGroup, maxX float64) (string, []engine.Change) {
	w := omegaLow(p.Circuit)
	need := 1 / (w * maxX) // total capacitance at the case
	first := g.first()
	others := g.capacitance() - first.Value
	ratio := 1.0
	if nom := p.NominalCircuit.Part(first.Ref); nom != nil && nom.Value > 0 {
		ratio = first.Value / nom.Value
	}
	exact := (need - others) / ratio * reactanceMargin
	v := roundUpE12(exact)
	if v == 0 {
		return fmt.Sprintf("%s needs %s in all; no E12 value fits, so use %s",
			first.Ref, quantity.Approx(need, quantity.Farad), quantity.Approx(exact, quantity.Farad)), nil
	}
	after := 1 / (w * (v*ratio + others))
	var b strings.Builder
	fmt.Fprintf(&b, "%s = %s (E12)", first.Ref, quantity.Approx(v, quantity.Farad))
	if len(g.Parts) > 1 {
		fmt.Fprintf(&b, ", with %s unchanged,", strings.Join(g.refs()[1:], ", "))
	}
	fmt.Fprintf(&b, " gives %s at %s", quantity.Approx(after, quantity.Ohm), quantity.Approx(p.Circuit.Band[0], quantity.Hertz))
	if ratio != 1 {
		fmt.Fprintf(&b, " at its %+.3g %% corner", (ratio-1)*100)
	}
	fmt.Fprintf(&b, " (needs at most %s)", quantity.Approx(maxX, quantity.Ohm))
	return b.String(), []engine.Change{{Part: first.Ref, Key: "value", To: quantity.Code(v, quantity.Farad)}}
}

// capWhy is the phrase that explains a group's limit, written only for a
// message: say formats the figures kept beside it (a function literal that
// captures nothing, so that judging a group allocates nothing for it).
type capWhy struct {
	say              func(w *capWhy) string
	frac, z, ceiling float64
	what             string
}

// capMsg is a capacitor group's message figures.
type capMsg struct {
	g            *capGroup
	x, fLow, lim float64
	why          capWhy
}

func (m *capMsg) Message() string {
	return fmt.Sprintf("%s has %s of reactance at %s, needs at most %s (%s)", m.g.name(),
		quantity.Approx(m.x, quantity.Ohm), quantity.Approx(m.fLow, quantity.Hertz),
		quantity.Approx(m.lim, quantity.Ohm), m.why.say(&m.why))
}

// judgeCapacitorGroups reports, for every group of the role, the reactance
// at the lowest frequency against limit(circuit impedance). limit returns
// ok false where the item is not judged (decoupling.reactance below
// min_ohms), and a phrase explaining the limit for the message.
func judgeCapacitorGroups(p *engine.Pass, role string, limit func(z float64) (lim float64, why capWhy, ok bool)) {
	judgeCapacitorGroupsBy(p, role, func(_ *capGroup, z float64) (float64, capWhy, bool) { return limit(z) })
}

// judgeCapacitorGroupsBy is judgeCapacitorGroups with a limit that may
// depend on the group (or pass it over, returning false).
func judgeCapacitorGroupsBy(p *engine.Pass, role string, limit func(g *capGroup, z float64) (lim float64, why capWhy, ok bool)) {
	if p.A.AC == nil {
		return
	}
	w := omegaLow(p.Circuit)
	groups := capacitorGroups(p, role)
	msgs := engine.NewBlock[capMsg](len(groups))
	for i := range groups {
		g := &groups[i]
		z, ok := groupImpedance(p, g)
		if !ok {
			continue
		}
		lim, why, ok := limit(g, z)
		if !ok || !(lim > 0) {
			continue
		}
		x := 1 / (w * g.capacitance())
		f := engine.Finding{Part: g.first().Ref,
			HasMetric: true, Measured: x, Limit: lim, Comparison: "<=", Unit: "ohm",
			Messenger: msgs.Add(capMsg{g: g, x: x, fLow: p.Circuit.Band[0], lim: lim, why: why})}
		if engine.Fails(x, lim, "<=") {
			f.Fix, f.Changes = capacitorFix(p, g, lim)
		}
		p.Report(f)
	}
}

// roundTurnsUp is the smallest set of turns, in the same ratio as turns, that
// gives the winding at index i at least need turns. When the turns are whole
// numbers (or become whole when multiplied by a small integer, as half turns
// do) the ratio is kept exactly: the windings become a whole multiple of
// their smallest whole-number ratio. Otherwise each winding is scaled and
// rounded up to a whole turn, and exact is false (the ratio moves a little).
func roundTurnsUp(turns []float64, i int, need float64) (out []int, exact bool) {
	for m := 1; m <= 16; m++ {
		ints := make([]int, len(turns))
		whole := true
		for j, n := range turns {
			r := math.Round(n * float64(m))
			if math.Abs(n*float64(m)-r) > 1e-9*math.Max(1, r) || r < 1 || r > 1e6 {
				whole = false
				break
			}
			ints[j] = int(r)
		}
		if !whole {
			continue
		}
		g := ints[0]
		for _, n := range ints[1:] {
			g = turnsGCD(g, n)
		}
		k := int(math.Ceil(need / float64(ints[i]/g)))
		if k < 1 {
			k = 1
		}
		out = make([]int, len(ints))
		for j, n := range ints {
			out[j] = k * (n / g)
		}
		return out, true
	}
	s := need / turns[i]
	out = make([]int, len(turns))
	for j, n := range turns {
		out[j] = int(math.Ceil(n * s))
	}
	if c := int(math.Ceil(need)); out[i] < c {
		out[i] = c
	}
	return out, false
}

func turnsGCD(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}
