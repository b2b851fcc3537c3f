// Package tomlfile reads a TOML file into tables whose every key and value
// knows its line and column, and turns what is wrong with them into input
// errors that point at the offending key or value (FORMAT.md §7).
//
// It exists because BurntSushi/toml reports positions only for syntax errors
// (and counts their columns in bytes): circuit and library files need a
// position for every value that is well-formed TOML but a bad quantity.
// Columns here count Unicode code points, 1-based.
package tomlfile

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/BurntSushi/toml"

	"headroom/checker/quantity"
	"headroom/checker/spell"
)

// Pos is a 1-based line and column; the column counts code points.
type Pos struct {
	Line, Col int
}

// Less orders positions in reading order.
func (p Pos) Less(q Pos) bool {
	if p.Line != q.Line {
		return p.Line < q.Line
	}
	return p.Col < q.Col
}

// Error is an input error at a place in a file.
type Error struct {
	File string
	Pos  Pos
	Msg  string
}

func (e *Error) Error() string {
	return fmt.Sprintf("%s:%d:%d: %s", e.File, e.Pos.Line, e.Pos.Col, e.Msg)
}

// Doc is one parsed file. Readers record every problem they find; Err returns
// the first in reading order.
type Doc struct {
	File string
	Root *Table
	idx  *index
	errs []*Error
}

var start = Pos{Line: 1, Col: 1}

// Parse decodes data (a UTF-8 byte-order mark is skipped). A file that is not
// valid TOML gives an *Error at the place the parser stopped.
func Parse(file string, data []byte) (*Doc, error) {
	s := strings.TrimPrefix(string(data), "\xef\xbb\xbf")
	idx := buildIndex(s)
	if idx.tooDeep.Line > 0 {
		return nil, &Error{File: file, Pos: idx.tooDeep, Msg: fmt.Sprintf("keys, tables and arrays nested more than %d deep; a circuit or library file never needs this", maxDepth)}
	}
	var m map[string]any
	if _, err := toml.Decode(s, &m); err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, &Error{File: file, Pos: parseErrorPos(s, pe.Position), Msg: "not valid TOML: " + redact(pe.Message)}
		}
		return nil, &Error{File: file, Pos: start, Msg: "not valid TOML: " + redact(err.Error())}
	}
	if m == nil {
		m = map[string]any{}
	}
	d := &Doc{File: file, idx: idx}
	d.Root = &Table{doc: d, m: m, Pos: start, What: "file"}
	return d, nil
}

// quoted matches what the TOML parser quotes of the text in its messages.
var quoted = regexp.MustCompile(`'[^'\n]*'|"(?:[^"\\\n]|\\.)*"`)

// redact drops what a parser message quotes of the text: a file that is not
// TOML may be anything (a credentials file named as a library), and its
// content must not reach a CI log. The position says where to look.
func redact(msg string) string {
	msg = quoted.ReplaceAllString(msg, "…")
	if r := []rune(msg); len(r) > 160 {
		msg = string(r[:160]) + "…"
	}
	return msg
}

// parseErrorPos turns the parser's position into a line and code-point
// column inside s. The byte offset is exact (the reported line has already
// moved on when the parser stops at a newline); the reported line and byte
// column are the fallback.
func parseErrorPos(s string, p toml.Position) Pos {
	if p.Start >= 0 && p.Start <= len(s) {
		// The parser's item may start with the blank before the offending
		// character ("... but got 'x'"): point at the character itself.
		for n := 1; n < p.Len && p.Start < len(s) && (s[p.Start] == ' ' || s[p.Start] == '\t'); n++ {
			p.Start++
		}
		ls := strings.LastIndexByte(s[:p.Start], '\n') + 1
		return Pos{Line: strings.Count(s[:p.Start], "\n") + 1, Col: runeCol(s[ls:], p.Start-ls)}
	}
	lines := strings.Split(s, "\n")
	line := min(max(p.Line, 1), len(lines))
	return Pos{Line: line, Col: runeCol(lines[line-1], p.Col-1)}
}

