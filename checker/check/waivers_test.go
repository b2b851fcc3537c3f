package check

import (
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/engine"
)

func TestWaivers(t *testing.T) {
	c := &circuit.Circuit{Waivers: []*circuit.Waiver{
		{Rule: "resistor.power", Part: "R4", Reason: "1 W part", Expires: "2027-06-30", Pos: circuit.Pos{Line: 40}},
		{Rule: "bjt.current", Part: "Q1", Reason: "old", Expires: "2026-01-31", Pos: circuit.Pos{Line: 44}},
		{Rule: "coupling.reactance", Reason: "whole file, nothing to match", Pos: circuit.Pos{Line: 48}},
	}}
	cfg := &engine.Config{Severity: map[string]engine.Severity{ruleExpired: engine.Warning, ruleUnused: engine.Info}}
	findings := func() []engine.Finding {
		return []engine.Finding{
			{Rule: "resistor.power", Part: "R4", Severity: engine.Warning},
			{Rule: "resistor.power", Part: "R5", Severity: engine.Warning},
			{Rule: "bjt.current", Part: "Q1", Severity: engine.Warning},
		}
	}
	// The day a waiver names is still in force (FORMAT.md §2: "in force through that day").
	out := applyWaivers(c, cfg, findings(), "2027-06-30", nil)
	if !out[0].Waived || out[0].Reason != "1 W part" {
		t.Errorf("R4 should be waived through its expiry day: %+v", out[0])
	}
	if out[1].Waived {
		t.Error("a waiver for R4 must not waive R5")
	}
	if out[2].Waived {
		t.Error("an expired waiver must not waive")
	}
	var expired, unused int
	for _, f := range out[3:] {
		switch f.Rule {
		case ruleExpired:
			expired++
			if f.Pos.Line != 44 {
				t.Errorf("waiver.expired points at line %d, want the waiver's 44", f.Pos.Line)
			}
		case ruleUnused:
			unused++
			if f.Pos.Line != 48 {
				t.Errorf("waiver.unused points at line %d, want the waiver's 48", f.Pos.Line)
			}
		}
	}
	if expired != 1 || unused != 1 {
		t.Fatalf("want one expired and one unused waiver finding, got %d and %d", expired, unused)
	}
	// A day later the first waiver has expired too.
	out = applyWaivers(c, cfg, findings(), "2027-07-01", nil)
	if out[0].Waived {
		t.Error("the R4 waiver expired on 2027-06-30")
	}
	// Off rules raise nothing.
	cfg.Severity[ruleExpired], cfg.Severity[ruleUnused] = engine.Off, engine.Off
	if out = applyWaivers(c, cfg, findings(), "2027-07-01", nil); len(out) != 3 {
		t.Errorf("with the waiver rules off, no waiver findings: got %d findings", len(out))
	}
}
