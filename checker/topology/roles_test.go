package topology

import "testing"

// Every expected role below follows from RULES.md's Roles table (the
// project's own contract, not an external fact); each case names the row.
func TestRoles(t *testing.T) {
	cases := []struct {
		name string
		ckt  *ckt
		want map[string]string
	}{{
		// Rows: coupling (neither net AC ground), decoupling (both AC
		// ground), bypass (touches an emitter).
		name: "common-emitter stage",
		ckt:  ceStage(),
		want: map[string]string{"C1": Coupling, "C4": Coupling, "C5": Decoupling, "C3": Bypass},
	}, {
		// Row: both nets AC ground — across two supplies counts too.
		name: "capacitor between two supplies",
		ckt:  newCkt().supply("vcc", 12).supply("vee", -12).cap("C1", "vcc", "vee").r("R1", "vcc", "vee"),
		want: map[string]string{"C1": Decoupling},
	}, {
		// Row: bypass, reached through resistors alone (a split emitter resistor).
		name: "bypass on a split emitter resistor",
		ckt: newCkt().supply("vcc", 12).r("R1", "vcc", "b").r("R2", "b", "gnd").npn("Q1", "vcc", "b", "e").
			r("R3", "e", "mid").r("R4", "mid", "lo").r("R5", "lo", "gnd").cap("C1", "lo", "gnd"),
		want: map[string]string{"C1": Bypass},
	}, {
		// The walk may not cross a net that touches a collector: C1 is not a
		// bypass, and with no collector, base or port on its own net it falls
		// to the last capacitor row, decoupling.
		name: "walk blocked by a collector net",
		ckt: newCkt().supply("vcc", 12).npn("Q1", "c1", "b1", "e1").r("RE", "e1", "gnd").r("RB", "vcc", "b1").
			npn("Q2", "x", "b2", "e2").r("R1", "e1", "x").r("R2", "x", "y").cap("C1", "y", "gnd").
			r("RB2", "vcc", "b2").r("RC1", "vcc", "c1").r("RE2", "e2", "gnd"),
		want: map[string]string{"C1": Decoupling},
	}, {
		// The walk may not cross a rail: y reaches emitter e1 only through
		// gnd, and Q2's emitter sits on gnd itself (a rail is not "reached").
		name: "walk blocked by a rail",
		ckt: newCkt().supply("vcc", 12).npn("Q1", "vcc", "b1", "e1").r("RE", "e1", "gnd").r("RB", "vcc", "b1").
			r("R1", "y", "gnd").cap("C1", "y", "vcc").npn("Q2", "c2", "b2", "gnd").r("RB2", "vcc", "b2").r("RC2", "vcc", "c2"),
		want: map[string]string{"C1": Decoupling},
	}, {
		// Potentiometer sections are not "resistors alone".
		name: "walk does not cross a potentiometer",
		ckt: newCkt().supply("vcc", 12).npn("Q1", "vcc", "b1", "e1").r("RB", "vcc", "b1").
			pot("RV1", "e1", "w", "gnd").cap("C1", "w", "gnd"),
		want: map[string]string{"C1": Decoupling},
	}, {
		// Row: tuning — the other net touches a collector, a base, or a port.
		name: "tuning on collector, base and port",
		ckt: ceStage().cap("CT1", "coll", "gnd").cap("CT2", "base", "gnd").cap("CT3", "rf_in", "gnd").
			cap("CT4", "vcc", "rf_out"),
		want: map[string]string{"CT1": Tuning, "CT2": Tuning, "CT3": Tuning, "CT4": Tuning},
	}, {
		// A net that touches a base does not start the walk: a follower Q2
		// drives Q1's base through RS, and C1 from that base to gnd is a
		// tuning capacitor, not a bypass of Q2's emitter.
		name: "base net does not start the bypass walk",
		ckt: newCkt().supply("vcc", 12).r("R1", "vcc", "b2").r("R2", "b2", "gnd").npn("Q2", "vcc", "b2", "e2").
			r("RE2", "e2", "gnd").r("RS", "e2", "b1").cap("C1", "b1", "gnd").
			npn("Q1", "c1", "b1", "e1").r("RE1", "e1", "gnd").r("RC1", "vcc", "c1"),
		want: map[string]string{"C1": Tuning},
	}, {
		// Row: decoupling, any other case (a filtered supply branch); then the
		// inductor from that decoupled net to a collector is a choke.
		name: "decoupled net feeding a choke",
		ckt: newCkt().supply("vcc", 12).r("RF", "vcc", "vcc_f").cap("C1", "vcc_f", "gnd").
			l("L1", "vcc_f", "coll").npn("Q1", "coll", "b", "e").r("R1", "vcc_f", "b").r("R2", "b", "gnd").
			r("R3", "e", "gnd"),
		want: map[string]string{"C1": Decoupling, "L1": Choke},
	}, {
		// Row: choke — one net AC ground, the other a collector, no capacitor
		// across it or from the collector to AC ground.
		name: "choke from the supply",
		ckt:  ceStage().l("L1", "vcc", "coll"),
		want: map[string]string{"L1": Choke},
	}, {
		// Row: tank — a capacitor across the inductor.
		name: "tank, capacitor across",
		ckt:  ceStage().l("L1", "coll", "vcc").cap("C9", "vcc", "coll"),
		want: map[string]string{"L1": Tuning, "C9": Tuning},
	}, {
		// Row: tank — a capacitor from that collector to AC ground.
		name: "tank, capacitor from collector to gnd",
		ckt:  ceStage().l("L1", "vcc", "coll").cap("C9", "coll", "gnd"),
		want: map[string]string{"L1": Tuning, "C9": Tuning},
	}, {
		// Row: inductor, any other case — series inductor in the signal path,
		// and a base inductor to gnd (touches no collector).
		name: "inductor, any other case",
		ckt:  ceStage().l("L1", "rf_in", "x").cap("C9", "x", "base").l("L2", "base", "gnd"),
		want: map[string]string{"L1": Tuning, "L2": Tuning, "C9": Coupling},
	}, {
		// The choke row needs the feed side to be AC ground or decoupled: an
		// inductor from a plain net (behind a resistor, no capacitor) is not a choke.
		name: "undecoupled feed is not a choke",
		ckt: newCkt().supply("vcc", 12).r("RF", "vcc", "vcc_f").l("L1", "vcc_f", "coll").
			npn("Q1", "coll", "b", "gnd").r("R1", "vcc", "b"),
		want: map[string]string{"L1": Tuning},
	}, {
		// An explicit role always wins over the table.
		name: "explicit role wins",
		ckt:  ceStage().capRole("C9", "vcc", "gnd", Bypass).lRole("L1", "vcc", "coll", Tuning).capRole("C8", "emit", "gnd", Decoupling),
		want: map[string]string{"C9": Bypass, "L1": Tuning, "C8": Decoupling},
	}}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			topo := tc.ckt.analyze()
			for ref, want := range tc.want {
				if got := topo.Roles[ref]; got != want {
					t.Errorf("role of %s = %q, want %q", ref, got, want)
				}
			}
		})
	}
}

