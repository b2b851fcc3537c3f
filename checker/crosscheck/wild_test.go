package crosscheck

// Random netlists with no design behind them: parts between random nets, with
// values over many decades. They reach what the amplifier generator does not
// — floating nets, junctions driven hard in either direction, milliohms next
// to megohms, three-winding transformers, a port on an AC ground — and so
// test the two implementations where numerical trouble lives.

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// genWild builds one random netlist. Every net but gnd gets at least two
// connections, as the loader demands.
func genWild(seed uint64) *circuit.Circuit {
	r := rand.New(rand.NewPCG(seed, 0x5851f42d4c957f2d))
	g := &gen{r: r, count: map[string]int{}}
	lo := g.logU(1.8e6, 29e6)
	amb := g.uni(-20, 60)
	g.c = &circuit.Circuit{
		Path:    fmt.Sprintf("wild-%d.toml", seed),
		Name:    fmt.Sprintf("wild netlist %d", seed),
		Band:    [2]float64{lo, math.Min(30e6, lo*g.uni(1, 1.5))},
		Ambient: circuit.Ambient{Nominal: amb, Lo: amb, Hi: amb},
	}
	nn := 3 + r.IntN(8)
	nets := make([]string, nn)
	for i := range nets {
		nets[i] = fmt.Sprintf("n%d", i)
	}
	uses := map[string]int{}
	pick := func() string {
		if r.IntN(5) == 0 {
			return circuit.Gnd
		}
		return nets[r.IntN(nn)]
	}
	// two distinct nets
	pair := func() (string, string) {
		a := pick()
		for {
			b := pick()
			if b != a {
				return a, b
			}
		}
	}
	// Supplies: one or two, on distinct nets.
	for i, ns := 0, 1+r.IntN(2); i < ns; i++ {
		net := nets[i]
		v := g.logU(1, 24)
		if r.IntN(4) == 0 {
			v = -v
		}
		s := &circuit.Supply{Net: net, Volts: v, Range: [2]float64{v, v}}
		switch r.IntN(3) {
		case 1:
			s.Impedance = g.uni(0, 2)
		case 2:
			s.Impedance = g.logU(1, 1e3)
		}
		g.c.Supplies = append(g.c.Supplies, s)
		uses[net]++
	}
	resVal := func() float64 {
		if r.IntN(8) == 0 {
			return g.logU(1e-3, 1)
		}
		return g.logU(1, 1e6)
	}
	np := 4 + r.IntN(14)
	for i := 0; i < np; i++ {
		var p *circuit.Part
		switch k := r.IntN(20); {
		case k < 6:
			a, b := pair()
			p = g.res(resVal(), a, b)
		case k < 10:
			a, b := pair()
			p = g.cap(g.logU(1e-12, 10e-6), a, b)
		case k < 12:
			a, b := pair()
			p = g.part(circuit.Inductor, "L", g.logU(100e-9, 1e-3), a, b)
			if r.IntN(3) > 0 {
				p.Resistance = resVal()
			}
		case k < 13:
			p = g.part(circuit.Transformer, "T", 0)
			p.Nets = nil
			p.AL = g.logU(20e-9, 1e-6)
			p.Coupling = g.uni(0.5, 0.995)
			for w := 0; w < 2+r.IntN(2); w++ {
				a, b := pair()
				wd := &circuit.Winding{Name: fmt.Sprintf("w%d", w), Turns: float64(1 + r.IntN(30)), Nets: [2]string{a, b}}
				if r.IntN(2) == 0 {
					wd.Resistance = resVal()
				}
				p.Windings = append(p.Windings, wd)
			}
		case k < 14:
			a, b := pair()
			p = g.part(circuit.Potentiometer, "RV", g.logU(10, 1e6), a, pick(), b)
			p.Setting = g.potSetting()
		default:
			kind := circuit.NPN
			if r.IntN(2) == 0 {
				kind = circuit.PNP
			}
			c, b := pair()
			e := pick()
			p = g.bjt(kind, c, b, e)
		}
		for _, n := range p.PartNets() {
			uses[n]++
		}
	}
	if r.IntN(8) > 0 {
		in := nets[r.IntN(nn)]
		g.c.Ports = append(g.c.Ports, &circuit.Port{Name: "in", Net: in, Direction: "in", Impedance: g.logU(10, 1e3), Matched: true})
		uses[in]++
	}
	if r.IntN(6) > 0 {
		out := nets[r.IntN(nn)]
		g.c.Ports = append(g.c.Ports, &circuit.Port{Name: "out", Net: out, Direction: "out", Impedance: g.logU(10, 1e3), Matched: true})
		uses[out]++
	}
	// Every net needs two connections: tie the lonely ones somewhere.
	for _, n := range nets {
		for uses[n] < 2 {
			other := pick()
			if other == n {
				continue
			}
			var p *circuit.Part
			if r.IntN(2) == 0 {
				p = g.res(resVal(), n, other)
			} else {
				p = g.cap(g.logU(1e-12, 10e-6), n, other)
			}
			uses[n]++
			uses[other]++
			_ = p
		}
	}
	return g.c
}