// Errorf records an input error at p.
func (d *Doc) Errorf(p Pos, format string, args ...any) {
	if p.Line < 1 || p.Col < 1 {
		p = start
	}
	d.errs = append(d.errs, &Error{File: d.File, Pos: p, Msg: fmt.Sprintf(format, args...)})
}

// Err returns the first recorded error in reading order, or nil.
func (d *Doc) Err() error {
	if len(d.errs) == 0 {
		return nil
	}
	first := d.errs[0]
	for _, e := range d.errs[1:] {
		if e.Pos.Less(first.Pos) {
			first = e
		}
	}
	return first
}

// Errors returns every recorded error in reading order.
func (d *Doc) Errors() []*Error {
	out := append([]*Error(nil), d.errs...)
	sort.SliceStable(out, func(i, j int) bool { return out[i].Pos.Less(out[j].Pos) })
	return out
}

// Table is one TOML table (a [header] table, an inline table or one element
// of an array of tables).
type Table struct {
	doc  *Doc
	path []string
	m    map[string]any
	Name string // the table's own key ("" for the root)
	Pos  Pos    // its header (column 1), or where its key starts
	What string // how messages name it: "R1", "supply vcc", "[circuit]"
}

// Doc returns the file the table belongs to.
func (t *Table) Doc() *Doc { return t.doc }

// Errorf records an input error at p.
func (t *Table) Errorf(p Pos, format string, args ...any) { t.doc.Errorf(p, format, args...) }

func (t *Table) sub(key string) []string {
	return append(append([]string(nil), t.path...), key)
}

func (t *Table) entry(key string) *entry { return t.doc.idx.lookup(t.sub(key)) }

// Has reports whether key is present.
func (t *Table) Has(key string) bool { _, ok := t.m[key]; return ok }

// Raw returns the decoded value of key.
func (t *Table) Raw(key string) any { return t.m[key] }

// Keys lists the table's keys in reading order.
func (t *Table) Keys() []string {
	type kp struct {
		k string
		p Pos
	}
	all := make([]kp, 0, len(t.m))
	for k := range t.m {
		all = append(all, kp{k, t.KeyPos(k)})
	}
	sort.Slice(all, func(i, j int) bool {
		if all[i].p != all[j].p {
			return all[i].p.Less(all[j].p)
		}
		return all[i].k < all[j].k
	})
	keys := make([]string, len(all))
	for i, x := range all {
		keys[i] = x.k
	}
	return keys
}

// KeyPos is where key is written (its last piece), or the table's own place.
func (t *Table) KeyPos(key string) Pos {
	if e := t.entry(key); e != nil && e.key.Line > 0 {
		return e.key
	}
	return t.Pos
}

// DefPos is where key's value is defined: a header at column 1, or the start
// of the key expression (so parts.R1 = {...} gives the column of "parts").
func (t *Table) DefPos(key string) Pos {
	if e := t.entry(key); e != nil && e.def.Line > 0 {
		return e.def
	}
	return t.KeyPos(key)
}

// ValPos is where key's value starts (the key for a table given by a header).
func (t *Table) ValPos(key string) Pos {
	if e := t.entry(key); e != nil && e.val.Line > 0 {
		return e.val
	}
	return t.KeyPos(key)
}

// ElemPos is where element i of the array under key starts.
func (t *Table) ElemPos(key string, i int) Pos {
	if e := t.doc.idx.lookup(append(t.sub(key), strconv.Itoa(i))); e != nil && e.val.Line > 0 {
		return e.val
	}
	return t.ValPos(key)
}

