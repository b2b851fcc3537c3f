package tomlfile

import (
	"strconv"
	"strings"
	"unicode/utf8"
)

// BurntSushi/toml keeps no position for a key that decoded fine, so the index
// re-reads the text once and records where every table, key and array element
// is. It is only run on text the TOML parser accepted, but it is written to be
// tolerant: on anything unexpected it skips a character and carries on, so it
// can neither panic nor loop.

// entry is what the index knows about one path.
type entry struct {
	def      Pos  // where the table or key is defined: a header (column 1) or the start of the key
	key      Pos  // the key's own last piece (for a.b.c = 1, where c starts)
	val      Pos  // the value's first character; zero for tables from headers
	explicit bool // def comes from a header naming exactly this path, or from a key
}

type index struct {
	m   map[string]*entry
	aot map[string]int // array-of-tables path → elements seen so far

	// tooDeep is where a key path first grew past maxDepth; the scan stops
	// there. The TOML parser slows down quadratically on very deep nesting,
	// so such a file is refused before it is parsed.
	tooDeep Pos

	s         string
	i         int
	line, col int
}

func joinPath(p []string) string { return strings.Join(p, "\x00") }

func buildIndex(s string) *index {
	x := &index{m: map[string]*entry{}, aot: map[string]int{}, s: s, line: 1, col: 1}
	x.top()
	x.s = ""
	return x
}

func (x *index) lookup(path []string) *entry { return x.m[joinPath(path)] }

// maxDepth bounds the pieces of a key path, array and inline-table levels
// included. A circuit file needs six (parts.T1.windings.primary.nets.0).
const maxDepth = 32

// define records a path; an explicit definition replaces an implicit one.
func (x *index) define(path []string, def, key, val Pos, explicit bool) {
	if len(path) > maxDepth {
		if x.tooDeep.Line == 0 {
			x.tooDeep = key
		}
		x.i = len(x.s) // stop scanning
		return
	}
	k := joinPath(path)
	e := x.m[k]
	if e == nil {
		x.m[k] = &entry{def: def, key: key, val: val, explicit: explicit}
		return
	}
	if explicit && !e.explicit {
		e.def, e.key, e.explicit = def, key, true
		if val.Line > 0 {
			e.val = val
		}
	}
}

func (x *index) eof() bool { return x.i >= len(x.s) }
func (x *index) peek() byte {
	if x.i < len(x.s) {
		return x.s[x.i]
	}
	return 0
}
func (x *index) pos() Pos { return Pos{Line: x.line, Col: x.col} }

// advance moves over one byte; columns count code points, so UTF-8
// continuation bytes do not move the column.
func (x *index) advance() {
	if x.i >= len(x.s) {
		return
	}
	c := x.s[x.i]
	x.i++
	switch {
	case c == '\n':
		x.line++
		x.col = 1
	case c&0xC0 != 0x80:
		x.col++
	}
}

func (x *index) skipSpace() {
	for !x.eof() && (x.peek() == ' ' || x.peek() == '\t' || x.peek() == '\r') {
		x.advance()
	}
}

func (x *index) skipComment() {
	if x.peek() == '#' {
		for !x.eof() && x.peek() != '\n' {
			x.advance()
		}
	}
}

// skipBlank skips spaces, comments and newlines.
func (x *index) skipBlank() {
	for !x.eof() {
		switch x.peek() {
		case ' ', '\t', '\r', '\n':
			x.advance()
		case '#':
			x.skipComment()
		default:
			return
		}
	}
}

func (x *index) skipLine() {
	for !x.eof() && x.peek() != '\n' {
		x.advance()
	}
}

func (x *index) top() {
	var cur []string
	for !x.eof() {
		start := x.i
		x.skipBlank()
		if x.eof() {
			return
		}
		here := x.pos()
		if x.peek() == '[' {
			header := Pos{Line: here.Line, Col: 1}
			if strings.HasPrefix(x.s[x.i:], "[[") {
				x.advance()
				x.advance()
				cur = x.headerPath(x.keyPieces(), header, true)
			} else {
				x.advance()
				cur = x.headerPath(x.keyPieces(), header, false)
			}
			x.skipLine()
		} else {
			x.keyval(cur, here)
			x.skipSpace()
			x.skipComment()
			if !x.eof() && x.peek() != '\n' {
				x.skipLine() // tolerate whatever is left on the line
			}
		}
		if x.i == start {
			x.advance()
		}
	}
}

type piece struct {
	name string
	pos  Pos
}

// keyPieces reads a dotted key: bare, "basic" or 'literal' pieces.
func (x *index) keyPieces() []piece {
	var out []piece
	for {
		x.skipSpace()
		p := x.pos()
		var name string
		switch x.peek() {
		case '"':
			name = unescape(x.quoted('"'))
		case '\'':
			name = x.quoted('\'')
		default:
			b := x.i
			for !x.eof() && isBare(x.peek()) {
				x.advance()
			}
			if x.i == b {
				return out
			}
			name = x.s[b:x.i]
		}
		if len(out) <= maxDepth {
			out = append(out, piece{name, p})
		}
		x.skipSpace()
		if x.peek() != '.' {
			return out
		}
		x.advance()
	}
}

func isBare(c byte) bool {
	return c >= 'A' && c <= 'Z' || c >= 'a' && c <= 'z' || c >= '0' && c <= '9' || c == '_' || c == '-'
}

