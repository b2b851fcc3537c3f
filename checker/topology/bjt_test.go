package topology

import (
	"slices"
	"testing"
)

// Expected rails follow RULES.md's definitions of return rail, feed rail and
// DC path (the project's own contract, not an external fact).
func TestReturnAndFeedRails(t *testing.T) {
	cases := []struct {
		name        string
		ckt         *ckt
		ref         string
		ret, feed   string
		byResistors bool
	}{{
		name: "NPN common emitter",
		ckt:  ceStage(), ref: "Q1", ret: "gnd", feed: "vcc", byResistors: true,
	}, {
		// RULES.md: "gnd for a PNP whose collector load returns to gnd".
		name: "PNP with collector load to gnd",
		ckt: newCkt().supply("vcc", 9).r("R1", "vcc", "b").r("R2", "b", "gnd").
			pnp("Q1", "c", "b", "e").r("RE", "vcc", "e").r("RC", "c", "gnd"),
		ref: "Q1", ret: "vcc", feed: "gnd", byResistors: true,
	}, {
		// A PNP on a negative rail: its emitter returns to gnd (the highest
		// rail its emitter reaches), its collector feeds from vee.
		name: "PNP on a negative rail",
		ckt: newCkt().supply("vee", -12).r("R1", "gnd", "b").r("R2", "b", "vee").
			pnp("Q1", "c", "b", "e").r("RE", "e", "gnd").r("RC", "c", "vee"),
		ref: "Q1", ret: "gnd", feed: "vee", byResistors: true,
	}, {
		// An NPN whose emitter reaches gnd and vee: the lowest, vee.
		name: "NPN emitter to two rails",
		ckt: newCkt().supply("vcc", 12).supply("vee", -5).r("R1", "vcc", "b").r("R2", "b", "gnd").
			npn("Q1", "c", "b", "e").r("RE1", "e", "gnd").r("RE2", "e", "vee").r("RC", "vcc", "c"),
		ref: "Q1", ret: "vee", feed: "vcc", byResistors: true,
	}, {
		// A PNP whose emitter reaches vcc directly and v24 only through a
		// net that touches another transistor: that walk is not allowed, so
		// the highest rail reached is vcc, not v24.
		name: "return walk stops at another transistor",
		ckt: newCkt().supply("vcc", 12).supply("v24", 24).r("R1", "vcc", "b").r("R2", "b", "gnd").
			pnp("Q1", "c", "b", "e").r("RE", "vcc", "e").r("RX", "e", "x").r("RY", "x", "v24").
			npn("Q2", "c2", "x", "gnd").r("RC2", "v24", "c2").r("RC", "c", "gnd"),
		ref: "Q1", ret: "vcc", feed: "gnd", byResistors: true,
	}, {
		// The emitter's own net may touch another transistor (a long-tailed pair).
		name: "long-tailed pair shares the emitter net",
		ckt: newCkt().supply("vcc", 12).supply("vee", -12).npn("Q1", "c1", "gnd", "tail").
			npn("Q2", "c2", "b2", "tail").r("RT", "tail", "vee").r("RC1", "vcc", "c1").r("RC2", "vcc", "c2").
			r("RB", "b2", "gnd"),
		ref: "Q2", ret: "vee", feed: "vcc", byResistors: true,
	}, {
		name: "emitter directly on gnd",
		ckt:  newCkt().supply("vcc", 5).r("RB", "c", "b").npn("Q1", "c", "b", "gnd").r("RC", "vcc", "c"),
		ref:  "Q1", ret: "gnd", feed: "vcc", byResistors: true,
	}, {
		// The collector reaches vcc and a lower v5: an NPN feeds from the highest.
		name: "NPN feed picks the highest",
		ckt: newCkt().supply("vcc", 12).supply("v5", 5).r("R1", "vcc", "b").r("R2", "b", "gnd").
			npn("Q1", "c", "b", "e").r("RE", "e", "gnd").r("RC", "c", "v5").r("RD", "c", "vcc"),
		ref: "Q1", ret: "gnd", feed: "vcc", byResistors: true,
	}, {
		// The collector reaches gnd and vee: a PNP feeds from the lowest.
		name: "PNP feed picks the lowest",
		ckt: newCkt().supply("vcc", 12).supply("vee", -12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			pnp("Q1", "c", "b", "e").r("RE", "vcc", "e").r("RC", "c", "gnd").r("RD", "c", "vee"),
		ref: "Q1", ret: "vcc", feed: "vee", byResistors: true,
	}, {
		// An emitter choke to gnd: resistors alone reach no rail, so the
		// return rail comes from the DC path, and says so.
		name: "emitter inductor",
		ckt: newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			npn("Q1", "c", "b", "e").l("LE", "e", "gnd").r("RC", "vcc", "c"),
		ref: "Q1", ret: "gnd", feed: "vcc", byResistors: false,
	}, {
		// Feed through a winding, a potentiometer section and a port resistor
		// all count as DC paths.
		name: "feed through winding",
		ckt: newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			npn("Q1", "c", "b", "gnd").xfmr("T1", 0.2, "pri", "c", "vcc", "sec", "rf_out", "gnd").port("out", "rf_out", "out"),
		ref: "Q1", ret: "gnd", feed: "vcc", byResistors: true,
	}, {
		name: "feed through a potentiometer section",
		ckt: newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			npn("Q1", "c", "b", "gnd").pot("RV1", "vcc", "c", "x").cap("C1", "x", "gnd"),
		ref: "Q1", ret: "gnd", feed: "vcc", byResistors: true,
	}, {
		// A PNP whose collector reaches gnd only through the out port's resistor.
		name: "feed through a port resistor",
		ckt: newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			pnp("Q1", "rf_out", "b", "e").r("RE", "vcc", "e").port("out", "rf_out", "out"),
		ref: "Q1", ret: "vcc", feed: "gnd", byResistors: true,
	}, {
		// Capacitors carry no DC: the collector reaches no rail.
		name: "no feed rail",
		ckt: newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			npn("Q1", "c", "b", "e").r("RE", "e", "gnd").cap("C1", "c", "vcc"),
		ref: "Q1", ret: "gnd", feed: "", byResistors: true,
	}, {
		// A floating emitter (only a capacitor) has no return rail at all.
		name: "no return rail",
		ckt: newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			npn("Q1", "c", "b", "e").cap("CE", "e", "gnd").r("RC", "vcc", "c"),
		ref: "Q1", ret: "", feed: "vcc", byResistors: false,
	}}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			q := bjt(t, tc.ckt.analyze(), tc.ref)
			if q.ReturnRail != tc.ret || q.FeedRail != tc.feed || q.ReturnByResistors != tc.byResistors {
				t.Errorf("return %q (by resistors %v), feed %q; want %q (%v), %q",
					q.ReturnRail, q.ReturnByResistors, q.FeedRail, tc.ret, tc.byResistors, tc.feed)
			}
		})
	}
}

