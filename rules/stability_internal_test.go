package rules

import (
	"strings"
	"testing"

	"headroom/checker/circuit"
)

// TestNoRBNote: a transistor without rb gets the pessimism note naming it and
// saying how to give rb; with rb the note is gone (issue 13's requirement,
// REFERENCES-2 §1.6 item 1: rb' = 0 gives K < 1 at every frequency).
func TestNoRBNote(t *testing.T) {
	c := &circuit.Circuit{Parts: []*circuit.Part{
		{Ref: "Q1", Kind: circuit.NPN, BJT: &circuit.BJTParams{}},
		{Ref: "Q2", Kind: circuit.PNP, BJT: &circuit.BJTParams{RB: 10}},
	}}
	n := noRBNote(c)
	if !strings.Contains(n, "Q1 has no rb") || strings.Contains(n, "Q2") || !strings.Contains(n, "pessimistic") || !strings.Contains(n, `rb = "10"`) {
		t.Errorf("note %q", n)
	}
	c.Parts[0].BJT.RB = 5
	if n := noRBNote(c); n != "" {
		t.Errorf("with rb everywhere: %q", n)
	}
}

// TestE12Candidates: the fix candidates are the E12 values (IEC 60063) in
// the documented ranges and order.
func TestE12Candidates(t *testing.T) {
	if len(stopperValues) != 37 || stopperValues[0] != 1 || stopperValues[36] != 1000 || stopperValues[5] != 2.7 {
		t.Errorf("stoppers %v", stopperValues)
	}
	if len(swampValues) != 37 || swampValues[0] != 10e3 || swampValues[36] != 10 || swampValues[1] != 8200 {
		t.Errorf("swamps %v", swampValues)
	}
}

// TestWithArticle: English articles before numbers read aloud (common
// practice, no published source).
func TestWithArticle(t *testing.T) {
	for v, want := range map[string]string{"82 ohm": "an", "8.2 kohm": "an", "18 ohm": "an", "180 ohm": "a",
		"1 kohm": "a", "11 ohm": "an", "1.8 kohm": "a", "560 ohm": "a"} {
		if got := withArticle(v); got != want+" "+v {
			t.Errorf("%q: %q", v, got)
		}
	}
}
