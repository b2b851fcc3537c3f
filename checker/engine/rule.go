// Package engine runs rules over an analysed circuit. A rule only measures:
// it reports one Finding per item it judges, with the metric, and the engine
// decides whether the item fails, how much that matters (the rule set's
// severity) and whether a waiver covers it. Keeping the verdict out of the
// rule is what lets the worst-case search drive the same rules at every corner.
package engine

import (
	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/quantity"
)

// Rule is one check: a stable id, its documentation, and a run function.
type Rule struct {
	ID  string // area.name, e.g. "bias.divider-stiffness"
	Doc Doc
	// Run measures one analysed case. It returns an error only when the rule
	// could not run at all; what it finds goes through Pass.Report.
	// Nil for the waiver rules, which the engine evaluates itself.
	Run func(*Pass) error
	// NeedsCorners marks a rule judged only with worst-case corners (bias.drift).
	NeedsCorners bool
	// CheckParams reports parameters that are fine one by one but not
	// together (a derating curve whose zero lies below its knee): the name
	// of the parameter to point at and what is wrong, or "" when they fit.
	CheckParams func(params map[string]float64) (param, problem string)
	// Static marks a rule that judges the file as written (preferred values,
	// core bands): its items are the same at every corner, so a worst-case
	// search runs it once, at nominal.
	Static bool
	// HoldSupplies keeps every supply at nominal when the worst case is
	// searched for this rule's items (bias.drift: a supply's own range moves
	// IC by design).
	HoldSupplies bool
	// FromFile marks a rule whose figures come from the file's values alone
	// (the supplies' voltages), not from the analysed circuit: like a
	// Static rule it is still judged when net.connectivity finds the wiring
	// broken.
	FromFile bool
	// FixMoves names the circuit measures this rule's fix is meant to move
	// (MoveIC: a transistor's nominal collector current; MoveGain: the band
	// gain). The whole-circuit check of a fix (checker/check) lets those
	// move past the rule set's [fixes] limits, and the fix says by how much.
	FixMoves []string
	// NeedsTransistor marks a rule whose items exist only around a
	// transistor (bias, device limits, the reactance rules that judge an
	// amplifier's coupling, bypass, decoupling and chokes, stability): a
	// circuit without one (a passive filter) is not judged by it.
	NeedsTransistor bool
	// PassiveOnly marks a rule whose items exist only in a circuit without
	// a transistor (the filter rules): an amplifier is not judged by it.
	PassiveOnly bool
}

// The measures a fix may be meant to move (Rule.FixMoves).
const (
	MoveIC   = "ic"
	MoveGain = "gain"
)

// Moves reports whether moving measure is the purpose of the rule's fix.
func (r *Rule) Moves(measure string) bool {
	for _, m := range r.FixMoves {
		if m == measure {
			return true
		}
	}
	return false
}

// Doc is a rule's structured documentation; `explain`, `rules`, the README's
// rule table and SARIF rule metadata are all generated from it.
type Doc struct {
	Title   string // one line, lowercase start, no period
	Why     string // why it matters
	Formula string // the metric, exactly
	Source  string // published source, or "common practice"
	Fix     string // how to fix a finding
	Params  []Param
}

// Param describes one parameter; its default and strict values live in the
// shipped rule sets, not here.
type Param struct {
	Name string
	Unit quantity.Unit // quantity.Ratio for plain numbers
	Help string
	// Positive marks a physical part value (a rating): zero is refused, as
	// in a circuit file (FORMAT.md §1). Other parameters may be zero.
	Positive bool
}

// Pass is what a rule sees of one case: read-only.
type Pass struct {
	Circuit *circuit.Circuit
	A       *analysis.Case
	Params  map[string]float64
	Corners bool // the run is a worst-case run
	// Nominal is the nominal case and NominalCircuit the circuit as loaded;
	// in a nominal run they are A and Circuit. Rules use them to express a
	// fix in nominal values and to compare a corner with nominal (bias.drift).
	Nominal        *analysis.Case
	NominalCircuit *circuit.Circuit
	rule           *Rule
	findings       []Finding
	pos            map[string]circuit.Pos // PosOf's answers, when Measure built them
}

// Param returns a parameter's value.
func (p *Pass) Param(name string) float64 { return p.Params[name] }

// Report records a judged item. Set the metric fields for a measured item
// (the engine compares them); leave HasMetric false for an item that fails
// outright (a connectivity fault, no operating point).
func (p *Pass) Report(f Finding) {
	f.Rule = p.rule.ID
	if f.Pos == (circuit.Pos{}) {
		f.Pos = p.PosOf(f.Part)
	}
	p.findings = append(p.findings, f)
}

// PosOf is the position findings about a part, port or supply point at;
// the [circuit] table for anything else.
func (p *Pass) PosOf(name string) circuit.Pos {
	if pos, ok := p.pos[name]; ok {
		return pos
	}
	c := p.Circuit
	if part := c.Part(name); part != nil {
		return part.Pos
	}
	for _, port := range c.Ports {
		if port.Name == name {
			return port.Pos
		}
	}
	if s := c.Supply(name); s != nil {
		return s.Pos
	}
	return c.Pos
}

// Fails reports whether measured fails "measured cmp limit".
func Fails(measured, limit float64, cmp string) bool {
	if cmp == ">=" {
		return measured < limit
	}
	return measured > limit
}