// A cascode: the lower device's collector feeds through the upper device's
// collector–emitter path (RULES.md counts other transistors' C–E paths as DC
// paths); the upper device's emitter reaches no rail through resistors, so
// its return rail comes from the DC path through the lower device.
func TestCascode(t *testing.T) {
	topo := newCkt().supply("vcc", 12).
		r("R1", "vcc", "b2").r("R2", "b2", "b1").r("R3", "b1", "gnd").cap("C2", "b2", "gnd").
		npn("Q1", "mid", "b1", "e1").r("RE", "e1", "gnd").
		npn("Q2", "c2", "b2", "mid").l("L1", "vcc", "c2").analyze()
	q1, q2 := bjt(t, topo, "Q1"), bjt(t, topo, "Q2")
	if q1.ReturnRail != "gnd" || q1.FeedRail != "vcc" || !q1.ReturnByResistors {
		t.Errorf("Q1: return %q feed %q by resistors %v", q1.ReturnRail, q1.FeedRail, q1.ReturnByResistors)
	}
	if q2.ReturnRail != "gnd" || q2.FeedRail != "vcc" || q2.ReturnByResistors {
		t.Errorf("Q2: return %q feed %q by resistors %v", q2.ReturnRail, q2.FeedRail, q2.ReturnByResistors)
	}
	// bjt.voltage's definition: L1 lies on a DC path from either collector.
	if !q1.InductiveFeed || q1.FeedInductor != "L1" || !q2.InductiveFeed {
		t.Errorf("inductive feed Q1 %v (%q), Q2 %v", q1.InductiveFeed, q1.FeedInductor, q2.InductiveFeed)
	}
	if len(q1.LowerLeg) != 1 || q1.LowerLeg[0] != "R3" || len(q2.LowerLeg) != 0 {
		t.Errorf("lower legs Q1 %v, Q2 %v", q1.LowerLeg, q2.LowerLeg)
	}
}

