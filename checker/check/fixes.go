package check

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/edit"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// A fix is a promise: before one is offered, its changes are made to the
// file's text, the file is loaded and checked again in the same corner mode,
// and the fix stands only when
//
//   - its finding is gone,
//   - no error-severity finding appears that was not there before,
//   - no transistor's nominal collector current moves by more than the rule
//     set's max_ic_change (a fraction of the present current), and no nominal
//     band gain by more than max_gain_change_db, unless moving that measure is
//     the rule's purpose (engine.Rule.FixMoves; the fix then says by how much),
//   - and no stage with gain is left an attenuator, whatever the rule.
//
// The text is edited and loaded again rather than a copy of the model
// changed, because the edited text is exactly what the user will have after
// making the fix: the written code is read back with its rounding, a new
// device brings its library figures, new turns reach every derived quantity,
// and no second way of applying a change can drift from the loader. The one
// exception is a change set that only sets values of keys the file has
// (most fixes): edit.Model sets the values, read from the same literals by
// the same parser, into a copy of the loaded circuit, and moves the
// positions the edit moves, which gives the circuit loading the edited text
// gives without parsing it again (TestInPlaceModelIsLoadedModel compares the
// two field by field over the generated corpus and the test circuits).
//
// A form that fails is not offered; the rule's other forms (Finding.FixForms)
// are tried in order. When none passes, the fix says so and describes what
// the best refused form would have cost (docs/fixes.md).

// measures are the whole-circuit figures a fix must not spoil, at nominal.
type measures struct {
	ic   map[string]float64 // collector current by transistor reference
	refs []string           // transistors in file order
	gain []float64          // transducer gain at each band point, dB; NaN without one
	freq []float64
}

func measure(cs *analysis.Case) measures {
	m := measures{ic: map[string]float64{}}
	if cs == nil {
		return m
	}
	if cs.OP != nil {
		for _, p := range cs.Circuit.Parts {
			if q, ok := cs.OP.BJTs[p.Ref]; ok && p.Kind.IsBJT() {
				m.ic[p.Ref] = q.IC
				m.refs = append(m.refs, p.Ref)
			}
		}
	}
	if cs.AC != nil && cs.AC.HasGain {
		for _, bp := range cs.AC.Band {
			g := math.NaN()
			if bp.GainDB != nil {
				g = *bp.GainDB
			}
			m.gain = append(m.gain, g)
			m.freq = append(m.freq, bp.Frequency)
		}
	}
	return m
}

// icFloor is the collector current below which a transistor counts as off:
// its relative change means nothing (the 1e-12 S gmin aid leaves about
// this much in a cut-off device).
const icFloor = 1e-9

// verdict is the outcome of checking one fix form.
type verdict struct {
	ok    bool
	why   string   // why the form was refused
	moved []string // what the form moves by the rule's purpose, for the fix text
}

// recheck checks a fixed file again: its findings and its nominal case. c is
// the fixed circuit when it was made without loading (edit.Model), else nil
// and data is the edited text to load. only, when not nil, names the only
// rules to judge (the others are switched off).
type recheck func(data []byte, c *circuit.Circuit, only []string) ([]engine.Finding, *analysis.Case, error)

// ratingRules are the only rules that read a part's rating: no analysis
// does (ratings are not among the corner box's parameters either), so a
// change set that only sets ratings leaves every other rule's findings, and
// the nominal case, exactly as they were before it. Its check judges these
// rules alone: a finding of another rule can neither be left (the fix is for
// one of these rules) nor be new. TestRatingsOnlyInRatingRules and
// TestRatingFixVerdicts hold this to the full check over the corpus.
var ratingRules = []string{"resistor.power", "capacitor.voltage"}

// onlyRatings reports whether a form of f's fix is checked by the rating
// rules alone: f is theirs and every change sets a rating.
func onlyRatings(f *engine.Finding, changes []engine.Change) bool {
	if !slices.Contains(ratingRules, f.Rule) {
		return false
	}
	for _, ch := range changes {
		if ch.Key != "rating" {
			return false
		}
	}
	return true
}

