// Package printable makes text from input files safe to print for people:
// a file name, circuit name or key may hold a newline that forges an extra
// "file:1:1: error:" line, or terminal escape sequences that rewrite the
// screen. JSON and SARIF escape on their own; every human-readable output
// passes its text through String.
package printable

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"
)

// String returns s with every control character (C0 but tab, DEL, C1),
// every bidirectional-text override and every invalid UTF-8 byte written as
// a Go-style escape (\n, \x1b, \u202e, \xff); a backslash stays as it is.
// Text that needs none is returned unchanged, without copying.
func String(s string) string {
	if clean(s) {
		return s
	}
	var b strings.Builder
	for i := 0; i < len(s); {
		r, n := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && n == 1:
			fmt.Fprintf(&b, `\x%02x`, s[i])
		case r == '\n':
			b.WriteString(`\n`)
		case r == '\r':
			b.WriteString(`\r`)
		case unsafe(r) && r < 0x100:
			fmt.Fprintf(&b, `\x%02x`, r)
		case unsafe(r):
			fmt.Fprintf(&b, `\u%04x`, r)
		default:
			b.WriteString(s[i : i+n])
		}
		i += n
	}
	return b.String()
}

func clean(s string) bool {
	for i := 0; i < len(s); {
		r, n := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && n == 1 || unsafe(r) {
			return false
		}
		i += n
	}
	return true
}

// unsafe: control characters other than tab, and the bidirectional
// embeddings, overrides and isolates that reorder what a terminal shows.
func unsafe(r rune) bool {
	switch {
	case r == '\t':
		return false
	case unicode.IsControl(r):
		return true
	case r >= 0x202a && r <= 0x202e, r >= 0x2066 && r <= 0x2069, r == 0x200e, r == 0x200f, r == 0x061c:
		return true
	}
	return false
}
