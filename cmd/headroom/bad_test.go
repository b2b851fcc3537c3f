package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"golang.org/x/tools/txtar"
)

// TestBadInputExitStatus runs every malformed circuit of testdata/bad through
// `check --format json` as a user would: each must exit 2, print its error in
// the GNU form on standard error at the position the archive names, carry the
// same position in the JSON document, and print no finding.
func TestBadInputExitStatus(t *testing.T) {
	files, _ := filepath.Glob("../../testdata/bad/*.txtar")
	if len(files) < 20 {
		t.Fatalf("want at least 20 malformed circuits, found %d", len(files))
	}
	for _, file := range files {
		file, _ := filepath.Abs(file)
		t.Run(strings.TrimSuffix(filepath.Base(file), ".txtar"), func(t *testing.T) {
			ar, err := txtar.ParseFile(file)
			if err != nil {
				t.Fatal(err)
			}
			dir := t.TempDir()
			var want string
			var libs []string
			for _, f := range ar.Files {
				switch f.Name {
				case "want":
					want = strings.TrimSpace(string(f.Data))
				case "ruleset-libraries":
					libs = strings.Fields(string(f.Data))
				default:
					p := filepath.Join(dir, filepath.FromSlash(f.Name))
					os.MkdirAll(filepath.Dir(p), 0o755)
					os.WriteFile(p, f.Data, 0o644)
				}
			}
			if len(libs) > 0 { // a rule set that names the libraries, found by discovery
				var b strings.Builder
				b.WriteString("library = [")
				for i, l := range libs {
					if i > 0 {
						b.WriteString(", ")
					}
					b.WriteString(`"` + l + `"`)
				}
				b.WriteString("]\n")
				os.WriteFile(filepath.Join(dir, ".headroom.toml"), []byte(b.String()), 0o644)
			}
			os.MkdirAll(filepath.Join(dir, ".git"), 0o755)
			t.Chdir(dir)
			var stdout, stderr bytes.Buffer
			e := &env{stdin: strings.NewReader(""), stdout: &stdout, stderr: &stderr,
				getenv: func(string) string { return "" }, today: "2026-12-02"}
			code := e.run([]string{"check", "--corners", "nominal", "--format", "json", "circuit.toml"})
			if code != exitInput {
				t.Fatalf("exit %d, want 2\nstdout: %s\nstderr: %s", code, stdout.String(), stderr.String())
			}
			// The archive's want line starts with file:line:col.
			loc := strings.Join(strings.SplitN(want, ":", 4)[:3], ":")
			if !strings.HasPrefix(stderr.String(), loc+": error: ") {
				t.Errorf("stderr %q does not start with %q", stderr.String(), loc+": error: ")
			}
			var doc struct {
				Findings []any
				Errors   []struct {
					Path         string
					Line, Column int
				}
			}
			if err := json.Unmarshal(stdout.Bytes(), &doc); err != nil {
				t.Fatalf("JSON: %v\n%s", err, stdout.String())
			}
			if len(doc.Findings) != 0 || len(doc.Errors) != 1 {
				t.Fatalf("want no finding and one error, got %d and %d", len(doc.Findings), len(doc.Errors))
			}
			e0 := doc.Errors[0]
			if got := strings.Join([]string{e0.Path, strconv.Itoa(e0.Line), strconv.Itoa(e0.Column)}, ":"); got != loc {
				t.Errorf("JSON error at %s, want %s", got, loc)
			}
		})
	}
}
