package edit

import (
	"strings"
	"unicode/utf8"

	"headroom/checker/circuit"
	"headroom/checker/circuit/tomlfile"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// Most changes set the value of a key the file already has. Such a change set
// is made in place: every value token is replaced where it stands, so the
// file keeps its lines, its tables and its other values, and only columns
// after a replaced token on its line move. That lets a text parsed once take
// any number of change sets (Text), and lets the whole-circuit check of a fix
// set the new values into a copy of the loaded circuit (Model) instead of
// loading the edited text again. Anything else (a key to add, a device to
// change, a value the loader would refuse) is left to Apply and the loader.

// Text is a circuit file's text, parsed once for many change sets.
type Text struct {
	text string
	doc  *tomlfile.Doc
}

// Parse parses data for InPlace; nil when it is not TOML or starts with a
// byte-order mark (whose columns Apply's sequential path counts differently).
func Parse(data []byte) *Text {
	if strings.HasPrefix(string(data), "\xef\xbb\xbf") {
		return nil
	}
	doc, err := tomlfile.Parse("edit", data)
	if err != nil {
		return nil
	}
	return &Text{text: string(data), doc: doc}
}

// Replacement is one change made in place: the value token text[start:end],
// which starts at Line and Col (code points), becomes Literal.
type Replacement struct {
	Change     engine.Change
	Line, Col  int
	start, end int
	Literal    string
	delta      int // code points Literal adds to the line (negative: removes)
}

// InPlace returns the replacements that make changes, or false when some
// change cannot be made in place: its key is absent, its part or winding is
// missing, two changes set the same value, or the value written there is not
// a single-line token that reads back as the value the file has.
func (x *Text) InPlace(changes []engine.Change) ([]Replacement, bool) {
	if x == nil {
		return nil, false
	}
	reps := make([]Replacement, 0, len(changes))
	for _, ch := range changes {
		t, err := target(x.doc, ch.Part)
		if err != nil || !t.Has(ch.Key) {
			return nil, false
		}
		p := t.ValPos(ch.Key)
		start := offset(x.text, p)
		end := start + tokenLen(x.text[start:])
		old, lit := x.text[start:end], literal(ch.To)
		if strings.HasPrefix(old, `"""`) || strings.HasPrefix(old, "'''") || strings.ContainsAny(lit, "\r\n") ||
			!sameRaw(old, t.Raw(ch.Key)) {
			return nil, false
		}
		for _, r := range reps {
			if r.start == start {
				return nil, false
			}
		}
		reps = append(reps, Replacement{Change: ch, Line: p.Line, Col: p.Col, start: start, end: end, Literal: lit,
			delta: utf8.RuneCountInString(lit) - utf8.RuneCountInString(old)})
	}
	return reps, true
}

// sameRaw reports whether token, read as a TOML value, is raw: that the token
// is the whole value and the replacement will take its place exactly.
func sameRaw(token string, raw any) bool {
	got, ok := readValue(token)
	return ok && got == raw
}

// readValue decodes one TOML value with the file parser.
func readValue(token string) (any, bool) {
	doc, err := tomlfile.Parse("edit", []byte("v = "+token+"\n"))
	if err != nil {
		return nil, false
	}
	switch v := doc.Root.Raw("v").(type) {
	case string, int64, float64, bool:
		return v, true
	}
	return nil, false
}

// Edited returns the text with the replacements made: the text Apply gives
// for the same changes.
func (x *Text) Edited(reps []Replacement) []byte {
	var b strings.Builder
	b.Grow(len(x.text) + 16*len(reps))
	at := 0
	for _, r := range sorted(reps) {
		b.WriteString(x.text[at:r.start])
		b.WriteString(r.Literal)
		at = r.end
	}
	b.WriteString(x.text[at:])
	return []byte(b.String())
}

// sorted is reps in text order (they never overlap: each starts a token).
func sorted(reps []Replacement) []Replacement {
	out := append([]Replacement(nil), reps...)
	for i := 1; i < len(out); i++ {
		for j := i; j > 0 && out[j].start < out[j-1].start; j-- {
			out[j], out[j-1] = out[j-1], out[j]
		}
	}
	return out
}

// field is how the loader reads a key a change may set in place
// (checker/circuit/load.go): its unit and sign, and the model field it
// fills. A test (checker/check TestInPlaceModelIsLoadedModel) compares the
// circuit Model makes with the one the loader reads from the edited text,
// field by field, over the generated corpus and the test circuits.
type field struct {
	unit quantity.Unit
	sign tomlfile.Sign
	set  func(p *circuit.Part, w *circuit.Winding, v float64)
}

func setValue(p *circuit.Part, _ *circuit.Winding, v float64)  { p.Value = v }
func setRating(p *circuit.Part, _ *circuit.Winding, v float64) { p.Rating = v }

var fields = map[circuit.Kind]map[string]field{
	circuit.Resistor: {
		"value":  {quantity.Ohm, tomlfile.Positive, setValue},
		"rating": {quantity.Watt, tomlfile.Positive, setRating},
	},
	circuit.Potentiometer: {
		"value":  {quantity.Ohm, tomlfile.Positive, setValue},
		"rating": {quantity.Watt, tomlfile.Positive, setRating},
	},
	circuit.Capacitor: {
		"value":  {quantity.Farad, tomlfile.Positive, setValue},
		"rating": {quantity.Volt, tomlfile.Positive, setRating},
	},
	circuit.Inductor: {
		"value": {quantity.Henry, tomlfile.Positive, setValue},
		"turns": {quantity.Ratio, tomlfile.Positive, func(p *circuit.Part, _ *circuit.Winding, v float64) { p.Turns = v }},
	},
}

// windingTurns is a transformer winding's turns.
var windingTurns = field{quantity.Ratio, tomlfile.Positive, func(_ *circuit.Part, w *circuit.Winding, v float64) { w.Turns = v }}

// Model returns a copy of c, the circuit loaded from the parsed text, with the
// replacements' values set and the positions after them on their lines
// moved: the circuit the loader reads from Edited(reps). It reports false
// when a replacement sets a key it does not handle or a value the loader
// would refuse; the caller then loads the edited text.
func Model(c *circuit.Circuit, reps []Replacement) (*circuit.Circuit, bool) {
	d := c.Clone()
	for _, r := range reps {
		ref, wname, isWinding := strings.Cut(r.Change.Part, ".")
		p := d.Part(ref)
		if p == nil {
			return nil, false
		}
		var w *circuit.Winding
		var f field
		var ok bool
		switch {
		case isWinding:
			if p.Kind != circuit.Transformer || r.Change.Key != "turns" {
				return nil, false
			}
			for _, x := range p.Windings {
				if x.Name == wname {
					w = x
				}
			}
			f, ok = windingTurns, w != nil
		case p.Kind == circuit.Inductor && (r.Change.Key == "value") != (p.Turns == 0):
			return nil, false // the loader reads value or turns, whichever the part is given by
		default:
			f, ok = fields[p.Kind][r.Change.Key]
		}
		if !ok {
			return nil, false
		}
		v, ok := readQuantity(r.Literal, f)
		if !ok {
			return nil, false
		}
		f.set(p, w, v)
	}
	if !shift(d, reps) {
		return nil, false
	}
	return d, true
}

// readQuantity reads a literal as the loader reads the key: the same TOML
// decoding and the same quantity conversion and checks.
func readQuantity(lit string, f field) (float64, bool) {
	doc, err := tomlfile.Parse("edit", []byte("v = "+lit+"\n"))
	if err != nil {
		return 0, false
	}
	v, ok := doc.Root.Quantity("v", f.unit, f.sign)
	return v, ok && doc.Err() == nil
}

// shift moves every position of d that lies after a replacement on its
// line by the code points the replacement adds. Only the copies Clone makes
// may move; a shared position (a waiver's, a rejection's) that would move
// reports false.
func shift(d *circuit.Circuit, reps []Replacement) bool {
	moved := func(p circuit.Pos) int {
		n := 0
		for _, r := range reps {
			if p.Line == r.Line && p.Col > r.Col {
				n += r.delta
			}
		}
		return n
	}
	move := func(p *circuit.Pos) { p.Col += moved(*p) }
	move(&d.Pos)
	for _, s := range d.Supplies {
		move(&s.Pos)
	}
	for _, p := range d.Ports {
		move(&p.Pos)
	}
	for _, p := range d.Parts {
		move(&p.Pos)
		for _, w := range p.Windings {
			move(&w.Pos)
		}
	}
	for _, w := range d.Waivers {
		if moved(w.Pos) != 0 || moved(w.RulePos) != 0 {
			return false
		}
	}
	for _, r := range d.Rejects {
		if moved(r.Pos) != 0 {
			return false
		}
	}
	return true
}
