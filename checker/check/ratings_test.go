package check

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/corners"
	"headroom/checker/corpus"
	"headroom/checker/engine"
	"headroom/checker/ruleset"
	"headroom/rules"
)

// TestRatingsOnlyInRatingRules holds up what the fix check of a rating
// assumes (ratingRules): with every resistor's, potentiometer's and
// capacitor's rating changed (set where it was not given), the nominal case
// and every finding of every other rule, passing or failing, message
// included, are exactly what they were; the rating rules' do change.
func TestRatingsOnlyInRatingRules(t *testing.T) {
	all := rules.All()
	set, err := (&ruleset.Loader{Rules: all}).Load("default")
	if err != nil {
		t.Fatal(err)
	}
	cfg := set.Config(all)
	changed := 0
	for i, src := range corpus.Mixed(225) {
		if i%3 != 0 {
			continue
		}
		c, err := circuit.LoadBytes(fmt.Sprintf("gen%03d.toml", i), src, circuit.Options{Libraries: set.Libraries})
		if err != nil {
			t.Fatal(err)
		}
		d := c.Clone()
		for _, p := range d.Parts {
			switch p.Kind {
			case circuit.Resistor, circuit.Potentiometer:
				p.Rating = math.Max(2*p.Rating, 0.0625)
			case circuit.Capacitor:
				p.Rating = math.Max(p.Rating/3, 2.5)
			}
		}
		measure := func(c *circuit.Circuit) (map[string]string, map[string]float64) {
			cs := analysis.Run(c, nil)
			fs, err := engine.Measure(cs, nil, cfg)
			if err != nil {
				t.Fatal(err)
			}
			out := map[string]string{}
			for _, f := range fs {
				f.ResolveMessage()
				k := f.Rule + " " + f.Part + " " + f.Bound
				out[k] += fmt.Sprintf("%x %x %v %s|", math.Float64bits(f.Measured), math.Float64bits(f.Limit), f.Failing(), f.Message)
			}
			ic := map[string]float64{}
			if cs.OP != nil {
				for ref, q := range cs.OP.BJTs {
					ic[ref] = q.IC
				}
			}
			if cs.AC != nil {
				for i, bp := range cs.AC.Band {
					if bp.GainDB != nil {
						ic[fmt.Sprintf("gain %d", i)] = *bp.GainDB
					}
				}
			}
			return out, ic
		}
		f1, n1 := measure(c)
		f2, n2 := measure(d)
		for _, pair := range [][2]map[string]string{{f1, f2}, {f2, f1}} {
			for k, v := range pair[0] {
				rule, _, _ := strings.Cut(k, " ")
				switch {
				case pair[1][k] == v:
				case slices.Contains(ratingRules, rule):
					changed++
				default:
					t.Errorf("gen%03d: %s changes with the ratings:\n%s\n%s", i, k, v, pair[1][k])
				}
			}
		}
		for k, v := range n1 {
			if math.Float64bits(n2[k]) != math.Float64bits(v) {
				t.Errorf("gen%03d: nominal %s %g, %g with other ratings", i, k, v, n2[k])
			}
		}
	}
	if changed < 50 {
		t.Errorf("only %d rating items changed: the test does not reach the rating rules", changed)
	}
}

// TestRatingFixVerdicts: the check of a rating fix by the rating rules alone
// gives the verdict (offered or not, why, what it moves) the whole check of
// the reloaded file gives, for every rating form of every finding, at
// nominal over the generated corpus and in the worst case over part of it
// and the test circuits.
func TestRatingFixVerdicts(t *testing.T) {
	all := rules.All()
	byID := map[string]*engine.Rule{}
	for _, r := range all {
		byID[r.ID] = r
	}
	type file struct {
		name string
		data []byte
		mode string
	}
	var files []file
	for i, f := range corpus.Mixed(225) {
		files = append(files, file{fmt.Sprintf("gen%03d.toml", i), f, "nominal"})
		if i%15 == 0 {
			files = append(files, file{fmt.Sprintf("gen%03d.toml", i), f, "worst"})
		}
	}
	paths, _ := filepath.Glob("../../testdata/circuits/*.toml")
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		files = append(files, file{p, b, "nominal"}, file{p, b, "worst"})
	}
	counts := map[string]int{}
	for _, f := range files {
		set, err := (&ruleset.Loader{Rules: all}).Load("default")
		if err != nil {
			t.Fatal(err)
		}
		set.Corners = f.mode
		cfg := set.Config(all)
		r := NewRunner(Options{Rules: all, Set: set, Worst: corners.Worst, Today: "2026-12-02"})
		c, err := circuit.LoadBytes(f.name, f.data, circuit.Options{Libraries: set.Libraries})
		if err != nil {
			t.Fatal(err)
		}
		j, err := r.judge(c, cfg, true)
		if err != nil {
			t.Fatal(err)
		}
		mBefore := measure(j.nominal)
		again := r.recheck(f.name, set, cfg)
		for i := range j.findings {
			g := &j.findings[i]
			for _, form := range fixForms(g) {
				if !onlyRatings(g, form.Changes) {
					continue
				}
				fast := judgeForm(byID[g.Rule], g, form, &source{data: f.data, c: c}, j.findings, mBefore, cfg.Fixes, again)
				full := judgeForm(byID[g.Rule], g, form, &source{data: f.data, c: c, reload: true}, j.findings, mBefore, cfg.Fixes, again)
				if fmt.Sprint(fast) != fmt.Sprint(full) {
					t.Errorf("%s %s %s %v: rating rules alone %+v, whole check %+v", f.name, f.mode, g.Rule, form.Changes, fast, full)
				}
				counts[fmt.Sprintf("%s %v", f.mode, full.ok)]++
			}
		}
	}
	t.Log(counts)
	if counts["nominal true"] < 40 || counts["worst true"] < 10 {
		t.Errorf("too few rating fixes checked: %v", counts)
	}
}
