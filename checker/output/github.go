package output

import (
	"fmt"
	"io"
	"strings"

	"headroom/checker/check"
	"headroom/checker/engine"
)

// GitHub writes one workflow-command line per unwaived, unbaselined finding
// and per input error, in the form CI runners turn into annotations on the
// changed lines:
//
//	::error file=PATH,line=L,col=C,title=TITLE::MESSAGE
//
// Paths are from the repository root, which is where the runner resolves
// them. Values are escaped as the runner's command format requires: "%",
// CR and LF everywhere, and ":" and "," inside properties.
func GitHub(w io.Writer, results []check.Result, inv Invocation) {
	for _, r := range results {
		if r.Skipped {
			continue
		}
		if r.Err != nil {
			j := errorJSON(r.Path, r.Err)
			annotate(w, "error", inv.ghPath(j.Path), j.Line, j.Column, "headroom: input error", j.Message)
			continue
		}
		for _, f := range r.Findings {
			if f.Waived || f.Baselined {
				continue
			}
			msg := f.Message
			if f.CornerText != "" {
				msg += "\nworst case: " + f.CornerText
			}
			if f.Fix != "" {
				msg += "\nfix: " + f.Fix
			}
			annotate(w, ghLevel(f.Severity), inv.ghPath(r.Path), f.Pos.Line, f.Pos.Col, "headroom "+f.Rule, msg)
		}
	}
}

func (inv Invocation) ghPath(path string) string {
	if path == "-" {
		return path
	}
	p, _ := inv.FromRoot(path)
	return p
}

func ghLevel(s engine.Severity) string {
	switch s {
	case engine.Error:
		return "error"
	case engine.Warning:
		return "warning"
	}
	return "notice"
}

func annotate(w io.Writer, level, file string, line, col int, title, msg string) {
	fmt.Fprintf(w, "::%s file=%s,line=%d,col=%d,title=%s::%s\n", level, ghProperty(file),
		max(line, 1), max(col, 1), ghProperty(title), ghData(msg))
}

var (
	ghDataEscaper     = strings.NewReplacer("%", "%25", "\r", "%0D", "\n", "%0A")
	ghPropertyEscaper = strings.NewReplacer("%", "%25", "\r", "%0D", "\n", "%0A", ":", "%3A", ",", "%2C")
)

func ghData(s string) string     { return ghDataEscaper.Replace(s) }
func ghProperty(s string) string { return ghPropertyEscaper.Replace(s) }
