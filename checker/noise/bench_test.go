package noise

import (
	"os"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
)

// BenchmarkNoiseBand against BenchmarkAnalysis: the noise analysis's cost
// as a ratio of the analysis of one case it runs on (the worst-case search
// runs both at every corner it visits); about 0.2 since the adjoint reuses
// the band analysis's factors.
func benchCase(b *testing.B) *analysis.Case {
	src, err := os.ReadFile("../../testdata/circuits/two-stage-40m.toml")
	if err != nil {
		b.Fatal(err)
	}
	c, err := circuit.LoadBytes("two-stage-40m.toml", src, circuit.Options{})
	if err != nil {
		b.Fatal(err)
	}
	return analysis.Run(c, nil)
}

func BenchmarkAnalysis(b *testing.B) {
	cs := benchCase(b)
	for b.Loop() {
		analysis.Run(cs.Circuit, cs.Topo)
	}
}

func BenchmarkNoiseBand(b *testing.B) {
	cs := benchCase(b)
	for b.Loop() {
		if _, err := Band(cs.Circuit, cs.OP, cs.AC); err != nil {
			b.Fatal(err)
		}
	}
}
