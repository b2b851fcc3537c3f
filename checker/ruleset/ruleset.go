// Package ruleset reads rule-set files (FORMAT.md §4): the shipped sets, files
// that extend them, discovery of .headroom.toml, and command-line overrides.
// It turns them into the engine's Config for one circuit file.
package ruleset

import (
	"fmt"
	"path/filepath"
	"strings"

	"headroom/checker/circuit/tomlfile"
	"headroom/checker/engine"
	"headroom/checker/inputfile"
	"headroom/checker/quantity"
	"headroom/checker/spell"
	"headroom/rulesets"
)

// DiscoveryName is the rule-set file `check` looks for beside circuit files.
const DiscoveryName = ".headroom.toml"

// Set is a fully resolved rule set.
type Set struct {
	Name      string
	Source    string // path, or "builtin:NAME"
	FailOn    engine.Severity
	Corners   string   // "worst" or "nominal"
	Libraries []string // resolved paths, in the order they are merged
	Files     []string // the rule-set files read, this one and those it extends
	Baseline  string   // the baseline file's path, resolved; "" = none
	Severity  map[string]engine.Severity
	Params    map[string]map[string]float64
	Fixes     engine.FixLimits // the [fixes] table: limits of the whole-circuit check of a fix
}

// Config returns the engine configuration for this set.
func (s *Set) Config(rules []*engine.Rule) *engine.Config {
	return &engine.Config{Rules: rules, Severity: s.Severity, Params: s.Params,
		FailOn: s.FailOn, Corners: s.Corners, Name: s.Name, Fixes: s.Fixes}
}

// Loader reads rule sets. ReadFile lets `check --staged` read from the git index.
type Loader struct {
	Rules    []*engine.Rule
	ReadFile func(path string) ([]byte, error)
}

// IsBuiltin reports whether ref names a shipped rule set rather than a file.
func IsBuiltin(ref string) bool {
	_, ok := rulesets.Builtin(ref)
	return ok && !strings.ContainsAny(ref, `/\.`)
}

// Load reads the rule set ref: a shipped name or a file path.
func (l *Loader) Load(ref string) (*Set, error) {
	return l.load(ref, nil)
}

func (l *Loader) load(ref string, seen []string) (*Set, error) {
	builtin := IsBuiltin(ref)
	key := ref
	if !builtin {
		key = filepath.Clean(ref)
	}
	for _, s := range seen {
		if s == key {
			return nil, &tomlfile.Error{File: key, Pos: tomlfile.Pos{Line: 1, Col: 1},
				Msg: fmt.Sprintf("rule sets extend each other in a cycle: %s -> %s", strings.Join(seen, " -> "), key)}
		}
	}
	seen = append(seen, key)

	var data []byte
	file := key
	if builtin {
		data, _ = rulesets.Builtin(ref)
		file = "builtin:" + ref
	} else {
		read := l.ReadFile
		if read == nil {
			read = inputfile.Read
		}
		b, err := read(key)
		if err != nil {
			return nil, &tomlfile.Error{File: key, Pos: tomlfile.Pos{Line: 1, Col: 1},
				Msg: fmt.Sprintf("cannot read rule set: %v (the shipped sets are %s)", inputfile.Reason(err), strings.Join(rulesets.Names(), ", "))}
		}
		data = b
	}
	doc, err := tomlfile.Parse(file, data)
	if err != nil {
		return nil, err
	}
	root := doc.Root
	root.What = "rule set"
	root.Allow("name", "extends", "fail_on", "corners", "library", "baseline", "rules", "fixes")
	if err := doc.Err(); err != nil {
		return nil, err
	}

	var set *Set
	if builtin && ref == "default" {
		set = &Set{Name: "default", FailOn: engine.Error, Corners: "worst",
			Severity: map[string]engine.Severity{}, Params: map[string]map[string]float64{}, Fixes: engine.DefaultFixLimits}
	} else {
		parentRef := "default"
		if s, ok := root.String("extends", false); ok {
			parentRef = s
			if !IsBuiltin(s) {
				if builtin {
					return nil, &tomlfile.Error{File: file, Pos: root.ValPos("extends"), Msg: "a shipped rule set extends only shipped ones"}
				}
				parentRef = s
				if !filepath.IsAbs(s) {
					parentRef = filepath.Join(filepath.Dir(key), s)
				}
				if scope, repo := inputfile.Scope(filepath.Dir(key)); !inputfile.Inside(scope, parentRef) {
					return nil, &tomlfile.Error{File: file, Pos: root.ValPos("extends"), Msg: inputfile.OutsideMsg("extends", s, repo)}
				}
			}
		}
		if err := doc.Err(); err != nil {
			return nil, err
		}
		parent, err := l.load(parentRef, seen)
		if err != nil {
			if te, ok := err.(*tomlfile.Error); ok && te.File == filepath.Clean(parentRef) && te.Pos == (tomlfile.Pos{Line: 1, Col: 1}) && !strings.Contains(te.Msg, "cycle") {
				// The parent cannot be read: point at the extends line that names it.
				return nil, &tomlfile.Error{File: file, Pos: root.ValPos("extends"), Msg: fmt.Sprintf("extends %q: %s", parentRef, te.Msg)}
			}
			return nil, err
		}
		set = parent.clone()
		set.Name = ""
	}
	set.Source = file
	if !builtin {
		set.Files = append(set.Files, key)
	}
	l.apply(root, set, filepath.Dir(key))
	if err := doc.Err(); err != nil {
		return nil, err
	}
	if set.Name == "" {
		set.Name = strings.TrimSuffix(filepath.Base(key), ".toml")
	}
	return set, nil
}

