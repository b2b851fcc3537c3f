// Package ruledoc renders rule documentation for people: `headroom explain`,
// `headroom rules`, and the README's rule table. Defaults are read from the
// shipped rule sets, so the numbers shown are the numbers enforced.
package ruledoc

import (
	"fmt"
	"strings"

	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/checker/ruleset"
)

// Shipped loads the default and strict rule sets for documentation.
func Shipped(rules []*engine.Rule) (def, strict *ruleset.Set, err error) {
	l := &ruleset.Loader{Rules: rules}
	if def, err = l.Load("default"); err != nil {
		return nil, nil, err
	}
	strict, err = l.Load("strict")
	return def, strict, err
}

// Value writes a parameter value as a rule-set file would hold it.
func Value(v float64, u quantity.Unit) string {
	switch u {
	case quantity.Ratio, quantity.Fraction:
		return quantity.Format(v, quantity.Ratio)
	}
	return quantity.Format(v, u)
}

// Explain is the text of `headroom explain RULE`.
func Explain(r *engine.Rule, def, strict *ruleset.Set) string {
	var b strings.Builder
	d := r.Doc
	fmt.Fprintf(&b, "%s: %s\n\n", r.ID, d.Title)
	fmt.Fprintf(&b, "Severity: %s by default, %s in strict\n\n", def.Severity[r.ID], strict.Severity[r.ID])
	section(&b, "Why it matters", d.Why)
	section(&b, "What it measures", d.Formula)
	if len(d.Params) > 0 {
		b.WriteString("Parameters (default, strict):\n")
		for _, p := range d.Params {
			fmt.Fprintf(&b, "  %-16s %s, %s  %s\n", p.Name, Value(def.Params[r.ID][p.Name], p.Unit),
				Value(strict.Params[r.ID][p.Name], p.Unit), p.Help)
		}
		b.WriteString("\n")
	}
	section(&b, "Source", d.Source)
	section(&b, "How to fix a finding", d.Fix)
	return b.String()
}

// Markdown is Explain as Markdown, for SARIF's help.markdown (code-scanning
// services show it beside an alert).
func Markdown(r *engine.Rule, def, strict *ruleset.Set) string {
	var b strings.Builder
	d := r.Doc
	fmt.Fprintf(&b, "**%s**: %s\n\n", r.ID, d.Title)
	fmt.Fprintf(&b, "Severity: %s by default, %s in strict.\n\n", def.Severity[r.ID], strict.Severity[r.ID])
	mdSection(&b, "Why it matters", d.Why)
	mdSection(&b, "What it measures", d.Formula)
	if len(d.Params) > 0 {
		b.WriteString("#### Parameters\n\n| parameter | default | strict | meaning |\n|---|---|---|---|\n")
		for _, p := range d.Params {
			fmt.Fprintf(&b, "| `%s` | %s | %s | %s |\n", p.Name, Value(def.Params[r.ID][p.Name], p.Unit),
				Value(strict.Params[r.ID][p.Name], p.Unit), p.Help)
		}
		b.WriteString("\n")
	}
	mdSection(&b, "Source", d.Source)
	mdSection(&b, "How to fix a finding", d.Fix)
	return strings.TrimRight(b.String(), "\n") + "\n"
}

func mdSection(b *strings.Builder, head, text string) {
	if text != "" {
		fmt.Fprintf(b, "#### %s\n\n%s\n\n", head, text)
	}
}

func section(b *strings.Builder, head, text string) {
	if text == "" {
		return
	}
	fmt.Fprintf(b, "%s:\n%s\n\n", head, wrap(text, 78, "  "))
}

// wrap folds text at width, indenting every line.
func wrap(text string, width int, indent string) string {
	var lines []string
	line := indent
	for _, w := range strings.Fields(text) {
		if len(line) > len(indent) && len(line)+1+len(w) > width {
			lines = append(lines, line)
			line = indent
		}
		if len(line) > len(indent) {
			line += " "
		}
		line += w
	}
	return strings.Join(append(lines, line), "\n")
}

// Table is the README's rule table in Markdown: id, default severity,
// parameters with default [strict] values, and the title.
func Table(rules []*engine.Rule, def, strict *ruleset.Set) string {
	var b strings.Builder
	b.WriteString("| rule | severity | parameters: default [strict] | checks |\n|---|---|---|---|\n")
	for _, r := range rules {
		var ps []string
		for _, p := range r.Doc.Params {
			dv, sv := Value(def.Params[r.ID][p.Name], p.Unit), Value(strict.Params[r.ID][p.Name], p.Unit)
			if dv == sv {
				ps = append(ps, fmt.Sprintf("`%s` %s", p.Name, dv))
			} else {
				ps = append(ps, fmt.Sprintf("`%s` %s [%s]", p.Name, dv, sv))
			}
		}
		sev := def.Severity[r.ID].String()
		if s := strict.Severity[r.ID].String(); s != sev {
			sev += " [" + s + "]"
		}
		fmt.Fprintf(&b, "| `%s` | %s | %s | %s |\n", r.ID, sev, strings.Join(ps, ", "), r.Doc.Title)
	}
	return b.String()
}
