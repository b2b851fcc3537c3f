package analysis

import (
	"path/filepath"
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// BenchmarkExamples times what a check does before any rule runs, over the
// shipped example circuits: loading, the DC operating point alone, and the
// whole analysis (topology, DC and the band analysis).
func BenchmarkExamples(b *testing.B) {
	files, _ := filepath.Glob("../../testdata/circuits/*.toml")
	if len(files) == 0 {
		b.Fatal("no example circuits")
	}
	load := func(b *testing.B) []*circuit.Circuit {
		var cs []*circuit.Circuit
		for _, f := range files {
			c, err := circuit.Load(f, circuit.Options{})
			if err != nil {
				b.Fatal(err)
			}
			cs = append(cs, c)
		}
		return cs
	}
	b.Run("load+dc", func(b *testing.B) {
		for b.Loop() {
			for _, c := range load(b) {
				if _, err := dc.Solve(c); err != nil {
					b.Fatal(err)
				}
			}
		}
	})
	b.Run("load+dc+ac", func(b *testing.B) {
		for b.Loop() {
			for _, c := range load(b) {
				if cs := Run(c, nil); cs.OP == nil || cs.AC == nil {
					b.Fatalf("%s: %v %v", c.Name, cs.OPErr, cs.ACErr)
				}
			}
		}
	})
}
