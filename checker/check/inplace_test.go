package check

import (
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"golang.org/x/tools/txtar"

	"headroom/checker/circuit"
	"headroom/checker/circuit/tomlfile"
	"headroom/checker/corners"
	"headroom/checker/corpus"
	"headroom/checker/edit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/ruleset"
	"headroom/rules"
)

// TestInPlaceModelIsLoadedModel proves that the circuit the fix check makes
// without loading (edit.Model: the loaded circuit with the changed values set
// and the moved positions moved) is the circuit the loader reads from the
// edited text, field by field, the library included. The change sets are
// every fix form the rules offer on the generated corpus and the test
// circuits, at nominal and (for testdata/circuits) at their worst case, and
// for every value, rating and turns key of the test circuits and every ninth
// generated file, written values of other lengths, some of them values the
// loader refuses (which Model must refuse too). The generated files are much
// alike: every third is used, all of them with -fixmodel.all.
var allFixModels = flag.Bool("fixmodel.all", false, "TestInPlaceModelIsLoadedModel: every generated file, not every third")

func TestInPlaceModelIsLoadedModel(t *testing.T) {
	all := rules.All()
	set, err := (&ruleset.Loader{Rules: all}).Load("default")
	if err != nil {
		t.Fatal(err)
	}
	type file struct {
		name string
		data []byte
	}
	var files []file
	generated := corpus.Mixed(225)
	step := 3
	if *allFixModels {
		step = 1
	}
	for i := 0; i < len(generated); i += step {
		files = append(files, file{fmt.Sprintf("gen%03d.toml", i), generated[i]})
	}
	nGen := len(files)
	files = append(files, file{"inline.toml", []byte(oneLine)}, file{"crlf.toml", []byte(strings.ReplaceAll(oneLine, "\n", "\r\n"))})
	paths, _ := filepath.Glob("../../testdata/circuits/*.toml")
	firstPath := len(files)
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		files = append(files, file{p, b})
	}
	archives, _ := filepath.Glob("../../testdata/rules/*.txtar")
	for _, p := range archives {
		a, err := txtar.ParseFile(p)
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range a.Files {
			if f.Name == "circuit.toml" {
				files = append(files, file{filepath.Join(filepath.Dir(p), filepath.Base(p)+".toml"), f.Data})
			}
		}
	}
	if len(paths) == 0 || len(archives) == 0 {
		t.Fatal("test circuits not found")
	}
	opt := circuit.Options{Libraries: set.Libraries}
	var made, refused, loader, forms int
	for fi, f := range files {
		c, err := circuit.LoadBytes(f.name, f.data, opt)
		if err != nil {
			continue // the broken circuits of the golden tests
		}
		var sets [][]engine.Change
		modes := []string{"nominal"}
		if fi >= firstPath && fi < firstPath+len(paths) && (fi-firstPath)%3 == 0 { // a third of testdata/circuits: their worst cases' fixes too
			modes = append(modes, "worst")
		}
		for _, mode := range modes {
			s := *set
			s.Corners = mode
			r := NewRunner(Options{Rules: all, Set: &s, Worst: corners.Worst, Today: "2026-12-02"})
			j, err := r.judge(c, s.Config(all), true) // as File does before the fix check
			if err != nil {
				t.Fatal(err)
			}
			for i := range j.findings {
				for _, form := range fixForms(&j.findings[i]) {
					sets = append(sets, form.Changes)
				}
			}
		}
		forms += len(sets)
		if fi >= nGen || fi%3 == 0 || *allFixModels { // written values: every ninth generated file
			sets = append(sets, writtenValues(t, f.data)...)
		}
		text := edit.Parse(f.data)
		for _, changes := range sets {
			reps, ok := text.InPlace(changes)
			if !ok {
				continue
			}
			d, ok := edit.Model(c, reps)
			edited, err := edit.Apply(f.data, changes)
			if err != nil {
				t.Fatalf("%s: %v: %v", f.name, changes, err)
			}
			loaded, err := circuit.LoadBytes(f.name, edited, opt)
			switch {
			case !ok && err == nil && setsValues(changes):
				t.Errorf("%s: %v: Model refuses a change set the loader reads", f.name, changes)
			case !ok && err == nil:
				loader++ // a device changes: left to the loader
			case ok && err != nil:
				t.Errorf("%s: %v: Model makes a circuit of a file the loader refuses: %v", f.name, changes, err)
			case ok:
				if diff := firstDiff(reflect.ValueOf(loaded), reflect.ValueOf(d), "circuit"); diff != "" {
					t.Errorf("%s: %v: %s", f.name, changes, diff)
				}
				made++
			default:
				refused++
			}
		}
	}
	t.Logf("%d files, %d fix forms; %d change sets made in place and compared, %d refused by both, %d left to the loader",
		len(files), forms, made, refused, loader)
	if forms < 400 || made < 1000 || refused < 300 {
		t.Errorf("too few cases: %d forms, %d compared, %d refused", forms, made, refused)
	}
}

