package rules_test

import (
	"sort"
	"strings"
	"testing"
	"unicode"

	"headroom/checker/ruledoc"
	"headroom/rules"
)

// Every rule's documentation is what `explain`, `rules`, SARIF and the
// README print: each field must be written, and the explain text must carry
// all of it with the shipped defaults (RULES.md: "explain RULE prints, for
// every rule: what it checks, why it matters, the formula, the parameters and
// their defaults, the source, and how to fix a finding").
func TestEveryRuleDocumented(t *testing.T) {
	all := rules.All()
	if !sort.SliceIsSorted(all, func(i, j int) bool { return all[i].ID < all[j].ID }) {
		t.Error("rules.All() is not sorted by id")
	}
	seen := map[string]bool{}
	for _, r := range all {
		d := r.Doc
		if seen[r.ID] {
			t.Errorf("%s listed twice", r.ID)
		}
		seen[r.ID] = true
		if rules.ByID(r.ID) != r {
			t.Errorf("ByID(%q) does not return the rule", r.ID)
		}
		switch {
		case d.Title == "" || d.Title == "not written yet":
			t.Errorf("%s: no title", r.ID)
		case unicode.IsUpper([]rune(d.Title)[0]) || strings.HasSuffix(d.Title, "."):
			t.Errorf("%s: title %q must start lowercase and have no period", r.ID, d.Title)
		}
		for field, text := range map[string]string{"Why": d.Why, "Formula": d.Formula, "Source": d.Source, "Fix": d.Fix} {
			if strings.TrimSpace(text) == "" {
				t.Errorf("%s: Doc.%s is empty", r.ID, field)
			}
		}
		names := map[string]bool{}
		for _, p := range d.Params {
			if p.Name == "" || strings.TrimSpace(p.Help) == "" {
				t.Errorf("%s: parameter %q has no name or no help", r.ID, p.Name)
			}
			if names[p.Name] {
				t.Errorf("%s: parameter %q twice", r.ID, p.Name)
			}
			names[p.Name] = true
		}
		if r.Run == nil && !strings.HasPrefix(r.ID, "waiver.") && r.ID != "baseline.unused" {
			t.Errorf("%s: no run function (only the waiver and baseline rules are judged by the driver)", r.ID)
		}
	}
}

// The shipped rule sets give every documented parameter a value and no
// other, and `explain` prints every section, every parameter and both
// values for every rule.
func TestExplainCoversEveryRule(t *testing.T) {
	all := rules.All()
	def, strict, err := ruledoc.Shipped(all)
	if err != nil {
		t.Fatalf("shipped rule sets: %v", err)
	}
	table := ruledoc.Table(all, def, strict)
	for _, r := range all {
		for _, set := range []struct {
			name   string
			params map[string]float64
		}{{"default", def.Params[r.ID]}, {"strict", strict.Params[r.ID]}} {
			if len(set.params) != len(r.Doc.Params) {
				t.Errorf("%s: the %s set has %d parameters, the doc %d", r.ID, set.name, len(set.params), len(r.Doc.Params))
			}
			for _, p := range r.Doc.Params {
				if _, ok := set.params[p.Name]; !ok {
					t.Errorf("%s: the %s set has no %s", r.ID, set.name, p.Name)
				}
			}
		}
		text := ruledoc.Explain(r, def, strict)
		want := []string{r.ID + ": " + r.Doc.Title, "Severity: " + def.Severity[r.ID].String(),
			"Why it matters:", "What it measures:", "Source:", "How to fix a finding:"}
		// The prose is wrapped; compare words, not lines.
		flat := strings.Join(strings.Fields(text), " ")
		for _, field := range []string{r.Doc.Why, r.Doc.Formula, r.Doc.Source, r.Doc.Fix} {
			want = append(want, strings.Join(strings.Fields(field), " "))
		}
		for _, p := range r.Doc.Params {
			want = append(want, p.Name+" "+ruledoc.Value(def.Params[r.ID][p.Name], p.Unit)+", "+
				ruledoc.Value(strict.Params[r.ID][p.Name], p.Unit), strings.Join(strings.Fields(p.Help), " "))
		}
		for _, w := range want {
			if !strings.Contains(flat, w) {
				t.Errorf("explain %s lacks %q:\n%s", r.ID, w, text)
			}
		}
		if !strings.Contains(table, "`"+r.ID+"`") {
			t.Errorf("the README table lacks %s", r.ID)
		}
	}
}
