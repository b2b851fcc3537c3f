package rules_test

import (
	"errors"
	"strings"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/rules"
)

// A band analysis that cannot be computed is a failing bias.region item that
// names the reason, never a silent pass of the rules judged in the band
// (FORMAT.md §7 asks the same of an operating point that cannot be found).
// The circuit is a demo of our own; the failure is put into the case by hand,
// as an in-range circuit whose small-signal network is exactly singular is
// not known to us.
func TestBiasRegionReportsFailedBandAnalysis(t *testing.T) {
	src := `[circuit]
name = "20 m test load"
band = ["14MHz", "14.35MHz"]

[supplies.vcc]
volts = "9V"

[parts.R1]
kind = "resistor"
value = "1k"
nets = ["vcc", "gnd"]
`
	c, err := circuit.LoadBytes("test.toml", []byte(src), circuit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	cs := analysis.Run(c, nil)
	if cs.OP == nil || cs.AC == nil {
		t.Fatalf("the demo circuit should analyse: %v %v", cs.OPErr, cs.ACErr)
	}
	cfg := &engine.Config{Rules: []*engine.Rule{rules.BiasRegion}, Severity: map[string]engine.Severity{"bias.region": engine.Error},
		Params: map[string]map[string]float64{"bias.region": shippedParams(t, "default", "bias.region")}, Corners: "nominal"}
	fs, err := engine.Evaluate(cs, nil, cfg)
	if err != nil {
		t.Fatal(err)
	}
	if len(fs) != 0 {
		t.Fatalf("no transistor, analysis fine: want no item, got %v", fs)
	}
	cs.AC, cs.ACErr = nil, errors.New("small-signal network at 1.4e+07 Hz: singular network")
	fs, err = engine.Evaluate(cs, nil, cfg)
	if err != nil {
		t.Fatal(err)
	}
	if len(fs) != 1 || !fs[0].Failing() || !strings.Contains(fs[0].Message, "singular network") ||
		!strings.Contains(fs[0].Message, "not judged") {
		t.Fatalf("want one failing item naming the reason, got %+v", fs)
	}
}