// oneLine has parts, windings and values written inline, several on a line,
// so that edits move the columns of what follows them.
const oneLine = `[circuit]
name = "one-line layout"
band = ["3.5MHz", "3.8MHz"]
[supplies.vcc]
volts = 9
[ports.in]
net = "in"
direction = "in"
[ports.out]
net = "out"
direction = "out"
[parts]
R1 = { kind = "resistor", value = "47k", nets = ["vcc", "b"], rating = "0.25W" }
R2 = { kind = "resistor", value = 10000, nets = ["b", "gnd"] }
R3 = { kind = "resistor", value = '1k', nets = ["e", "gnd"] }
C1 = { kind = "capacitor", value = "100n", nets = ["in", "b"] }
C2 = { kind = "capacitor", value = "10µ", nets = ["e", "gnd"], role = "bypass", rating = "16V" }
Q1 = { kind = "npn", device = "2N3904", nets = { collector = "c", base = "b", emitter = "e" } }
T1 = { kind = "transformer", al = "50nH", windings = { p = { turns = 20, nets = ["vcc", "c"] }, s = { turns = 5, nets = ["out", "gnd"] } } }
L1 = { kind = "inductor", turns = 12, al = "20nH", nets = ["c", "vcc"] }
`

// writtenValues makes change sets for every value, rating and turns key the
// file writes: values of other lengths, one refused by the loader (zero),
// and all the keys at once.
func writtenValues(t *testing.T, data []byte) [][]engine.Change {
	doc, err := tomlfile.Parse("x", data)
	if err != nil {
		t.Fatal(err)
	}
	parts := doc.Root.Table("parts", "parts")
	if parts == nil {
		return nil
	}
	var out [][]engine.Change
	var every []engine.Change
	add := func(part, key string, tos ...string) {
		for _, to := range tos {
			out = append(out, []engine.Change{{Part: part, Key: key, To: to}})
		}
		every = append(every, engine.Change{Part: part, Key: key, To: tos[0]})
	}
	for _, p := range parts.Tables(func(k string) string { return k }) {
		kind, _ := p.String("kind", false)
		unit, valued := map[string]quantity.Unit{"resistor": quantity.Ohm, "potentiometer": quantity.Ohm,
			"capacitor": quantity.Farad, "inductor": quantity.Henry}[kind]
		if p.Has("value") && valued {
			add(p.Name, "value", quantity.Code(1.5e-3*unitScale(unit), unit), "0")
		}
		if p.Has("rating") {
			add(p.Name, "rating", "0.5W", "63V")
		}
		if p.Has("turns") {
			add(p.Name, "turns", "12.5", "0")
		}
		if ws := p.Table("windings", "windings"); ws != nil {
			for _, w := range ws.Tables(func(k string) string { return k }) {
				if w.Has("turns") {
					add(p.Name+"."+w.Name, "turns", "150", "-1")
				}
			}
		}
	}
	if len(every) > 0 {
		out = append(out, every)
	}
	return out
}

// setsValues reports whether every change sets a value, rating or turns,
// which edit.Model handles.
func setsValues(changes []engine.Change) bool {
	for _, ch := range changes {
		if ch.Key != "value" && ch.Key != "rating" && ch.Key != "turns" {
			return false
		}
	}
	return true
}

// unitScale is a typical size of a part of the unit.
func unitScale(u quantity.Unit) float64 {
	switch u {
	case quantity.Farad:
		return 1e-9
	case quantity.Henry:
		return 1e-6
	}
	return 1e3
}

// firstDiff walks two values of the same type and names the first field
// where they differ ("" when equal); floats compare by their bits.
func firstDiff(a, b reflect.Value, path string) string {
	if a.Kind() != b.Kind() {
		return path + ": kinds differ"
	}
	switch a.Kind() {
	case reflect.Pointer, reflect.Interface:
		if a.IsNil() || b.IsNil() {
			if a.IsNil() != b.IsNil() {
				return path + ": one is nil"
			}
			return ""
		}
		return firstDiff(a.Elem(), b.Elem(), path)
	case reflect.Struct:
		for i := range a.NumField() {
			if d := firstDiff(a.Field(i), b.Field(i), path+"."+a.Type().Field(i).Name); d != "" {
				return d
			}
		}
	case reflect.Slice, reflect.Array:
		if a.Len() != b.Len() {
			return fmt.Sprintf("%s: lengths %d and %d", path, a.Len(), b.Len())
		}
		for i := range a.Len() {
			if d := firstDiff(a.Index(i), b.Index(i), fmt.Sprintf("%s[%d]", path, i)); d != "" {
				return d
			}
		}
	case reflect.Map:
		if a.Len() != b.Len() {
			return fmt.Sprintf("%s: sizes %d and %d", path, a.Len(), b.Len())
		}
		for _, k := range a.MapKeys() {
			bv := b.MapIndex(k)
			if !bv.IsValid() {
				return fmt.Sprintf("%s[%v]: missing", path, k)
			}
			if d := firstDiff(a.MapIndex(k), bv, fmt.Sprintf("%s[%v]", path, k)); d != "" {
				return d
			}
		}
	case reflect.Float32, reflect.Float64:
		if math.Float64bits(a.Float()) != math.Float64bits(b.Float()) {
			return fmt.Sprintf("%s: %v and %v", path, a.Float(), b.Float())
		}
	case reflect.Func:
		if !a.IsNil() || !b.IsNil() {
			return path + ": a function"
		}
	default:
		if !a.CanInterface() {
			return firstDiffUnexported(a, b, path)
		}
		if a.Interface() != b.Interface() {
			return fmt.Sprintf("%s: %v and %v", path, a.Interface(), b.Interface())
		}
	}
	return ""
}

// firstDiffUnexported compares unexported scalar fields by their text.
func firstDiffUnexported(a, b reflect.Value, path string) string {
	if sa, sb := fmt.Sprint(a), fmt.Sprint(b); sa != sb && !strings.Contains(sa, "0x") {
		return fmt.Sprintf("%s: %s and %s", path, sa, sb)
	}
	return ""
}
