package rules_test

import (
	"sort"
	"strings"
	"testing"

	"headroom/rules"
)

// The thresholds, 25 % (15 % strict), are common practice with no published
// source; the rule runs only in a worst-case search and holds the supplies
// (RULES.md: a supply's own range moves IC by design).
func TestDriftThresholdsAndFlags(t *testing.T) {
	if d, s := shippedParams(t, "default", "bias.drift")["max_fraction"], shippedParams(t, "strict", "bias.drift")["max_fraction"]; d != 0.25 || s != 0.15 {
		t.Errorf("max_fraction %g [%g], want 0.25 [0.15]", d, s)
	}
	if !rules.BiasDrift.NeedsCorners || !rules.BiasDrift.HoldSupplies {
		t.Error("bias.drift must need corners and hold the supplies")
	}
	if fs := judgeRule(t, rules.BiasDrift, fedStage("270k", "180"), nil, false); len(fs) != 0 {
		t.Errorf("judged without corners: %+v", fs)
	}
}

func cornerKeys(c map[string]float64) string {
	var ks []string
	for k := range c {
		ks = append(ks, k)
	}
	sort.Strings(ks)
	return strings.Join(ks, " ")
}

// The current-fed 80 m stage: IC = hFE·(12 − VBE)/(R1 + (hFE + 1)·R3) by the
// closed form, at hFE 300 with R1 and R3 at −5 % (up) and hFE 100 with both
// at +5 % (down). The collector resistor does not move IC in a model without
// Early effect, so it must not appear in the corner; hFE is the dominant
// parameter.
func TestDriftClosedForm(t *testing.T) {
	fs := judgeRule(t, rules.BiasDrift, fedStage("270k", "180"), nil, true)
	up, down := biasItem(t, fs, "Q1", "up"), biasItem(t, fs, "Q1", "down")
	nom := dividerStage(12, 270e3, 180, nominalHFE, 0.70, 0.010, 25).IC
	hiIC := dividerStage(12, 270e3*0.95, 180*0.95, 300, 0.70, 0.010, 25).IC
	loIC := dividerStage(12, 270e3*1.05, 180*1.05, 100, 0.70, 0.010, 25).IC
	if want := hiIC/nom - 1; !within(up.Measured, want, 0.005) {
		t.Errorf("up %g, closed form %g", up.Measured, want)
	}
	if want := 1 - loIC/nom; !within(down.Measured, want, 0.005) {
		t.Errorf("down %g, closed form %g", down.Measured, want)
	}
	if k := cornerKeys(up.Corner); k != "Q1.hfe R1 R3" {
		t.Errorf("up corner %q, want Q1.hfe R1 R3", k)
	}
	if !contains(up.Fix, "dominant parameter is Q1 hFE 300", "divider") || len(up.Changes) != 0 {
		t.Errorf("fix %q", up.Fix)
	}
}

// Supplies are held: a stiff 20 m preamp on a 9..15 V supply drifts by the
// closed form's figure at 12 V, with no supply in the corner.
func TestDriftHoldsSupplies(t *testing.T) {
	src := `[circuit]
name = "20 m preamp, wide supply"
band = ["14MHz", "14.35MHz"]

[supplies.vcc]
volts = "12V"
range = ["9V", "15V"]

[parts.R1]
kind = "resistor"
value = "10k"
nets = ["vcc", "base"]

[parts.R2]
kind = "resistor"
value = "2k2"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "120"
nets = ["emit", "gnd"]
tolerance = "1%"

[parts.R4]
kind = "resistor"
value = "470"
nets = ["vcc", "coll"]
`
	up := biasItem(t, judgeRule(t, rules.BiasDrift, src, nil, true), "Q1", "up")
	nom := divider(12, 10e3, 2.2e3, 120, nominalHFE, 0.70, 0.010, 25).IC
	hi := divider(12, 9.5e3, 2.31e3, 118.8, 300, 0.70, 0.010, 25).IC
	if want := hi/nom - 1; !within(up.Measured, want, 0.005) || up.Measured > 0.25 {
		t.Errorf("up %g, closed form %g (supply held)", up.Measured, want)
	}
	if _, ok := up.Corner["vcc"]; ok {
		t.Errorf("the supply moved: %v", up.Corner)
	}
}

// A stiff divider with little emitter voltage over a wide ambient: VBE's
// 2 mV/°C (FORMAT.md §6) dominates, and the fix names the ambient.
func TestDriftAmbientDominates(t *testing.T) {
	src := ceStage("10 m mast-head preamp", "12V", "2N3904", "10k", "1k", "33", "330", "")
	src = strings.Replace(src, `band = ["7MHz", "7.2MHz"]`, `band = ["28MHz", "29.7MHz"]`+"\n"+`ambient = ["-20C", "60C"]`, 1)
	down := biasItem(t, judgeRule(t, rules.BiasDrift, src, nil, true), "Q1", "down")
	nom := divider(12, 10e3, 1e3, 33, nominalHFE, 0.70, 0.010, 25).IC
	cold := divider(12, 10e3*1.05, 1e3*0.95, 33*1.05, 100, 0.70, 0.010, -20).IC
	if want := 1 - cold/nom; !within(down.Measured, want, 0.005) {
		t.Errorf("down %g, closed form %g at %v", down.Measured, want, down.Corner)
	}
	if !contains(down.Fix, "dominant parameter is ambient -20 °C", "2 mV per °C") {
		t.Errorf("fix %q", down.Fix)
	}
}