// quoted reads a one-line string and returns its raw content.
func (x *index) quoted(q byte) string {
	x.advance()
	b := x.i
	for !x.eof() && x.peek() != q && x.peek() != '\n' {
		if q == '"' && x.peek() == '\\' {
			x.advance()
		}
		x.advance()
	}
	e := x.i
	if e > len(x.s) {
		e = len(x.s)
	}
	raw := x.s[b:e]
	if x.peek() == q {
		x.advance()
	}
	return raw
}

// headerPath resolves a [table] or [[array]] header to its full path, placing
// the current element index after every array of tables on the way.
func (x *index) headerPath(pieces []piece, header Pos, array bool) []string {
	var path []string
	for j, pc := range pieces {
		if x.tooDeep.Line > 0 {
			return path
		}
		path = append(path, pc.name)
		last := j == len(pieces)-1
		k := joinPath(path)
		if last && array {
			n := x.aot[k]
			x.aot[k] = n + 1
			x.define(path, header, pc.pos, Pos{}, false)
			path = append(path, strconv.Itoa(n))
			x.define(path, header, pc.pos, Pos{}, true)
			return path
		}
		x.define(path, header, pc.pos, Pos{}, last)
		if n, ok := x.aot[k]; ok && !last && n > 0 {
			path = append(path, strconv.Itoa(n-1))
		}
	}
	return path
}

// keyval reads key = value inside the table at path; start is where the key begins.
func (x *index) keyval(table []string, start Pos) {
	pieces := x.keyPieces()
	if len(pieces) == 0 {
		return
	}
	x.skipSpace()
	if x.peek() == '=' {
		x.advance()
	}
	x.skipSpace()
	val := x.pos()
	path := append([]string(nil), table...)
	for j, pc := range pieces {
		path = append(path, pc.name)
		if j < len(pieces)-1 {
			x.define(path, start, pc.pos, Pos{}, true)
		} else {
			x.define(path, start, pc.pos, val, true)
		}
	}
	x.value(path)
}

// value reads one value and indexes what is inside arrays and inline tables.
func (x *index) value(path []string) {
	switch x.peek() {
	case '"':
		if strings.HasPrefix(x.s[x.i:], `"""`) {
			x.multiline(`"""`, true)
		} else {
			x.quoted('"')
		}
	case '\'':
		if strings.HasPrefix(x.s[x.i:], `'''`) {
			x.multiline(`'''`, false)
		} else {
			x.quoted('\'')
		}
	case '[':
		n := 0
		x.items(']', func() {
			p := x.pos()
			elem := append(append([]string(nil), path...), strconv.Itoa(n))
			x.define(elem, p, p, p, true)
			x.value(elem)
			n++
		})
	case '{':
		x.items('}', func() { x.keyval(path, x.pos()) })
	default:
		for !x.eof() && !strings.ContainsRune(",]}#\n", rune(x.peek())) {
			x.advance()
		}
	}
}

// items reads the comma-separated items of an array or inline table whose
// opening bracket is next, up to the closing one, calling item at the start
// of each. An item that reads nothing is stepped over, so the scan always
// moves on.
func (x *index) items(closing byte, item func()) {
	x.advance()
	for !x.eof() {
		x.skipBlank()
		switch c := x.peek(); {
		case c == closing:
			x.advance()
			return
		case c == ',':
			x.advance()
			continue
		case x.eof():
			return
		}
		b := x.i
		item()
		if x.i == b {
			x.advance()
		}
	}
}

// multiline skips a """ or ”' string, which may end in up to two extra quotes.
func (x *index) multiline(delim string, escapes bool) {
	for range 3 {
		x.advance()
	}
	for !x.eof() {
		if escapes && x.peek() == '\\' {
			x.advance()
			x.advance()
			continue
		}
		if strings.HasPrefix(x.s[x.i:], delim) {
			for range 3 {
				x.advance()
			}
			for k := 0; k < 2 && x.peek() == delim[0]; k++ {
				x.advance()
			}
			return
		}
		x.advance()
	}
}

// unescape decodes the escapes of a TOML basic string used as a key.
func unescape(s string) string {
	if !strings.Contains(s, `\`) {
		return s
	}
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		c := s[i]
		if c != '\\' || i+1 >= len(s) {
			b.WriteByte(c)
			continue
		}
		i++
		switch s[i] {
		case 'b':
			b.WriteByte('\b')
		case 't':
			b.WriteByte('\t')
		case 'n':
			b.WriteByte('\n')
		case 'f':
			b.WriteByte('\f')
		case 'r':
			b.WriteByte('\r')
		case 'e':
			b.WriteByte(0x1b)
		case '"', '\\':
			b.WriteByte(s[i])
		case 'x', 'u', 'U':
			n := map[byte]int{'x': 2, 'u': 4, 'U': 8}[s[i]]
			if i+1+n <= len(s) {
				if r, err := strconv.ParseUint(s[i+1:i+1+n], 16, 32); err == nil {
					b.WriteRune(rune(r))
					i += n
					continue
				}
			}
			b.WriteByte('\\')
			b.WriteByte(s[i])
		default:
			b.WriteByte('\\')
			b.WriteByte(s[i])
		}
	}
	return b.String()
}

// runeCol converts a byte offset within a line into a code-point column.
func runeCol(line string, byteOff int) int {
	if byteOff < 0 {
		byteOff = 0
	}
	if byteOff > len(line) {
		byteOff = len(line)
	}
	return utf8.RuneCountInString(line[:byteOff]) + 1
}
