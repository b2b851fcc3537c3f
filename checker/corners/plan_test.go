package corners

import (
	"flag"
	"fmt"
	"math"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/corpus"
	"headroom/checker/topology"
)

var planFiles = flag.Int("plan.files", 40, "corpus files TestPlanCases analyses (225: all of BenchmarkCorpus's)")

// TestPlanCases analyses every parameter's two ends, for files of the
// generated corpus (checker/corpus.Mixed), once from scratch (analysis.Run:
// the netlist, pattern and network built anew, Newton from its cold start)
// and once with the nominal case's plan (analysis.Case.Vary: built once).
// The plan must give the same answers to the bit. With analysis.WarmStart
// (Newton from the nominal operating point) both must find an operating
// point in the same cases, within the solver's tolerance of each other
// (dc.Solve stops when no unknown moves by more than 1e-7 relative; the
// quadratic last step leaves far less), with the same band figures, and the
// warm start must take fewer Newton iterations in all (it logs both totals).
func TestPlanCases(t *testing.T) {
	for _, warm := range []bool{false, true} {
		t.Run(fmt.Sprintf("warm=%v", warm), func(t *testing.T) {
			defer func(was bool) { analysis.WarmStart = was }(analysis.WarmStart)
			analysis.WarmStart = warm
			planCases(t, warm)
		})
	}
}

func planCases(t *testing.T, warm bool) {
	files := corpus.Mixed(225)[:*planFiles]
	var cold, hot, cases int
	worst := 0.0
	for i, f := range files {
		name := fmt.Sprintf("gen%03d.toml", i)
		c, err := circuit.LoadBytes(name, f, circuit.Options{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		topo := topology.Analyze(c)
		nominal := analysis.Run(c, topo)
		for _, p := range Box(c) {
			for _, v := range []float64{p.Lo, p.Hi} {
				cc := variant(c)
				p.set(cc, v)
				want, got := analysis.Run(cc, topo), nominal.Vary(cc)
				where := fmt.Sprintf("%s at %s %g", name, p.Key, v)
				if (want.OP == nil) != (got.OP == nil) || (want.AC == nil) != (got.AC == nil) {
					t.Fatalf("%s: from scratch %v %v, planned %v %v", where, want.OPErr, want.ACErr, got.OPErr, got.ACErr)
				}
				if want.OP == nil {
					if want.OPErr.Error() != got.OPErr.Error() {
						t.Errorf("%s: from scratch %v, planned %v", where, want.OPErr, got.OPErr)
					}
					continue
				}
				cases++
				cold += want.OP.Iterations
				hot += got.OP.Iterations
				for net, x := range want.OP.V {
					d := math.Abs(got.OP.V[net] - x)
					if d > 1e-9*math.Abs(x)+1e-12 || !warm && got.OP.V[net] != x {
						t.Errorf("%s: net %s at %.15g V, from scratch %.15g V", where, net, got.OP.V[net], x)
					}
					if x != 0 {
						worst = max(worst, d/math.Abs(x))
					}
				}
				if want.AC == nil {
					continue
				}
				for k, b := range want.AC.Band {
					g := got.AC.Band[k]
					if !closeZ(g.InputImpedance, b.InputImpedance) || (g.GainDB == nil) != (b.GainDB == nil) ||
						b.GainDB != nil && math.Abs(*g.GainDB-*b.GainDB) > 1e-6 ||
						!warm && (g.InputImpedance != b.InputImpedance || g.ReturnLossDB != b.ReturnLossDB || b.GainDB != nil && *g.GainDB != *b.GainDB) {
						t.Errorf("%s: band point %d %+v, from scratch %+v", where, k, g, b)
					}
				}
			}
		}
	}
	t.Logf("%d files, %d cases: Newton iterations from scratch %d (%.2f a case), with the plan %d (%.2f a case); largest relative difference of a net voltage %.3g",
		len(files), cases, cold, float64(cold)/float64(cases), hot, float64(hot)/float64(cases), worst)
	if warm && hot >= cold || !warm && hot != cold {
		t.Errorf("the plan took %d iterations, analysing from scratch %d", hot, cold)
	}
}

func closeZ(a, b complex128) bool {
	d := a - b
	return math.Hypot(real(d), imag(d)) <= 1e-7*math.Hypot(real(b), imag(b))+1e-9
}

// BenchmarkPlanCase times one analysed case (every parameter at its high
// end) of the amplifiers of BenchmarkWorst, analysis alone, no rules: from
// scratch (analysis.Run), with the nominal case's plan (analysis.Case.Vary),
// and with the plan and Newton's warm start (analysis.WarmStart). Compare
// the three within one run; the allocations are steady.
func BenchmarkPlanCase(b *testing.B) {
	for _, stages := range []int{2, 5, 16, 50} {
		c := testCircuit(stages)
		topo := topology.Analyze(c)
		box := Box(c)
		high := make([]int8, len(box))
		for i := range high {
			high[i] = +1
		}
		cc := at(c, box, high)
		for _, mode := range []string{"scratch", "plan", "warm"} {
			b.Run(fmt.Sprintf("parts=%d/%s", len(c.Parts), mode), func(b *testing.B) {
				defer func(was bool) { analysis.WarmStart = was }(analysis.WarmStart)
				analysis.WarmStart = mode == "warm"
				nominal := analysis.Run(c, topo)
				nominal.Vary(cc) // builds the plan
				b.ReportAllocs()
				iters := 0
				for b.Loop() {
					var cs *analysis.Case
					if mode == "scratch" {
						cs = analysis.Run(cc, topo)
					} else {
						cs = nominal.Vary(cc)
					}
					if cs.AC == nil {
						b.Fatal(cs.OPErr, cs.ACErr)
					}
					iters += cs.OP.Iterations
				}
				b.ReportMetric(float64(iters)/float64(b.N), "newton-iters/op")
			})
		}
	}
}
