package corners

import (
	"fmt"
	"math"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/ruleset"
	"headroom/checker/topology"
	"headroom/rules"
)

// probe rules measure monotonic figures of the operating point, so that the
// search can be checked against a brute-force walk over every vertex of the
// box without depending on the catalogue's rules.
func probe(id, cmp string, limit float64, fig func(*analysis.Case, string) (float64, bool)) *engine.Rule {
	return &engine.Rule{ID: id, Run: func(p *engine.Pass) error {
		for _, part := range p.Circuit.Parts {
			if !part.Kind.IsBJT() || p.A.OP == nil {
				continue
			}
			if v, ok := fig(p.A, part.Ref); ok {
				p.Report(engine.Finding{Part: part.Ref, HasMetric: true, Measured: v, Limit: limit, Comparison: cmp, Unit: "ratio"})
			}
		}
		return nil
	}}
}

func probes() []*engine.Rule {
	ic := func(cs *analysis.Case, ref string) (float64, bool) { return cs.OP.BJTs[ref].IC, true }
	vce := func(cs *analysis.Case, ref string) (float64, bool) { return cs.OP.BJTs[ref].VCE, true }
	pw := func(cs *analysis.Case, ref string) (float64, bool) { return cs.OP.BJTs[ref].Power, true }
	gain := func(cs *analysis.Case, ref string) (float64, bool) {
		if cs.AC == nil || cs.AC.Band[0].GainDB == nil {
			return 0, false
		}
		return *cs.AC.Band[0].GainDB, true
	}
	return []*engine.Rule{
		probe("t.ic-high", "<=", 1, ic),
		probe("t.ic-low", ">=", 1e-9, ic),
		probe("t.vce-low", ">=", 1e-3, vce),
		probe("t.power-high", "<=", 10, pw),
		probe("t.gain-low", ">=", 1e-3, gain),
	}
}

func config(rules []*engine.Rule) *engine.Config {
	cfg := &engine.Config{Rules: rules, Severity: map[string]engine.Severity{}, Params: map[string]map[string]float64{}, Corners: "worst"}
	for _, r := range rules {
		cfg.Severity[r.ID] = engine.Warning
	}
	return cfg
}

// stage appends a divider-biased common-emitter stage whose collector feeds
// the next stage through a coupling capacitor.
func stage(c *circuit.Circuit, n int, in string) string {
	s := func(x string) string { return fmt.Sprintf("%s%d", x, n) }
	base, emit, coll := s("b"), s("e"), s("c")
	add := func(kind circuit.Kind, ref string, v, tol float64, nets ...string) {
		c.Parts = append(c.Parts, &circuit.Part{Ref: ref, Kind: kind, Value: v, Tolerance: tol, Nets: nets})
	}
	add(circuit.Capacitor, s("C"), 100e-9, 0.1, in, base)
	add(circuit.Resistor, s("RA"), 22e3, 0.05, "vcc", base)
	add(circuit.Resistor, s("RB"), 4.7e3, 0.05, base, circuit.Gnd)
	add(circuit.Resistor, s("RE"), 470, 0.05, emit, circuit.Gnd)
	add(circuit.Resistor, s("RC"), 1.5e3, 0.05, "vcc", coll)
	c.Parts = append(c.Parts, &circuit.Part{Ref: s("Q"), Kind: circuit.NPN, Nets: []string{coll, base, emit},
		BJT: &circuit.BJTParams{FT: 300e6, HFEMin: 100, HFEMax: 300, VBE: 0.65, ICRef: 10e-3, PD: 0.625, TjMax: 150, ICMax: 0.2, VCEO: 40, Cob: 4e-12}})
	return coll
}

