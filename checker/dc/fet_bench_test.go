package dc

import (
	"fmt"
	"testing"

	"headroom/checker/circuit"
)

// withFETs replaces every NPN of c by a FET of kind on the same nets
// (drain, gate, source = collector, base, emitter; a dual gate's gate 2 on
// the stage's decoupled rail), figures of the clean vector of
// REFERENCES-2.md §5.2 (IDSS 16 mA, VP −4 V).
func withFETs(c *circuit.Circuit, kind circuit.Kind) *circuit.Circuit {
	for i, p := range c.Parts {
		if p.Kind != circuit.NPN {
			continue
		}
		q := &circuit.Part{Ref: p.Ref, Kind: kind, Nets: append([]string(nil), p.Nets...), FET: jfetFigures(16e-3, -4)}
		if kind == circuit.DualGateMOSFET {
			q.Nets = append(q.Nets, "v"+p.Ref[1:])
		}
		c.Parts[i] = q
	}
	return c
}

// BenchmarkSolveFET times the 10-stage cascade of BenchmarkSolve with its
// transistors bipolar, JFETs and dual gates, in one run so that the ratios
// can be read off (go test -run '^$' -bench SolveFET ./checker/dc).
func BenchmarkSolveFET(b *testing.B) {
	for _, kind := range []circuit.Kind{circuit.NPN, circuit.NJFET, circuit.DualGateMOSFET} {
		b.Run(fmt.Sprintf("kind=%s", kind), func(b *testing.B) {
			c := cascade(10).c
			if kind != circuit.NPN {
				c = withFETs(c, kind)
			}
			r := solve(b, c)
			if kind != circuit.NPN && len(r.FETs) != 10 {
				b.Fatalf("%d FETs solved", len(r.FETs))
			}
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Solve(c); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
