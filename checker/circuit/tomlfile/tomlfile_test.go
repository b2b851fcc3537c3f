package tomlfile

import (
	"errors"
	"strings"
	"testing"

	"headroom/checker/quantity"
)

func parse(t *testing.T, src string) *Doc {
	t.Helper()
	d, err := Parse("t.toml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// Positions of keys and values through the constructs a tolerant scanner can
// trip on. Every expected line and column was counted by hand in src.
func TestIndexPositions(t *testing.T) {
	src := `# [not.a.table] = "comment"
s = """
[fake]
x = "=" # ] }
"""
lit = '''a ' b'''
"qu\"o.ted" = { 'in.ner' = 1, b = [ 2, [3, 4] ] }
  [ t . "u" ]   # spaced header
"µk" = 1
v = "µµ"   ;
[[arr]]
n = 1
[[arr]]
n = 2
[[arr.sub]]
m = 3
[a.b]
c.d.e = 'x'
`
	src = strings.Replace(src, "   ;", "", 1)
	d := parse(t, src)
	idx := d.idx
	for _, c := range []struct {
		path     []string
		def, key Pos
		val      Pos
	}{
		{[]string{"s"}, Pos{2, 1}, Pos{2, 1}, Pos{2, 5}},
		{[]string{"lit"}, Pos{6, 1}, Pos{6, 1}, Pos{6, 7}},
		{[]string{`qu"o.ted`}, Pos{7, 1}, Pos{7, 1}, Pos{7, 15}},
		{[]string{`qu"o.ted`, "in.ner"}, Pos{7, 17}, Pos{7, 17}, Pos{7, 28}},
		{[]string{`qu"o.ted`, "b", "0"}, Pos{7, 37}, Pos{7, 37}, Pos{7, 37}},
		{[]string{`qu"o.ted`, "b", "1", "1"}, Pos{7, 44}, Pos{7, 44}, Pos{7, 44}},
		{[]string{"t", "u"}, Pos{8, 1}, Pos{8, 9}, Pos{}},
		{[]string{"t", "u", "µk"}, Pos{9, 1}, Pos{9, 1}, Pos{9, 8}},
		{[]string{"t", "u", "v"}, Pos{10, 1}, Pos{10, 1}, Pos{10, 5}},
		{[]string{"arr", "0", "n"}, Pos{12, 1}, Pos{12, 1}, Pos{12, 5}},
		{[]string{"arr", "1"}, Pos{13, 1}, Pos{13, 3}, Pos{}},
		{[]string{"arr", "1", "n"}, Pos{14, 1}, Pos{14, 1}, Pos{14, 5}},
		{[]string{"arr", "1", "sub", "0", "m"}, Pos{16, 1}, Pos{16, 1}, Pos{16, 5}},
		{[]string{"a", "b", "c"}, Pos{18, 1}, Pos{18, 1}, Pos{}},
		{[]string{"a", "b", "c", "d", "e"}, Pos{18, 1}, Pos{18, 5}, Pos{18, 9}},
	} {
		e := idx.lookup(c.path)
		if e == nil {
			t.Errorf("%q not indexed", c.path)
			continue
		}
		if e.def != c.def || e.key != c.key || e.val != c.val {
			t.Errorf("%q: def %v key %v val %v, want %v %v %v", c.path, e.def, e.key, e.val, c.def, c.key, c.val)
		}
	}
	if idx.lookup([]string{"fake"}) != nil || idx.lookup([]string{"not", "a", "table"}) != nil {
		t.Error("text inside a string or comment was indexed")
	}
}

// A syntax error's column counts code points, not bytes.
func TestParseErrorColumn(t *testing.T) {
	for _, c := range []struct {
		src       string
		line, col int
	}{
		{"a = \"µµµ\" b\n", 1, 11},           // 'b' is byte 14, code point 11
		{"a = 1\n[t\n", 2, 3},                // the newline ends the header too early
		{"a = [1,\n", 1, 8},                  // end of file inside the array, at the newline
		{"\xef\xbb\xbfa = 1\na = 2\n", 2, 1}, // the byte-order mark is not a column
	} {
		_, err := Parse("t.toml", []byte(c.src))
		var e *Error
		if !errors.As(err, &e) {
			t.Errorf("%q: %v", c.src, err)
			continue
		}
		if e.Pos.Line != c.line || e.Pos.Col != c.col {
			t.Errorf("%q: at %d:%d, want %d:%d (%v)", c.src, e.Pos.Line, e.Pos.Col, c.line, c.col, err)
		}
	}
}

func TestQuantityReading(t *testing.T) {
	d := parse(t, `r = "4k7"
n = 4700
f = 1.5e-9
temp = 25
neg = "-5V"
bad = true
pair = ["1MHz", 2e6]
`)
	root := d.Root
	root.What = "x"
	if v, ok := root.Quantity("r", quantity.Ohm, Positive); !ok || v != 4700 {
		t.Errorf("r = %v %v", v, ok)
	}
	if v, ok := root.Quantity("n", quantity.Ohm, Positive); !ok || v != 4700 {
		t.Errorf("n = %v %v", v, ok)
	}
	if v, ok := root.Quantity("f", quantity.Farad, Positive); !ok || v != 1.5e-9 {
		t.Errorf("f = %v %v", v, ok)
	}
	if p, ok := root.Pair("pair", quantity.Hertz, Positive); !ok || p != [2]float64{1e6, 2e6} {
		t.Errorf("pair = %v %v", p, ok)
	}
	if _, ok := root.Quantity("absent", quantity.Ohm, Positive); ok || d.Err() != nil {
		t.Error("an absent key must be no value and no error")
	}
	root.Quantity("bad", quantity.Volt, AnySign)
	root.Quantity("neg", quantity.Volt, Positive)
	root.Quantity("temp", quantity.Celsius, AnySign)
	errs := d.Errors()
	want := []string{"t.toml:4:8: x temp: a bare number", "t.toml:5:7: x neg: must be greater than zero", "t.toml:6:7: x bad: expected a quantity"}
	if len(errs) != len(want) {
		t.Fatalf("errors %v", errs)
	}
	for i, w := range want {
		if !strings.HasPrefix(errs[i].Error(), w) {
			t.Errorf("error %d = %q, want %q...", i, errs[i], w)
		}
	}
	if d.Err() != errs[0] {
		t.Error("Err is not the first error in reading order")
	}
}
