package rules

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"headroom/checker/ac"
	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/eseries"
	"headroom/checker/poles"
	"headroom/checker/quantity"
	"headroom/checker/sweep"
)

// The stability rules share their fixes: a base stopper (a resistor in
// series with a transistor's base) or a swamping resistor (across its
// collector load), the smallest change of preferred value (E12) that makes
// the case judged pass with margin. Each candidate is put into a copy of the
// case's circuit, analysed again from DC up, and judged by the rule's own
// measure before it is offered. Neither fix can be written as `changes`: both
// need a new part (and a stopper a new net), which the edit package cannot
// add, so they are precise advice.

// stopperValues and swampValues are the candidates, in the order tried:
// E12 from 1 Ω up to 1 kΩ for a stopper (the least resistance in the signal
// path first), E12 from 10 kΩ down to 10 Ω for a swamping resistor (the
// lightest load first).
var stopperValues, swampValues = e12Range(1, 1000, true), e12Range(10, 10e3, false)

func e12Range(lo, hi float64, up bool) []float64 {
	var out []float64
	for _, v := range eseries.Values(eseries.E12) {
		for m := 1e-3; m <= 1e6; m *= 10 {
			if x := v * m; x >= lo*(1-1e-9) && x <= hi*(1+1e-9) {
				out = append(out, x)
			}
		}
	}
	for i := range out {
		out[i] = math.Round(out[i]*1e6) / 1e6
	}
	sortFloats(out, up)
	return out
}

func sortFloats(v []float64, up bool) {
	for i := 1; i < len(v); i++ {
		for j := i; j > 0 && (v[j] < v[j-1]) == up; j-- {
			v[j], v[j-1] = v[j-1], v[j]
		}
	}
}

// stableJudge reports whether an analysed case passes a stability rule with
// the margin the rule asks of a fix.
type stableJudge func(cs *analysis.Case) bool

// noRBNote says, for every transistor without rb, that the verdict is
// pessimistic and how to give rb; "" when every transistor has one.
func noRBNote(c *circuit.Circuit) string {
	var refs []string
	for _, part := range c.Parts {
		if part.Kind.IsBJT() && part.BJT != nil && part.BJT.RB == 0 {
			refs = append(refs, part.Ref)
		}
	}
	if len(refs) == 0 {
		return ""
	}
	return fmt.Sprintf(". %s %s no rb: the model then has no base damping, so this verdict is pessimistic; "+
		"give the base spreading resistance (rb = \"10\" inline, or rb in the library entry: public device "+
		"models give about 10 ohm for common small-signal parts)", refList(refs), hasHave(len(refs)))
}

func hasHave(n int) string {
	if n == 1 {
		return "has"
	}
	return "have"
}

// withStopper returns a copy of c with a resistor of r ohms between q's base
// net and its base pin, which moves to a new net; and the new part's name.
func withStopper(c *circuit.Circuit, q string, r float64) (*circuit.Circuit, string, string) {
	d := c.Clone()
	part := d.Part(q)
	base := part.Nets[1]
	net, ref := uniqueNet(d, base+"_"+strings.ToLower(q)), uniqueRef(d, "RB_"+q)
	part.Nets[1] = net
	d.Parts = append(d.Parts, &circuit.Part{Ref: ref, Kind: circuit.Resistor, Nets: []string{base, net},
		Value: r, Tolerance: 0.05, Pos: part.Pos})
	return d, ref, net
}

// withSwamp returns a copy of c with a resistor of r ohms between nets a and b.
func withSwamp(c *circuit.Circuit, a, b string, r float64) *circuit.Circuit {
	d := c.Clone()
	d.Parts = append(d.Parts, &circuit.Part{Ref: uniqueRef(d, "RSWAMP"), Kind: circuit.Resistor,
		Nets: []string{a, b}, Value: r, Tolerance: 0.05, Pos: d.Pos})
	return d
}

func uniqueNet(c *circuit.Circuit, want string) string {
	nets := map[string]bool{}
	for _, n := range c.Nets() {
		nets[n] = true
	}
	for i := 1; ; i++ {
		n := want
		if i > 1 {
			n = fmt.Sprintf("%s%d", want, i)
		}
		if !nets[n] {
			return n
		}
	}
}

func uniqueRef(c *circuit.Circuit, want string) string {
	for i := 1; ; i++ {
		r := want
		if i > 1 {
			r = fmt.Sprintf("%s%d", want, i)
		}
		if c.Part(r) == nil {
			return r
		}
	}
}

