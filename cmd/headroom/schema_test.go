package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/santhosh-tekuri/jsonschema/v6"
	"golang.org/x/tools/txtar"
)

// sarifSchema is the official SARIF 2.1.0 schema (OASIS; source in
// testdata/schema/README.md).
const sarifSchema = "sarif-schema-2.1.0.json"

// compileSchema loads one of the schemas in testdata/schema.
func compileSchema(t *testing.T, name string) *jsonschema.Schema {
	t.Helper()
	path, _ := filepath.Abs(filepath.Join("../../testdata/schema", name))
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	doc, err := jsonschema.UnmarshalJSON(f)
	if err != nil {
		t.Fatal(err)
	}
	c := jsonschema.NewCompiler()
	if err := c.AddResource(path, doc); err != nil {
		t.Fatal(err)
	}
	s, err := c.Compile(path)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// corpus writes the circuit of each golden archive (with the library files
// beside them) into one folder per archive, for a whole-folder check.
func corpus(t *testing.T) string {
	t.Helper()
	root := t.TempDir()
	files, _ := filepath.Glob("../../testdata/rules/*.txtar")
	for _, file := range files {
		ar, err := txtar.ParseFile(file)
		if err != nil {
			t.Fatal(err)
		}
		dir := filepath.Join(root, strings.TrimSuffix(filepath.Base(file), ".txtar"))
		os.MkdirAll(dir, 0o755)
		for _, f := range ar.Files {
			if strings.HasSuffix(f.Name, ".toml") && f.Name != "ruleset.toml" {
				os.WriteFile(filepath.Join(dir, f.Name), f.Data, 0o644)
			}
		}
	}
	// One file with an input error and one with a waiver, so that errors,
	// notifications and suppressions appear in the output.
	os.WriteFile(filepath.Join(root, "broken.toml"), []byte("[circuit]\nname = \"x\"\nband = [\"7MHz\", \"1MHz\"]\n"), 0o644)
	os.WriteFile(filepath.Join(root, "waived.toml"), []byte(`[circuit]
name = "12 m test jig with an open net"
band = ["24.89MHz", "24.99MHz"]

[supplies.vcc]
volts = "9V"

[parts.R1]
kind = "resistor"
value = "1k"
nets = ["vcc", "probe"]

[[waivers]]
rule = "net.connectivity"
part = "R1"
reason = "the probe net is a test point"
`), 0o644)
	return root
}

func checkOutput(t *testing.T, dir, format string) []byte {
	t.Helper()
	t.Chdir(dir)
	var stdout, stderr bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &stdout, stderr: &stderr,
		getenv: func(string) string { return "" }, today: "2026-12-02"}
	if code := e.run([]string{"check", "--format", format, "--corners", "nominal", "."}); code != exitInput {
		t.Fatalf("the corpus holds a broken file, so check must exit 2; got %d\n%s", code, stderr.String())
	}
	return stdout.Bytes()
}

func validate(t *testing.T, s *jsonschema.Schema, data []byte) {
	t.Helper()
	inst, err := jsonschema.UnmarshalJSON(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("not JSON: %v", err)
	}
	if err := s.Validate(inst); err != nil {
		t.Fatalf("does not validate: %v", err)
	}
}

// TestCheckJSONSchema validates `check --format json` against FORMAT.md §5's
// document, written as a schema in testdata/schema/check.schema.json.
func TestCheckJSONSchema(t *testing.T) {
	s := compileSchema(t, "check.schema.json")
	out := checkOutput(t, corpus(t), "json")
	validate(t, s, out)
	var doc struct {
		Findings []map[string]any
		Errors   []map[string]any
	}
	json.Unmarshal(out, &doc)
	if len(doc.Findings) == 0 || len(doc.Errors) == 0 {
		t.Fatalf("the corpus should give findings and errors: %d, %d", len(doc.Findings), len(doc.Errors))
	}
}

