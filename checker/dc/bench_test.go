package dc

import (
	"fmt"
	"testing"
)

// cascade is n divider-biased NPN stages of an IF strip on a 12 V rail with
// 0.2 Ω source impedance, each stage on its own RC-decoupled branch of the
// rail (100 Ω, 10 µF), joined by coupling capacitors, the last one driving a
// transformer into the 50 Ω output.
func cascade(n int) *builder {
	b := newCircuit(25).supply("vcc", 12, 0.2).
		port("in", "in", "in", 50).port("out", "out", "out", 50)
	prev := "in"
	for i := 1; i <= n; i++ {
		s := func(name string) string { return fmt.Sprintf("%s%d", name, i) }
		b.res(s("RD"), "vcc", s("v"), 100).cap(s("CD"), s("v"), "gnd", 10e-6).
			cap(s("CC"), prev, s("b"), 10e-9).
			res(s("RA"), s("v"), s("b"), 33e3).res(s("RB"), s("b"), "gnd", 6.8e3).
			res(s("RE"), s("e"), "gnd", 270).cap(s("CE"), s("e"), "gnd", 100e-9)
		if i < n {
			b.res(s("RC"), s("v"), s("c"), 1.5e3)
		} else {
			b.xfmr("T1", winding("primary", s("v"), s("c"), 12, 0.4), winding("secondary", "out", "gnd", 3, 0.1))
		}
		b.npn(s("Q"), s("c"), s("b"), s("e"), npn3904())
		prev = s("c")
	}
	return b
}

// Each circuit is checked once for a sound answer, so that the benchmark
// cannot time a failure path.
func benchSolve(b *testing.B, stages int) {
	c := cascade(stages).c
	r := solve(b, c)
	checkKCL(b, c, r, 1e-9)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Solve(c); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSolve(b *testing.B) {
	for _, n := range []int{1, 2, 10} {
		b.Run(fmt.Sprintf("stages=%d", n), func(b *testing.B) { benchSolve(b, n) })
	}
}
