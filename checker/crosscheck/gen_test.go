package crosscheck

// A seeded generator of random, valid small-signal amplifiers: one to three
// common-emitter stages, NPN or PNP, with the bias, load, coupling and supply
// variations a hand-built HF amplifier has. The values are drawn from wide
// ranges around a rough design so that most stages are forward-active but
// some saturate or cut off; all figures are invented for the test (the
// transistor figures are "library-like", not any registered part's).

import (
	"fmt"
	"math"
	"math/rand/v2"

	"headroom/checker/circuit"
)

type gen struct {
	r     *rand.Rand
	c     *circuit.Circuit
	count map[string]int
	// supplies created on first use: the positive rail and, maybe, a negative one.
	vcc, vee *circuit.Supply
	allowVee bool
}

// genCircuit builds the random circuit of one seed. defects adds, with a
// small probability, a zero-resistance loop or a supply shorted to gnd, so
// that both implementations must refuse the same circuits.
func genCircuit(seed uint64, defects bool) *circuit.Circuit {
	g := &gen{
		r:     rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15)),
		count: map[string]int{},
	}
	lo := g.logU(1.8e6, 29e6)
	hi := math.Min(30e6, lo*g.uni(1.005, 1.15))
	amb := g.uni(-20, 60)
	g.c = &circuit.Circuit{
		Path: fmt.Sprintf("random-%d.toml", seed),
		Name: fmt.Sprintf("random amplifier %d", seed),
		Band: [2]float64{lo, hi},
	}
	if g.r.IntN(3) == 0 {
		g.c.Ambient = circuit.Ambient{Nominal: amb, Lo: amb - 10, Hi: amb + 10}
	} else {
		g.c.Ambient = circuit.Ambient{Nominal: amb, Lo: amb, Hi: amb}
	}
	g.allowVee = g.r.IntN(5) < 2
	stages := 1 + g.r.IntN(3)
	g.c.Ports = append(g.c.Ports, &circuit.Port{Name: "in", Net: "rf_in", Direction: "in", Impedance: 50, Matched: true})
	src := g.inputCoupling()
	for k := 1; k <= stages; k++ {
		src = g.stage(k, src)
	}
	g.c.Ports = append(g.c.Ports, &circuit.Port{Name: "out", Net: "rf_out", Direction: "out", Impedance: 50, Matched: true})
	g.output(src)
	if defects && g.r.IntN(25) == 0 {
		g.defect()
	}
	return g.c
}

func (g *gen) uni(a, b float64) float64 { return a + (b-a)*g.r.Float64() }
func (g *gen) logU(a, b float64) float64 {
	return math.Exp(g.uni(math.Log(a), math.Log(b)))
}
func (g *gen) chance(p float64) bool { return g.r.Float64() < p }

func (g *gen) ref(prefix string) string {
	g.count[prefix]++
	return fmt.Sprintf("%s%d", prefix, g.count[prefix])
}

func (g *gen) part(kind circuit.Kind, prefix string, value float64, nets ...string) *circuit.Part {
	p := &circuit.Part{Ref: g.ref(prefix), Kind: kind, Value: value, Nets: nets}
	switch kind {
	case circuit.Resistor:
		p.Tolerance = 0.05
	case circuit.Capacitor, circuit.Inductor:
		p.Tolerance = 0.1
	case circuit.Potentiometer:
		p.Tolerance = 0.2
	}
	g.c.Parts = append(g.c.Parts, p)
	return p
}

func (g *gen) res(v float64, a, b string) *circuit.Part {
	return g.part(circuit.Resistor, "R", v, a, b)
}
func (g *gen) cap(v float64, a, b string) *circuit.Part {
	return g.part(circuit.Capacitor, "C", v, a, b)
}

// twoWay returns a and b in random order.
func (g *gen) twoWay(a, b string) (string, string) {
	if g.chance(0.5) {
		return b, a
	}
	return a, b
}

// choke is an inductor given by value or by turns on an AL.
func (g *gen) choke(a, b string) *circuit.Part {
	a, b = g.twoWay(a, b)
	p := g.part(circuit.Inductor, "L", 0, a, b)
	if g.chance(0.3) {
		p.Turns = float64(3 + g.r.IntN(18))
		p.AL = g.logU(20e-9, 1e-6)
		p.ALTolerance = 0.25
		p.Tolerance = 0
	} else {
		p.Value = g.logU(2e-6, 150e-6)
	}
	if g.chance(0.6) {
		p.Resistance = g.logU(0.02, 5)
	}
	p.Role = "choke"
	return p
}

