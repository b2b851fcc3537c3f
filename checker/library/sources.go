package library

import (
	"regexp"
	"strings"
)

// Sources are the comments beside an entry's figures in a library file,
// where the shipped library names where each figure comes from ([S] a
// registered datasheet, [C] computed, [M] from memory; see parts.toml's
// head). They are read from the text rather than kept in keys, so that the
// file stays the one place a figure and its source are written together.
type Sources map[string]string // figure key → its comment

// section matches a table header: [transistors."2N3904"], [cores.x].
var section = regexp.MustCompile(`^\[(transistors|cores)\.("([^"]*)"|[A-Za-z0-9_-]+)\]\s*(#.*)?$`)

// keyLine matches key = value, with an optional comment.
var keyLine = regexp.MustCompile(`^([A-Za-z_][A-Za-z0-9_]*)\s*=\s*(.*)$`)

// ParseSources reads the figure comments of a library file's text: entry
// kind ("transistors" or "cores") → entry name → figure → comment. The
// comment block just above a header (a material's note) is kept under the
// key "", and entries of the same kind without one share the last block; an
// indented comment line continues the figure comment above it. Lines the
// pattern does not know (multi-line values) are passed over.
func ParseSources(data []byte) map[string]map[string]Sources {
	out := map[string]map[string]Sources{"transistors": {}, "cores": {}}
	var cur Sources
	lastKey := ""
	var block []string           // comment lines since the last non-comment line
	group := map[string]string{} // kind → the last block above a header
	for _, raw := range strings.Split(string(data), "\n") {
		line := strings.TrimSpace(raw)
		if strings.HasPrefix(line, "#") {
			text := strings.TrimSpace(strings.TrimPrefix(line, "#"))
			if raw != line && cur != nil && lastKey != "" { // indented: continues a figure's comment
				cur[lastKey] += " " + text
				continue
			}
			block = append(block, text)
			continue
		}
		if m := section.FindStringSubmatch(line); m != nil {
			name := m[2]
			if m[3] != "" || strings.HasPrefix(name, `"`) {
				name = m[3]
			}
			if len(block) > 0 {
				group[m[1]] = strings.Join(block, " ")
			}
			cur, lastKey, block = Sources{}, "", nil
			out[m[1]][name] = cur
			note := group[m[1]]
			if c := strings.TrimSpace(strings.TrimPrefix(m[4], "#")); c != "" {
				note = c
			}
			if note != "" {
				cur[""] = note
			}
			continue
		}
		block = nil
		if strings.HasPrefix(line, "[") {
			cur, lastKey = nil, ""
			continue
		}
		m := keyLine.FindStringSubmatch(line)
		if m == nil || cur == nil {
			continue
		}
		lastKey = m[1]
		if c := comment(m[2]); c != "" {
			cur[m[1]] = c
		}
	}
	return out
}

// comment is the text after the first # outside a string in a value.
func comment(v string) string {
	in := false
	for i, r := range v {
		switch {
		case r == '"':
			in = !in
		case r == '#' && !in:
			return strings.TrimSpace(v[i+1:])
		}
	}
	return ""
}

// ShippedSources are the figure comments of the shipped library.
func ShippedSources() map[string]map[string]Sources { return ParseSources(shippedTOML) }
