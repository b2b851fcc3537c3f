package spell

import (
	"slices"
	"testing"
)

// Published examples: kitten/sitting = 3 (the classic Levenshtein example);
// "ca"/"abc" = 3 under optimal string alignment (the example by which the
// Wikipedia article on Damerau–Levenshtein distance tells OSA from the
// unrestricted distance, which gives 2); single typos count one.
func TestDistance(t *testing.T) {
	for _, c := range []struct {
		a, b string
		d    int
	}{
		{"kitten", "sitting", 3}, {"ca", "abc", 3}, {"value", "valeu", 1}, {"value", "valu", 1},
		{"kind", "kidn", 1}, {"", "abc", 3}, {"base", "bse", 1}, {"vcc", "vcc", 0}, {"µa", "ua", 1},
	} {
		if got := Distance(c.a, c.b); got != c.d {
			t.Errorf("Distance(%q, %q) = %d, want %d", c.a, c.b, got, c.d)
		}
	}
}

func TestClosest(t *testing.T) {
	ids := []string{"bias.drift", "bias.region", "bias.divider-stiffness", "coupling.reactance", "decoupling.reactance"}
	// What was typed is the start of an id: that id comes first.
	if got := Closest("bias.divider", ids, 2); got[0] != "bias.divider-stiffness" {
		t.Errorf("Closest(bias.divider) = %v", got)
	}
	if got := Closest("coupling.reactanse", ids, 2); !slices.Equal(got, []string{"coupling.reactance", "decoupling.reactance"}) {
		t.Errorf("Closest(coupling.reactanse) = %v", got)
	}
	if got := Closest("x", nil, 3); len(got) != 0 {
		t.Errorf("no candidates: %v", got)
	}
}

// Suggest names one candidate only when it is close: a prefix, or within a
// third of the name's length in edits; case does not matter.
func TestSuggest(t *testing.T) {
	cands := []string{"turns", "nets", "resistance"}
	for name, want := range map[string]string{
		"trns": "turns", "resistence": "resistance", "NETS": "nets", "turn": "turns", "core": "", "xyzzy": "",
	} {
		if got := Suggest(name, cands); got != want {
			t.Errorf("Suggest(%q) = %q, want %q", name, got, want)
		}
	}
	if got := Suggest("2N39O4", []string{"2N2222A", "2N3904", "2N3906"}); got != "2N3904" {
		t.Errorf("a typed part number: %q", got)
	}
}
