package printable

import "testing"

// The escapes are the C0/C1 control characters of ISO/IEC 6429 (ESC is
// 0x1b, CSI in C1 is 0x9b) and the bidirectional formatting characters of
// Unicode Standard Annex #9 (U+202E RIGHT-TO-LEFT OVERRIDE, U+2066–U+2069
// isolates).
func TestString(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"board.toml", "board.toml"},
		{"20 m µ-preamp\tΩ", "20 m µ-preamp\tΩ"},
		{"x.toml\nx.toml:1:1: error: forged", `x.toml\nx.toml:1:1: error: forged`},
		{"\x1b[2J\x1b]0;title\x07", `\x1b[2J\x1b]0;title\x07`},
		{"a\r\x7f", `a\r\x7f`},
		{"\u009b31m", `\x9b31m`},
		{"gnd\u202etxt.exe", `gnd\u202etxt.exe`},
		{"\u2066x\u2069", `\u2066x\u2069`},
		{"bad\xffutf8", `bad\xffutf8`},
		{`C:\boards`, `C:\boards`},
	} {
		if got := String(c.in); got != c.want {
			t.Errorf("String(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}