// Allow records an error for every key not in accepted, listing them.
func (t *Table) Allow(accepted ...string) {
	ok := map[string]bool{}
	for _, a := range accepted {
		ok[a] = true
	}
	for _, k := range t.Keys() {
		if !ok[k] {
			hint := ""
			if s := spell.Suggest(k, accepted); s != "" {
				hint = fmt.Sprintf(" (did you mean %s?)", s)
			}
			t.Errorf(t.KeyPos(k), "%s: unknown key %q%s; accepted keys: %s", t.What, k, hint, strings.Join(accepted, ", "))
		}
	}
}

// Table returns the table under key, or nil (recording an error) when the
// value is not a table. what names it in messages.
func (t *Table) Table(key, what string) *Table {
	raw, ok := t.m[key]
	if !ok {
		return nil
	}
	m, ok := raw.(map[string]any)
	if !ok {
		t.Errorf(t.ValPos(key), "%s: expected a table, got %s", what, TypeName(raw))
		return nil
	}
	return &Table{doc: t.doc, path: t.sub(key), m: m, Name: key, Pos: t.DefPos(key), What: what}
}

// Tables returns every value of the table as a table, in reading order; what
// names each one from its key. A value that is not a table is an error.
func (t *Table) Tables(what func(key string) string) []*Table {
	var out []*Table
	for _, k := range t.Keys() {
		if sub := t.Table(k, what(k)); sub != nil {
			out = append(out, sub)
		}
	}
	return out
}

// TableArray returns the elements of an array of tables ([[key]] or
// key = [{...}, {...}]).
func (t *Table) TableArray(key string, what func(i int) string) []*Table {
	raw, ok := t.m[key]
	if !ok {
		return nil
	}
	var elems []any
	switch x := raw.(type) {
	case []map[string]any:
		for _, m := range x {
			elems = append(elems, m)
		}
	case []any:
		elems = x
	default:
		t.Errorf(t.ValPos(key), "%s: expected an array of tables ([[%s]]), got %s", t.What, key, TypeName(raw))
		return nil
	}
	var out []*Table
	for i, e := range elems {
		m, ok := e.(map[string]any)
		path := append(t.sub(key), strconv.Itoa(i))
		p := t.ElemPos(key, i)
		if en := t.doc.idx.lookup(path); en != nil && en.def.Line > 0 {
			p = en.def
		}
		if !ok {
			t.Errorf(p, "%s: expected a table, got %s", what(i), TypeName(e))
			continue
		}
		out = append(out, &Table{doc: t.doc, path: path, m: m, Name: strconv.Itoa(i), Pos: p, What: what(i)})
	}
	return out
}

// String returns a string value. Absent: "", false (an error when required).
func (t *Table) String(key string, required bool) (string, bool) {
	raw, ok := t.m[key]
	if !ok {
		if required {
			t.Missing(key, "")
		}
		return "", false
	}
	s, ok := raw.(string)
	if !ok {
		t.Errorf(t.ValPos(key), "%s %s: expected a string, got %s", t.What, key, TypeName(raw))
		return "", false
	}
	return s, true
}

// Missing records that a required key is absent, at the table's place. The
// message suggests a key of the table that looks like a misspelling of it.
func (t *Table) Missing(key, detail string) {
	msg := fmt.Sprintf("%s: missing required key %q", t.What, key)
	if detail != "" {
		msg += " " + detail
	}
	for _, k := range t.Keys() {
		if k != key && spell.Distance(k, key) <= 2 {
			msg += fmt.Sprintf(" (is %q a misspelling of it?)", k)
			break
		}
	}
	t.Errorf(t.Pos, "%s", msg)
}

// Bool returns a boolean value; absent or wrong type gives false, false.
func (t *Table) Bool(key string) (bool, bool) {
	raw, ok := t.m[key]
	if !ok {
		return false, false
	}
	b, ok := raw.(bool)
	if !ok {
		t.Errorf(t.ValPos(key), "%s %s: expected true or false, got %s", t.What, key, TypeName(raw))
		return false, false
	}
	return b, true
}

