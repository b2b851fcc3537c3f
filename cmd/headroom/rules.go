package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"strings"

	"headroom/checker/printable"
	"headroom/checker/ruledoc"
	"headroom/checker/ruleset"
	"headroom/rules"
)

func (e *env) rules(args []string) int {
	fset := flag.NewFlagSet("rules", flag.ContinueOnError)
	ref := fset.String("rules", "", "rule set: a file or a shipped name (default: discovery from this folder)")
	format := fset.String("format", "text", "text or json")
	rest, status, ok := e.parse(fset, args)
	if !ok {
		return status
	}
	if len(rest) > 0 {
		return e.usageError("rules takes no arguments")
	}
	if !oneOf(*format, "text", "json") {
		return e.usageError("--format must be text or json, not %q", *format)
	}
	all := rules.All()
	loader := &ruleset.Loader{Rules: all, ReadFile: readFile}
	name := *ref
	if name == "" {
		name = ruleset.Discover(".", exists)
	}
	set, err := loader.Load(name)
	if err != nil {
		fmt.Fprintln(e.stderr, errorLine(name, err))
		return exitInput
	}
	if *format == "json" {
		type jr struct {
			ID       string             `json:"id"`
			Title    string             `json:"title"`
			Severity string             `json:"severity"`
			Params   map[string]float64 `json:"params"`
		}
		doc := struct {
			Version int                `json:"version"`
			RuleSet string             `json:"ruleset"`
			Rules   []jr               `json:"rules"`
			Fixes   map[string]float64 `json:"fixes"`
		}{Version: 1, RuleSet: set.Name, Rules: []jr{},
			Fixes: map[string]float64{"max_ic_change": set.Fixes.MaxICChange, "max_gain_change_db": set.Fixes.MaxGainChangeDB}}
		for _, r := range all {
			params := map[string]float64{}
			for _, p := range r.Doc.Params {
				params[p.Name] = set.Params[r.ID][p.Name]
			}
			doc.Rules = append(doc.Rules, jr{r.ID, r.Doc.Title, set.Severity[r.ID].String(), params})
		}
		enc := json.NewEncoder(e.stdout)
		enc.SetIndent("", "  ")
		enc.Encode(doc)
		return exitOK
	}
	fmt.Fprintf(e.stdout, "rule set %s\n\n", printable.String(set.Name))
	for _, r := range all {
		fmt.Fprintf(e.stdout, "%-26s %-8s %s\n", r.ID, set.Severity[r.ID], r.Doc.Title)
		for _, p := range r.Doc.Params {
			fmt.Fprintf(e.stdout, "%-26s   %s = %s\n", "", p.Name, ruledoc.Value(set.Params[r.ID][p.Name], p.Unit))
		}
	}
	fmt.Fprintf(e.stdout, "\n%-26s %-8s %s\n", "[fixes]", "", "limits of the whole-circuit check of every fix (docs/fixes.md)")
	for _, p := range ruleset.FixParams {
		v := set.Fixes.MaxICChange
		if p.Name == "max_gain_change_db" {
			v = set.Fixes.MaxGainChangeDB
		}
		fmt.Fprintf(e.stdout, "%-26s   %s = %s\n", "", p.Name, ruledoc.Value(v, p.Unit))
	}
	return exitOK
}

func (e *env) explain(args []string) int {
	if isHelp(args) {
		commandUsage(e.stdout, "explain", nil)
		return exitOK
	}
	if len(args) != 1 {
		return e.usageError("explain takes one rule id, e.g. headroom explain bias.divider-stiffness")
	}
	all := rules.All()
	r := rules.ByID(args[0])
	if r == nil {
		// A unique prefix of an id, or of its name after the area
		// ("emitter" for bias.emitter-fraction), names the rule.
		var hits []string
		for _, x := range all {
			_, name, _ := strings.Cut(x.ID, ".")
			if strings.HasPrefix(x.ID, args[0]) || strings.HasPrefix(name, args[0]) {
				hits = append(hits, x.ID)
			}
		}
		switch {
		case len(hits) == 1:
			r = rules.ByID(hits[0])
		case len(hits) > 1:
			return e.usageError("%q is the start of several rules: %s", args[0], strings.Join(hits, ", "))
		default:
			return e.usageError("unknown rule %q; %s", args[0], ruleset.Closest(args[0], all))
		}
	}
	def, strict, err := ruledoc.Shipped(all)
	if err != nil {
		return e.usageError("%v", err)
	}
	fmt.Fprint(e.stdout, ruledoc.Explain(r, def, strict))
	return exitOK
}
