package rules_test

import (
	"fmt"
	"strings"
	"testing"

	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/rules"
)

// board writes one part per entry of parts ("R1 resistor 4k7 5%"), each from
// its own net to gnd.
func board(parts ...string) string {
	var b strings.Builder
	b.WriteString("[circuit]\nname = \"value board\"\nband = [\"7MHz\", \"7.2MHz\"]\n\n[supplies.vcc]\nvolts = \"12V\"\n")
	for i, p := range parts {
		f := strings.Fields(p)
		fmt.Fprintf(&b, "\n[parts.%s]\nkind = %q\nvalue = %q\nnets = [\"n%d\", \"gnd\"]\n", f[0], f[1], f[2], i)
		if len(f) > 3 {
			fmt.Fprintf(&b, "tolerance = %q\n", f[3])
		}
		fmt.Fprintf(&b, "\n[parts.X%s]\nkind = \"resistor\"\nvalue = \"1k\"\nnets = [\"vcc\", \"n%d\"]\n", f[0], i)
	}
	return b.String()
}

func failing(fs []engine.Finding) map[string]engine.Finding {
	out := map[string]engine.Finding{}
	for _, f := range fs {
		if f.Failing() {
			out[f.Part] = f
		}
	}
	return out
}

// IEC 60063 (REFERENCES.md §1): the E24 members that differ from the rounded
// geometric series — 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2 — are preferred
// at 5 %, and the geometric roundings in their place (2.6, 2.9, 3.2, 3.5,
// 3.8, 4.2, 4.6, 8.3) are not.
func TestValuesPreferredE24Irregulars(t *testing.T) {
	std := []string{"2k7", "3k0", "3k3", "3k6", "3k9", "4k3", "4k7", "8k2"}
	geo := []string{"2k6", "2k9", "3k2", "3k5", "3k8", "4k2", "4k6", "8k3"}
	var parts []string
	for i := range std {
		parts = append(parts, fmt.Sprintf("S%d resistor %s 5%%", i, std[i]), fmt.Sprintf("G%d resistor %s 5%%", i, geo[i]))
	}
	bad := failing(judgeRule(t, rules.ValuesPreferred, board(parts...), nil, false))
	for i := range std {
		if _, ok := bad[fmt.Sprintf("S%d", i)]; ok {
			t.Errorf("%s (E24) was flagged", std[i])
		}
		f, ok := bad[fmt.Sprintf("G%d", i)]
		if !ok {
			t.Errorf("%s (not E24) was not flagged", geo[i])
			continue
		}
		// The nearest series value is the IEC one it stands in for.
		want, _ := quantity.Parse(std[i], quantity.Ohm)
		if len(f.Changes) != 1 {
			t.Errorf("%s: fix %q without a change", geo[i], f.Fix)
			continue
		}
		if got, err := quantity.Parse(f.Changes[0].To, quantity.Ohm); err != nil || got != want {
			t.Errorf("%s: fix %q %+v, want %s", geo[i], f.Fix, f.Changes, std[i])
		}
	}
}

// The series follow the tolerance (≤ 1 % E96, ≤ 2 % E48, ≤ 5 % E24, ≤ 10 %
// E12, else E6) and a close-tolerance part may take any coarser series
// (RULES.md; REFERENCES.md §1). Deviations are |v − n|/n by hand.
func TestValuesPreferredSeriesForTolerance(t *testing.T) {
	fs := judgeRule(t, rules.ValuesPreferred, board(
		"A resistor 4k7 1%",   // E24 value at 1 %: fine
		"B resistor 4k75 1%",  // E96 4.75: fine
		"C resistor 4k75 5%",  // not E24: 4.7 is 1.064 % away
		"D resistor 4k64 2%",  // E48 4.64: fine
		"E resistor 4k75 2%",  // E96 but not E48 (4.64, 4.87), nor E24 (4.7)
		"F capacitor 27n 10%", // E12: fine
		"G capacitor 27n 20%", // E6: 22n and 33n; 33n is 18.18 % away
		"H capacitor 1n5 20%", // E6: fine
		"I resistor 9k8 1%",   // E96 9.76 is 0.4098 % away
	), nil, false)
	bad := failing(fs)
	for _, ok := range []string{"A", "B", "D", "F", "H"} {
		if f, isBad := bad[ok]; isBad {
			t.Errorf("%s flagged: %s", ok, f.Message)
		}
	}
	for _, c := range []struct {
		part, to string
		dev      float64
	}{
		{"C", "4k7", 0.05 / 4.7}, {"E", "4k7", 0.05 / 4.7}, {"G", "33n", 6.0 / 33}, {"I", "9k76", 0.04 / 9.76},
	} {
		f, ok := bad[c.part]
		if !ok {
			t.Errorf("%s not flagged", c.part)
			continue
		}
		if !within(f.Measured, c.dev, 1e-9) || len(f.Changes) != 1 || f.Changes[0].To != c.to {
			t.Errorf("%s: deviation %g (want %g), changes %+v (want %s)", c.part, f.Measured, c.dev, f.Changes, c.to)
		}
	}
	// The text names both neighbours: 9k8 at 1 % lies between 9.76 k and 10 k.
	if f := bad["I"]; !contains(f.Fix, "9.76 kohm", "10 kohm") {
		t.Errorf("fix %q must name both neighbours", f.Fix)
	}
}

// max_deviation 0.002 is common practice, no published source: a value is
// taken as written for a series value when it is within 0.2 %. 4709.4 ohm
// (0.2 % above 4k7, one rounding below in double precision) passes; 4710
// (0.213 %) fails. Potentiometers are not judged (their tracks come in their
// own steps, 5k and 50k among them).
func TestValuesPreferredThresholdAndScope(t *testing.T) {
	if d := shippedParams(t, "default", "values.preferred")["max_deviation"]; d != 0.002 {
		t.Errorf("max_deviation %g", d)
	}
	bad := failing(judgeRule(t, rules.ValuesPreferred, board("A resistor 4709.4", "B resistor 4710"), nil, false))
	if _, ok := bad["A"]; ok {
		t.Error("4709.4 ohm, 0.2 % from 4k7, must pass")
	}
	if _, ok := bad["B"]; !ok {
		t.Error("4710 ohm, 0.213 % from 4k7, must fail")
	}
	pot := board() + `
[parts.RV1]
kind = "potentiometer"
value = "5k"
nets = { a = "vcc", wiper = "w", b = "gnd" }

[parts.R9]
kind = "resistor"
value = "10k"
nets = ["w", "gnd"]
`
	for _, f := range judgeRule(t, rules.ValuesPreferred, pot, nil, false) {
		if f.Part == "RV1" {
			t.Errorf("a potentiometer was judged: %+v", f)
		}
	}
}