// collectorLoad is the part (or transformer winding) that loads q's
// collector: an inductor, winding or resistor between the collector net and
// another net; its nets and a name for people. ok is false when the
// collector sits on a rail or nothing suitable is there.
func collectorLoad(c *circuit.Circuit, q *circuit.Part) (a, b, name string, ok bool) {
	coll := q.Nets[0]
	if c.Supply(coll) != nil || coll == circuit.Gnd {
		return "", "", "", false
	}
	best := -1
	for _, part := range c.Parts {
		rank := map[circuit.Kind]int{circuit.Transformer: 3, circuit.Inductor: 2, circuit.Resistor: 1}[part.Kind]
		if rank <= best || rank == 0 {
			continue
		}
		if part.Kind == circuit.Transformer {
			for _, w := range part.Windings {
				if w.Nets[0] == coll || w.Nets[1] == coll {
					a, b, name, ok, best = w.Nets[0], w.Nets[1], part.Ref+" "+w.Name, true, rank
				}
			}
			continue
		}
		if len(part.Nets) == 2 && (part.Nets[0] == coll || part.Nets[1] == coll) && part.Nets[0] != part.Nets[1] {
			a, b, name, ok, best = part.Nets[0], part.Nets[1], part.Ref, true, rank
		}
	}
	return a, b, name, ok
}

// stabilityFix searches the stopper and the swamping resistor for each
// transistor in order, and advises the first transistor's that work. gainHz
// is where the cost in gain is stated.
func stabilityFix(p *engine.Pass, order []*circuit.Part, judge stableJudge, margin func(r float64, stopper bool) float64) string {
	c := p.Circuit
	base := bandGain(p.A)
	// A candidate must also keep every transistor's collector current
	// within maxBiasShift of the case's: a fix that moves the bias trades
	// one problem for another.
	// Each candidate is analysed once: the one found is stated with the
	// case its search analysed.
	type candidate struct {
		q       string
		stopper bool
		r       float64
	}
	analysed := map[candidate]*analysis.Case{}
	analyse := func(k candidate, d *circuit.Circuit) *analysis.Case {
		cs, ok := analysed[k]
		if !ok {
			cs = analysis.Run(d, nil)
			analysed[k] = cs
		}
		return cs
	}
	ok := func(k candidate, d *circuit.Circuit) bool {
		cs := analyse(k, d)
		return cs.AC != nil && judge(cs) && biasKept(p.A, cs)
	}
	type option struct {
		text string
		cost float64 // dB of gain lost at the band's centre (0 when unknown)
	}
	var out []option
	for _, q := range order {
		if len(q.Nets) != 3 {
			continue
		}
		var opts []option
		stop := func(r float64) bool { d, _, _ := withStopper(c, q.Ref, r); return ok(candidate{q.Ref, true, r}, d) }
		if r, found := firstPassing(stopperValues, stop, func(r float64) float64 { return margin(r, true) }); found {
			d, ref, net := withStopper(c, q.Ref, r)
			text, cost := gainCost(base, analyse(candidate{q.Ref, true, r}, d))
			opts = append(opts, option{fmt.Sprintf("%s base stopper %s in series with %s's base (from net %s to %s's base pin, on a new net %s), %s",
				withArticle(quantity.Approx(r, quantity.Ohm)), ref, q.Ref, q.Nets[1], q.Ref, net, text), cost})
		}
		if a, b, name, found := collectorLoad(c, q); found {
			swamp := func(r float64) bool { return ok(candidate{q.Ref, false, r}, withSwamp(c, a, b, r)) }
			if r, found := firstPassing(swampValues, swamp, func(r float64) float64 { return margin(r, false) }); found {
				d := withSwamp(c, a, b, r)
				text, cost := gainCost(base, analyse(candidate{q.Ref, false, r}, d))
				opts = append(opts, option{fmt.Sprintf("%s swamping resistor across %s's collector load %s (between nets %s and %s), %s",
					withArticle(quantity.Approx(r, quantity.Ohm)), q.Ref, name, a, b, text), cost})
			}
		}
		if len(opts) > 0 {
			out = opts
			break
		}
	}
	if len(out) == 0 {
		return "No base stopper up to 1 kohm and no swamping resistor down to 10 ohm makes the stage stable at this case " +
			"without moving its bias: look for the feedback path (a coupling or supply loop, an unbypassed emitter, a tank " +
			"on both sides) and break it."
	}
	// The cheaper in gain first.
	if len(out) == 2 && out[1].cost < out[0].cost {
		out[0], out[1] = out[1], out[0]
	}
	texts := make([]string, len(out))
	for i, o := range out {
		texts[i] = o.text
	}
	return "Add " + strings.Join(texts, "; or ") + ". Each was put into the circuit and the whole case analysed again " +
		"(DC, poles and sweep) before it is offered, and keeps every collector current within 10 % of the case's. " +
		"A stopper belongs right at the transistor's base pin."
}

// maxBiasShift is how far a fix may move a transistor's collector current,
// as a fraction of the case's.
const maxBiasShift = 0.1

// biasKept reports whether every transistor of the case cs keeps its
// collector current within maxBiasShift in got, the case with a fix.
func biasKept(cs, got *analysis.Case) bool {
	if cs.OP == nil {
		return true
	}
	if got.OP == nil {
		return false
	}
	for ref, b := range cs.OP.BJTs {
		n := got.OP.BJTs[ref]
		if n == nil || math.Abs(n.IC-b.IC) > maxBiasShift*math.Abs(b.IC) {
			return false
		}
	}
	return true
}

