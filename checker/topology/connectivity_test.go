package topology

import (
	"slices"
	"strings"
	"testing"
)

// The problems below are RULES.md's net.connectivity cases (the project's
// own contract) and FORMAT.md §5's rule for the part named.

func TestCleanCircuitsHaveNoProblems(t *testing.T) {
	for name, b := range map[string]*ckt{
		"common emitter": ceStage(),
		"transformer-coupled output with choke": ceStage().l("L1", "vcc", "coll").
			xfmr("T1", 0, "pri", "coll", "x", "sec", "rf_out", "gnd").cap("CX", "x", "gnd"),
		// Two ideal inductors in series form no loop.
		"ideal inductors in series": ceStage().l0("L1", "coll", "m").l0("L2", "m", "vcc"),
		// Parallel inductors with a DC resistance on one of them are solvable.
		"parallel inductors, one with resistance": ceStage().l0("L1", "coll", "vcc").l("L2", "coll", "vcc"),
	} {
		if ps := b.analyze().Problems; len(ps) != 0 {
			t.Errorf("%s: unexpected problems %+v", name, ps)
		}
	}
}

func TestOneConnection(t *testing.T) {
	// The usual typo: R2 names "bse" instead of "base".
	b := ceStage()
	b.c.Part("R2").Nets[0] = "bse"
	ps := b.analyze().Problems
	if len(ps) != 1 {
		t.Fatalf("problems = %+v, want one", ps)
	}
	p := ps[0]
	if p.Kind != OneConnection || p.Net != "bse" || p.Part != "R2" || p.Port || p.Supply || !slices.Equal(p.Parts, []string{"R2"}) {
		t.Errorf("problem = %+v", p)
	}
	if !strings.Contains(p.Message, "did you mean base?") || !strings.Contains(p.Message, "one connection") {
		t.Errorf("message %q should say one connection and suggest base", p.Message)
	}

	// A net touched only by a port, and one only by a supply: no part to
	// name, so the port or supply is named.
	ps = ceStage().port("mon", "spare", "out").supply("v5", 5).analyze().Problems
	if len(ps) != 2 {
		t.Fatalf("problems = %+v, want two", ps)
	}
	if ps[0].Kind != OneConnection || ps[0].Net != "spare" || ps[0].Part != "mon" || !ps[0].Port {
		t.Errorf("port problem = %+v", ps[0])
	}
	if ps[1].Kind != OneConnection || ps[1].Net != "v5" || ps[1].Part != "v5" || !ps[1].Supply {
		t.Errorf("supply problem = %+v", ps[1])
	}
	// A single-connection name far from every other gets no suggestion.
	b = ceStage()
	b.c.Part("C4").Nets[1] = "antenna_relay"
	ps = b.analyze().Problems
	if len(ps) != 2 || strings.Contains(ps[0].Message, "did you mean") {
		t.Errorf("problems = %+v: want antenna_relay (no suggestion) and the orphaned out port", ps)
	}
}

func TestSupplyShort(t *testing.T) {
	ps := ceStage().l0("L9", "vcc", "gnd").analyze().Problems
	if len(ps) != 1 {
		t.Fatalf("problems = %+v, want one", ps)
	}
	p := ps[0]
	if p.Kind != SupplyShort || p.Part != "vcc" || !p.Supply || p.Net != "vcc" || !slices.Equal(p.Parts, []string{"L9"}) {
		t.Errorf("problem = %+v", p)
	}
	if !strings.Contains(p.Message, "shorted to gnd") || !strings.Contains(p.Message, "L9") {
		t.Errorf("message %q", p.Message)
	}

	// The same inductor with a DC resistance is no short (RULES.md: a path
	// of zero DC resistance).
	if ps := ceStage().l("L9", "vcc", "gnd").analyze().Problems; len(ps) != 0 {
		t.Errorf("a resistive inductor across the supply is not a zero-resistance short: %+v", ps)
	}

	// Two supplies joined through an ideal inductor and a zero-resistance
	// winding: each supply is reported, naming the other.
	ps = ceStage().supply("v5", 5).l0("L9", "vcc", "x").xfmr("T1", 0, "a", "x", "v5", "b", "y", "gnd").
		r("RY", "y", "gnd").r("R5", "v5", "gnd").analyze().Problems
	if len(ps) != 2 {
		t.Fatalf("problems = %+v, want two", ps)
	}
	for i, want := range []struct{ supply, other string }{{"vcc", "supply v5"}, {"v5", "supply vcc"}} {
		p := ps[i]
		if p.Kind != SupplyShort || p.Part != want.supply || !strings.Contains(p.Message, "shorted to "+want.other) ||
			!slices.Equal(p.Parts, []string{"L9", "T1.a"}) {
			t.Errorf("problem %d = %+v", i, p)
		}
	}
}