// TestWildAgainstReference compares dc and ac with the reference on random
// netlists. Such a netlist may have more than one operating point (two
// transistors wired as a latch), so where both find one and they differ,
// dc's must still solve the reference's equations (then it is another valid
// operating point: counted, not failed). Two kinds of netlist are outside the
// acceptance criterion and are compared without failing (disagreements are
// logged and counted): those with a transistor terminal that has no DC path
// to a supply or gnd, which RULES.md net.connectivity reports, and those
// whose operating point has a transistor current above 10 A, where the
// Ebers–Moll difference IS·(e^(VBE/VT) − e^(VBC/VT)) of two numbers near
// 1e27 is rounding noise in any double-precision program.
func TestWildAgainstReference(t *testing.T) {
	n := circuitCount(1500, 300)
	ty := newTally(t)
	var both, neither, multi, onlyRef, onlyDC, acFail, reversed, excused, outsideAgreed int
	for seed := uint64(1); seed <= uint64(n); seed++ {
		c := genWild(seed)
		where := fmt.Sprintf("wild seed %d", seed)
		ref, refErr := refSolveDC(c)
		got, gotErr := dc.Solve(c)
		outside := ""
		if f := floatingTerminal(c); f != "" {
			outside = "net.connectivity: floating transistor terminal " + f
		} else if (ref != nil && hugeCurrent(ref.BJT)) || (got != nil && hugeCurrentDC(got)) {
			outside = "a transistor current above 10 A"
		}
		switch {
		case refErr != nil && gotErr != nil:
			neither++
			continue
		case refErr != nil:
			onlyDC++
			imb, spread, err := kclError(c, withInner(c, got.V, func(ref string) float64 { return got.BJTs[ref].VBJf }))
			if err != nil || imb > 1e-4 || spread > floorV {
				if outside == "" {
					ty.fail("%s: the reference finds no operating point (%v) and dc's does not solve the model (KCL %.3g, spread %.3g V, %v)", where, refErr, imb, spread, err)
				} else {
					t.Logf("%s (%s): the reference finds no operating point (%v) and dc's does not solve the model", where, outside, refErr)
				}
			} else {
				t.Logf("%s: the reference's solver fails (%v) where dc finds a valid point (%s)", where, refErr, got.Method)
			}
			continue
		case gotErr != nil:
			onlyRef++
			if outside != "" {
				excused++
				t.Logf("%s (%s): dc finds no operating point (%v); the reference finds one (%s)", where, outside, gotErr, ref.Method)
			} else {
				ty.fail("%s: dc finds no operating point (%v) where the reference finds one that solves the model (%s)", where, gotErr, ref.Method)
			}
			continue
		}
		both++
		local := newTally(t)
		local.quiet = true
		compareDC(local, where, c, ref, got)
		if local.errors > 0 && outside == "" {
			imb, spread, err := kclError(c, withInner(c, got.V, func(ref string) float64 { return got.BJTs[ref].VBJf }))
			if err == nil && imb <= 1e-4 && spread <= floorV {
				multi++
				t.Logf("%s: dc found another valid operating point (KCL %.2g): %s", where, imb, local.msgs[0])
				continue
			}
		}
		rac, err := refAnalyze(c, ref)
		gac, gerr := ac.Analyze(c, got)
		switch {
		case gerr == nil && gmOfReverse(ref, gac):
			// ac gives a transistor conducting in reverse gm = |IC|/VT
			// rather than 0 (TestBugGmOfReverseConductingTransistor). To
			// keep checking everything else, compare with the reference
			// run under that convention, tallied apart.
			reversed++
			if rac2, err := refAnalyzeGm(c, ref, true); err == nil {
				local.prefix = "gm=|IC|/VT: "
				compareAC(local, where, c, rac2, gac)
				local.prefix = ""
			}
		case err != nil || gerr != nil:
			acFail++
			if (err == nil) != (gerr == nil) {
				local.fail("%s: reference AC error %v, ac.Analyze error %v", where, err, gerr)
			}
		default:
			compareAC(local, where, c, rac, gac)
		}
		if outside != "" {
			// Compared for the log only; its figures stay out of the tally.
			if local.errors > 0 {
				excused++
				t.Logf("%s (%s): %d disagreements, the first: %s", where, outside, local.errors, local.msgs[0])
			} else {
				outsideAgreed++
			}
			continue
		}
		ty.merge(local)
	}
	t.Logf("%d netlists: %d with an operating point in both (%d other valid operating points; %d with a transistor conducting in reverse, their AC compared under ac's gm = |IC|/VT); "+
		"%d with no operating point in either; %d found only by the reference, %d only by dc; %d AC failures in both; "+
		"outside the criterion: %d agreed, %d disagreed (logged)",
		n, both, multi, reversed, neither, onlyRef, onlyDC, acFail, outsideAgreed, excused)
	ty.log()
}

