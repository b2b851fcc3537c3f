package dc

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"headroom/checker/circuit"
)

func mustFail(t *testing.T, c *circuit.Circuit, cause Cause) *Failure {
	t.Helper()
	r, err := Solve(c)
	if err == nil {
		t.Fatalf("Solve succeeded (%v), want a %s failure", r.V, cause)
	}
	var f *Failure
	if !errors.As(err, &f) {
		t.Fatalf("error %T %v is not a *Failure", err, err)
	}
	if f.Cause != cause {
		t.Errorf("cause %q (%s), want %q", f.Cause, f.Reason, cause)
	}
	return f
}

func mentions(t *testing.T, f *Failure, words ...string) {
	t.Helper()
	for _, w := range words {
		if !strings.Contains(f.Reason, w) {
			t.Errorf("reason %q does not name %s", f.Reason, w)
		}
	}
}

// (i) FORMAT.md §6: "A loop made only of zero-resistance inductors or windings
// has no defined DC current" — it must be reported, naming the parts.
func TestZeroResistanceLoop(t *testing.T) {
	c := dividerStage().
		ind("L1", "coll", "tap", 10e-6, 0).
		xfmr("T1", winding("primary", "tap", "coll", 10, 0), winding("secondary", "out2", "gnd", 3, 0.2)).
		res("RL", "out2", "gnd", 1e3).c
	f := mustFail(t, c, Connectivity)
	mentions(t, f, "L1", "T1.primary", "resistance")
	if !slices.Contains(f.Parts, "L1") || !slices.Contains(f.Parts, "T1.primary") {
		t.Errorf("parts %v, want L1 and T1.primary", f.Parts)
	}
	if f.Part == "" {
		t.Error("no part named")
	}

	// The fix the message asks for works: a resistance on one of them.
	c.Part("L1").Resistance = 0.3
	r := solve(t, c)
	// Two paths from coll to tap: 0.3 Ω and a short; all of it in the short.
	checkAbs(t, "L1 current beside a short", r.Parts["L1"].Current, 0, 1e-12)
	checkKCL(t, c, r, 1e-9)
}

// A choke with both ends on one net is a one-part loop.
func TestSelfLoopChoke(t *testing.T) {
	c := dividerStage().ind("L9", "coll", "coll", 1e-6, 0).c
	f := mustFail(t, c, Connectivity)
	mentions(t, f, "L9")
}

// (i) two ideal supplies joined by a choke with no resistance.
func TestShortedSupplies(t *testing.T) {
	c := dividerStage().supply("v5", 5, 0).ind("L1", "vcc", "v5", 1e-6, 0).c
	f := mustFail(t, c, Connectivity)
	mentions(t, f, "vcc", "v5", "L1", "shorted")
	if f.Net != "vcc" && f.Net != "v5" {
		t.Errorf("net %q, want one of the supplies", f.Net)
	}

	// With a DC resistance the two rails are merely loaded: (12 − 5)/1.2 Ω.
	c.Part("L1").Resistance = 1.2
	r := solve(t, c)
	checkRel(t, "choke current between rails", r.Parts["L1"].Current, 7/1.2, 1e-9)
	checkKCL(t, c, r, 1e-9)
}

// A supply shorted to gnd through a zero-resistance choke.
func TestSupplyShortedToGnd(t *testing.T) {
	c := dividerStage().ind("L2", "vcc", "gnd", 1e-6, 0).c
	f := mustFail(t, c, Connectivity)
	mentions(t, f, "vcc", "L2", "gnd")
	if f.Net != "vcc" || f.Part != "L2" {
		t.Errorf("net %q part %q, want vcc and L2", f.Net, f.Part)
	}
	// Behind an impedance the same short is a defined (if silly) circuit:
	// 12 V / 0.5 Ω. net.connectivity judges that; the DC solve must not fail.
	c.Supplies[0].Impedance = 0.5
	r := solve(t, c)
	checkRel(t, "short-circuit current", r.SupplyCurrent["vcc"], 24, 1e-9)
}

// (j) a stage whose base has no bias is cut off; one whose base is driven
// hard is saturated (FORMAT.md §5: cutoff IC < 1 µA tested first, then
// saturated VCE < 0.3 V).
func TestRegions(t *testing.T) {
	// Base only on a coupling capacitor: floating, held at 0 V by the
	// 1e-12 S aid of FORMAT.md §6.
	c := newCircuit(25).supply("vcc", 12, 0).
		port("in", "rf_in", "in", 50).cap("C1", "rf_in", "base", 10e-9).
		res("RC", "vcc", "coll", 1e3).res("RE", "emit", "gnd", 100).
		npn("Q1", "coll", "base", "emit", npn3904()).c
	r := solve(t, c)
	if q := r.BJTs["Q1"]; q.Region != "cutoff" || !(q.IC < 1e-6) {
		t.Errorf("floating base: %v, want cutoff", q)
	}
	checkKCL(t, c, r, 1e-9)

	// A PNP on a −12 V rail whose base is returned to its emitter (gnd)
	// through 10k: VEB = 0, cut off.
	c = newCircuit(25).supply("vneg", -12, 0).
		res("RB", "base", "gnd", 10e3).res("RC", "coll", "vneg", 1e3).
		pnp("Q1", "coll", "base", "gnd", pnp3906()).c
	r = solve(t, c)
	if q := r.BJTs["Q1"]; q.Region != "cutoff" {
		t.Errorf("PNP with VEB = 0: %v, want cutoff", q)
	}
	checkKCL(t, c, r, 1e-9)

	// Saturated: 10k from the rail into the base, 10k collector load. The
	// base current (~1.1 mA) times hFE far exceeds the 1.2 mA the load allows.
	c = newCircuit(25).supply("vcc", 12, 0).
		res("RB", "vcc", "base", 10e3).res("RC", "vcc", "coll", 10e3).
		npn("Q1", "coll", "base", "gnd", npn3904()).c
	r = solve(t, c)
	q := r.BJTs["Q1"]
	if q.Region != "saturated" || !(q.VCE < 0.3) {
		t.Errorf("overdriven stage: %v, want saturated", q)
	}
	checkRel(t, "saturated IC set by the load", q.IC, (12-q.VCE)/10e3, 1e-6)
	checkRel(t, "power is the sum over terminals", q.Power, q.VCE*q.IC+q.VBE*q.IB, 1e-12)
	checkKCL(t, c, r, 1e-9)
}

