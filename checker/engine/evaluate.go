package engine

import (
	"fmt"
	"sort"
	"sync/atomic"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
)

// Config is the effective rule set for one circuit file.
type Config struct {
	Rules    []*Rule                       // every known rule, sorted by id
	Severity map[string]Severity           // per rule id; missing = Off
	Params   map[string]map[string]float64 // per rule id
	FailOn   Severity
	Corners  string // "worst" or "nominal"
	Name     string // the rule set's name, for output
	Fixes    FixLimits
}

// FixLimits are the rule set's [fixes] parameters: how far a fix may move
// what it is not meant to move before the whole-circuit check refuses it.
type FixLimits struct {
	MaxICChange     float64 // largest |ΔIC| ÷ IC of any transistor, nominal; fraction
	MaxGainChangeDB float64 // largest |Δ gain| at any band point, nominal; dB
}

// DefaultFixLimits are the limits when no rule set sets them (25 %, 1 dB).
var DefaultFixLimits = FixLimits{MaxICChange: 0.25, MaxGainChangeDB: 1}

// Enabled reports whether the rule runs under this configuration.
func (cfg *Config) Enabled(r *Rule) bool { return cfg.Severity[r.ID] != Off }

// Evaluate runs every enabled rule with a run function over one analysed
// case and returns everything the rules judged, failing or not. nominal is
// the nominal case of a worst-case search, nil for a nominal run (rules that
// need corners run only in a search).
func Evaluate(cs *analysis.Case, nominal *analysis.Case, cfg *Config) ([]Finding, error) {
	fs, err := Measure(cs, nominal, cfg)
	for i := range fs {
		fs[i].ResolveMessage()
	}
	return fs, err
}

// Measure is Evaluate without writing the messages a rule left for later
// (MessageLater): the worst-case search judges every item at many cases and
// writes each message once, at the case it reports.
func Measure(cs *analysis.Case, nominal *analysis.Case, cfg *Config) ([]Finding, error) {
	return MeasureAppend(make([]Finding, 0, 2*len(cs.Circuit.Parts)+16), cs, nominal, cfg)
}

// MeasureAppend is Measure appending to dst, so that a search can reuse one
// slice for the cases it is done with (findings are large: growing a new
// slice for every case cost more than the rules' judging).
func MeasureAppend(dst []Finding, cs *analysis.Case, nominal *analysis.Case, cfg *Config) ([]Finding, error) {
	worst := nominal != nil
	if nominal == nil {
		nominal = cs
	}
	runs := func(r *Rule) bool {
		return r.Run != nil && cfg.Enabled(r) && !(r.NeedsCorners && !worst) && !(r.Static && cs != nominal)
	}
	n := 0
	for _, r := range cfg.Rules {
		if runs(r) {
			n++
		}
	}
	// One block for the passes: a rule's later message or fix may keep its
	// pass, so each rule has its own, but not an allocation of its own.
	passes := make([]Pass, 0, n)
	pos := positionsOf(cs.Circuit)
	all := dst // every pass appends to the one slice
	for _, r := range cfg.Rules {
		if !runs(r) {
			continue
		}
		passes = append(passes, Pass{Circuit: cs.Circuit, A: cs, Params: cfg.Params[r.ID], Corners: worst,
			Nominal: nominal, NominalCircuit: nominal.Circuit, rule: r, pos: pos, findings: all})
		p := &passes[len(passes)-1]
		if err := r.Run(p); err != nil {
			return nil, fmt.Errorf("rule %s: %w", r.ID, err)
		}
		all = p.findings
	}
	return all, nil
}

// lastPositions is the index positionsOf built last, with the names and
// positions it was built from: a worst-case search's cases all have their
// nominal circuit's names and positions, so one index serves them all.
var lastPositions atomic.Pointer[posIndex]

type posIndex struct {
	parts, ports, supplies int
	names                  []string // the parts', ports' and supplies' names, in that order
	places                 []circuit.Pos
	pos                    map[string]circuit.Pos
}

// positionsOf is positions(c), reused from the last index built when c
// names the same parts, ports and supplies in the same order at the same
// positions as the circuit that index was built from.
func positionsOf(c *circuit.Circuit) map[string]circuit.Pos {
	if last := lastPositions.Load(); last != nil && last.fits(c) {
		return last.pos
	}
	x := &posIndex{parts: len(c.Parts), ports: len(c.Ports), supplies: len(c.Supplies), pos: positions(c)}
	for _, p := range c.Parts {
		x.names, x.places = append(x.names, p.Ref), append(x.places, p.Pos)
	}
	for _, p := range c.Ports {
		x.names, x.places = append(x.names, p.Name), append(x.places, p.Pos)
	}
	for _, s := range c.Supplies {
		x.names, x.places = append(x.names, s.Net), append(x.places, s.Pos)
	}
	lastPositions.Store(x)
	return x.pos
}

// fits reports whether c lists the names and positions x was built from.
func (x *posIndex) fits(c *circuit.Circuit) bool {
	if len(c.Parts) != x.parts || len(c.Ports) != x.ports || len(c.Supplies) != x.supplies {
		return false
	}
	i := 0
	same := func(name string, pos circuit.Pos) bool {
		ok := x.names[i] == name && x.places[i] == pos
		i++
		return ok
	}
	for _, p := range c.Parts {
		if !same(p.Ref, p.Pos) {
			return false
		}
	}
	for _, p := range c.Ports {
		if !same(p.Name, p.Pos) {
			return false
		}
	}
	for _, s := range c.Supplies {
		if !same(s.Net, s.Pos) {
			return false
		}
	}
	return true
}

// positions indexes where findings about each part, port and supply point,
// with PosOf's precedence: a part first, then a port, then a supply.
func positions(c *circuit.Circuit) map[string]circuit.Pos {
	pos := make(map[string]circuit.Pos, len(c.Parts)+len(c.Ports)+len(c.Supplies))
	for _, part := range c.Parts {
		if _, ok := pos[part.Ref]; !ok {
			pos[part.Ref] = part.Pos
		}
	}
	for _, port := range c.Ports {
		if _, ok := pos[port.Name]; !ok {
			pos[port.Name] = port.Pos
		}
	}
	for _, s := range c.Supplies {
		if _, ok := pos[s.Net]; !ok {
			pos[s.Net] = s.Pos
		}
	}
	return pos
}

// Key identifies one judged item across cases: the rule, the part and, for a
// two-bound rule, the bound.
type Key struct {
	Rule, Part, Bound string
}

// KeyOf is the identity the worst-case search groups findings by.
func KeyOf(f *Finding) Key { return Key{f.Rule, f.Part, f.Bound} }

// Sort puts findings in a fixed order: file, line, column, rule, part.
func Sort(fs []Finding) {
	sort.SliceStable(fs, func(i, j int) bool {
		a, b := fs[i], fs[j]
		if a.Pos.File != b.Pos.File {
			return a.Pos.File < b.Pos.File
		}
		if a.Pos.Line != b.Pos.Line {
			return a.Pos.Line < b.Pos.Line
		}
		if a.Pos.Col != b.Pos.Col {
			return a.Pos.Col < b.Pos.Col
		}
		if a.Rule != b.Rule {
			return a.Rule < b.Rule
		}
		return a.Part < b.Part
	})
}
