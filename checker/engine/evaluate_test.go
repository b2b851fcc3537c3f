package engine

import (
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
)

// Evaluate writes every message a rule left for later; Measure leaves them
// for the worst-case search to write once. Both point findings at the part,
// port or supply they name.
func TestEvaluateWritesLaterMessages(t *testing.T) {
	c := &circuit.Circuit{Pos: circuit.Pos{Line: 1},
		Parts:    []*circuit.Part{{Ref: "R1", Pos: circuit.Pos{Line: 5}}},
		Ports:    []*circuit.Port{{Name: "in", Pos: circuit.Pos{Line: 9}}},
		Supplies: []*circuit.Supply{{Net: "vcc", Pos: circuit.Pos{Line: 12}}}}
	calls := 0
	r := &Rule{ID: "t.lazy", Run: func(p *Pass) error {
		for _, name := range []string{"R1", "in", "vcc", ""} {
			p.Report(Finding{Part: name, MessageLater: func() string { calls++; return "about " + name }})
		}
		return nil
	}}
	cfg := &Config{Rules: []*Rule{r}, Severity: map[string]Severity{"t.lazy": Warning}}
	cs := &analysis.Case{Circuit: c}
	fs, err := Measure(cs, nil, cfg)
	if err != nil || len(fs) != 4 || calls != 0 || fs[0].Message != "" {
		t.Fatalf("Measure: %d findings, %d messages written, err %v", len(fs), calls, err)
	}
	fs, err = Evaluate(cs, nil, cfg)
	if err != nil || len(fs) != 4 || calls != 4 {
		t.Fatalf("Evaluate: %d findings, %d messages written, err %v", len(fs), calls, err)
	}
	for i, want := range []struct {
		msg  string
		line int
	}{{"about R1", 5}, {"about in", 9}, {"about vcc", 12}, {"about ", 1}} {
		if fs[i].Message != want.msg || fs[i].MessageLater != nil || fs[i].Pos.Line != want.line {
			t.Errorf("finding %d: message %q at line %d, want %q at line %d", i, fs[i].Message, fs[i].Pos.Line, want.msg, want.line)
		}
	}
}
