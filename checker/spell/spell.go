// Package spell finds what a user probably meant: the distance between two
// names, and the known names closest to an unknown one, for the messages
// that answer a typo in a key, a net or a rule id.
package spell

import (
	"slices"
	"sort"
	"strings"
)

// Distance is the optimal-string-alignment distance between a and b, in
// runes: insertions, deletions, substitutions and swaps of neighbours count
// one each (a swapped pair is the commonest typo).
func Distance(a, b string) int {
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

// Closest returns up to n of the candidates nearest to name: first those
// that begin with what was typed (or that it begins with), then by
// distance; ties keep the candidates' order.
func Closest(name string, candidates []string, n int) []string {
	type cand struct {
		s      string
		prefix bool
		d      int
	}
	cs := make([]cand, 0, len(candidates))
	for _, c := range candidates {
		p := len(name) > 0 && (hasPrefix(c, name) || hasPrefix(name, c))
		cs = append(cs, cand{c, p, Distance(name, c)})
	}
	sort.SliceStable(cs, func(i, j int) bool {
		if cs[i].prefix != cs[j].prefix {
			return cs[i].prefix
		}
		return cs[i].d < cs[j].d
	})
	out := make([]string, 0, n)
	for i := 0; i < len(cs) && i < n; i++ {
		out = append(out, cs[i].s)
	}
	return out
}

func hasPrefix(s, p string) bool { return len(s) >= len(p) && s[:len(p)] == p }

// Suggest is the one candidate close enough to name to be what was meant, or
// "": the nearest that begins with what was typed (or that it begins with),
// or else one within a third of name's length (at least two) edits. Names
// are compared without regard to case, since a part number or a key typed
// in the wrong case is still the same name.
func Suggest(name string, candidates []string) string {
	if name == "" || len(candidates) == 0 {
		return ""
	}
	low := strings.ToLower(name)
	lows := make([]string, len(candidates))
	for i, c := range candidates {
		lows[i] = strings.ToLower(c)
	}
	best := Closest(low, lows, 1)
	if len(best) == 0 || best[0] == low && len(candidates) == 1 && candidates[0] == name {
		return ""
	}
	i := slices.Index(lows, best[0])
	limit := max(2, len(name)/3)
	if hasPrefix(best[0], low) || hasPrefix(low, best[0]) || Distance(low, best[0]) <= limit {
		return candidates[i]
	}
	return ""
}