// RULES.md bias.divider-stiffness: the lower leg is the resistors (not
// potentiometer sections) directly between the base and the return rail.
func TestLowerLeg(t *testing.T) {
	cases := []struct {
		name string
		ckt  *ckt
		want []string
	}{
		{"divider", ceStage(), []string{"R2"}},
		{"two resistors in file order, pot and upper leg excluded",
			newCkt().supply("vcc", 12).r("R5", "gnd", "b").r("R1", "vcc", "b").pot("RV1", "b", "gnd", "w").
				r("R2", "b", "gnd").npn("Q1", "c", "b", "e").r("RE", "e", "gnd").r("RC", "vcc", "c").r("RW", "w", "gnd"),
			[]string{"R5", "R2"}},
		{"collector feedback has none",
			newCkt().supply("vcc", 12).r("RC", "vcc", "c").r("RF", "c", "b").npn("Q1", "c", "b", "e").r("RE", "e", "gnd"),
			nil},
		{"PNP lower leg goes to its return rail, vcc",
			newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
				pnp("Q1", "c", "b", "e").r("RE", "vcc", "e").r("RC", "c", "gnd"),
			[]string{"R1"}},
		{"base fed through a winding has none",
			newCkt().supply("vcc", 12).r("R1", "vcc", "bias").r("R2", "bias", "gnd").cap("C1", "bias", "gnd").
				xfmr("T1", 0.1, "pri", "rf_in", "gnd", "sec", "b", "bias").port("in", "rf_in", "in").
				npn("Q1", "c", "b", "e").r("RE", "e", "gnd").r("RC", "vcc", "c"),
			nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := bjt(t, tc.ckt.analyze(), "Q1").LowerLeg; !slices.Equal(got, tc.want) {
				t.Errorf("LowerLeg = %v, want %v", got, tc.want)
			}
		})
	}
}

// RULES.md bjt.voltage: inductive when a DC path from the collector to a
// rail, not through the transistor's own base or emitter nets, contains an
// inductor or winding.
func TestInductiveFeed(t *testing.T) {
	cases := []struct {
		name string
		ckt  *ckt
		want string // FeedInductor, "" for none
	}{
		{"resistive load", ceStage(), ""},
		{"choke", ceStage().l("L1", "vcc", "coll"), "L1"},
		{"winding", ceStage().xfmr("T1", 0.3, "pri", "vcc", "coll", "sec", "rf_out", "gnd"), "T1.pri"},
		{"choke behind a decoupling resistor",
			ceStage().l("L1", "x", "coll").r("RF", "vcc", "x").cap("CX", "x", "gnd"), "L1"},
		// An inductor hanging off the collector into a capacitor carries no
		// DC: only a walk there and back would "contain" it.
		{"series inductor into a coupling capacitor",
			ceStage().l("L1", "coll", "x").cap("CX", "x", "rf_out"), ""},
		// The only inductive path runs through the base net.
		{"inductor only beyond the own base",
			newCkt().supply("vcc", 12).r("RC", "vcc", "c").r("RF", "c", "b").npn("Q1", "c", "b", "e").
				r("RE", "e", "gnd").xfmr("T1", 0.1, "pri", "rf_in", "gnd", "sec", "b", "bias").
				r("RB", "bias", "gnd").port("in", "rf_in", "in"), ""},
		{"inductor only beyond the own emitter",
			newCkt().supply("vcc", 12).r("RC", "vcc", "c").r("R1", "vcc", "b").r("R2", "b", "gnd").
				npn("Q1", "c", "b", "e").r("RX", "c", "e").l("LE", "e", "gnd"), ""},
		// An inductor in a loop that the collector path must enter and
		// leave through the same net is not on a simple path either.
		{"inductor in a side loop",
			ceStage().r("RA", "coll", "y").l("L1", "y", "z").r("RB", "z", "y"), ""},
		{"inductor in a loop on the way to the rail",
			newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").npn("Q1", "c", "b", "e").
				r("RE", "e", "gnd").r("RA", "c", "y").l("L1", "y", "z").r("RB", "z", "y").r("RZ", "z", "vcc"), "L1"},
		{"emitter follower", newCkt().supply("vcc", 12).l("L1", "vcc", "x").cap("C1", "x", "gnd").
			npn("Q1", "vcc", "b", "e").r("RE", "e", "gnd").r("R1", "vcc", "b"), ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			q := bjt(t, tc.ckt.analyze(), "Q1")
			if q.FeedInductor != tc.want || q.InductiveFeed != (tc.want != "") {
				t.Errorf("InductiveFeed %v via %q, want %q", q.InductiveFeed, q.FeedInductor, tc.want)
			}
		})
	}
}