// firstPassing finds the first candidate (they are ordered weakest first)
// that passes, and whose margin value passes too. It bisects, since more
// damping helps in the circuits these fixes are for, but never trusts that:
// the value it returns was itself judged passing, and where the margin
// fails it steps on to stronger values one at a time.
func firstPassing(values []float64, ok func(float64) bool, margin func(float64) float64) (float64, bool) {
	if len(values) == 0 || !ok(values[len(values)-1]) {
		return 0, false
	}
	lo, hi := -1, len(values)-1 // values[hi] passes; values[lo] is taken to fail
	for hi-lo > 1 {
		m := (lo + hi) / 2
		if ok(values[m]) {
			hi = m
		} else {
			lo = m
		}
	}
	for i := hi; i < len(values); i++ {
		r := values[i]
		if i != hi && !ok(r) {
			continue
		}
		if m := margin(r); m == r || ok(m) {
			return r, true
		}
	}
	return 0, false
}

// bandGain is the transducer gain at the band's centre, and its frequency;
// nil when the circuit has none.
func bandGain(cs *analysis.Case) *[2]float64 {
	if cs == nil || cs.AC == nil || cs.AC.Band[1].GainDB == nil {
		return nil
	}
	return &[2]float64{*cs.AC.Band[1].GainDB, cs.AC.Band[1].Frequency}
}

// gainCost states what a fix costs in gain at the band's centre, and the
// cost in dB (0 when it cannot be stated).
func gainCost(before *[2]float64, cs *analysis.Case) (string, float64) {
	after := bandGain(cs)
	if before == nil || after == nil {
		return "whose cost in gain is not stated: the circuit has no in and out port", 0
	}
	d := before[0] - after[0]
	at := quantity.Approx(before[1], quantity.Hertz)
	switch {
	case math.Abs(d) < 0.05:
		return "which costs less than 0.05 dB of gain at " + at, d
	case d < 0:
		return fmt.Sprintf("which adds %s dB of gain at %s", quantity.Approx(-d, quantity.Ratio), at), d
	}
	return fmt.Sprintf("which costs %s dB of gain at %s", quantity.Approx(d, quantity.Ratio), at), d
}

// sweepHolds is what a stability fix's judge asks of the case's wide sweep
// (sweep.Run over sweep.Grid): whether the sweep works, has the form asked
// for (the two-port form, or the one-port form), and its least figure (μ, or
// Re Z looking into the one port) is at least floor. It computes each point
// as sweep.Run does and stops at the first point that settles the answer,
// so a candidate the search refuses costs the points up to its first failing
// one, not the whole sweep (TestSweepHoldsIsSweepJudge compares it with the
// full sweep on every candidate of the generated corpus).
func sweepHolds(cs *analysis.Case, twoPort bool, floor float64) bool {
	least, first := math.Inf(1), true
	err := cs.AC.PortsEach(sweep.Grid(cs.Circuit), func(pp ac.PortPoint) error {
		if first {
			first = false
			two := pp.HasIn && pp.HasOut
			if two != twoPort || !pp.HasIn && !pp.HasOut {
				return errSettled // the other form, or no port: sweep.Run gives neither figure
			}
		}
		var v float64
		switch {
		case twoPort:
			v, _, _, _ = sweep.Figures(sweep.ToS(pp.Z, pp.RS, pp.RL))
		case pp.HasIn:
			v = real(pp.Z[0][0])
		default:
			v = real(pp.Z[1][1])
		}
		if v < least {
			least = v
		}
		if least < floor {
			return errSettled // the least can only fall further
		}
		return nil
	})
	if err != nil {
		return false
	}
	if math.IsInf(least, 1) {
		least = 0 // as sweep.Run reports a sweep without a finite figure
	}
	return least >= floor
}

// errSettled stops a sweep whose answer is known.
var errSettled = errors.New("settled")

// sweepOf and polesOf analyse a case, reporting false when they cannot.
func sweepOf(cs *analysis.Case) (*sweep.Result, bool) {
	r, err := sweep.Stability(cs.Circuit, cs.AC) // the stability rules read no gains
	return r, err == nil
}

func polesOf(cs *analysis.Case) (*poles.Result, bool) {
	r, err := poles.Find(cs.Circuit, cs.AC)
	return r, err == nil
}

// withArticle puts "a" or "an" before a value as it is read aloud: "an 82
// ohm", "an 18 ohm", "an 11 kohm", "a 180 ohm".
func withArticle(v string) string {
	digits := strings.IndexFunc(v, func(r rune) bool { return (r < '0' || r > '9') && r != '.' })
	if digits < 0 {
		digits = len(v)
	}
	n := v[:digits]
	if strings.HasPrefix(n, "8") || n == "11" || n == "18" || strings.HasPrefix(n, "11.") || strings.HasPrefix(n, "18.") {
		return "an " + v
	}
	return "a " + v
}
