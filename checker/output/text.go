package output

import (
	"fmt"
	"io"

	"github.com/fatih/color"

	"headroom/checker/check"
	"headroom/checker/engine"
	"headroom/checker/printable"
)

// Palette colours the text output; the zero value prints plain text.
type Palette struct {
	on                           bool
	err, warn, info, rule, faint *color.Color
}

// NewPalette returns a palette that colours only when on is true.
func NewPalette(on bool) Palette {
	mk := func(attrs ...color.Attribute) *color.Color {
		c := color.New(attrs...)
		if on {
			c.EnableColor()
		} else {
			c.DisableColor()
		}
		return c
	}
	return Palette{on: on, err: mk(color.FgRed, color.Bold), warn: mk(color.FgYellow, color.Bold),
		info: mk(color.FgBlue), rule: mk(color.FgCyan), faint: mk(color.Faint)}
}

func (p Palette) paint(c *color.Color, s string) string {
	if !p.on || c == nil {
		return s
	}
	return c.Sprint(s)
}

func (p Palette) severity(s engine.Severity) string {
	switch s {
	case engine.Error:
		return p.paint(p.err, "error")
	case engine.Warning:
		return p.paint(p.warn, "warning")
	}
	return p.paint(p.info, "info")
}

// Text writes one GNU-style line per unwaived finding with indented detail
// lines, then a summary line, which ends with the notes given (what a folder
// walk skipped). Input errors are written to errw.
func Text(w, errw io.Writer, results []check.Result, pal Palette, notes ...string) {
	files, failed := 0, 0
	for _, r := range results {
		if r.Skipped {
			continue
		}
		if r.Err != nil {
			fmt.Fprintln(errw, ErrorLine(r.Path, r.Err))
			failed++
			continue
		}
		files++
		for _, f := range r.Findings {
			if f.Waived || f.Baselined {
				continue
			}
			fmt.Fprintf(w, "%s:%d:%d: %s: %s %s\n", printable.String(r.Path), f.Pos.Line, f.Pos.Col, pal.severity(f.Severity),
				printable.String(f.Message), pal.paint(pal.rule, "["+f.Rule+"]"))
			if c := f.CornerText; c != "" {
				fmt.Fprintf(w, "    %s %s\n", pal.paint(pal.faint, "worst case:"), printable.String(c))
			}
			if f.Fix != "" {
				fmt.Fprintf(w, "    %s %s\n", pal.paint(pal.faint, "fix:"), printable.String(f.Fix))
			}
		}
	}
	s := Summarize(results)
	for _, r := range results {
		if len(r.NotJudged) > 0 && r.Err == nil {
			fmt.Fprintf(w, "%s: %s not judged: %s\n", r.Path, Plural(len(r.NotJudged), "rule"), r.NotJudgedWhy)
		}
	}
	tail := ""
	if failed > 0 {
		tail = fmt.Sprintf("; %s not checked (input errors)", Plural(failed, "file"))
	}
	for _, n := range notes {
		tail += "; " + n
	}
	baselined := ""
	if s.Baselined > 0 {
		baselined = fmt.Sprintf(", %d baselined", s.Baselined)
	}
	fmt.Fprintf(w, "%s, %s, %s, %d waived%s in %s%s\n", Plural(s.Error, "error"), Plural(s.Warning, "warning"),
		Plural(s.Info, "info"), s.Waived, baselined, Plural(files, "circuit file"), tail)
}

// ErrorLine renders an input error in the GNU form, at 1:1 when it has no
// position, with control characters escaped: one error is one line.
func ErrorLine(path string, err error) string {
	j := errorJSON(path, err)
	return fmt.Sprintf("%s:%d:%d: error: %s", printable.String(j.Path), j.Line, j.Column, printable.String(j.Message))
}

// Plural writes a count with its word: "1 error", "2 errors", "3 info".
func Plural(n int, word string) string {
	if n == 1 || word == "info" {
		return fmt.Sprintf("%d %s", n, word)
	}
	return fmt.Sprintf("%d %ss", n, word)
}
