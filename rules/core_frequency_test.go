package rules_test

import (
	"testing"

	"headroom/rules"
)

// xfmr writes a 1:2 transformer between two ports on core, over band.
func xfmr(band, core string) string {
	return `[circuit]
name = "transformer board"
band = ` + band + `

[ports.in]
net = "rf_in"
direction = "in"

[ports.out]
net = "rf_out"
direction = "out"
impedance = "200"

[parts.T1]
kind = "transformer"
` + core + `
windings.primary = { turns = 6, nets = ["rf_in", "gnd"] }
windings.secondary = { turns = 12, nets = ["rf_out", "gnd"] }
`
}

// The band must lie inside the core's f_range (the shipped mu 800 ferrite:
// 1 MHz to 50 MHz, a figure the library marks as from memory): one item per
// edge, low >= range low, high <= range high, in Hz; an edge exactly on the
// range passes.
func TestCoreFrequencyEdges(t *testing.T) {
	core := `core = "toroid-12.7x7.15x4.9-mu800"`
	for _, c := range []struct {
		band          string
		lowOK, highOK bool
	}{
		{`["10.1MHz", "10.15MHz"]`, true, true},
		{`["1MHz", "50MHz"]`, true, true}, // both edges exactly on the range
		{`["50MHz", "54MHz"]`, true, false},
		{`["500kHz", "2MHz"]`, false, true},
		{`["500kHz", "60MHz"]`, false, false},
	} {
		fs := judgeRule(t, rules.CoreFrequency, xfmr(c.band, core), nil, false)
		lo, hi := biasItem(t, fs, "T1", "low"), biasItem(t, fs, "T1", "high")
		if lo.Failing() == c.lowOK || hi.Failing() == c.highOK {
			t.Errorf("band %s: low failing %v, high failing %v", c.band, lo.Failing(), hi.Failing())
		}
		if lo.Limit != 1e6 || lo.Comparison != ">=" || hi.Limit != 50e6 || hi.Comparison != "<=" || lo.Unit != "Hz" {
			t.Errorf("band %s: %+v %+v", c.band, lo, hi)
		}
	}
}

// A core given by al alone has no f_range: not judged. The advice for a 6 m
// band on a HF ferrite names the same-size mu 125 core (1 to 200 MHz) first.
func TestCoreFrequencyScopeAndAdvice(t *testing.T) {
	if fs := judgeRule(t, rules.CoreFrequency, xfmr(`["50MHz", "54MHz"]`, `al = "360nH"`), nil, false); len(fs) != 0 {
		t.Errorf("a core without f_range was judged: %+v", fs)
	}
	fs := judgeRule(t, rules.CoreFrequency, xfmr(`["50MHz", "54MHz"]`, `core = "toroid-12.7x7.15x4.9-mu800"`), nil, false)
	hi := biasItem(t, fs, "T1", "high")
	if !contains(hi.Fix, ": toroid-12.7x7.15x4.9-mu125") || len(hi.Changes) != 0 {
		t.Errorf("advice %q", hi.Fix)
	}
}