// TestSARIF validates `check --format sarif` against the official OASIS
// SARIF 2.1.0 schema (testdata/schema/sarif-schema-2.1.0.json, see the README
// beside it) and checks the properties the standard requires of what we emit.
func TestSARIF(t *testing.T) {
	s := compileSchema(t, sarifSchema)
	out := checkOutput(t, corpus(t), "sarif")
	validate(t, s, out)
	var log struct {
		Runs []struct {
			OriginalURIBaseIDs map[string]struct{ URI string } `json:"originalUriBaseIds"`
			Tool               struct {
				Driver struct {
					Rules []struct {
						ID                   string
						FullDescription      struct{ Text string }
						Help                 struct{ Text, Markdown string }
						DefaultConfiguration struct {
							Enabled bool
							Level   string
						}
					}
				}
			}
			Results []struct {
				RuleID    string
				RuleIndex int
				Locations []struct {
					PhysicalLocation struct {
						ArtifactLocation struct{ URI, URIBaseID string }
					}
				}
				Suppressions        []struct{ Kind, Justification string }
				PartialFingerprints map[string]string
			}
			Invocations []struct {
				ExitCode            int
				ExecutionSuccessful bool
				Notifications       []any `json:"toolExecutionNotifications"`
			}
		}
	}
	if err := json.Unmarshal(out, &log); err != nil {
		t.Fatal(err)
	}
	if len(log.Runs) != 1 {
		t.Fatalf("want one run, got %d", len(log.Runs))
	}
	run := log.Runs[0]
	base, ok := run.OriginalURIBaseIDs["SRCROOT"]
	if !ok || !strings.HasPrefix(base.URI, "file://") || !strings.HasSuffix(base.URI, "/") {
		t.Errorf("SARIF 3.14.14: the base id must be an absolute URI ending in a slash, got %q", base.URI)
	}
	suppressed := false
	for _, r := range run.Results {
		// SARIF 3.27.6: ruleIndex points at the rule with the same id.
		if r.RuleIndex < 0 || r.RuleIndex >= len(run.Tool.Driver.Rules) || run.Tool.Driver.Rules[r.RuleIndex].ID != r.RuleID {
			t.Errorf("result %s: ruleIndex %d does not name its rule", r.RuleID, r.RuleIndex)
		}
		for _, l := range r.Locations {
			a := l.PhysicalLocation.ArtifactLocation
			if a.URIBaseID != "SRCROOT" || strings.HasPrefix(a.URI, "/") || strings.Contains(a.URI, `\`) {
				t.Errorf("result %s: location %q must be relative to SRCROOT", r.RuleID, a.URI)
			}
		}
		for _, s := range r.Suppressions {
			suppressed = suppressed || s.Kind == "inSource" && s.Justification == "the probe net is a test point"
		}
	}
	if !suppressed {
		t.Error("the waived finding must appear as an inSource suppression with its reason")
	}
	for _, r := range run.Tool.Driver.Rules {
		// The help is the explain text (its first line names the rule), in text and Markdown.
		if !strings.HasPrefix(r.Help.Text, r.ID+": ") || !strings.Contains(r.Help.Markdown, "**"+r.ID+"**") ||
			r.FullDescription.Text == "" || r.DefaultConfiguration.Level == "" {
			t.Errorf("rule %s: help, full description or default configuration missing", r.ID)
		}
	}
	for _, r := range run.Results {
		if len(r.PartialFingerprints["headroomFinding/v1"]) != 32 {
			t.Errorf("result %s: no fingerprint", r.RuleID)
		}
	}
	if inv := run.Invocations; len(inv) != 1 || inv[0].ExitCode != exitInput {
		t.Errorf("the invocation must record exit status 2 for a corpus with an input error")
	}
	if inv := run.Invocations; len(inv) != 1 || inv[0].ExecutionSuccessful || len(inv[0].Notifications) == 0 {
		t.Error("an input error must make the invocation unsuccessful with a notification")
	}
}

func jsonschemaUnmarshal(s string) (any, error) {
	return jsonschema.UnmarshalJSON(strings.NewReader(s))
}