func TestZeroResistanceLoop(t *testing.T) {
	// Two ideal chokes in parallel feeding the collector.
	ps := ceStage().l0("L1", "vcc", "coll").l0("L2", "coll", "vcc").analyze().Problems
	if len(ps) != 1 {
		t.Fatalf("problems = %+v, want one", ps)
	}
	p := ps[0]
	if p.Kind != ZeroResistanceLoop || p.Part != "L1" || !slices.Equal(p.Parts, []string{"L1", "L2"}) ||
		!strings.Contains(p.Message, "resistance") {
		t.Errorf("problem = %+v", p)
	}

	// An ideal inductor with both ends on one net.
	ps = ceStage().l0("L3", "coll", "coll").analyze().Problems
	if len(ps) != 1 || ps[0].Kind != ZeroResistanceLoop || ps[0].Part != "L3" || ps[0].Net != "coll" {
		t.Errorf("problems = %+v, want the self-loop of L3", ps)
	}

	// A loop of a winding and two inductors; the first member in file order
	// (the transformer, declared first) is named.
	ps = ceStage().xfmr("T1", 0, "p", "m", "n", "s", "rf_out", "gnd").l0("L1", "n", "k").l0("L2", "k", "m").
		r("RM", "m", "coll").analyze().Problems
	if len(ps) != 1 || ps[0].Kind != ZeroResistanceLoop || ps[0].Part != "T1" ||
		!slices.Equal(ps[0].Parts, []string{"T1.p", "L1", "L2"}) {
		t.Errorf("problems = %+v, want one loop T1.p, L1, L2", ps)
	}

	// Three ideal inductors in parallel: two independent loops.
	ps = ceStage().l0("L1", "vcc", "coll").l0("L2", "vcc", "coll").l0("L3", "vcc", "coll").analyze().Problems
	if len(ps) != 2 || ps[0].Kind != ZeroResistanceLoop || ps[1].Kind != ZeroResistanceLoop {
		t.Errorf("problems = %+v, want two loops", ps)
	}
}

func TestNoDCPath(t *testing.T) {
	// Base reached only through the coupling capacitor: no bias resistor.
	b := newCkt().supply("vcc", 12).port("in", "rf_in", "in").cap("C1", "rf_in", "base").
		cap("C2", "base", "gnd").npn("Q1", "coll", "base", "emit").r("R3", "emit", "gnd").r("R4", "vcc", "coll")
	ps := b.analyze().Problems
	if len(ps) != 1 {
		t.Fatalf("problems = %+v, want one", ps)
	}
	p := ps[0]
	// FORMAT.md §5: the first part in file order on the net concerned.
	if p.Kind != NoDCPath || p.Net != "base" || p.Part != "C1" || !slices.Equal(p.Parts, []string{"Q1"}) ||
		!strings.Contains(p.Message, "Q1 base") {
		t.Errorf("problem = %+v", p)
	}

	// Emitter and collector with capacitors only; the collector net is
	// also another transistor's base (both terminals named, one problem).
	b = newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
		npn("Q1", "c", "b", "e").cap("CE", "e", "gnd").cap("CC", "c", "vcc").
		npn("Q2", "vcc", "c", "e2").r("RE2", "e2", "gnd")
	ps = b.analyze().Problems
	if len(ps) != 2 {
		t.Fatalf("problems = %+v, want two", ps)
	}
	if ps[0].Net != "c" || ps[0].Part != "Q1" || !slices.Equal(ps[0].Parts, []string{"Q1", "Q2"}) ||
		!strings.Contains(ps[0].Message, "Q1 collector and Q2 base") {
		t.Errorf("collector problem = %+v", ps[0])
	}
	if ps[1].Net != "e" || ps[1].Part != "Q1" || ps[1].Kind != NoDCPath {
		t.Errorf("emitter problem = %+v", ps[1])
	}

	// A base with only the transistor on it is one problem (one
	// connection), not two.
	b = newCkt().supply("vcc", 12).npn("Q1", "vcc", "b", "e").r("RE", "e", "gnd")
	ps = b.analyze().Problems
	if len(ps) != 1 || ps[0].Kind != OneConnection || ps[0].Net != "b" {
		t.Errorf("problems = %+v, want only the one-connection net b", ps)
	}

	// Other transistors' collector–emitter paths are DC paths: the cascode
	// has none of these problems.
	b = newCkt().supply("vcc", 12).
		r("R1", "vcc", "b2").r("R2", "b2", "b1").r("R3", "b1", "gnd").cap("C2", "b2", "gnd").
		npn("Q1", "mid", "b1", "e1").r("RE", "e1", "gnd").npn("Q2", "c2", "b2", "mid").l("L1", "vcc", "c2")
	if ps := b.analyze().Problems; len(ps) != 0 {
		t.Errorf("cascode: %+v", ps)
	}

	// RULES.md's DC path excludes base–emitter junctions, so a Darlington
	// without a bleeder resistor has its driver's emitter reported. This
	// pins the literal reading (see the package report).
	b = newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
		npn("Q1", "vcc", "b", "mid").npn("Q2", "c", "mid", "e").r("RE", "e", "gnd").r("RC", "vcc", "c")
	ps = b.analyze().Problems
	if len(ps) != 1 || ps[0].Kind != NoDCPath || ps[0].Net != "mid" || !strings.Contains(ps[0].Message, "Q1 emitter") ||
		strings.Contains(ps[0].Message, "Q2") {
		t.Errorf("Darlington: %+v", ps)
	}
}

// Problems come out in a fixed order: shorts, loops, one-connection nets,
// then floating transistor terminals.
func TestProblemOrder(t *testing.T) {
	b := newCkt().supply("vcc", 12).
		npn("Q1", "c", "b", "e").cap("CB", "b", "x").r("RX", "x", "gnd"). // b floats
		r("RE", "e", "gnd").r("RC", "vcc", "c").
		r("RT", "typo", "c").                                      // one connection
		l0("L1", "c", "d").l0("L2", "d", "c").r("RD", "d", "gnd"). // loop
		l0("L3", "vcc", "gnd")                                     // short
	var kinds []ProblemKind
	for _, p := range b.analyze().Problems {
		kinds = append(kinds, p.Kind)
	}
	want := []ProblemKind{SupplyShort, ZeroResistanceLoop, OneConnection, NoDCPath}
	if !slices.Equal(kinds, want) {
		t.Errorf("kinds = %v, want %v", kinds, want)
	}
}