// Date returns a TOML local date as "YYYY-MM-DD".
func (t *Table) Date(key string) (string, bool) {
	raw, ok := t.m[key]
	if !ok {
		return "", false
	}
	d, ok := raw.(time.Time)
	if !ok || d.Location().String() != "date-local" {
		t.Errorf(t.ValPos(key), "%s %s: expected a TOML local date such as 2027-06-30 (no quotes), got %s", t.What, key, TypeName(raw))
		return "", false
	}
	return d.Format("2006-01-02"), true
}

// Sign says which values a quantity field accepts.
type Sign int

// The sign rules of FORMAT.md §1.
const (
	Positive    Sign = iota // > 0: physical part values, ratings, band
	NonNegative             // ≥ 0: supply impedance, DC resistance, cob, tolerances
	NonZero                 // ≠ 0: supply volts and range
	AnySign                 // temperatures (checked against absolute zero)
)

// Quantity reads key as a quantity of unit u. Absent: 0, false, no error.
func (t *Table) Quantity(key string, u quantity.Unit, s Sign) (float64, bool) {
	raw, ok := t.m[key]
	if !ok {
		return 0, false
	}
	return t.doc.quantity(t.What+" "+key, raw, t.ValPos(key), u, s)
}

// Pair reads key as an array of exactly two quantities.
func (t *Table) Pair(key string, u quantity.Unit, s Sign) ([2]float64, bool) {
	var out [2]float64
	raw, ok := t.m[key]
	if !ok {
		return out, false
	}
	arr, ok := raw.([]any)
	if !ok || len(arr) != 2 {
		got := TypeName(raw)
		if ok {
			got = fmt.Sprint(len(arr))
		}
		t.Errorf(t.ValPos(key), "%s %s: expected two values [low, high], got %s", t.What, key, got)
		return out, false
	}
	good := true
	for i, e := range arr {
		v, ok := t.doc.quantity(fmt.Sprintf("%s %s[%d]", t.What, key, i), e, t.ElemPos(key, i), u, s)
		out[i] = v
		good = good && ok
	}
	return out, good
}

// Strings reads key as an array of strings.
func (t *Table) Strings(key string) ([]string, bool) {
	raw, ok := t.m[key]
	if !ok {
		return nil, false
	}
	arr, ok := raw.([]any)
	if !ok {
		t.Errorf(t.ValPos(key), "%s %s: expected an array of strings, got %s", t.What, key, TypeName(raw))
		return nil, false
	}
	out := make([]string, len(arr))
	for i, e := range arr {
		s, ok := e.(string)
		if !ok {
			t.Errorf(t.ElemPos(key, i), "%s %s[%d]: expected a string, got %s", t.What, key, i, TypeName(e))
			return nil, false
		}
		out[i] = s
	}
	return out, true
}

// quantity converts a decoded value: a string in the notation of FORMAT.md §1,
// or a bare number in SI base units (not for temperatures and lengths).
func (d *Doc) quantity(label string, raw any, p Pos, u quantity.Unit, s Sign) (float64, bool) {
	var v float64
	switch x := raw.(type) {
	case string:
		var err error
		v, err = quantity.Parse(x, u)
		if err != nil {
			d.Errorf(p, "%s: %v", label, err)
			return 0, false
		}
	case int64, float64:
		if u == quantity.Celsius || u == quantity.Metre {
			d.Errorf(p, "%s: a bare number is not accepted here; write %s", label, map[quantity.Unit]string{
				quantity.Celsius: `the unit, as in "25C" or "298.15K"`, quantity.Metre: `the unit, as in "9.5mm"`}[u])
			return 0, false
		}
		if i, ok := x.(int64); ok {
			v = float64(i)
		} else {
			v = x.(float64)
		}
	default:
		d.Errorf(p, "%s: expected a quantity such as %s, got %s", label, example(u), TypeName(raw))
		return 0, false
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		d.Errorf(p, "%s: expected a finite number", label)
		return 0, false
	}
	switch {
	case s == Positive && v <= 0:
		d.Errorf(p, "%s: must be greater than zero, got %s", label, quantity.Format(v, u))
		return 0, false
	case s == NonNegative && v < 0:
		d.Errorf(p, "%s: must not be negative, got %s", label, quantity.Format(v, u))
		return 0, false
	case s == NonZero && v == 0:
		d.Errorf(p, "%s: must not be zero", label)
		return 0, false
	case u == quantity.Celsius && v <= -273.15:
		d.Errorf(p, "%s: %s is not above absolute zero", label, quantity.Format(v, u))
		return 0, false
	}
	if b, ok := Bounds[u]; ok && v != 0 && (math.Abs(v) < b[0] || math.Abs(v) > b[1]) {
		what := "magnitude"
		if u == quantity.Celsius {
			what = "value"
		}
		d.Errorf(p, "%s: %s is outside what a small-signal circuit uses (%s %s to %s)", label,
			quantity.Format(v, u), what, quantity.Format(b[0], u), quantity.Format(b[1], u))
		return 0, false
	}
	return v, true
}

