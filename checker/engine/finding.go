package engine

import "headroom/checker/circuit"

// Severity orders how much a finding matters.
type Severity int

// Severities, lowest first. Off disables a rule.
const (
	Off Severity = iota
	Info
	Warning
	Error
)

var severityNames = [...]string{"off", "info", "warning", "error"}

func (s Severity) String() string { return severityNames[s] }

// ParseSeverity reads a severity name.
func ParseSeverity(s string) (Severity, bool) {
	for i, n := range severityNames {
		if n == s {
			return Severity(i), true
		}
	}
	return Off, false
}

// Finding is one judged item. A rule fills the first block; the engine fills
// the rest.
type Finding struct {
	Rule    string
	Part    string      // part, port or supply name; "" for the whole circuit
	Pos     circuit.Pos // where the finding points
	Message string      // states the fact, in the case judged
	// MessageLater writes Message when formatting it costs more than judging
	// the item: Evaluate calls it at once, the worst-case search only for the
	// case it finally reports instead of at every corner. It must capture
	// only what the message needs, not the whole case.
	MessageLater func() string
	// Messenger is MessageLater for a rule that keeps its items' message
	// figures in one block per pass (engine.Block): a pointer into the
	// block is an interface value without an allocation, where a closure
	// per item is one, at every case of a worst-case search.
	Messenger Messenger

	// The metric, in SI base units. Comparison reads "Measured must be
	// Comparison Limit".
	HasMetric  bool
	Measured   float64
	Limit      float64
	Comparison string // ">=" or "<="
	Unit       string // ohm F H V A W Hz dB ratio fraction
	// Bound names which bound a two-bound rule judged ("min" or "max"); the
	// worst-case search keeps one finding per part, at the worse bound.
	Bound string
	// Absolute is the load against the part's absolute rating (margin rules);
	// above 1 the finding is an error whatever the rule's severity.
	Absolute float64
	// AtHz is the frequency the finding is about, Hz (the stability rules:
	// a growing pole's, or where μ is least); 0 when it is about none.
	AtHz float64

	Fix     string   // always present on a failing finding
	Changes []Change // the file edits that make the fix, when it is concrete
	// FixLater computes Fix and Changes when they are costly (a fix that
	// solves the circuit again): the engine calls it once, for a finding
	// that fails at the case finally reported, instead of at every corner.
	FixLater func() (string, []Change)
	// FixForms lists further forms of the fix (another part to change, the
	// same aim reached another way), tried in order when the first form
	// fails the whole-circuit check of checker/check. Called at most once.
	FixForms func() []FixForm

	// Engine-filled.
	Severity   Severity
	Corner     map[string]float64 // the values that differ from nominal
	CornerText string             // the same, for people: "Q1 hFE 100, vcc 13.8 V, R1 -5 %"
	Waived     bool
	Baselined  bool   // recorded in the baseline file: reported, never failing
	Reason     string // the waiver's reason, when waived
}

// FixForm is one way to make a fix: the text for people and the edits.
type FixForm struct {
	Text    string
	Changes []Change
}

// Change is one circuit-file edit: part (or REF.WINDING), key, new text.
type Change struct {
	Part string `json:"part"`
	Key  string `json:"key"`
	To   string `json:"to"`
}

// Messenger writes a finding's message when it is needed (Finding.Messenger).
type Messenger interface{ Message() string }

// Block hands out storage for values that findings point at (a Messenger's
// figures) from blocks of a few items each: one allocation per pass instead
// of one per item. A value handed out stays where it is (a full block is
// left to the values in it and a new one started).
type Block[T any] struct{ s []T }

// NewBlock starts a Block with room for n values.
func NewBlock[T any](n int) Block[T] { return Block[T]{s: make([]T, 0, max(n, 1))} }

// Add stores v and returns where it is.
func (b *Block[T]) Add(v T) *T {
	if len(b.s) == cap(b.s) {
		b.s = make([]T, 0, max(2*cap(b.s), 4))
	}
	b.s = append(b.s, v)
	return &b.s[len(b.s)-1]
}

// ResolveMessage fills Message from MessageLater or Messenger, once.
func (f *Finding) ResolveMessage() {
	if f.MessageLater != nil {
		if f.Message == "" {
			f.Message = f.MessageLater()
		}
		f.MessageLater = nil
	}
	if f.Messenger != nil {
		if f.Message == "" {
			f.Message = f.Messenger.Message()
		}
		f.Messenger = nil
	}
}

// ResolveFix fills Fix and Changes from FixLater, once.
func (f *Finding) ResolveFix() {
	if f.FixLater != nil {
		if f.Fix == "" {
			f.Fix, f.Changes = f.FixLater()
		}
		f.FixLater = nil
	}
}

// Failing reports whether the finding fails its rule: always for an item
// without a metric, else when the metric fails its comparison.
func (f *Finding) Failing() bool {
	if !f.HasMetric {
		return true
	}
	return Fails(f.Measured, f.Limit, f.Comparison)
}

// Worse reports whether f is more adverse than g for the worst-case search
// (FORMAT.md §6): the larger measured ÷ limit for a "<=" rule, the larger
// limit ÷ measured for a ">=" rule, where a measured value at or below zero is
// worse than every positive one and more negative is worse. An item without a
// metric (it fails outright) is worse than any measured one.
func Worse(f, g *Finding) bool {
	cf, vf := f.badness()
	cg, vg := g.badness()
	if cf != cg {
		return cf > cg
	}
	return vf > vg
}

// badness is a class and a value within it, compared lexicographically.
func (f *Finding) badness() (int, float64) {
	switch {
	case !f.HasMetric:
		return 3, 0
	case f.Comparison == "<=":
		if f.Limit <= 0 {
			return 2, f.Measured
		}
		return 0, f.Measured / f.Limit
	case f.Measured <= 0:
		return 1, -f.Measured
	}
	return 0, f.Limit / f.Measured
}
