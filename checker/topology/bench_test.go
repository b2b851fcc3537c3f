package topology

import (
	"fmt"
	"testing"
)

// chain builds n choke-fed common-emitter stages in cascade, each with a
// divider, a split bypassed emitter resistor, a filtered supply branch and a
// transformer to the next stage: about 14 parts per stage.
func chain(n int) *ckt {
	b := newCkt().supply("vcc", 12).port("in", "n0", "in")
	for i := 0; i < n; i++ {
		s := func(net string) string { return fmt.Sprintf("%s%d", net, i) }
		in, out := fmt.Sprintf("n%d", i), fmt.Sprintf("n%d", i+1)
		b.cap(s("C1_"), in, s("b")).r(s("R1_"), s("vf"), s("b")).r(s("R2_"), s("b"), "gnd").
			npn(s("Q"), s("c"), s("b"), s("e")).r(s("R3_"), s("e"), s("m")).r(s("R4_"), s("m"), "gnd").
			cap(s("C3_"), s("m"), "gnd").r(s("RF_"), "vcc", s("vf")).cap(s("CF_"), s("vf"), "gnd").
			l(s("L_"), s("vf"), s("c")).cap(s("CT_"), s("c"), "gnd").
			xfmr(s("T_"), 0.2, "pri", s("c"), s("x"), "sec", out, "gnd").cap(s("CX_"), s("x"), "gnd").
			r(s("RL_"), out, "gnd")
	}
	return b.port("out", fmt.Sprintf("n%d", n), "out")
}

// Analyze runs once per circuit file; this shows how it scales with size.
func BenchmarkAnalyze(b *testing.B) {
	for _, n := range []int{1, 10, 100} {
		c := chain(n).c
		b.Run(fmt.Sprintf("stages=%d", n), func(b *testing.B) {
			for b.Loop() {
				Analyze(c)
			}
		})
	}
}

// The benchmark circuit is itself clean, and every stage gets the same facts.
func TestChainIsClean(t *testing.T) {
	topo := chain(3).analyze()
	if len(topo.Problems) != 0 {
		t.Errorf("problems: %+v", topo.Problems)
	}
	for i := 0; i < 3; i++ {
		q := bjt(t, topo, fmt.Sprintf("Q%d", i))
		if q.ReturnRail != "gnd" || q.FeedRail != "vcc" || !q.InductiveFeed || !q.CommonEmitter ||
			len(q.LowerLeg) != 1 {
			t.Errorf("stage %d: %+v", i, q)
		}
		if r := topo.Roles[fmt.Sprintf("C3_%d", i)]; r != Bypass {
			t.Errorf("C3_%d role %q, want bypass (split emitter resistor)", i, r)
		}
		if r := topo.Roles[fmt.Sprintf("L_%d", i)]; r != Tuning {
			t.Errorf("L_%d role %q, want tuning (tank with CT)", i, r)
		}
	}
}
