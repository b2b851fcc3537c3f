package library

import (
	"strings"
	"testing"
)

// The shipped library names a source for every figure of every transistor
// (parts.toml's head: [S], [C] or [M]), and each core's material note says
// where its frequency range comes from; ParseSources must find them all.
func TestShippedSources(t *testing.T) {
	src := ShippedSources()
	lib := Shipped()
	for name := range lib.Transistors {
		s := src["transistors"][name]
		if s == nil {
			t.Errorf("%s: no sources read", name)
			continue
		}
		for _, k := range []string{"ft", "hfe", "vceo", "ic_max", "pd"} {
			if !strings.ContainsAny(s[k], "[") {
				t.Errorf("%s %s: source %q names no [S], [C] or [M]", name, k, s[k])
			}
		}
	}
	for name := range lib.Cores {
		if src["cores"][name][""] == "" {
			t.Errorf("core %s: no material note read", name)
		}
	}
	if got := src["transistors"]["BC547B"]["cob"]; !strings.Contains(got, "the largest is taken [S]") {
		t.Errorf("a continued comment is not joined: %q", got)
	}
}

func TestParseSources(t *testing.T) {
	got := ParseSources([]byte(`# ferrite, f_range [M]
[cores.a]
mu = 800 # from the sheet
[cores.b]
mu = 125
[transistors."X 1"]
ft = "1GHz"   # min [S]
              # at 10 mA
vceo = "20V"
`))
	if got["cores"]["a"][""] != "ferrite, f_range [M]" || got["cores"]["b"][""] != "ferrite, f_range [M]" ||
		got["cores"]["a"]["mu"] != "from the sheet" || got["transistors"]["X 1"]["ft"] != "min [S] at 10 mA" ||
		got["transistors"]["X 1"]["vceo"] != "" {
		t.Errorf("%v", got)
	}
}
