// Package spell finds what a user probably meant: the distance between two
// names, and the known names closest to an unknown one, for the messages
// that answer a typo in a key, a net or a rule id.
package spell

import (
	"slices"
	"sort"
	"strings"
	"unicode/utf8"
)

// MaxDistance is the largest distance computed exactly. A name more edits
// than this from a candidate is no typo of it, and bounding the work keeps a
// 10 MB key from costing gigabytes: the table is a band of 2·MaxDistance+1
// cells per row (Ukkonen's cut-off), so time and memory grow linearly with
// the names, not with their product.
const MaxDistance = 16

// Distance is the optimal-string-alignment distance between a and b, in
// runes: insertions, deletions, substitutions and swaps of neighbours count
// one each (a swapped pair is the commonest typo). Beyond MaxDistance it
// returns a lower bound above MaxDistance: the larger of MaxDistance+1 and
// the difference in length.
func Distance(a, b string) int {
	const k = MaxDistance
	la, lb := utf8.RuneCountInString(a), utf8.RuneCountInString(b)
	far := max(k+1, la-lb, lb-la)
	if la-lb > k || lb-la > k {
		return far
	}
	x, y := []rune(a), []rune(b)
	const w = 2*k + 1 // row i holds columns j = i-k … i+k at index j-i+k
	rows := [3][w]int{}
	at := func(row *[w]int, i, j int) int {
		idx := j - i + k
		if j < 0 || j > lb || idx < 0 || idx >= w {
			return far
		}
		return row[idx]
	}
	prev2, prev, cur := &rows[0], &rows[1], &rows[2]
	for j := range w {
		prev[j] = far
		if j-k >= 0 {
			prev[j] = j - k // row 0: d[0][j] = j
		}
	}
	for i := 1; i <= la; i++ {
		for idx := range w {
			cur[idx] = far
			j := i - k + idx
			if j < 0 || j > lb {
				continue
			}
			if j == 0 {
				cur[idx] = i
				continue
			}
			cost := 1
			if x[i-1] == y[j-1] {
				cost = 0
			}
			d := min(at(prev, i-1, j)+1, at(cur, i, j-1)+1, at(prev, i-1, j-1)+cost)
			if i > 1 && j > 1 && x[i-1] == y[j-2] && x[i-2] == y[j-1] {
				d = min(d, at(prev2, i-2, j-2)+1)
			}
			cur[idx] = min(d, far)
		}
		prev2, prev, cur = prev, cur, prev2
	}
	if d := at(prev, la, lb); d <= k {
		return d
	}
	return far
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