// Bounds are the magnitudes a value of each unit may take (zero aside, where
// the field allows zero). They are far wider than any part a small-signal
// board holds, and narrow enough that every figure computed from them
// (reactances, products of gains, squares of turns, V²/R) stays finite with
// room to spare: a value of 1e300 or 5e-324 is accepted by TOML but turns
// into Inf or a singular network once computed with. README "Reading values"
// lists them. A temperature is bounded by its value (absolute zero is
// checked above).
var Bounds = map[quantity.Unit][2]float64{
	quantity.Ohm:      {1e-6, 1e15},    // 1 µΩ (a shunt is 100 µΩ) to 1 PΩ (an electrometer resistor is 1 TΩ)
	quantity.Farad:    {1e-18, 100},    // 1 aF to 100 F (a supply-rail supercapacitor)
	quantity.Henry:    {1e-15, 1e3},    // 1 fH (AL of an air core per turn² is nH) to 1 kH
	quantity.Volt:     {1e-9, 1e6},     // 1 nV to 1 MV
	quantity.Ampere:   {1e-18, 1e4},    // 1 aA to 10 kA
	quantity.Watt:     {1e-12, 1e6},    // 1 pW to 1 MW
	quantity.Hertz:    {1, 1e12},       // 1 Hz to 1 THz
	quantity.Metre:    {1e-6, 10},      // 1 µm to 10 m (core dimensions)
	quantity.Celsius:  {-273.15, 1000}, // above absolute zero, at most 1000 °C
	quantity.Fraction: {1e-12, 1e3},    // tolerances and limits: 1e-10 % to 100000 %
	quantity.Ratio:    {1e-9, 1e9},     // turns, hFE, μ, coupling, limits
}

func example(u quantity.Unit) string {
	switch u {
	case quantity.Ohm:
		return `"4k7"`
	case quantity.Farad:
		return `"10n"`
	case quantity.Henry:
		return `"22u"`
	case quantity.Volt:
		return `"12V"`
	case quantity.Ampere:
		return `"10mA"`
	case quantity.Watt:
		return `"0.25W"`
	case quantity.Hertz:
		return `"10.1MHz"`
	case quantity.Metre:
		return `"9.5mm"`
	case quantity.Celsius:
		return `"25C"`
	case quantity.Fraction:
		return `"5%"`
	}
	return "a number"
}

// TypeName names a decoded TOML value's type for messages.
func TypeName(v any) string {
	switch x := v.(type) {
	case string:
		return fmt.Sprintf("the string %q", x)
	case int64:
		return fmt.Sprintf("the integer %d", x)
	case float64:
		return fmt.Sprintf("the number %v", x)
	case bool:
		return fmt.Sprintf("the boolean %v", x)
	case time.Time:
		return "a date or time"
	case []any:
		return "an array"
	case []map[string]any:
		return "an array of tables"
	case map[string]any:
		return "a table"
	}
	return fmt.Sprintf("a %T", v)
}
