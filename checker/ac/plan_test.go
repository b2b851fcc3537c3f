package ac

import (
	"errors"
	"path/filepath"
	"reflect"
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// TestPlanIsAnalyze builds a Plan from every example circuit and analyses
// it with each part's value 5 % up in turn: the plan must take every case
// (the wiring is the same) and give exactly Analyze's figures.
func TestPlanIsAnalyze(t *testing.T) {
	files, _ := filepath.Glob("../../testdata/circuits/*.toml")
	if len(files) == 0 {
		t.Fatal("no example circuits")
	}
	cases := 0
	for _, f := range files {
		c, err := circuit.Load(f, circuit.Options{})
		if err != nil {
			t.Fatal(err)
		}
		op, err := dc.Solve(c)
		if err != nil {
			continue
		}
		p := NewPlan(c, op)
		if p == nil {
			t.Fatalf("%s: no plan", f)
		}
		for i, part := range c.Parts {
			if !(part.Value > 0) {
				continue
			}
			v := c.Clone()
			v.Parts[i].Value *= 1.05
			op, err := dc.Solve(v)
			if err != nil {
				continue
			}
			want, werr := Analyze(v, op)
			got, gerr := analyze(v, op, p.like)
			if errors.Is(gerr, errShape) {
				t.Fatalf("%s with %s +5 %%: the plan does not fit", f, part.Ref)
			}
			if (werr == nil) != (gerr == nil) {
				t.Fatalf("%s with %s +5 %%: %v, Analyze %v", f, part.Ref, gerr, werr)
			}
			if werr != nil {
				continue
			}
			cases++
			if !reflect.DeepEqual(got.Band, want.Band) || !reflect.DeepEqual(got.Parts, want.Parts) ||
				!reflect.DeepEqual(got.BJTs, want.BJTs) || !reflect.DeepEqual(got.Windings, want.Windings) ||
				!reflect.DeepEqual(got.FETs, want.FETs) {
				t.Errorf("%s with %s +5 %%: the plan's figures differ from Analyze's", f, part.Ref)
			}
		}
	}
	if cases == 0 {
		t.Fatal("no case analysed")
	}
}
