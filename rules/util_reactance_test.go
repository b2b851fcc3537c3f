package rules

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/corners"
	"headroom/checker/engine"
	"headroom/checker/ruleset"
)

// Helpers shared by the reactance rules' tests (coupling, bypass, decoupling,
// choke, winding). Names start with rx so they stay clear of other rules'
// test helpers in this package.

// rxRun loads src, runs one rule over it (nominal, or the worst-case search)
// under the shipped set (default or strict) with params overridden, and
// returns everything the rule judged, passing or failing.
func rxRun(t testing.TB, src, set, ruleID string, worst bool, params map[string]float64) []engine.Finding {
	t.Helper()
	c, err := circuit.LoadBytes("test.toml", []byte(src), circuit.Options{})
	if err != nil {
		t.Fatalf("load: %v", err)
	}
	s, err := (&ruleset.Loader{Rules: All()}).Load(set)
	if err != nil {
		t.Fatalf("rule set: %v", err)
	}
	cfg := s.Config(All())
	cfg.Severity = map[string]engine.Severity{ruleID: engine.Warning}
	cfg.Params = map[string]map[string]float64{ruleID: {}}
	for k, v := range s.Params[ruleID] {
		cfg.Params[ruleID][k] = v
	}
	for k, v := range params {
		cfg.Params[ruleID][k] = v
	}
	cs := analysis.Run(c, nil)
	if cs.OPErr != nil || cs.ACErr != nil {
		t.Fatalf("analysis: %v %v", cs.OPErr, cs.ACErr)
	}
	var fs []engine.Finding
	if worst {
		fs, err = corners.Worst(c, cs.Topo, cs, cfg)
	} else {
		fs, err = engine.Evaluate(cs, nil, cfg)
	}
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range fs {
		if f.HasMetric && (rxBad(f.Measured) || rxBad(f.Limit)) || strings.Contains(f.Message+f.Fix, "NaN") ||
			strings.Contains(f.Message+f.Fix, "Inf") {
			t.Errorf("%s %s: a figure is not finite: %+v", f.Rule, f.Part, f)
		}
	}
	return fs
}

func rxBad(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }

// rxOne returns the one finding about part, failing the test when there is
// not exactly one.
func rxOne(t *testing.T, fs []engine.Finding, part string) engine.Finding {
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

// rxNear fails unless got is within rel (a fraction) of want.
func rxNear(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.6g, want %.6g (within %.2g %%)", what, got, want, rel*100)
	}
}

// rxChange returns the "to" of the change to part.key, or "".
func rxChange(f engine.Finding, part, key string) string {
	for _, c := range f.Changes {
		if c.Part == part && c.Key == key {
			return c.To
		}
	}
	return ""
}

// The closed forms below are written out here, independently of the
// analysis packages, from FORMAT.md §6 and the hybrid-π relations of
// REFERENCES.md §9, so that the tests can check the code's circuit
// impedances against them.

// rxVT is the thermal voltage kT/q at tc °C (exact SI constants, REFERENCES.md §3).
func rxVT(tc float64) float64 { return 1.380649e-23 * (tc + 273.15) / 1.602176634e-19 }

// rxDividerBias solves a divider-biased NPN in the forward-active region by
// fixed-point iteration on the Ebers–Moll law (βR terms negligible there):
// VTh − (IC/β)·RTh − VBE = IC·(1 + 1/β)·RE with VBE = VT·ln(IC/IS + 1),
// IS = icRef/exp(vbeRef/VT) at the ambient (vbeRef falls 2 mV/°C above 25 °C).
func rxDividerBias(vcc, r1, r2, re, beta, vbe, icRef, tc float64) (ic float64) {
	vt := rxVT(tc)
	is := icRef / math.Exp((vbe-0.002*(tc-25))/vt)
	vth, rth := vcc*r2/(r1+r2), r1*r2/(r1+r2)
	ic = 1e-3
	for i := 0; i < 200; i++ {
		vbeNow := vt * math.Log(ic/is+1)
		ic = (vth - vbeNow) / (rth/beta + re*(1+1/beta))
	}
	return ic
}

// rxEmitterZ is the impedance looking into an emitter whose base sees zb:
// (zπ + zb)/(1 + gm·zπ), zπ = rπ ∥ Cπ, Cμ left out (REFERENCES.md §10's
// "impedance looking into the emitter" with the hybrid-π zπ).
func rxEmitterZ(ic, beta, ft, cmu, f, tc float64, zb complex128) complex128 {
	gm := ic / rxVT(tc)
	rpi := beta / gm
	cpi := math.Max(gm/(2*math.Pi*ft)-cmu, 0)
	zpi := 1 / complex(1/rpi, 2*math.Pi*f*cpi)
	return (zpi + zb) / (1 + complex(gm, 0)*zpi)
}

// rxPar is the parallel combination of impedances.
func rxPar(zs ...complex128) complex128 {
	var y complex128
	for _, z := range zs {
		y += 1 / z
	}
	return 1 / y
}

// rxCap is a capacitor's impedance at f.
func rxCap(c, f float64) complex128 { return complex(0, -1/(2*math.Pi*f*c)) }

func rxAbs(z complex128) float64 { return cmplx.Abs(z) }
