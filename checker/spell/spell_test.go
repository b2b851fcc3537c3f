package spell

import (
	"math/rand/v2"
	"slices"
	"strings"
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

// fullOSA is the textbook optimal-string-alignment recurrence over the whole
// table (Wagner–Fischer with the adjacent-swap case), kept as the reference
// the banded Distance is checked against.
func fullOSA(a, b string) int {
	x, y := []rune(a), []rune(b)
	d := make([][]int, len(x)+1)
	for i := range d {
		d[i] = make([]int, len(y)+1)
		d[i][0] = i
	}
	for j := range d[0] {
		d[0][j] = j
	}
	for i := 1; i <= len(x); i++ {
		for j := 1; j <= len(y); j++ {
			cost := 1
			if x[i-1] == y[j-1] {
				cost = 0
			}
			d[i][j] = min(d[i-1][j]+1, d[i][j-1]+1, d[i-1][j-1]+cost)
			if i > 1 && j > 1 && x[i-1] == y[j-2] && x[i-2] == y[j-1] {
				d[i][j] = min(d[i][j], d[i-2][j-2]+1)
			}
		}
	}
	return d[len(x)][len(y)]
}

// The band gives the exact distance whenever it is at most MaxDistance, and
// something above MaxDistance otherwise.
func TestDistanceBand(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	alphabet := []rune("abµ.-")
	word := func(n int) string {
		r := make([]rune, n)
		for i := range r {
			r[i] = alphabet[rng.IntN(len(alphabet))]
		}
		return string(r)
	}
	for range 3000 {
		a, b := word(rng.IntN(40)), word(rng.IntN(40))
		if rng.IntN(2) == 0 { // a near copy: few edits
			r := []rune(a)
			for range rng.IntN(4) {
				if len(r) > 0 {
					r[rng.IntN(len(r))] = 'z'
				}
			}
			b = string(r) + word(rng.IntN(3))
		}
		want, got := fullOSA(a, b), Distance(a, b)
		if want <= MaxDistance && got != want || want > MaxDistance && got <= MaxDistance {
			t.Fatalf("Distance(%q, %q) = %d, full table %d", a, b, got, want)
		}
	}
}

// A 100,000-character name against short candidates costs nothing more than
// counting its runes; against a near copy of itself, a band of rows.
func TestDistanceLong(t *testing.T) {
	long := strings.Repeat("k", 100_000)
	if d := Distance(long, "value"); d != 100_000-5 {
		t.Errorf("Distance(long, value) = %d, want the length difference %d", d, 100_000-5)
	}
	if d := Distance(long, long[1:]+"j"); d != 1 { // the last k becomes j
		t.Errorf("near copy: %d, want 1", d)
	}
	allocs := testing.AllocsPerRun(3, func() { Distance(long, "value") })
	if allocs != 0 {
		t.Errorf("a far candidate allocated %v times", allocs)
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
