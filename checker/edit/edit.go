// Package edit applies a finding's changes to the text of a circuit file, the
// way a builder would make them by hand: the value of an existing key is
// replaced in place, and a missing key is added to its part's table. Comments
// and layout are kept. Tests use it to prove that every fix removes its finding.
package edit

import (
	"fmt"
	"strconv"
	"strings"
	"unicode/utf8"

	"headroom/checker/circuit/tomlfile"
	"headroom/checker/engine"
)

// Apply returns data with every change made. A change's Part is a part
// reference, or REF.WINDING for a transformer winding. Changes that only set
// existing values are made in one pass over the text parsed once (InPlace);
// the others one at a time, parsing the text again after each.
func Apply(data []byte, changes []engine.Change) ([]byte, error) {
	x := Parse(data)
	if reps, ok := x.InPlace(changes); ok {
		return x.Edited(reps), nil
	}
	return applyEach(data, changes)
}

// applyEach makes the changes one at a time, parsing the text after each.
func applyEach(data []byte, changes []engine.Change) ([]byte, error) {
	text := string(data)
	for _, ch := range changes {
		var err error
		if text, err = apply(text, ch); err != nil {
			return nil, err
		}
	}
	return []byte(text), nil
}

func apply(text string, ch engine.Change) (string, error) {
	doc, err := tomlfile.Parse("edit", []byte(text))
	if err != nil {
		return "", err
	}
	t, err := target(doc, ch.Part)
	if err != nil {
		return "", err
	}
	val := literal(ch.To)
	if t.Has(ch.Key) {
		p := t.ValPos(ch.Key)
		start := offset(text, p)
		end := start + tokenLen(text[start:])
		return text[:start] + val + text[end:], nil
	}
	// The key is absent: add it to the table.
	start := offset(text, t.Pos)
	if text[start] == '[' { // a [parts.REF] header: a new line below it
		nl := strings.IndexByte(text[start:], '\n')
		if nl < 0 {
			return text + "\n" + ch.Key + " = " + val + "\n", nil
		}
		at := start + nl + 1
		return text[:at] + ch.Key + " = " + val + "\n" + text[at:], nil
	}
	// An inline table: after its opening brace.
	brace := strings.IndexByte(text[start:], '{')
	if brace < 0 {
		return "", fmt.Errorf("cannot find the table of %s", ch.Part)
	}
	at := start + brace + 1
	return text[:at] + " " + ch.Key + " = " + val + "," + text[at:], nil
}

// target is the table of a part, or of a winding for REF.WINDING.
func target(doc *tomlfile.Doc, part string) (*tomlfile.Table, error) {
	parts := doc.Root.Table("parts", "parts")
	if parts == nil {
		return nil, fmt.Errorf("no [parts] table")
	}
	ref, winding, _ := strings.Cut(part, ".")
	t := parts.Table(ref, ref)
	if t == nil {
		return nil, fmt.Errorf("no part %s", ref)
	}
	if winding != "" {
		ws := t.Table("windings", "windings")
		if ws == nil {
			return nil, fmt.Errorf("%s has no windings", ref)
		}
		if t = ws.Table(winding, winding); t == nil {
			return nil, fmt.Errorf("%s has no winding %s", ref, winding)
		}
	}
	return t, nil
}

// literal writes a change's value as TOML: whole numbers bare (turns), every
// other value as a string in the file's own notation.
func literal(to string) string {
	if _, err := strconv.Atoi(to); err == nil {
		return to
	}
	return strconv.Quote(to)
}

// offset turns a line and code-point column into a byte offset.
func offset(text string, p tomlfile.Pos) int {
	off := 0
	for line := 1; line < p.Line; line++ {
		nl := strings.IndexByte(text[off:], '\n')
		if nl < 0 {
			return len(text)
		}
		off += nl + 1
	}
	for col := 1; col < p.Col && off < len(text); col++ {
		_, size := utf8.DecodeRuneInString(text[off:])
		off += size
	}
	return off
}

// tokenLen measures one TOML scalar: a quoted string, or a bare number,
// boolean or date up to the next separator.
func tokenLen(s string) int {
	if s == "" {
		return 0
	}
	if q := s[0]; q == '"' || q == '\'' {
		for i := 1; i < len(s); i++ {
			if q == '"' && s[i] == '\\' {
				i++
				continue
			}
			if s[i] == q {
				return i + 1
			}
		}
		return len(s)
	}
	i := strings.IndexAny(s, " \t\r\n,}]#")
	if i < 0 {
		return len(s)
	}
	return i
}