// testCircuit is an HF amplifier of n stages between 50 Ω ports (invented
// values, for exercising the search).
func testCircuit(stages int) *circuit.Circuit {
	c := &circuit.Circuit{Name: "search test", Band: [2]float64{3.5e6, 3.8e6},
		Ambient:  circuit.Ambient{Nominal: 25, Lo: 0, Hi: 50},
		Supplies: []*circuit.Supply{{Net: "vcc", Volts: 12, Range: [2]float64{10.8, 13.8}}},
		Ports:    []*circuit.Port{{Name: "in", Net: "in", Direction: "in", Impedance: 50, Matched: true}}}
	in := "in"
	for i := 1; i <= stages; i++ {
		in = stage(c, i, in)
	}
	c.Parts = append(c.Parts, &circuit.Part{Ref: "CO", Kind: circuit.Capacitor, Value: 100e-9, Tolerance: 0.1, Nets: []string{in, "out"}})
	c.Ports = append(c.Ports, &circuit.Port{Name: "out", Net: "out", Direction: "out", Impedance: 50, Matched: true})
	return c
}

// bruteForce evaluates every vertex of the box and keeps each item's worst.
// Items of rules that hold the supplies at nominal (bias.drift) are judged
// over the box without the supplies, every supply at nominal.
func bruteForce(t *testing.T, c *circuit.Circuit, cfg *engine.Config) map[engine.Key]engine.Finding {
	box := Box(c)
	topo := topology.Analyze(c)
	nominal := analysis.Run(c, topo)
	hold := map[string]bool{}
	var held []Param
	for _, r := range cfg.Rules {
		hold[r.ID] = r.HoldSupplies
	}
	for _, p := range box {
		if !p.holdsSupply {
			held = append(held, p)
		}
	}
	worst := map[engine.Key]engine.Finding{}
	walk := func(box []Param, keep func(rule string) bool) {
		for mask := 0; mask < 1<<len(box); mask++ {
			cc := c.Clone()
			for i, p := range box {
				if mask&(1<<i) != 0 {
					p.set(cc, p.Hi)
				} else {
					p.set(cc, p.Lo)
				}
			}
			fs, err := engine.Evaluate(analysis.Run(cc, topo), nominal, cfg)
			if err != nil {
				t.Fatal(err)
			}
			for _, f := range fs {
				if !keep(f.Rule) {
					continue
				}
				k := engine.KeyOf(&f)
				if w, ok := worst[k]; !ok || engine.Worse(&f, &w) {
					worst[k] = f
				}
			}
		}
	}
	walk(box, func(rule string) bool { return !hold[rule] })
	walk(held, func(rule string) bool { return hold[rule] })
	return worst
}

// TestWorstMatchesBruteForce: for metrics monotonic in each parameter the
// search must find the worst vertex (FORMAT.md §6), checked here within 1 %
// by trying every vertex of boxes of 9 and 14 parameters... kept to at most
// 12 varied parameters by fixing the rest.
func TestWorstMatchesBruteForce(t *testing.T) {
	for _, stages := range []int{1, 2} {
		c := testCircuit(stages)
		// Keep at most 12 parameters: fix the coupling capacitors (they do
		// not move the operating point) beyond that count.
		for len(Box(c)) > 12 {
			for _, p := range c.Parts {
				if p.Kind == circuit.Capacitor && p.Tolerance > 0 {
					p.Tolerance = 0
					break
				}
			}
			if len(Box(c)) > 12 {
				for _, p := range c.Parts {
					if p.Kind == circuit.Resistor && p.Tolerance > 0 {
						p.Tolerance = 0
						break
					}
				}
			}
		}
		t.Run(fmt.Sprintf("%d-stage-%d-params", stages, len(Box(c))), func(t *testing.T) {
			cfg := config(probes())
			topo := topology.Analyze(c)
			nominal := analysis.Run(c, topo)
			got, err := Worst(c, topo, nominal, cfg)
			if err != nil {
				t.Fatal(err)
			}
			want := bruteForce(t, c, cfg)
			if len(got) != len(want) {
				t.Fatalf("search judged %d items, brute force %d", len(got), len(want))
			}
			for _, f := range got {
				w := want[engine.KeyOf(&f)]
				if math.Abs(f.Measured-w.Measured) > 0.01*math.Abs(w.Measured) {
					t.Errorf("%s %s: search found %g at %v, brute force %g", f.Rule, f.Part, f.Measured, f.CornerText, w.Measured)
				}
			}
		})
	}
}