// RULES.md: a decoupled net is a net other than gnd carrying a capacitor of
// role decoupling, explicit or found.
func TestDecoupled(t *testing.T) {
	topo := newCkt().supply("vcc", 12).r("RF", "vcc", "vcc_f").cap("C1", "vcc_f", "gnd").
		r("R2", "vcc", "x").capRole("C2", "x", "y", Decoupling).r("R3", "y", "gnd").
		cap("C3", "vcc", "gnd").r("R4", "vcc_f", "gnd").analyze()
	want := map[string]bool{"vcc_f": true, "x": true, "y": true, "vcc": true}
	for n := range want {
		if !topo.Decoupled[n] {
			t.Errorf("net %s should be decoupled", n)
		}
	}
	if len(topo.Decoupled) != len(want) {
		t.Errorf("decoupled nets = %v, want %v (never gnd)", topo.Decoupled, want)
	}
}

// RULES.md: the rails and AC-ground nets are gnd and the supply nets; a
// rail's EMF is the supply's nominal volts, 0 for gnd.
func TestRails(t *testing.T) {
	topo := newCkt().supply("vcc", 12).supply("vee", -5).r("R1", "vcc", "x").r("R2", "x", "vee").analyze()
	for n, want := range map[string]bool{"gnd": true, "vcc": true, "vee": true, "x": false} {
		if topo.Rails[n] != want || topo.ACGround(n) != want {
			t.Errorf("rail %s = %v, want %v", n, topo.Rails[n], want)
		}
	}
	for n, want := range map[string]float64{"gnd": 0, "vcc": 12, "vee": -5} {
		if got := topo.RailEMF(n); got != want {
			t.Errorf("RailEMF(%s) = %g, want %g", n, got, want)
		}
	}
}

func TestTouchesAndNets(t *testing.T) {
	topo := ceStage().xfmr("T1", 0.1, "pri", "coll", "vcc", "sec", "rf_out", "gnd").analyze()
	got := topo.Touches("coll")
	want := []Terminal{
		{Ref: "Q1", Kind: "npn", Pin: "collector", Order: 3},
		{Ref: "R4", Kind: "resistor", Pin: "2", Order: 6},
		{Ref: "C4", Kind: "capacitor", Pin: "1", Order: 7},
		{Ref: "T1", Kind: "transformer", Pin: "1", Winding: "pri", Order: 9},
	}
	if len(got) != len(want) {
		t.Fatalf("Touches(coll) = %+v, want %+v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("Touches(coll)[%d] = %+v, want %+v", i, got[i], want[i])
		}
	}
	rfIn := topo.Touches("rf_in")
	if len(rfIn) != 2 || rfIn[0].Ref != "C1" || !rfIn[1].Port || rfIn[1].Ref != "in" {
		t.Errorf("Touches(rf_in) = %+v, want C1 then port in", rfIn)
	}
	if v := topo.Touches("vcc"); !v[len(v)-1].Supply {
		t.Errorf("Touches(vcc) should end with the supply: %+v", v)
	}
	if n := topo.NetsOf("T1"); len(n) != 4 || n[0] != "coll" || n[3] != "gnd" {
		t.Errorf("NetsOf(T1) = %v", n)
	}
	if topo.NetsOf("nope") != nil {
		t.Errorf("NetsOf of an unknown part should be nil")
	}
	if topo.FirstPartOn("rf_out") != "C4" {
		t.Errorf("FirstPartOn(rf_out) = %q, want C4", topo.FirstPartOn("rf_out"))
	}
}
