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

// The positions index is reused only for a circuit with the same names at
// the same places: a case of a search (a copy with other values) points
// where its nominal circuit does, another file (or an edited one) where it
// says itself. Also a Messenger's message is written once, like
// MessageLater's.
func TestPositionsFollowEachCircuit(t *testing.T) {
	mk := func(line int) *circuit.Circuit {
		return &circuit.Circuit{Pos: circuit.Pos{Line: 1},
			Parts:    []*circuit.Part{{Ref: "R1", Pos: circuit.Pos{File: "a.toml", Line: line}}},
			Supplies: []*circuit.Supply{{Net: "vcc", Pos: circuit.Pos{Line: 12}}}}
	}
	r := &Rule{ID: "t.pos", Run: func(p *Pass) error {
		p.Report(Finding{Part: "R1", Messenger: &testMsg{text: "about R1"}})
		p.Report(Finding{Part: "vcc"})
		return nil
	}}
	cfg := &Config{Rules: []*Rule{r}, Severity: map[string]Severity{"t.pos": Warning}}
	nominal := &analysis.Case{Circuit: mk(5)}
	copyOf := *nominal.Circuit
	for _, tc := range []struct {
		c    *circuit.Circuit
		line int
	}{{nominal.Circuit, 5}, {&copyOf, 5}, {mk(7), 7}, {mk(5), 5}, {mk(8), 8}} {
		fs, err := Evaluate(&analysis.Case{Circuit: tc.c}, nil, cfg)
		if err != nil || len(fs) != 2 {
			t.Fatalf("%d findings, err %v", len(fs), err)
		}
		if fs[0].Pos.Line != tc.line || fs[1].Pos.Line != 12 || fs[0].Message != "about R1" || fs[0].Messenger != nil {
			t.Errorf("R1 at line %d (want %d), vcc at line %d (want 12), message %q", fs[0].Pos.Line, tc.line, fs[1].Pos.Line, fs[0].Message)
		}
	}
}

type testMsg struct{ text string }

func (m *testMsg) Message() string { return m.text }

// A Block hands out values that stay where they are as it grows.
func TestBlockKeepsValues(t *testing.T) {
	b := NewBlock[int](2)
	var ps []*int
	for i := range 20 {
		ps = append(ps, b.Add(i))
	}
	for i, p := range ps {
		if *p != i {
			t.Fatalf("value %d reads %d", i, *p)
		}
	}
}
