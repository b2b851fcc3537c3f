package poles

import (
	"fmt"
	"strings"
	"testing"

	"headroom/checker/sweep"
)

// chain writes a cascade of RC-coupled common-emitter stages with about
// parts parts (8 a stage, plus the coupling into the next): invented values
// for timing only.
func chain(parts int) string {
	var b strings.Builder
	b.WriteString("[circuit]\nname = \"chain\"\nband = [\"7MHz\", \"7.3MHz\"]\nambient = \"25C\"\n\n" +
		"[supplies.vcc]\nvolts = \"12V\"\nimpedance = \"1\"\n\n" +
		"[ports.in]\nnet = \"n0\"\ndirection = \"in\"\n\n[ports.out]\nnet = \"OUT\"\ndirection = \"out\"\n\n[parts]\n")
	stages := max(1, parts/9)
	last := ""
	for s := range stages {
		in, base, coll, emit := fmt.Sprintf("n%d", s), fmt.Sprintf("b%d", s), fmt.Sprintf("c%d", s), fmt.Sprintf("e%d", s)
		fmt.Fprintf(&b, "CI%d = { kind = \"capacitor\", value = \"10n\", nets = [\"%s\", \"%s\"] }\n", s, in, base)
		fmt.Fprintf(&b, "RA%d = { kind = \"resistor\", value = \"10k\", nets = [\"vcc\", \"%s\"] }\n", s, base)
		fmt.Fprintf(&b, "RB%d = { kind = \"resistor\", value = \"2.2k\", nets = [\"%s\", \"gnd\"] }\n", s, base)
		fmt.Fprintf(&b, "Q%d = { kind = \"npn\", device = \"2N3904\", nets = { collector = \"%s\", base = \"%s\", emitter = \"%s\" } }\n", s, coll, base, emit)
		fmt.Fprintf(&b, "RE%d = { kind = \"resistor\", value = \"220\", nets = [\"%s\", \"gnd\"] }\n", s, emit)
		fmt.Fprintf(&b, "CE%d = { kind = \"capacitor\", value = \"1n\", nets = [\"%s\", \"gnd\"] }\n", s, emit)
		fmt.Fprintf(&b, "RC%d = { kind = \"resistor\", value = \"1k\", nets = [\"vcc\", \"%s\"] }\n", s, coll)
		fmt.Fprintf(&b, "LC%d = { kind = \"inductor\", value = \"1u\", resistance = \"1\", nets = [\"%s\", \"n%d\"] }\n", s, coll, s+1)
		fmt.Fprintf(&b, "CD%d = { kind = \"capacitor\", value = \"100p\", nets = [\"n%d\", \"gnd\"] }\n", s, s+1)
		last = fmt.Sprintf("n%d", s+1)
	}
	return strings.ReplaceAll(b.String(), "\"OUT\"", "\""+last+"\"")
}

// BenchmarkStability times the pole search and the wide sweep of one
// analysed case on 10-, 30-, 100- and 300-part circuits. The pole search is
// timed past the memo (Find would answer every loop after the first from
// it): "poles" is the solver, "poles-reference" the solver before its
// workspace was reused, in the same run.
func BenchmarkStability(b *testing.B) {
	for _, n := range []int{10, 30, 100, 300} {
		cs := analyse(b, chain(n), nil)
		pen, err := build(cs.Circuit, cs.AC)
		if err != nil {
			b.Fatal(err)
		}
		fLo, fHi := span(cs.Circuit)
		for _, v := range []struct {
			name  string
			solve func(*pencil, float64, float64) (*Result, error)
		}{{"poles", findPoles}, {"poles-reference", referencePoles}} {
			b.Run(fmt.Sprintf("%s/%d-parts", v.name, len(cs.Circuit.Parts)), func(b *testing.B) {
				for b.Loop() {
					if _, err := v.solve(pen, fLo, fHi); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(pen.n), "unknowns")
			})
		}
		b.Run(fmt.Sprintf("sweep/%d-parts", len(cs.Circuit.Parts)), func(b *testing.B) {
			for b.Loop() {
				if _, err := sweep.Run(cs.Circuit, cs.AC); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
