package rules

import (
	"fmt"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/corpus"
)

// TestSweepHoldsIsSweepJudge: the stability fixes' judge that stops the
// sweep early (sweepHolds) says what the full sweep says (sweep.Run, as the
// rule measures) on the candidates the fix search tries: stoppers and
// swamping resistors of E12 values on every transistor of a fifth of the
// generated corpus, in the two-port form (min_mu 1 and 1.1, the shipped
// sets' values) and, with one port removed, in both one-port forms.
func TestSweepHoldsIsSweepJudge(t *testing.T) {
	counts := map[string]int{}
	for i, src := range corpus.Mixed(225) {
		if i%5 != 0 {
			continue
		}
		c, err := circuit.LoadBytes(fmt.Sprintf("gen%03d.toml", i), src, circuit.Options{})
		if err != nil {
			t.Fatal(err)
		}
		var cands []*circuit.Circuit
		for _, q := range c.Parts {
			if !q.Kind.IsBJT() {
				continue
			}
			for k := 0; k < len(stopperValues); k += 6 {
				d, _, _ := withStopper(c, q.Ref, stopperValues[k])
				cands = append(cands, d)
			}
			if a, b, _, ok := collectorLoad(c, q); ok {
				for k := 0; k < len(swampValues); k += 6 {
					cands = append(cands, withSwamp(c, a, b, swampValues[k]))
				}
			}
		}
		for _, d := range cands {
			for _, drop := range []string{"", "in", "out"} {
				e := d.Clone()
				if drop != "" {
					e.Ports = nil
					for _, p := range d.Ports {
						if p.Direction != drop {
							e.Ports = append(e.Ports, p)
						}
					}
				}
				cs := analysis.Run(e, nil)
				if cs.AC == nil {
					continue
				}
				sw, ok := sweepOf(cs)
				for _, minMu := range []float64{1, 1.1} {
					want := ok && sw.TwoPort && sw.MuMin >= minMu
					if got := sweepHolds(cs, true, minMu); got != want {
						t.Errorf("gen%03d without port %q, min_mu %g: early %v, full sweep %v (μ %g)", i, drop, minMu, got, want, sw.MuMin)
					}
					counts[fmt.Sprintf("two-port %v", want)]++
				}
				want := ok && sw.OnePort != "" && sw.ReMin >= 0
				if got := sweepHolds(cs, false, 0); got != want {
					t.Errorf("gen%03d without port %q, one port: early %v, full sweep %v (Re %g)", i, drop, got, want, sw.ReMin)
				}
				counts[fmt.Sprintf("one-port %v", want)]++
			}
		}
	}
	t.Log(counts)
	for _, k := range []string{"two-port true", "two-port false", "one-port true", "one-port false"} {
		if counts[k] < 20 {
			t.Errorf("too few cases of %s: %v", k, counts)
		}
	}
}
