package baseline

import (
	"bytes"
	"strings"
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/engine"
)

func TestFingerprintsNameWhatNotWhere(t *testing.T) {
	fs := []engine.Finding{
		{Rule: "net.connectivity", Part: "R1", Pos: circuit.Pos{Line: 8}, Message: "net bias has only one connection (R1)"},
		{Rule: "net.connectivity", Part: "R1", Pos: circuit.Pos{Line: 8}, Message: "net tap has only one connection (R1)"},
		{Rule: "bias.region", Part: "Q1", Bound: "min", Pos: circuit.Pos{Line: 20}},
		{Rule: "bias.region", Part: "Q1", Bound: "max", Pos: circuit.Pos{Line: 20}},
	}
	a := Fingerprints("boards/a.toml", fs)
	seen := map[string]bool{}
	for _, f := range a {
		if len(f) != 32 || seen[f] {
			t.Fatalf("fingerprints must be 32 hex digits and distinct: %v", a)
		}
		seen[f] = true
	}
	// Moved lines and new numbers in the message keep the fingerprint.
	moved := append([]engine.Finding(nil), fs...)
	for i := range moved {
		moved[i].Pos.Line += 10
		moved[i].Message = strings.ReplaceAll(moved[i].Message, "R1", "R1 (4.7 kohm)")
	}
	if b := Fingerprints("boards/a.toml", moved); strings.Join(a, ",") != strings.Join(b, ",") {
		t.Errorf("moving lines changed the fingerprints:\n%v\n%v", a, b)
	}
	// Another file or another part is another finding.
	if b := Fingerprints("boards/b.toml", fs); b[0] == a[0] {
		t.Error("the path must be part of the fingerprint")
	}
	other := append([]engine.Finding(nil), fs...)
	other[2].Part = "Q2"
	if b := Fingerprints("boards/a.toml", other); b[2] == a[2] {
		t.Error("the part must be part of the fingerprint")
	}
}

func TestBaselineRoundTripAndMatch(t *testing.T) {
	entries := []Entry{
		{Fingerprint: "bb", Rule: "z.rule", Path: "b.toml", Message: "m"},
		{Fingerprint: "aa", Rule: "a.rule", Path: "a.toml", Part: "R1", Message: "m"},
		{Fingerprint: "aa", Rule: "a.rule", Path: "a.toml", Part: "R1", Message: "m"},
	}
	var buf bytes.Buffer
	if err := Write(&buf, entries); err != nil {
		t.Fatal(err)
	}
	f, err := Read(buf.Bytes())
	if err != nil {
		t.Fatal(err)
	}
	if f.Findings[0].Path != "a.toml" || f.Findings[2].Path != "b.toml" {
		t.Errorf("entries must be sorted by path: %+v", f.Findings)
	}
	m := NewMatcher(f)
	// Two entries with one fingerprint cover two findings, not three.
	if !m.Match("aa") || !m.Match("aa") || m.Match("aa") {
		t.Error("each entry must match one finding")
	}
	if got := m.Unmatched("b.toml"); len(got) != 1 || got[0].Rule != "z.rule" {
		t.Errorf("unmatched in b.toml: %+v", got)
	}
	if got := m.Unmatched("a.toml"); len(got) != 0 {
		t.Errorf("a.toml's entries all matched: %+v", got)
	}
	for _, bad := range []string{`{"version": 2, "findings": []}`, `{"version": 1, "findings": [{"rule": "x"}]}`,
		`{"version": 1, "findings": [], "extra": 1}`, `[]`} {
		if _, err := Read([]byte(bad)); err == nil {
			t.Errorf("accepted %s", bad)
		}
	}
	_, err = Read([]byte("{\n  \"version\": 1,\n  \"findings\": [\n    {\"fingerprint\": 7}\n  ]\n}\n"))
	if e, ok := err.(*Error); !ok || e.Line != 4 || e.Col < 5 {
		t.Errorf("a wrong type must be placed on its line: %v", err)
	}
	_, err = Read([]byte("{\"version\": 1,\n \"findings\": [}"))
	if e, ok := err.(*Error); !ok || e.Line != 2 {
		t.Errorf("a syntax error must be placed on its line: %v", err)
	}
}

// FuzzRead: no input makes Read panic, and what it accepts writes back to
// an equal file.
func FuzzRead(f *testing.F) {
	f.Add([]byte(`{"version": 1, "findings": []}`))
	f.Add([]byte(`{"version": 1, "findings": [{"fingerprint": "aa", "rule": "r.x", "path": "a.toml", "part": "R1", "message": "m"}]}`))
	f.Add([]byte(`{"version": 2}`))
	f.Add([]byte("{\n\"version\": 1,\n\"findings\": [{\"fingerprint\": 1e400}]}"))
	f.Fuzz(func(t *testing.T, data []byte) {
		b, err := Read(data)
		if err != nil {
			if e, ok := err.(*Error); !ok || e.Line < 1 || e.Col < 1 {
				t.Fatalf("error without a position: %v", err)
			}
			return
		}
		var out bytes.Buffer
		if err := Write(&out, b.Findings); err != nil {
			t.Fatal(err)
		}
		again, err := Read(out.Bytes())
		if err != nil || len(again.Findings) != len(b.Findings) {
			t.Fatalf("written baseline does not read back: %v", err)
		}
	})
}
