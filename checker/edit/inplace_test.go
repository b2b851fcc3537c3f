package edit

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"headroom/checker/circuit/tomlfile"
	"headroom/checker/corpus"
	"headroom/checker/engine"
)

// TestInPlaceTextIsSequentialText proves that the one-pass edit (InPlace,
// Edited) writes the text that making the changes one at a time, parsing
// again after each, writes: for every value, rating and turns key of the
// generated corpus, the test circuits and this package's board (also with
// CRLF line ends), one change at a time and all of them at once, with
// written values of other lengths.
func TestInPlaceTextIsSequentialText(t *testing.T) {
	files := [][]byte{[]byte(board), []byte(strings.ReplaceAll(board, "\n", "\r\n"))}
	paths, _ := filepath.Glob("../../testdata/circuits/*.toml")
	if len(paths) == 0 {
		t.Fatal("no test circuits")
	}
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		files = append(files, b)
	}
	for i, f := range corpus.Mixed(225) {
		if i%5 == 0 {
			files = append(files, f)
		}
	}
	inPlace, each := 0, 0
	for _, data := range files {
		x := Parse(data)
		if x == nil {
			t.Fatalf("does not parse:\n%s", data)
		}
		for _, changes := range valueChanges(x.doc) {
			want, werr := applyEach(data, changes)
			reps, ok := x.InPlace(changes)
			if !ok {
				each++
				continue
			}
			inPlace++
			if werr != nil {
				t.Errorf("%v: made in place, but one at a time: %v", changes, werr)
				continue
			}
			if got := x.Edited(reps); string(got) != string(want) {
				t.Errorf("%v: in place\n%s\none at a time\n%s", changes, got, want)
			}
		}
	}
	t.Logf("%d files: %d change sets made in place and compared, %d left to the sequential edit", len(files), inPlace, each)
	if inPlace < 500 || each < 20 {
		t.Errorf("too few cases: %d in place, %d sequential", inPlace, each)
	}
}

// valueChanges lists change sets for every part's value, rating and turns
// (present or not) and every winding's turns, all the present ones at once,
// twice one of them, and all of them with the absent ratings.
func valueChanges(doc *tomlfile.Doc) [][]engine.Change {
	parts := doc.Root.Table("parts", "parts")
	if parts == nil {
		return nil
	}
	var out [][]engine.Change
	var every, rated []engine.Change // every present key; with every absent rating too
	add := func(part, key string, tos ...string) {
		for _, to := range tos {
			out = append(out, []engine.Change{{Part: part, Key: key, To: to}})
		}
		every = append(every, engine.Change{Part: part, Key: key, To: tos[len(tos)-1]})
	}
	for _, p := range parts.Tables(func(k string) string { return k }) {
		if p.Has("value") {
			add(p.Name, "value", "1", "4.7µ", "1500k")
		}
		if p.Has("rating") {
			add(p.Name, "rating", "0.25W")
		} else {
			out = append(out, []engine.Change{{Part: p.Name, Key: "rating", To: "0.25W"}})
			rated = append(rated, engine.Change{Part: p.Name, Key: "rating", To: "63V"})
		}
		if p.Has("turns") {
			add(p.Name, "turns", "7", "12.5")
		}
		if ws := p.Table("windings", "windings"); ws != nil {
			for _, w := range ws.Tables(func(k string) string { return k }) {
				add(p.Name+"."+w.Name, "turns", "3", "150")
			}
		}
	}
	if len(every) == 0 {
		return out
	}
	return append(out, every, append(every, every[0]), append(rated, every...))
}
