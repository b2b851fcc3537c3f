package main

import (
	"bytes"
	"runtime/debug"
	"strings"
	"testing"

	"headroom/checker/check"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/output"
)

func TestVersionOf(t *testing.T) {
	for _, c := range []struct {
		main     string
		settings map[string]string
		want     string
	}{
		{"v1.4.0", map[string]string{"vcs.revision": "0123456789abcdef0123"}, "v1.4.0"},
		{"(devel)", map[string]string{"vcs.revision": "0123456789abcdef0123", "vcs.modified": "true"}, "(devel) 0123456789ab+dirty"},
		{"(devel)", map[string]string{"vcs.revision": "0123456789abcdef0123", "vcs.modified": "false"}, "(devel) 0123456789ab"},
		{"", nil, "(devel)"},
	} {
		info := &debug.BuildInfo{Main: debug.Module{Version: c.main}}
		for k, v := range c.settings {
			info.Settings = append(info.Settings, debug.BuildSetting{Key: k, Value: v})
		}
		if got := versionOf(info); got != c.want {
			t.Errorf("versionOf(%q, %v) = %q, want %q", c.main, c.settings, got, c.want)
		}
	}
}

// The expected diff is written by hand in the unified format (POSIX diff -u,
// as git prints it): hunk header "@@ -start,count +start,count @@", three
// lines of context, removals before additions.
func TestUnifiedDiff(t *testing.T) {
	old := "a\nb\nc\nd\ne\nf\ng\nh\ni\nj\nk\nl\nm\n"
	new := "a\nb\nc\nd\nE\nf\ng\nh\ni\nj\nk\nl\nM\nn\n"
	want := `--- a/x.toml
+++ b/x.toml
@@ -2,7 +2,7 @@
 b
 c
 d
-e
+E
 f
 g
 h
@@ -10,4 +10,5 @@
 j
 k
 l
-m
+M
+n
`
	got := fileDiff{path: "x.toml", old: []byte(old), new: []byte(new)}.unified()
	if got != want {
		t.Errorf("diff:\n%s\nwant:\n%s", got, want)
	}
	got = fileDiff{path: "y.toml", old: []byte("a"), new: []byte("b")}.unified()
	if want := "--- a/y.toml\n+++ b/y.toml\n@@ -1 +1 @@\n-a\n\\ No newline at end of file\n+b\n\\ No newline at end of file\n"; got != want {
		t.Errorf("diff without final newline:\n%q\nwant\n%q", got, want)
	}
}

// Two fixes that change one value are not applied in one round: the first
// is, the second waits for the check to see the first.
func TestFixRoundDefersConflicts(t *testing.T) {
	text := []byte("[circuit]\nname = \"x\"\n\n[parts.C1]\nkind = \"capacitor\"\nvalue = \"1n\"\nnets = [\"a\", \"b\"]\n\n[parts.C2]\nkind = \"capacitor\"\nvalue = \"1n\"\nnets = [\"b\", \"c\"]\n")
	fs := []engine.Finding{
		{Rule: "coupling.reactance", Part: "C1", Changes: []engine.Change{{Part: "C1", Key: "value", To: "10n"}}},
		{Rule: "values.preferred", Part: "C1", Changes: []engine.Change{{Part: "C1", Key: "value", To: "1n2"}}},
		{Rule: "coupling.reactance", Part: "C2", Changes: []engine.Change{{Part: "C2", Key: "value", To: "4n7"}}},
		{Rule: "capacitor.voltage", Part: "C2", Waived: true, Changes: []engine.Change{{Part: "C2", Key: "rating", To: "50V"}}},
		{Rule: "x.broken", Part: "C9", Changes: []engine.Change{{Part: "C9", Key: "value", To: "1n"}}},
	}
	failed := map[engine.Key]bool{}
	got, n := fixRound(text, fs, failed)
	if n != 2 || !bytes.Contains(got, []byte(`value = "10n"`)) || !bytes.Contains(got, []byte(`value = "4n7"`)) ||
		bytes.Contains(got, []byte("1n2")) || bytes.Contains(got, []byte("50V")) {
		t.Errorf("round applied %d fixes:\n%s", n, got)
	}
	if !failed[engine.Key{Rule: "x.broken", Part: "C9"}] || len(failed) != 1 {
		t.Errorf("the fix for a missing part must be remembered as failed: %v", failed)
	}
}

// GitHub workflow commands: "%" and line breaks are escaped in the message,
// and ":" and "," as well in properties (the runner's command format).
func TestGitHubEscaping(t *testing.T) {
	res := []check.Result{{Path: "b:o,ard%.toml", Findings: []engine.Finding{{Rule: "r.x", Severity: engine.Info,
		Pos: circuit.Pos{Line: 3, Col: 1}, Message: "100% over\r\nlimit: a, b", Fix: "f"}}}}
	var b bytes.Buffer
	output.GitHub(&b, res, output.Invocation{Root: "/r", WD: "/r"})
	want := "::notice file=b%3Ao%2Card%25.toml,line=3,col=1,title=headroom r.x::100%25 over%0D%0Alimit: a, b%0Afix: f\n"
	if b.String() != want {
		t.Errorf("got  %q\nwant %q", b.String(), want)
	}
}

// The schema the tests validate against must reject what SARIF forbids, or
// the validation could not fail.
func TestSARIFSchemaRejectsInvalid(t *testing.T) {
	s := compileSchema(t, sarifSchema)
	for _, bad := range []string{
		`{"version": "2.1.0", "runs": [{"tool": {"driver": {"name": "x"}}, "results": [{"message": {"text": "m"}, "level": "fatal"}]}]}`,
		`{"version": "2.0.0", "runs": []}`,
		`{"version": "2.1.0", "runs": [{"tool": {"driver": {"name": "x"}}, "results": [{"message": {"text": "m"}, "locations": [{"physicalLocation": {"region": {"startLine": 0}}}]}]}]}`,
	} {
		inst, err := jsonschemaUnmarshal(bad)
		if err != nil {
			t.Fatal(err)
		}
		if s.Validate(inst) == nil {
			t.Errorf("the official schema accepted %s", bad)
		}
	}
	if !strings.Contains(sarifSchema, "2.1.0") {
		t.Fatal("not the 2.1.0 schema")
	}
}