func (s *Set) clone() *Set {
	d := *s
	d.Libraries = append([]string(nil), s.Libraries...)
	d.Files = append([]string(nil), s.Files...)
	d.Severity = map[string]engine.Severity{}
	for k, v := range s.Severity {
		d.Severity[k] = v
	}
	d.Params = map[string]map[string]float64{}
	for k, m := range s.Params {
		d.Params[k] = map[string]float64{}
		for p, v := range m {
			d.Params[k][p] = v
		}
	}
	return &d
}

// apply overlays one rule-set file on the set it extends. Problems are
// recorded on the file's document.
func (l *Loader) apply(root *tomlfile.Table, set *Set, dir string) {
	if s, ok := root.String("name", false); ok {
		set.Name = s
	}
	if s, ok := root.String("fail_on", false); ok {
		if sev, ok := engine.ParseSeverity(s); ok && sev != engine.Off {
			set.FailOn = sev
		} else {
			root.Errorf(root.ValPos("fail_on"), "fail_on must be one of error, warning, info, not %q", s)
		}
	}
	if s, ok := root.String("corners", false); ok {
		if s == "worst" || s == "nominal" {
			set.Corners = s
		} else {
			root.Errorf(root.ValPos("corners"), "corners must be \"worst\" or \"nominal\", not %q", s)
		}
	}
	if s, ok := root.String("baseline", false); ok {
		if s == "" {
			set.Baseline = "" // an empty value turns off an inherited baseline
		} else if filepath.IsAbs(s) {
			set.Baseline = s
		} else {
			set.Baseline = filepath.Join(dir, s)
		}
	}
	if libs, ok := root.Strings("library"); ok {
		scope, repo := inputfile.Scope(dir)
		for i, s := range libs {
			p := s
			if !filepath.IsAbs(s) { // an absolute path is taken as given
				p = filepath.Join(dir, s)
			}
			if !inputfile.Inside(scope, p) {
				root.Errorf(root.ElemPos("library", i), "%s", inputfile.OutsideMsg("library", s, repo))
				continue
			}
			set.Libraries = append(set.Libraries, p)
		}
	}
	if ft := root.Table("fixes", "fixes"); ft != nil {
		applyFixLimits(ft, set)
	}
	rulesTable := root.Table("rules", "rules")
	if rulesTable == nil {
		return
	}
	for _, t := range rulesTable.Tables(func(id string) string { return fmt.Sprintf("[rules.%q]", id) }) {
		id := t.Name
		rule := l.find(id)
		if rule == nil {
			t.Errorf(rulesTable.KeyPos(id), "unknown rule %q; %s", id, Closest(id, l.Rules))
			continue
		}
		accepted := []string{"severity"}
		for _, p := range rule.Doc.Params {
			accepted = append(accepted, p.Name)
		}
		t.Allow(accepted...)
		if s, ok := t.String("severity", false); ok {
			if sev, ok := engine.ParseSeverity(s); ok {
				set.Severity[id] = sev
			} else {
				t.Errorf(t.ValPos("severity"), "severity must be one of error, warning, info, off, not %q", s)
			}
		}
		if set.Params[id] == nil {
			set.Params[id] = map[string]float64{}
		}
		for _, p := range rule.Doc.Params {
			sign := tomlfile.NonNegative
			switch {
			case p.Unit == quantity.Celsius:
				sign = tomlfile.AnySign
			case p.Positive:
				sign = tomlfile.Positive
			}
			if x, ok := t.Quantity(p.Name, p.Unit, sign); ok {
				set.Params[id][p.Name] = x
			}
		}
		if rule.CheckParams != nil {
			if name, problem := rule.CheckParams(set.Params[id]); name != "" {
				pos := t.Pos
				if t.Has(name) {
					pos = t.ValPos(name)
				}
				t.Errorf(pos, "[rules.%q] %s: %s", id, name, problem)
			}
		}
	}
}

// FixParams are the [fixes] table's keys: the limits of the whole-circuit
// check every fix passes before it is offered (docs/fixes.md).
var FixParams = []engine.Param{
	{Name: "max_ic_change", Unit: quantity.Fraction,
		Help: "largest change of any transistor's nominal collector current a fix may cause, ÷ the present current"},
	{Name: "max_gain_change_db", Unit: quantity.Decibel,
		Help: "largest change of the nominal band gain, at any band point, a fix may cause"},
}

// applyFixLimits reads the [fixes] table over the limits set inherits.
func applyFixLimits(t *tomlfile.Table, set *Set) {
	names := make([]string, len(FixParams))
	for i, p := range FixParams {
		names[i] = p.Name
	}
	t.Allow(names...)
	if x, ok := t.Quantity("max_ic_change", quantity.Fraction, tomlfile.NonNegative); ok {
		set.Fixes.MaxICChange = x
	}
	if x, ok := t.Quantity("max_gain_change_db", quantity.Decibel, tomlfile.NonNegative); ok {
		set.Fixes.MaxGainChangeDB = x
	}
}

func (l *Loader) find(id string) *engine.Rule {
	for _, x := range l.Rules {
		if x.ID == id {
			return x
		}
	}
	return nil
}

// Closest names the known rule ids nearest to id, for an error message.
func Closest(id string, rules []*engine.Rule) string {
	ids := make([]string, len(rules))
	for i, r := range rules {
		ids[i] = r.ID
	}
	return "closest known rules: " + strings.Join(spell.Closest(id, ids, 3), ", ")
}
