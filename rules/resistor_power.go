package rules

import (
	"fmt"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// ResistorPower keeps every resistor well inside its power rating, derated
// for the ambient the way resistor makers rate them.
var ResistorPower = &engine.Rule{
	ID:          "resistor.power",
	CheckParams: kneeBelowZero,
	Doc: engine.Doc{
		Title: "resistor dissipation must stay well inside its derated power rating",
		Why: "A resistor run near its rating runs hot: its value drifts, it cooks the board and the parts beside it, " +
			"and it fails early. Above the rated ambient the permitted power falls, so a part that is comfortable " +
			"on the bench can be overloaded in a warm enclosure.",
		Formula: "DC dissipation ÷ (rating × derating at the ambient) <= max_load (unit fraction); derating is 1 up to knee " +
			"and falls linearly to 0 at zero. A resistor with no rating is judged against default_rating. A potentiometer's " +
			"two sections are each rated in proportion to their share of the track (their resistances after the 1 mΩ floor); " +
			"the worse section is judged. An ambient at or beyond zero leaves no rating: always an error, without a metric. " +
			"A load above 1 (past the absolute rating) is always an error.",
		Source: "the derating curve is that of IEC 60115-1 (rated dissipation up to the rated ambient of 70 °C, linear to zero " +
			"at the upper category temperature, 155 °C for leaded metal-film and thick-film chip resistors); the 50 % " +
			"load is common practice, as strict as or stricter than published reliability derating guidance (e.g. NASA " +
			"EEE-INST-002, values from memory, not confirmed)",
		Fix: "the next standard rating (⅛, ¼, ½, 1, 2, 3, 5, 10 W) that meets max_load; above 10 W the fix says so and gives the " +
			"exact rating needed (or lower the current through the part)",
		Params: []engine.Param{
			{Name: "max_load", Unit: quantity.Fraction, Help: "largest dissipation ÷ derated rating"},
			{Name: "knee", Unit: quantity.Celsius, Help: "ambient up to which the full rating holds"},
			{Name: "zero", Unit: quantity.Celsius, Help: "ambient at which the rating reaches zero"},
			{Name: "default_rating", Unit: quantity.Watt, Help: "rating assumed when a resistor gives none", Positive: true},
		},
	},
	Run: runResistorPower,
}

func runResistorPower(p *engine.Pass) error {
	op := p.A.OP
	if op == nil {
		return nil
	}
	maxLoad, knee, zero := p.Param("max_load"), p.Param("knee"), p.Param("zero")
	ambient := p.Circuit.Ambient.Nominal
	der := derating(ambient, knee, zero)
	n := 0
	for _, part := range p.Circuit.Parts {
		if part.Kind == circuit.Resistor || part.Kind == circuit.Potentiometer {
			n++
		}
	}
	msgs := engine.NewBlock[powerMsg](n)
	for _, part := range p.Circuit.Parts {
		if part.Kind != circuit.Resistor && part.Kind != circuit.Potentiometer {
			continue
		}
		st := op.Parts[part.Ref]
		if st == nil {
			continue
		}
		rating, given := part.Rating, part.Rating > 0
		if !given {
			rating = p.Param("default_rating")
		}
		if !(rating > 0) {
			continue // no rating to judge against (a rule set with default_rating 0)
		}
		if der <= 0 {
			zeroRating(p, part.Ref, "power", ambient, zero,
				fmt.Sprintf("keep the ambient below %s, or use a resistor whose rating holds at %s and set knee and zero to its curve",
					temp(zero), temp(ambient)))
			continue
		}

		// What is judged: the whole part, or the worse potentiometer section.
		power, share, what := st.Power, 1.0, section{ref: part.Ref, i: -1}
		if part.Kind == circuit.Potentiometer {
			power, share, what = worseSection(part.Ref, st.Sections, rating*der)
		}
		load := power / (rating * share * der)

		f := engine.Finding{Part: part.Ref, HasMetric: true, Measured: load, Limit: maxLoad,
			Comparison: "<=", Unit: "fraction", Absolute: load,
			Messenger: msgs.Add(powerMsg{what, power, load, rating, share, der, ambient, maxLoad, given})}
		if engine.Fails(load, maxLoad, "<=") {
			f.Fix, f.Changes = resistorRatingFix(part.Ref, power/(share*der*maxLoad), power/(share*der), ambient)
		}
		p.Report(f)
	}
	return nil
}

// powerMsg is a resistor's message figures.
type powerMsg struct {
	what                                          section
	power, load, rating, share, der, ambient, max float64
	given                                         bool
}

func (m *powerMsg) Message() string {
	msg := m.what.String() + " dissipates "
	msg += fmt.Sprintf("%s, %s of its %s rating", quantity.Approx(m.power, quantity.Watt), pct(m.load),
		quantity.Approx(m.rating*m.share, quantity.Watt))
	if m.share < 1 {
		msg += fmt.Sprintf(" (its %s share of the %s part)", pct(m.share), quantity.Approx(m.rating, quantity.Watt))
	}
	if m.der < 1 {
		msg += fmt.Sprintf(" derated to %s at %s", quantity.Approx(m.rating*m.share*m.der, quantity.Watt), temp(m.ambient))
	} else {
		msg += " at " + temp(m.ambient)
	}
	msg += fmt.Sprintf(", at most %s", pct(m.max))
	if !m.given {
		msg += fmt.Sprintf(" (no rating given: judged as %s, the rule set's default_rating)", quantity.Approx(m.rating, quantity.Watt))
	}
	return msg + runsHot(m.load)
}

// section is what resistor.power judges of a part: the whole part (i −1)
// or a potentiometer's section i, named only for a message.
type section struct {
	ref string
	i   int
}

func (s section) String() string {
	if s.i < 0 {
		return s.ref
	}
	return fmt.Sprintf("%s's %s section", s.ref, [2]string{"a–wiper", "wiper–b"}[s.i])
}

// worseSection picks the potentiometer section with the larger load: each
// section is rated in proportion to its share of the track.
func worseSection(ref string, s [2]dc.Section, derated float64) (power, share float64, what section) {
	total := s[0].R + s[1].R
	best := -1.0
	for i := range s {
		sh := s[i].R / total
		load := s[i].Power / (derated * sh)
		if load > best {
			best, power, share, what = load, s[i].Power, sh, section{ref, i}
		}
	}
	return power, share, what
}

// resistorRatingFix names the next standard rating at or above need (the
// rating that meets max_load); perWatt is the load times the rating.
func resistorRatingFix(ref string, need, perWatt, ambient float64) (string, []engine.Change) {
	r, ok := nextStandard(need, resistorRatings)
	if !ok {
		return fmt.Sprintf("no standard rating up to 10 W is enough: %s needs a rating of at least %s at %s, "+
			"or less current through it", ref, quantity.Approx(roundUp3(need), quantity.Watt), temp(ambient)), nil
	}
	return fmt.Sprintf("%s rating = %s (next standard rating) brings the load to %s at %s",
			ref, ratingText(r, "W"), pct(perWatt/r), temp(ambient)),
		[]engine.Change{{Part: ref, Key: "rating", To: ratingCode(r, "W")}}
}