// RULES.md bias.emitter-fraction: common emitter when the collector is not
// directly on an AC-ground or decoupled net.
func TestCommonEmitter(t *testing.T) {
	cases := []struct {
		name string
		ckt  *ckt
		want bool
	}{
		{"common emitter", ceStage(), true},
		{"emitter follower", newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			npn("Q1", "vcc", "b", "e").r("RE", "e", "gnd"), false},
		// By the Roles table a capacitor on a collector net is a tuning one,
		// so a follower's filtered collector net is decoupled only when
		// the file says role = "decoupling".
		{"follower on a filtered net, role given", newCkt().supply("vcc", 12).r("RF", "vcc", "vf").capRole("CF", "vf", "gnd", Decoupling).
			r("R1", "vf", "b").r("R2", "b", "gnd").npn("Q1", "vf", "b", "e").r("RE", "e", "gnd"), false},
		{"PNP follower, collector on gnd", newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			pnp("Q1", "gnd", "b", "e").r("RE", "vcc", "e"), false},
		// Read literally, the table makes CF a tuning capacitor (its net
		// touches a collector), so vf is not decoupled and the follower
		// counts as common emitter. This pins the literal reading.
		{"follower on a filtered net, role found", newCkt().supply("vcc", 12).r("RF", "vcc", "vf").cap("CF", "vf", "gnd").
			r("R1", "vf", "b").r("R2", "b", "gnd").npn("Q1", "vf", "b", "e").r("RE", "e", "gnd"), true},
		{"choke-fed collector", ceStage().l("L1", "vcc", "coll"), true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := bjt(t, tc.ckt.analyze(), "Q1").CommonEmitter; got != tc.want {
				t.Errorf("CommonEmitter = %v, want %v", got, tc.want)
			}
		})
	}
}

// The three configurations, named for the terminal common to input and
// output (the textbook classification, e.g. Sedra and Smith, Microelectronic
// Circuits, the basic single-transistor amplifier configurations; cited from
// memory): a base held at AC ground by a capacitor or a rail is common base,
// a collector on AC ground common collector, the rest common emitter.
func TestConfiguration(t *testing.T) {
	cascode := newCkt().supply("vcc", 12).port("in", "rf_in", "in").port("out", "rf_out", "out").
		cap("C1", "rf_in", "b1").r("R1", "vcc", "b2").r("R2", "b2", "b1").r("R3", "b1", "gnd").
		cap("C2", "b2", "gnd").npn("Q1", "mid", "b1", "e1").r("RE", "e1", "gnd").
		npn("Q2", "coll", "b2", "mid").l("L1", "vcc", "coll").cap("C3", "coll", "rf_out")
	cases := []struct {
		name    string
		ckt     *ckt
		ref     string
		want    string
		stacked string
	}{
		{"common emitter", ceStage(), "Q1", CommonEmitter, ""},
		{"emitter follower", newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").
			npn("Q1", "vcc", "b", "e").r("RE", "e", "gnd"), "Q1", CommonCollector, ""},
		{"grounded base, capacitor", newCkt().supply("vcc", 12).port("in", "rf_in", "in").cap("C1", "rf_in", "e").
			r("RE", "e", "gnd").r("R1", "vcc", "b").r("R2", "b", "gnd").cap("CB", "b", "gnd").
			npn("Q1", "c", "b", "e").l("L1", "vcc", "c"), "Q1", CommonBase, ""},
		{"grounded base, base on the rail", newCkt().supply("vcc", 12).supply("vneg", -5).port("in", "rf_in", "in").
			cap("C1", "rf_in", "e").r("RE", "e", "vneg").npn("Q1", "c", "gnd", "e").l("L1", "vcc", "c"), "Q1", CommonBase, ""},
		{"cascode, lower device", cascode, "Q1", CommonEmitter, ""},
		{"cascode, upper device", cascode, "Q2", CommonBase, "Q1"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			q := bjt(t, tc.ckt.analyze(), tc.ref)
			if q.Config != tc.want || q.CommonEmitter != (tc.want == CommonEmitter) || q.Stacked != tc.stacked {
				t.Errorf("Config %q (CommonEmitter %v), Stacked %q; want %q, %q", q.Config, q.CommonEmitter, q.Stacked, tc.want, tc.stacked)
			}
		})
	}
	if got := cascode.analyze().Roles["C2"]; got != Bypass {
		t.Errorf("the capacitor holding the cascode's upper base has role %q, want bypass", got)
	}
}