// source is the file whose fixes are checked: its text, and the circuit
// loaded from it.
type source struct {
	data   []byte
	c      *circuit.Circuit
	text   *edit.Text // parsed on first use
	parsed bool
	// reload loads every fixed file from its edited text and judges it
	// with every rule (for measuring and testing what edit.Model and
	// ratingRules save).
	reload bool
}

// fixed makes changes: the fixed circuit when they only set existing values
// (edit.InPlace, edit.Model), else the edited text.
func (s *source) fixed(changes []engine.Change) ([]byte, *circuit.Circuit, error) {
	if !s.reload && s.c != nil {
		if !s.parsed {
			s.text, s.parsed = edit.Parse(s.data), true
		}
		if reps, ok := s.text.InPlace(changes); ok {
			if d, ok := edit.Model(s.c, reps); ok {
				return nil, d, nil
			}
		}
	}
	b, err := edit.Apply(s.data, changes)
	return b, nil, err
}

// judgeForm applies one form's changes and judges the result against before.
func judgeForm(rule *engine.Rule, f *engine.Finding, form engine.FixForm, src *source,
	before []engine.Finding, mBefore measures, limits engine.FixLimits, again recheck) verdict {
	text, fixed, err := src.fixed(form.Changes)
	if err != nil {
		return verdict{why: fmt.Sprintf("cannot be made to the file (%v)", err)}
	}
	var only []string
	if !src.reload && onlyRatings(f, form.Changes) {
		only = ratingRules
	}
	after, nominal, err := again(text, fixed, only)
	if err != nil {
		return verdict{why: fmt.Sprintf("leaves a file that does not load (%v)", err)}
	}
	for _, g := range after {
		if g.Rule == f.Rule && g.Part == f.Part {
			return verdict{why: "leaves the finding: " + g.Message}
		}
	}
	wasError := map[[2]string]bool{}
	for _, g := range before {
		if g.Severity == engine.Error {
			wasError[[2]string{g.Rule, g.Part}] = true
		}
	}
	for _, g := range after {
		if g.Severity == engine.Error && !wasError[[2]string{g.Rule, g.Part}] {
			return verdict{why: fmt.Sprintf("raises a new error: %s [%s]", g.Message, g.Rule)}
		}
	}
	mAfter := measure(nominal)
	var v verdict
	for _, ref := range mBefore.refs {
		b, a := mBefore.ic[ref], mAfter.ic[ref]
		if !(math.Abs(b) > icFloor) {
			continue
		}
		rel := (a - b) / math.Abs(b)
		if math.Abs(rel) <= limits.MaxICChange {
			continue
		}
		text := fmt.Sprintf("moves %s's nominal collector current from %s to %s (%s)", ref,
			quantity.Approx(b, quantity.Ampere), quantity.Approx(shown(a), quantity.Ampere), signedPercent(rel))
		if !rule.Moves(engine.MoveIC) {
			return verdict{why: text + ", more than max_ic_change " + quantity.Format(limits.MaxICChange, quantity.Fraction)}
		}
		v.moved = append(v.moved, text)
	}
	if len(mBefore.gain) > 0 {
		worst, at, from, to := 0.0, -1, 0.0, 0.0
		for i, b := range mBefore.gain {
			if math.IsNaN(b) {
				continue
			}
			a := math.Inf(-1) // no signal reaches the output any more
			if i < len(mAfter.gain) && !math.IsNaN(mAfter.gain[i]) {
				a = mAfter.gain[i]
			}
			if b > 0 && a < 0 {
				return verdict{why: fmt.Sprintf("turns the stage into an attenuator: nominal gain at %s from %s to %s",
					quantity.Approx(mBefore.freq[i], quantity.Hertz), signedDB(b), signedDB(a))}
			}
			if d := math.Abs(a - b); d > worst {
				worst, at, from, to = d, i, b, a
			}
		}
		if at >= 0 && worst > limits.MaxGainChangeDB {
			text := fmt.Sprintf("moves the nominal gain at %s from %s to %s", quantity.Approx(mBefore.freq[at], quantity.Hertz),
				signedDB(from), signedDB(to))
			if !rule.Moves(engine.MoveGain) {
				return verdict{why: text + ", more than max_gain_change_db " + quantity.Format(limits.MaxGainChangeDB, quantity.Decibel)}
			}
			v.moved = append(v.moved, text)
		}
	}
	v.ok = true
	return v
}