// The fall-backs must land on the same operating point as plain Newton,
// with and without a base resistance (an internal base node).
func TestFallbacksAgree(t *testing.T) {
	for name, b := range map[string]*builder{"npn": dividerStage(), "pnp": pnpStage(),
		"npn rb 47": dividerStage(), "pnp rb 47": pnpStage()} {
		if strings.HasSuffix(name, "rb 47") {
			b.c.Part("Q1").BJT.RB = 47
		}
		want := solve(t, b.c)
		nl, f := compile(b.c)
		if f != nil {
			t.Fatal(f)
		}
		for method, run := range map[string]func(*solver) outcome{
			"gmin": (*solver).gminStepping, "source": (*solver).sourceStepping,
		} {
			s := newSolver(nl)
			if o := run(s); o != converged {
				t.Errorf("%s %s stepping: outcome %d", name, method, o)
				continue
			}
			got, err := nl.result(b.c, s.x, s.iters, method)
			if err != nil {
				t.Fatal(err)
			}
			checkRel(t, name+" "+method+" IC", got.BJTs["Q1"].IC, want.BJTs["Q1"].IC, 1e-7)
			checkKCL(t, b.c, got, 1e-9)
		}
	}
}

// When Newton cannot settle, the failure names the transistors.
func TestNoConvergenceNamesTransistor(t *testing.T) {
	nl, f := compile(dividerStage().c)
	if f != nil {
		t.Fatal(f)
	}
	s := newSolver(nl)
	if o := s.newton(1, 0, 2, true); o != diverged {
		t.Fatalf("two iterations converged?")
	}
	fl := s.convergenceFailure()
	if fl.Cause != NoConvergence || fl.Part != "Q1" {
		t.Errorf("failure %+v, want no-convergence naming Q1", fl)
	}
	mentions(t, fl, "Q1")
}

// Values the loader should have refused come back as an Invalid failure,
// never a panic.
func TestInvalidValues(t *testing.T) {
	cases := map[string]func(c *circuit.Circuit){
		"zero resistor":  func(c *circuit.Circuit) { c.Part("R1").Value = 0 },
		"NaN resistor":   func(c *circuit.Circuit) { c.Part("R2").Value = math.NaN() },
		"no BJT figures": func(c *circuit.Circuit) { c.Part("Q1").BJT = nil },
		"zero hFE":       func(c *circuit.Circuit) { c.Part("Q1").BJT.HFEMin = 0 },
		"two-net BJT":    func(c *circuit.Circuit) { c.Part("Q1").Nets = c.Part("Q1").Nets[:2] },
		"negative DCR": func(c *circuit.Circuit) {
			c.Parts = append(c.Parts, &circuit.Part{Ref: "L5", Kind: circuit.Inductor, Resistance: -1, Nets: []string{"coll", "gnd"}})
		},
		"pot setting 2": func(c *circuit.Circuit) {
			c.Parts = append(c.Parts, &circuit.Part{Ref: "RV", Kind: circuit.Potentiometer, Value: 1e3, Setting: 2, Nets: []string{"coll", "x", "gnd"}})
		},
		"infinite supply": func(c *circuit.Circuit) { c.Supplies[0].Volts = math.Inf(1) },
		"zero port":       func(c *circuit.Circuit) { c.Ports[0].Impedance = 0 },
		"absolute zero":   func(c *circuit.Circuit) { c.Ambient.Nominal = -300 },
		"unknown part kind": func(c *circuit.Circuit) {
			c.Parts = append(c.Parts, &circuit.Part{Ref: "D1", Kind: "diode", Nets: []string{"coll", "gnd"}})
		},
	}
	for name, spoil := range cases {
		c := dividerStage().c
		spoil(c)
		f := mustFail(t, c, Invalid)
		if f.Reason == "" {
			t.Errorf("%s: empty reason", name)
		}
	}
	if _, err := Solve(nil); err == nil {
		t.Error("nil circuit solved")
	}
}

// A circuit with every part on gnd has no unknowns and still gives a result.
func TestNoNets(t *testing.T) {
	c := newCircuit(25).res("R1", "gnd", "gnd", 1e3).c
	r := solve(t, c)
	if r.V["gnd"] != 0 || r.Parts["R1"].Current != 0 {
		t.Errorf("%+v", r)
	}
}

// A supply straight across a base-emitter junction has no bounded model
// current (IS·e^(12 V/VT)); Solve must say so and name the transistor rather
// than iterate.
func TestOverdrivenJunction(t *testing.T) {
	c := newCircuit(25).supply("vcc", 12, 0).
		res("RC", "vcc", "coll", 1e3).
		npn("Q1", "coll", "vcc", "gnd", npn3904()).c
	f := mustFail(t, c, Overdriven)
	mentions(t, f, "Q1", "base-emitter")
	if f.Part != "Q1" {
		t.Errorf("part %q, want Q1", f.Part)
	}
}
