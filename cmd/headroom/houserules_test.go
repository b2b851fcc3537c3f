package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// copyTree copies a folder of the repository's testdata into dst.
func copyTree(t *testing.T, src, dst string) {
	t.Helper()
	err := filepath.Walk(src, func(p string, info os.FileInfo, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(src, p)
		target := filepath.Join(dst, rel)
		if info.IsDir() {
			return os.MkdirAll(target, 0o755)
		}
		b, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		return os.WriteFile(target, b, 0o644)
	})
	if err != nil {
		t.Fatal(err)
	}
}

// TestHouseRules runs the README's house-rules example end to end: the club
// set is discovered from the kit's folder, it extends strict, its fail_on
// makes warnings fail, its thresholds replace strict's, and the kit's waiver
// holds.
func TestHouseRules(t *testing.T) {
	bin := binary(t)
	repo := t.TempDir()
	copyTree(t, "../../testdata/houserules", repo)
	os.MkdirAll(filepath.Join(repo, ".git"), 0o755) // the repository root, where discovery stops

	out, code := runIn(t, repo, nil, bin, "check", "--format", "json", "kits")
	if code != 1 {
		t.Fatalf("club rules fail on warnings: want exit 1, got %d\n%s", code, out)
	}
	var doc struct {
		Files []struct {
			RuleSet string `json:"ruleset"`
			FailOn  string `json:"fail_on"`
		} `json:"files"`
		Findings []struct {
			Rule   string
			Part   string
			Limit  float64
			Waived bool
		}
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if len(doc.Files) != 1 || doc.Files[0].RuleSet != "club" || doc.Files[0].FailOn != "warning" {
		t.Fatalf("the club set was not discovered: %+v", doc.Files)
	}
	waived, divider := false, false
	for _, f := range doc.Findings {
		switch f.Rule {
		case "bjt.voltage":
			waived = f.Waived
		case "bias.divider-stiffness":
			divider = f.Limit == 15 // the club's value, not strict's 20
		case "values.preferred":
			t.Errorf("values.preferred is off in the club set but reported %s", f.Part)
		}
	}
	if !waived {
		t.Error("the kit's waiver of bjt.voltage for Q1 did not hold")
	}
	if !divider {
		t.Error("bias.divider-stiffness was not judged against the club's min_ratio 15")
	}

	// With the shipped default (fail_on error) the same warnings do not fail.
	if out, code = runIn(t, repo, nil, bin, "check", "--rules", "default", "kits"); code != 0 {
		t.Fatalf("default rules: want exit 0, got %d\n%s", code, out)
	}
	// --fail-on on the command line overrides the rule set.
	if out, code = runIn(t, repo, nil, bin, "check", "--fail-on", "error", "kits"); code != 0 {
		t.Fatalf("--fail-on error: want exit 0, got %d\n%s", code, out)
	}

	// Discovery stops at the repository root: a broken .headroom.toml above
	// it is never read.
	outer := t.TempDir()
	os.WriteFile(filepath.Join(outer, ".headroom.toml"), []byte("this is not = = toml"), 0o644)
	inner := filepath.Join(outer, "repo")
	copyTree(t, "../../testdata/circuits", filepath.Join(inner, "boards"))
	os.MkdirAll(filepath.Join(inner, ".git"), 0o755)
	out, code = runIn(t, inner, nil, bin, "check", "boards/preamp-30m.toml")
	if code == 2 || strings.Contains(out, "not valid TOML") {
		t.Fatalf("a rule set above the repository root was read:\n%s", out)
	}
}
