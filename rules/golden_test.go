package rules_test

import (
	"bytes"
	"flag"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"golang.org/x/tools/txtar"

	"headroom/checker/check"
	"headroom/checker/corners"
	"headroom/checker/edit"
	"headroom/checker/engine"
	"headroom/checker/output"
	"headroom/checker/ruleset"
	"headroom/rules"
)

var update = flag.Bool("update", false, "rewrite the want sections of the golden archives")

// Golden archives live in testdata/rules/*.txtar. The archive's comment holds
// directives, one per line:
//
//	rules: coupling.reactance bias.region   only these rules run (default: all)
//	set: strict                              the shipped set to start from (default: default)
//	corners: worst                           default: nominal
//	today: 2026-12-02                        the date waivers are judged on
//
// Files: circuit.toml (the circuit), optional ruleset.toml (used as the rule
// set; it may extend by path), any library files the circuit names,
// want.json (the check's JSON output) and optional want.txt (its text).
// Every unwaived finding with changes is re-checked with the changes applied:
// the finding must go away.
func TestGolden(t *testing.T) {
	files, err := filepath.Glob("../testdata/rules/*.txtar")
	if err != nil || len(files) == 0 {
		t.Fatalf("no golden archives: %v", err)
	}
	for _, file := range files {
		t.Run(strings.TrimSuffix(filepath.Base(file), ".txtar"), func(t *testing.T) { runGolden(t, file) })
	}
}

type golden struct {
	ar    *txtar.Archive
	files map[string][]byte
	dirs  map[string]string
}

func readGolden(t *testing.T, path string) *golden {
	ar, err := txtar.ParseFile(path)
	if err != nil {
		t.Fatal(err)
	}
	g := &golden{ar: ar, files: map[string][]byte{}, dirs: map[string]string{}}
	for _, f := range ar.Files {
		switch {
		case f.Name == "circuit.toml", f.Name == "ruleset.toml", f.Name == "want.json", f.Name == "want.txt",
			strings.HasSuffix(f.Name, ".toml"):
			g.files[f.Name] = f.Data
		default:
			t.Fatalf("unknown section %q", f.Name)
		}
	}
	for _, line := range strings.Split(string(ar.Comment), "\n") {
		if k, v, ok := strings.Cut(line, ":"); ok {
			g.dirs[strings.TrimSpace(k)] = strings.TrimSpace(v)
		}
	}
	if g.files["circuit.toml"] == nil {
		t.Fatal("archive has no circuit.toml")
	}
	return g
}

func (g *golden) readFile(p string) ([]byte, error) {
	if b, ok := g.files[filepath.ToSlash(filepath.Clean(p))]; ok {
		return b, nil
	}
	return nil, &fs.PathError{Op: "open", Path: p, Err: fs.ErrNotExist}
}

// options builds the check options the archive asks for.
func (g *golden) options(t *testing.T) check.Options {
	all := rules.All()
	loader := &ruleset.Loader{Rules: all, ReadFile: g.readFile}
	ref := g.dirs["set"]
	if ref == "" {
		ref = "default"
	}
	if _, ok := g.files["ruleset.toml"]; ok {
		ref = "ruleset.toml"
	}
	set, err := loader.Load(ref)
	if err != nil {
		t.Fatalf("rule set: %v", err)
	}
	if only := strings.Fields(g.dirs["rules"]); len(only) > 0 {
		keep := map[string]bool{}
		for _, id := range only {
			if rules.ByID(id) == nil {
				t.Fatalf("directive names unknown rule %q", id)
			}
			keep[id] = true
		}
		for _, r := range all {
			if !keep[r.ID] {
				set.Severity[r.ID] = engine.Off
			}
		}
	}
	set.Corners = "nominal"
	if c := g.dirs["corners"]; c != "" {
		set.Corners = c
	}
	today := g.dirs["today"]
	if today == "" {
		today = "2026-12-02"
	}
	return check.Options{Rules: all, Set: set, ReadFile: g.readFile, Today: today, Worst: corners.Worst,
		Exists: func(string) bool { return false }}
}

func (g *golden) run(t *testing.T, circuit []byte) []check.Result {
	r := check.NewRunner(g.options(t))
	return []check.Result{r.File("circuit.toml", circuit)}
}

func runGolden(t *testing.T, path string) {
	g := readGolden(t, path)
	results := g.run(t, g.files["circuit.toml"])
	var js, txt, errs bytes.Buffer
	if err := output.JSON(&js, results, nil); err != nil {
		t.Fatal(err)
	}
	output.Text(&txt, &errs, results, output.NewPalette(false))
	txt.Write(errs.Bytes())
	validateSARIF(t, results)
	got := map[string][]byte{"want.json": js.Bytes(), "want.txt": txt.Bytes()}
	for name, b := range got {
		// FORMAT.md §6: no number is ever printed as Inf or NaN.
		if bytes.Contains(b, []byte("NaN")) || bytes.Contains(b, []byte("Inf")) {
			t.Errorf("%s prints a non-finite number:\n%s", name, b)
		}
	}
	if *update {
		for i, f := range g.ar.Files {
			if b, ok := got[f.Name]; ok {
				g.ar.Files[i].Data = b
			}
		}
		if _, ok := g.files["want.json"]; !ok {
			g.ar.Files = append(g.ar.Files, txtar.File{Name: "want.json", Data: js.Bytes()})
		}
		if err := os.WriteFile(path, txtar.Format(g.ar), 0o644); err != nil {
			t.Fatal(err)
		}
	} else {
		for name, b := range got {
			want, ok := g.files[name]
			if ok && !bytes.Equal(want, b) {
				t.Errorf("%s differs (run go test ./rules -run TestGolden -update, then read the diff):\n--- got\n%s\n--- want\n%s", name, b, want)
			}
		}
		if _, ok := g.files["want.json"]; !ok {
			t.Errorf("archive has no want.json")
		}
	}
	checkFixes(t, g, results)
}

// checkFixes applies each finding's changes and checks that the finding is gone.
func checkFixes(t *testing.T, g *golden, results []check.Result) {
	for _, res := range results {
		for _, f := range res.Findings {
			if f.Waived || len(f.Changes) == 0 {
				continue
			}
			fixed, err := edit.Apply(g.files["circuit.toml"], f.Changes)
			if err != nil {
				t.Errorf("%s %s: applying %v: %v", f.Rule, f.Part, f.Changes, err)
				continue
			}
			again := g.run(t, fixed)[0]
			if again.Err != nil {
				t.Errorf("%s %s: the fixed circuit does not load: %v", f.Rule, f.Part, again.Err)
				continue
			}
			for _, f2 := range again.Findings {
				if f2.Rule == f.Rule && f2.Part == f.Part && !f2.Waived {
					t.Errorf("%s %s: fix %s (%v) leaves the finding: %s", f.Rule, f.Part, f.Fix, describe(f.Changes), f2.Message)
				}
			}
		}
	}
}

func describe(cs []engine.Change) string {
	var s []string
	for _, c := range cs {
		s = append(s, fmt.Sprintf("%s.%s=%s", c.Part, c.Key, c.To))
	}
	return strings.Join(s, " ")
}