// TestCornerListsOnlyMovers: a parameter that does not move a metric is not
// in its corner (FORMAT.md §6): the coupling capacitors never move IC.
func TestCornerListsOnlyMovers(t *testing.T) {
	c := testCircuit(1)
	cfg := config(probes()[:1])
	topo := topology.Analyze(c)
	got, err := Worst(c, topo, analysis.Run(c, topo), cfg)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 1 {
		t.Fatalf("want one item, got %d", len(got))
	}
	corner := got[0].Corner
	for _, k := range []string{"C1", "CO"} {
		if _, ok := corner[k]; ok {
			t.Errorf("corner lists %s, which does not move IC: %v", k, corner)
		}
	}
	// The largest IC needs the largest hFE, the highest supply, the smallest
	// emitter resistor and the stiffest pull-up: check the directions a
	// designer expects.
	if corner["Q1.hfe"] != 300 || corner["vcc"] != 13.8 || corner["RE1"] != 470*0.95 || corner["RA1"] != 22e3*0.95 {
		t.Errorf("unexpected worst corner for the largest IC: %v", corner)
	}
}

// BenchmarkWorst times the worst-case search with every rule of the default
// set on amplifiers of about 10, 30, 100 and 300 parts, without and with the
// local search (compare the pairs within one run), and with the local search
// and every transistor given the library's rb of 10 Ω (rb=10: an internal
// base node each).
func BenchmarkWorst(b *testing.B) {
	all := rules.All()
	set, err := (&ruleset.Loader{Rules: all}).Load("default")
	if err != nil {
		b.Fatal(err)
	}
	cfg := set.Config(all)
	for _, stages := range []int{2, 5, 16, 50} {
		for _, v := range []struct {
			local bool
			rb    float64
		}{{false, 0}, {true, 0}, {true, 10}} {
			c := testCircuit(stages)
			name := fmt.Sprintf("parts=%d/local=%v", len(c.Parts), v.local)
			if v.rb > 0 {
				name += "/rb=10"
				for _, p := range c.Parts {
					if p.BJT != nil {
						p.BJT.RB = v.rb
					}
				}
			}
			b.Run(name, func(b *testing.B) {
				topo := topology.Analyze(c)
				cases := analysed.Load()
				for b.Loop() {
					if _, err := search(c, topo, analysis.Run(c, topo), cfg, v.local); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(len(Box(c))), "params")
				b.ReportMetric(float64(analysed.Load()-cases)/float64(b.N), "cases/op")
			})
		}
		// One analysed case alone (every parameter at its high end, every
		// rule), analysed as the search does (the nominal case's plan,
		// Vary): its allocations are the per-case figure of DEVELOPERS.md.
		c := testCircuit(stages)
		b.Run(fmt.Sprintf("parts=%d/case", len(c.Parts)), func(b *testing.B) {
			topo := topology.Analyze(c)
			nominal := analysis.Run(c, topo)
			box := Box(c)
			high := make([]int8, len(box))
			for i := range high {
				high[i] = +1
			}
			b.ReportAllocs()
			// One case first: the plan is built once per file, before the
			// search's cases (b.Loop leaves this out of the figures).
			buf, err := engine.MeasureAppend(nil, nominal.Vary(at(c, box, high)), nominal, cfg)
			if err != nil {
				b.Fatal(err)
			}
			for b.Loop() {
				fs, err := engine.MeasureAppend(buf[:0], nominal.Vary(at(c, box, high)), nominal, cfg)
				if err != nil {
					b.Fatal(err)
				}
				buf = fs
			}
		})
	}
}