// gmOfReverse: a transistor whose forward-sense collector current is
// negative (FORMAT.md §6: gm = 0 when IC ≤ 0) has a gm in ac's result.
func gmOfReverse(ref *refOP, got *ac.Result) bool {
	for k, b := range ref.BJT {
		if b.ICf < 0 && got.BJTs[k] != nil && got.BJTs[k].GM != 0 {
			return true
		}
	}
	return false
}

// hugeCurrent: some transistor carries more than 10 A (every generated
// transistor's ic_max is below 1 A).
func hugeCurrent(bjts map[string]*refBJT) bool {
	for _, b := range bjts {
		if math.Abs(b.ICf) > 10 || math.Abs(b.IBf) > 10 {
			return true
		}
	}
	return false
}

func hugeCurrentDC(op *dc.Result) bool {
	for _, b := range op.BJTs {
		if b.IC > 10 || b.IB > 10 {
			return true
		}
	}
	return false
}

// floatingTerminal names a transistor terminal net that has no DC path to a
// supply or gnd through resistors, potentiometers, inductors, windings, supply
// impedances and ports (junctions do not count), or "".
func floatingTerminal(c *circuit.Circuit) string {
	parent := map[string]string{}
	var find func(string) string
	find = func(x string) string {
		if p, ok := parent[x]; ok && p != x {
			r := find(p)
			parent[x] = r
			return r
		}
		return x
	}
	join := func(a, b string) { parent[find(a)] = find(b) }
	for _, s := range c.Supplies {
		join(s.Net, circuit.Gnd)
	}
	for _, pt := range c.Ports {
		join(pt.Net, circuit.Gnd)
	}
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Resistor, circuit.Inductor:
			join(p.Nets[0], p.Nets[1])
		case circuit.Potentiometer:
			join(p.Nets[0], p.Nets[1])
			join(p.Nets[1], p.Nets[2])
		case circuit.Transformer:
			for _, w := range p.Windings {
				join(w.Nets[0], w.Nets[1])
			}
		}
	}
	for _, p := range c.Parts {
		if p.Kind.IsBJT() {
			for _, n := range p.Nets {
				if find(n) != find(circuit.Gnd) {
					return n
				}
			}
		}
	}
	return ""
}
