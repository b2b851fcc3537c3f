package rules_test

import (
	"math"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/check"
	"headroom/checker/circuit"
	"headroom/checker/edit"
	"headroom/checker/engine"
)

// nominalIC is a transistor's nominal collector current in a circuit file.
func nominalIC(t *testing.T, src []byte, ref string) float64 {
	t.Helper()
	c, err := circuit.LoadBytes("circuit.toml", src, circuit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	cs := analysis.Run(c, nil)
	if cs.OP == nil || cs.OP.BJTs[ref] == nil {
		t.Fatalf("no operating point: %v", cs.OPErr)
	}
	return cs.OP.BJTs[ref].IC
}

// The harmful-fix case (testdata/rules/bias.emitter-fraction-harmful-fix):
// without the whole-circuit check the rule's first form raises the emitter
// resistor of a divider-held base to 1.2 k, which cuts the collector current
// by 58 % (hand calculation in the archive: 1.773 mA to 0.746 mA); with the
// check that form is refused and the offered one keeps the current within
// max_ic_change.
func TestHarmfulEmitterFixRefused(t *testing.T) {
	g := readGolden(t, "../testdata/rules/bias.emitter-fraction-harmful-fix.txtar")
	src := g.files["circuit.toml"]
	find := func(opt check.Options) engine.Finding {
		res := check.NewRunner(opt).File("circuit.toml", src)
		if res.Err != nil {
			t.Fatal(res.Err)
		}
		for _, f := range res.Findings {
			if f.Rule == "bias.emitter-fraction" {
				return f
			}
		}
		t.Fatal("the emitter fraction does not fire")
		return engine.Finding{}
	}
	before := nominalIC(t, src, "Q1")
	if math.Abs(before-1.773e-3) > 0.01*1.773e-3 {
		t.Fatalf("nominal IC %g, hand calculation 1.773 mA", before)
	}
	opt := g.options(t)
	opt.NoFixCheck = true
	old := find(opt)
	if len(old.Changes) != 1 || old.Changes[0].Part != "R3" || old.Changes[0].To != "1k2" {
		t.Fatalf("the unchecked fix was %v; the archive's hand calculation expects R3 = 1k2", old.Changes)
	}
	harmful, err := edit.Apply(src, old.Changes)
	if err != nil {
		t.Fatal(err)
	}
	if got := nominalIC(t, harmful, "Q1"); math.Abs(got-0.746e-3) > 0.02*0.746e-3 {
		t.Errorf("with R3 = 1.2 k the nominal IC is %g, hand calculation 0.746 mA", got)
	}
	fixed := find(g.options(t))
	if len(fixed.Changes) == 0 {
		t.Fatalf("no fix offered: %s", fixed.Fix)
	}
	after, err := edit.Apply(src, fixed.Changes)
	if err != nil {
		t.Fatal(err)
	}
	if got := nominalIC(t, after, "Q1"); math.Abs(got-before) > 0.25*before {
		t.Errorf("the offered fix %v moves IC from %g to %g", fixed.Changes, before, got)
	}
}