// transformer adds a two-winding transformer; the primary's nets are given,
// the secondary's are returned for the caller to connect.
func (g *gen) transformer(pa, pb, sa, sb string) *circuit.Part {
	p := g.part(circuit.Transformer, "T", 0)
	p.Nets = nil
	p.AL = g.logU(20e-9, 1e-6)
	p.ALTolerance = 0.25
	p.Coupling = g.uni(0.9, 0.99)
	pa, pb = g.twoWay(pa, pb)
	sa, sb = g.twoWay(sa, sb)
	wr := func() float64 {
		if g.chance(0.5) {
			return 0
		}
		return g.logU(0.01, 1)
	}
	p.Windings = []*circuit.Winding{
		{Name: "primary", Turns: float64(3 + g.r.IntN(18)), Nets: [2]string{pa, pb}, Resistance: wr()},
		{Name: "secondary", Turns: float64(3 + g.r.IntN(18)), Nets: [2]string{sa, sb}, Resistance: wr()},
	}
	return p
}

func (g *gen) supply(neg bool) *circuit.Supply {
	if neg && g.vee != nil {
		return g.vee
	}
	if !neg && g.vcc != nil {
		return g.vcc
	}
	v := g.uni(5, 24)
	s := &circuit.Supply{Net: "vcc", Volts: v}
	if neg {
		s.Net, s.Volts = "vee", -v
	}
	s.Range = [2]float64{s.Volts, s.Volts}
	if g.chance(0.6) {
		s.Impedance = g.uni(0, 1)
	}
	g.c.Supplies = append(g.c.Supplies, s)
	if neg {
		g.vee = s
	} else {
		g.vcc = s
	}
	return s
}

// bjt draws library-like figures.
func (g *gen) bjt(kind circuit.Kind, c, b, e string) *circuit.Part {
	p := g.part(kind, "Q", 0, c, b, e)
	p.Nets = []string{c, b, e}
	hmin := g.uni(25, 120)
	hmax := hmin * g.uni(1.5, 4)
	bj := &circuit.BJTParams{
		FT: g.uni(100e6, 900e6), HFEMin: hmin, HFEMax: hmax,
		VBE: g.uni(0.6, 0.75), ICRef: g.uni(1e-3, 10e-3),
		PD: g.uni(0.3, 1), TjMax: 150, ICMax: g.uni(0.1, 0.8), VCEO: g.uni(15, 60),
		Cob: g.uni(1e-12, 8e-12),
	}
	if g.chance(0.4) {
		bj.HFETyp = g.uni(hmin, hmax)
	}
	if g.chance(0.5) { // a base spreading resistance on about half of them
		bj.RB = g.logU(0.5, 200)
	}
	p.BJT = bj
	p.Device = ""
	return p
}

// inputCoupling returns the net that carries the signal towards the first
// base: rf_in itself (a capacitor follows) or a transformer secondary.
func (g *gen) inputCoupling() string {
	if g.chance(0.2) {
		t := g.transformer("rf_in", circuit.Gnd, "in_sec", circuit.Gnd)
		return "xfmr:" + t.Ref
	}
	return "rf_in"
}

