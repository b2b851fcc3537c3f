package rules_test

import (
	"math"
	"strings"
	"testing"

	"headroom/checker/engine"
	"headroom/rules"
)

// Helpers for the margin rules' unit tests (resistor.power, bjt.*,
// capacitor.voltage): load a circuit written inline, run one rule over it
// with a shipped rule set's parameters (some overridden), and return what
// the rule judged, passing or failing.

// marginFinding returns the one finding about part, failing the test when
// there is none or more than one.
func marginFinding(t testing.TB, fs []engine.Finding, part string) engine.Finding {
	t.Helper()
	var got []engine.Finding
	for _, f := range fs {
		if f.Part == part {
			got = append(got, f)
		}
	}
	if len(got) != 1 {
		t.Fatalf("want one finding about %s, got %d: %+v", part, len(got), fs)
	}
	return got[0]
}

// followerPoint is an independent solution of FORMAT.md §6's model for one
// NPN whose base is held at vb by an ideal source and whose emitter returns
// to gnd through re, collector well above its base (VBC reverse-biased, so
// its Ebers–Moll terms are a few IS and are dropped). IS = ic_ref/e^(VBEref/VT)
// with VBEref = vbe − 2 mV/°C·(T − 25); IB = IC/βF; vb = Vj + IB·rb + (IC + IB)·re
// with Vj the junction's VBE and rb = libraryRB. Solved by bisection on IC;
// vbeOut is VBE between the pins, Vj + IB·rb.
func followerPoint(vb, re, vbe, icRef, beta, tempC float64) (ic, ib, vbeOut float64) {
	vt := thermalVoltage(tempC)
	is := icRef / math.Exp((vbe-0.002*(tempC-25))/vt)
	lo, hi := 0.0, vb/re
	for i := 0; i < 200; i++ {
		ic = (lo + hi) / 2
		v := vt*math.Log(ic/is+1) + ic/beta*libraryRB + ic*(1+1/beta)*re
		if v > vb {
			hi = ic
		} else {
			lo = ic
		}
	}
	return ic, ic / beta, vt*math.Log(ic/is+1) + ic/beta*libraryRB
}

// Every rule of the group documents itself fully (explain prints these): a
// lowercase title without a period, why, the formula, a source, the fix,
// and help for each parameter.
func TestMarginRuleDocs(t *testing.T) {
	for _, r := range []*engine.Rule{rules.ResistorPower, rules.BJTDissipation, rules.BJTCurrent, rules.BJTVoltage,
		rules.CapacitorVoltage, rules.BJTFtHeadroom} {
		d := r.Doc
		if d.Title == "" || strings.ToLower(d.Title[:1]) != d.Title[:1] || strings.HasSuffix(d.Title, ".") {
			t.Errorf("%s: title %q", r.ID, d.Title)
		}
		if d.Why == "" || d.Formula == "" || d.Source == "" || d.Fix == "" || r.Run == nil {
			t.Errorf("%s: incomplete doc", r.ID)
		}
		if !strings.Contains(d.Source, "common practice") && !strings.Contains(d.Source, "IEC") {
			t.Errorf("%s: source %q names neither a standard nor common practice", r.ID, d.Source)
		}
		for _, p := range d.Params {
			if p.Help == "" {
				t.Errorf("%s: parameter %s has no help", r.ID, p.Name)
			}
		}
	}
}
