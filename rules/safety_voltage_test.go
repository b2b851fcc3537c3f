package rules_test

import (
	"strings"
	"testing"

	"headroom/rules"
)

// rails writes a test circuit (not a design) with the given supplies, each
// loaded by a resistor to gnd.
func rails(supplies ...string) string {
	var b strings.Builder
	b.WriteString("[circuit]\nname = \"test circuit: rails\"\nband = [\"14MHz\", \"14.35MHz\"]\n")
	for _, s := range supplies {
		f := strings.Fields(s)
		b.WriteString("\n[supplies." + f[0] + "]\nvolts = \"" + f[1] + "\"\n")
		if len(f) > 2 {
			b.WriteString("range = [\"" + f[2] + "\", \"" + f[3] + "\"]\n")
		}
		b.WriteString("\n[parts.R" + f[0] + "]\nkind = \"resistor\"\nvalue = \"10k\"\nnets = [\"" + f[0] + "\", \"gnd\"]\n")
	}
	return b.String()
}

// 60 V DC is IEC 60950-1's SELV limit in normal operation (REFERENCES.md §8,
// seen in a public summary) and, from memory, the DC limit of IEC 62368-1's
// lowest energy class ES1.
func TestSafetyVoltageSELV(t *testing.T) {
	if v := shippedParams(t, "default", "safety.voltage")["max_volts"]; v != 60 {
		t.Errorf("max_volts %g, want 60", v)
	}
	if !contains(rules.SafetyVoltage.Doc.Source, "IEC 60950-1", "60 V DC", "IEC 62368-1", "from memory") {
		t.Errorf("source %q", rules.SafetyVoltage.Doc.Source)
	}
}

// The span is between any two rails, gnd (0 V) included; the part is the
// supply with the largest |EMF|; failing messages carry the caution; 60 V
// exactly passes.
func TestSafetyVoltageSpan(t *testing.T) {
	for _, c := range []struct {
		supplies []string
		span     float64
		part     string
	}{
		{[]string{"vcc 12V"}, 12, "vcc"},
		{[]string{"vneg -72V"}, 72, "vneg"},
		{[]string{"vpos 40V", "vneg -30V"}, 70, "vpos"},
		{[]string{"vlo 5V", "vhi 48V"}, 48, "vhi"},
		{[]string{"hv 60V"}, 60, "hv"},
	} {
		f := biasItem(t, judgeRule(t, rules.SafetyVoltage, rails(c.supplies...), nil, false), c.part, "")
		if f.Measured != c.span || f.Unit != "V" || f.Comparison != "<=" {
			t.Errorf("%v: span %g, want %g (%+v)", c.supplies, f.Measured, c.span, f)
		}
		fails := c.span > 60
		if f.Failing() != fails || fails != contains(f.Message, "treat the circuit as hazardous", "local codes", "licensed practice") {
			t.Errorf("%v: failing %v, message %q", c.supplies, f.Failing(), f.Message)
		}
	}
}

// In the worst case each supply may reach the end of its range: ±28 V rails
// that may reach ±31 V span 62 V.
func TestSafetyVoltageWorstCase(t *testing.T) {
	src := rails("vpos 28V 25V 31V", "vneg -28V -31V -25V")
	f := biasItem(t, judgeRule(t, rules.SafetyVoltage, src, nil, true), "vpos", "")
	if f.Measured != 62 || f.Corner["vpos"] != 31 || f.Corner["vneg"] != -31 {
		t.Errorf("worst %g at %v, want 62 V at ±31 V", f.Measured, f.Corner)
	}
}

// The supply named is the one with the largest |EMF| at nominal, at every
// corner, so the worst-case search judges one item: +40 V and -38 V that may
// reach +44 V and -42 V give one finding on vpos, spanning 86 V.
func TestSafetyVoltageOneItem(t *testing.T) {
	fs := judgeRule(t, rules.SafetyVoltage, rails("vpos 40V 30V 44V", "vneg -38V -42V -30V"), nil, true)
	if len(fs) != 1 || fs[0].Part != "vpos" || fs[0].Measured != 86 {
		t.Errorf("want one item on vpos spanning 86 V: %+v", fs)
	}
}