// shown is x with what the numerical floor leaves in a cut-off device
// written as 0.
func shown(x float64) float64 {
	if math.Abs(x) < icFloor {
		return 0
	}
	return x
}

func signedPercent(r float64) string {
	s := quantity.Approx(r, quantity.Fraction)
	if r > 0 {
		s = "+" + s
	}
	return s
}

func signedDB(x float64) string {
	if math.IsInf(x, -1) {
		return "no signal"
	}
	s := fmt.Sprintf("%.1f dB", x)
	if s == "-0.0 dB" {
		s = "0.0 dB"
	}
	if x > 0 && s != "0.0 dB" {
		s = "+" + s
	}
	return s
}

// verifyFixes runs the whole-circuit check over every failing finding with
// changes, keeping the first form that passes.
func verifyFixes(rules []*engine.Rule, fs []engine.Finding, src *source, nominal *analysis.Case,
	limits engine.FixLimits, again recheck) {
	byID := map[string]*engine.Rule{}
	for _, r := range rules {
		byID[r.ID] = r
	}
	mBefore := measure(nominal)
	for i := range fs {
		f := &fs[i]
		forms := fixForms(f)
		f.FixForms = nil
		if len(forms) == 0 {
			continue
		}
		rule := byID[f.Rule]
		if rule == nil {
			continue
		}
		var refused []string
		done := false
		for _, form := range forms {
			v := judgeForm(rule, f, form, src, fs, mBefore, limits, again)
			if !v.ok {
				refused = append(refused, fmt.Sprintf("%s was not offered: it %s", describe(form.Changes), v.why))
				continue
			}
			f.Fix, f.Changes = form.Text, form.Changes
			if len(v.moved) > 0 {
				f.Fix += "; by design it " + strings.Join(v.moved, " and ")
			}
			if len(refused) > 0 {
				f.Fix += " (checked first: " + strings.Join(refused, "; ") + ")"
			}
			done = true
			break
		}
		if !done {
			advice := tradeOff(f.Rule)
			if len(f.Changes) == 0 && f.Fix != "" {
				advice = "Advice: " + f.Fix // the rule's own advice, when its first form had no changes
			}
			f.Fix = "no change passes the whole-circuit check, so none is offered: " + strings.Join(refused, "; ") +
				". " + advice
			f.Changes = nil
		}
	}
}

// fixForms lists a finding's fix forms with changes, in the order they are
// tried: its own fix, then the rule's other forms.
func fixForms(f *engine.Finding) []engine.FixForm {
	var forms []engine.FixForm
	if len(f.Changes) > 0 {
		forms = append(forms, engine.FixForm{Text: f.Fix, Changes: f.Changes})
	}
	if f.FixForms != nil {
		for _, ff := range f.FixForms() {
			if len(ff.Changes) > 0 {
				forms = append(forms, ff)
			}
		}
	}
	return forms
}

// describe writes changes as the file would read them: "R3.value = 18k".
func describe(cs []engine.Change) string {
	out := make([]string, len(cs))
	for i, c := range cs {
		out[i] = fmt.Sprintf("%s.%s = %s", c.Part, c.Key, c.To)
	}
	sort.Strings(out)
	return strings.Join(out, ", ")
}

// tradeOff says what is left to the designer when no form of a rule's fix
// passes.
func tradeOff(rule string) string {
	switch rule {
	case "bias.emitter-fraction":
		return "The trade-off: more emitter voltage steadies the bias but, with the base where it is, costs collector current " +
			"and gain; move the base voltage and the emitter resistor together to keep the current"
	case "bjt.current", "bjt.dissipation", "bjt.voltage":
		return "The trade-off: every library transistor that meets the rating here changes the stage's current or gain past " +
			"the [fixes] limits; choose a part whose other figures match the present one (its figures may be given inline), " +
			"or lower the current or voltage the part carries"
	case "bias.divider-stiffness", "bias.collector-headroom":
		return "The trade-off: a stiffer or lower-drop bias network moves the operating point; re-design the bias network as a whole"
	}
	return "The trade-off: meeting this rule here moves the operating point or the gain; weigh the finding against that or waive it with a reason"
}