// stage adds common-emitter stage k fed from src ("xfmr:REF" for a
// transformer whose secondary's hot end is still open, else a net to couple
// through a capacitor) and returns its output in the same form.
func (g *gen) stage(k int, src string) string {
	kind := circuit.NPN
	if g.chance(0.4) {
		kind = circuit.PNP
	}
	negRail := kind == circuit.PNP && g.allowVee && g.chance(0.6)
	sup := g.supply(negRail)
	rail := sup.Net
	vs := math.Abs(sup.Volts)
	ic := g.logU(1.5e-3, 25e-3)
	if g.chance(0.5) {
		// RC-decoupled rail: drop 2–20 % of the supply at the planned current.
		dec := fmt.Sprintf("rail%d", k)
		rd := g.uni(0.02, 0.2) * vs / ic
		g.res(rd, rail, dec)
		g.cap(g.logU(0.1e-6, 10e-6), dec, circuit.Gnd)
		vs *= 0.9
		rail = dec
	}
	// Collector-side and emitter-side references.
	cRef, eRef := rail, circuit.Gnd
	if kind == circuit.PNP && !negRail {
		cRef, eRef = circuit.Gnd, rail
	}
	b, e, c := fmt.Sprintf("b%d", k), fmt.Sprintf("e%d", k), fmt.Sprintf("c%d", k)
	q := g.bjt(kind, c, b, e)
	beta := q.BJT.NominalHFE()
	ib := ic / beta
	// Emitter network.
	ve := g.uni(0.05, 0.25) * vs
	re := ve / ic
	switch x := g.r.IntN(5); x {
	case 0: // unbypassed
		g.res(re, e, eRef)
	case 1: // fully bypassed
		g.res(re, e, eRef)
		g.cap(g.logU(10e-9, 1e-6), e, eRef)
	case 2: // split, lower part bypassed
		mid := fmt.Sprintf("e%dx", k)
		f := g.uni(0.1, 0.5)
		g.res(re*f, e, mid)
		g.res(re*(1-f), mid, eRef)
		g.cap(g.logU(10e-9, 1e-6), mid, eRef)
	default: // emitter potentiometer, wiper bypassed
		w := fmt.Sprintf("e%dw", k)
		pot := g.part(circuit.Potentiometer, "RV", re, e, w, eRef)
		pot.Setting = g.potSetting()
		g.cap(g.logU(10e-9, 1e-6), w, eRef)
	}
	// Collector load.
	vbe := q.BJT.VBE
	vb := ve + vbe
	load := g.r.IntN(10)
	var out string
	vc := vs // choke and transformer loads sit at the rail
	switch {
	case load < 4:
		vc = ve + g.uni(0.2, 0.7)*(vs-ve)
		g.res(math.Max(vs-vc, 0.05*vs)/ic, cRef, c)
		out = c
	case load < 7:
		l := g.choke(cRef, c)
		if g.chance(0.3) { // damping resistor across the choke
			g.res(g.logU(470, 10e3), l.Nets[0], l.Nets[1])
		}
		out = c
	default:
		t := g.transformer(cRef, c, fmt.Sprintf("s%d", k), circuit.Gnd)
		out = "xfmr:" + t.Ref
	}
	// Base feed: the signal arrives through a capacitor, or a transformer
	// secondary either grounded (then a capacitor) or carrying the bias.
	bias := b
	if t, ok := g.xfmr(src); ok {
		sec := t.Windings[1]
		hot := hotEnd(sec)
		if g.chance(0.5) {
			// The secondary feeds the base directly; its cold end is the bias node, bypassed.
			bias = fmt.Sprintf("b%dbias", k)
			renameNet(sec, circuit.Gnd, bias)
			renameNet(sec, hot, b)
			g.cap(g.logU(10e-9, 1e-6), bias, eRef)
		} else {
			g.cap(g.logU(1e-9, 1e-6), hot, b)
			if g.chance(0.5) { // a load across the secondary
				g.res(g.logU(100, 10e3), hot, circuit.Gnd)
			}
		}
	} else {
		g.cap(g.logU(1e-9, 1e-6), src, b)
	}
	// Bias network.
	scale := func() float64 { return g.uni(0.75, 1.35) }
	if g.chance(0.65) || bias != b {
		idiv := ib * g.uni(4, 20)
		r2 := vb / idiv * scale()
		r1 := (vs - vb) / (idiv + ib) * scale()
		if g.chance(0.2) {
			pot := g.part(circuit.Potentiometer, "RV", r1+r2, cRef, bias, eRef)
			pot.Setting = r2 / (r1 + r2)
			if g.chance(0.3) {
				pot.Setting = g.potSetting()
			}
		} else {
			g.res(r1, cRef, bias)
			g.res(r2, bias, eRef)
		}
	} else {
		// Collector feedback, with or without a resistor to the emitter side.
		i2 := 0.0
		if g.chance(0.5) {
			i2 = ib * g.uni(1, 5)
			g.res(vb/i2*scale(), b, eRef)
		}
		g.res(math.Max(vc-vb, 0.3)/(ib+i2)*scale(), c, b)
	}
	return out
}

// potSetting is a wiper position, at the ends now and then.
func (g *gen) potSetting() float64 {
	switch g.r.IntN(10) {
	case 0:
		return 0
	case 1:
		return 1
	}
	return g.r.Float64()
}

// hotEnd is the winding's net that is not gnd.
func hotEnd(w *circuit.Winding) string {
	if w.Nets[0] == circuit.Gnd {
		return w.Nets[1]
	}
	return w.Nets[0]
}

func (g *gen) xfmr(src string) (*circuit.Part, bool) {
	if len(src) > 5 && src[:5] == "xfmr:" {
		return g.c.Part(src[5:]), true
	}
	return nil, false
}

func renameNet(w *circuit.Winding, from, to string) {
	for i := range w.Nets {
		if w.Nets[i] == from {
			w.Nets[i] = to
			return
		}
	}
}

// output connects the last stage to rf_out.
func (g *gen) output(src string) {
	if t, ok := g.xfmr(src); ok {
		sec := t.Windings[1]
		hot := hotEnd(sec)
		if g.chance(0.6) {
			renameNet(sec, hot, "rf_out")
			return
		}
		g.cap(g.logU(1e-9, 1e-6), hot, "rf_out")
		return
	}
	if g.chance(0.2) {
		// Level control: a potentiometer across the coupled signal.
		g.cap(g.logU(1e-9, 1e-6), src, "lvl")
		pot := g.part(circuit.Potentiometer, "RV", g.logU(100, 5e3), "lvl", "rf_out", circuit.Gnd)
		pot.Setting = g.potSetting()
		return
	}
	g.cap(g.logU(1e-9, 1e-6), src, "rf_out")
}

// defect makes the circuit one that has no DC operating point by its
// topology: two zero-resistance inductors in a loop, or a zero-impedance
// supply shorted to gnd.
func (g *gen) defect() {
	if g.vcc != nil && g.chance(0.5) {
		g.vcc.Impedance = 0
		g.part(circuit.Inductor, "L", 1e-6, g.vcc.Net, circuit.Gnd)
		return
	}
	g.part(circuit.Inductor, "L", 10e-6, "loop", circuit.Gnd)
	g.part(circuit.Inductor, "L", 22e-6, "loop", circuit.Gnd)
	g.res(1e3, "rf_out", "loop")
}
