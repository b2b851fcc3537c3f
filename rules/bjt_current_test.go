package rules_test

import (
	"math"
	"strings"
	"testing"

	"headroom/rules"
)

// The shipped thresholds: 75 % of ic_max by default (equal to NASA
// EEE-INST-002's small-signal transistor figure, values from memory, not
// confirmed; REFERENCES.md §5.3) and 50 % strict.
func TestBJTCurrentThresholdsMatchSources(t *testing.T) {
	if v := shippedParams(t, "default", "bjt.current")["max_load"]; v != 0.75 {
		t.Errorf("default max_load %g, want 0.75", v)
	}
	if v := shippedParams(t, "strict", "bjt.current")["max_load"]; v != 0.5 {
		t.Errorf("strict max_load %g, want 0.5", v)
	}
}

// IC ÷ ic_max against an independent solution of the follower (FORMAT.md §6)
// for a 2N5179 (ic_max 50 mA, vbe 0.75 V at 5 mA, hFE 25..250; figures from
// memory, REFERENCES.md §6).
func TestBJTCurrentClosedForm(t *testing.T) {
	src := followerSrc("10 m post-mixer follower", "2N5179", "1.7V", "22", "25C", "")
	f := marginFinding(t, judgeRule(t, rules.BJTCurrent, src, nil, false), "Q1")
	ic, _, _ := followerPoint(1.7, 22, 0.75, 0.005, math.Sqrt(25*250), 25)
	if want := ic / 0.050; !within(f.Measured, want, 0.005) || f.Absolute != f.Measured {
		t.Errorf("load %g, independent %g", f.Measured, want)
	}
	if f.Measured <= 0.75 || len(f.Changes) != 1 || f.Changes[0].To != "2N3904" {
		t.Errorf("want a failing finding fixed by the 2N3904: %+v", f)
	}
}

// With ic_max written inline a device change cannot help: the fix names the
// largest collector current, max_load × ic_max.
func TestBJTCurrentInlineAdvice(t *testing.T) {
	src := followerSrc("10 m post-mixer follower, inline ic_max", "2N5179", "1.6V", "22", "25C", "\nic_max = \"40mA\"")
	f := marginFinding(t, judgeRule(t, rules.BJTCurrent, src, nil, false), "Q1")
	if len(f.Changes) != 0 || !contains(f.Fix, "ic_max is written inline", "30 mA") {
		t.Errorf("%q %+v", f.Fix, f.Changes)
	}
	if !strings.Contains(f.Message, "40 mA ic_max") {
		t.Errorf("message %q", f.Message)
	}
}
