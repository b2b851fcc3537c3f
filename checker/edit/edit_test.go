package edit

import (
	"strings"
	"testing"

	"headroom/checker/engine"
)

const board = `[circuit]
name = "µ-test"   # a code point before the edits
band = ["7MHz", "7.2MHz"]

[parts.R1]
kind = "resistor"
value = "4k7"   # upper leg
nets = ["vcc", "base"]

[parts.T1]
kind = "transformer"
al = "360nH"
windings.primary = { turns = 12, nets = ["vcc", "coll"] }
windings.secondary = { turns = 6, nets = ["out", "gnd"] }

[parts]
C9 = { kind = "capacitor", value = "10n", nets = ["a", "b"] }
`

func TestApply(t *testing.T) {
	out, err := Apply([]byte(board), []engine.Change{
		{Part: "R1", Key: "value", To: "4k3"},
		{Part: "R1", Key: "rating", To: "0.5W"},
		{Part: "T1.primary", Key: "turns", To: "14"},
		{Part: "T1.secondary", Key: "turns", To: "7"},
		{Part: "C9", Key: "value", To: "22n"},
		{Part: "C9", Key: "rating", To: "50V"},
	})
	if err != nil {
		t.Fatal(err)
	}
	got := string(out)
	for _, want := range []string{
		`value = "4k3"   # upper leg`,
		"[parts.R1]\nrating = \"0.5W\"\n",
		`windings.primary = { turns = 14, nets`,
		`windings.secondary = { turns = 7, nets`,
		`C9 = { rating = "50V", kind = "capacitor", value = "22n", nets`,
	} {
		if !strings.Contains(got, want) {
			t.Errorf("missing %q in\n%s", want, got)
		}
	}
}

func TestApplyUnknownPart(t *testing.T) {
	if _, err := Apply([]byte(board), []engine.Change{{Part: "R7", Key: "value", To: "1k"}}); err == nil {
		t.Fatal("a change to a part that does not exist must fail")
	}
}
