package rules_test

import (
	"math"
	"testing"

	"headroom/checker/edit"
	"headroom/checker/engine"
)

// Helpers for the unit tests of bias.*, match.input, values.preferred,
// core.frequency and safety.voltage: run one rule over a circuit written
// inline, and independent closed forms of FORMAT.md §6's DC model that share
// nothing with the code under test.

// biasItem returns the one item about part with the given bound ("" for a
// one-bound rule), failing the test when there is none or more than one.
func biasItem(t testing.TB, fs []engine.Finding, part, bound string) engine.Finding {
	t.Helper()
	var got []engine.Finding
	for _, f := range fs {
		if f.Part == part && f.Bound == bound {
			got = append(got, f)
		}
	}
	if len(got) != 1 {
		t.Fatalf("want one item about %s (bound %q), got %d: %+v", part, bound, len(got), fs)
	}
	return got[0]
}

// biasApply applies a finding's changes to src and returns the edited text.
func biasApply(t testing.TB, src string, f engine.Finding) string {
	t.Helper()
	out, err := edit.Apply([]byte(src), f.Changes)
	if err != nil {
		t.Fatalf("applying %+v: %v", f.Changes, err)
	}
	return string(out)
}

// stage is the DC state of one transistor found by closed form.
type stage struct {
	IC, IB, VBE, VB, VE float64 // magnitudes, V from the return rail; VBE between the pins
}

// libraryRB is the base spreading resistance every shipped transistor has
// (checker/library/parts.toml: 10 Ω, from a public device model or from
// memory, REFERENCES-2.md §1.4). The closed forms below carry it in series
// with the base, as the model does.
const libraryRB = 10.0 // Ω

// dividerStage solves FORMAT.md §6's model for a transistor whose base is
// fed from a Thevenin source (vth behind rth, from the return rail) and
// whose emitter returns through re, collector well clear of saturation so
// that the reverse Ebers–Moll terms are negligible: IC = IS·e^(VBE/VT),
// IS = icRef/e^(VBEref/VT), VBEref = vbe − 2 mV/°C·(T − 25), IB = IC/β,
// vth = (rth + rb)·IB + VBE + (IC + IB)·re with rb = libraryRB, VBE the
// junction's. Bisection on IC.
func dividerStage(vth, rth, re, beta, vbe, icRef, tempC float64) stage {
	vt := thermalVoltage(tempC)
	is := icRef / math.Exp((vbe-0.002*(tempC-25))/vt)
	lo, hi := 0.0, vth/re
	var ic float64
	for i := 0; i < 200; i++ {
		ic = (lo + hi) / 2
		if vt*math.Log(ic/is+1)+ic/beta*(rth+libraryRB)+ic*(1+1/beta)*re > vth {
			hi = ic
		} else {
			lo = ic
		}
	}
	ib := ic / beta
	return stage{IC: ic, IB: ib, VBE: vt*math.Log(ic/is+1) + ib*libraryRB, VB: vth - rth*ib, VE: (ic + ib) * re}
}

// divider is dividerStage for a divider of r1 (to the feed) and r2 (to the
// return rail) across vcc.
func divider(vcc, r1, r2, re, beta, vbe, icRef, tempC float64) stage {
	return dividerStage(vcc*r2/(r1+r2), r1*r2/(r1+r2), re, beta, vbe, icRef, tempC)
}

// nominalHFE of the 2N3904 and 2N3906 (hfe 100..300, no hfe_typ): √(100·300).
var nominalHFE = math.Sqrt(100 * 300)

// ceStage writes a common-emitter stage: a divider R1 (vcc–base) and R2
// (base–gnd), R3 in the emitter (bypassed by C2), R4 from vcc to the
// collector. Values are circuit-file strings; extra is appended.
func ceStage(name, vcc, device, r1, r2, r3, r4, extra string) string {
	return `[circuit]
name = "` + name + `"
band = ["7MHz", "7.2MHz"]

[supplies.vcc]
volts = "` + vcc + `"

[parts.R1]
kind = "resistor"
value = "` + r1 + `"
nets = ["vcc", "base"]

[parts.R2]
kind = "resistor"
value = "` + r2 + `"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "` + device + `"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "` + r3 + `"
nets = ["emit", "gnd"]

[parts.C2]
kind = "capacitor"
value = "100n"
nets = ["emit", "gnd"]

[parts.R4]
kind = "resistor"
value = "` + r4 + `"
nets = ["vcc", "coll"]
` + extra
}
