package rules_test

import (
	"fmt"
	"math/rand"
)

// randomStage writes a common-emitter stage with deliberately careless
// values: E24 resistors over wide ranges, small coupling and bypass
// capacitors, a choke or a transformer collector load, some ratings given.
// (Invented values: the point is to provoke findings whose fixes can be
// checked, not to be good designs.)
func randomStage(rng *rand.Rand, i int) string {
	e24 := []float64{1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1}
	r := func(decade float64) string { return fmt.Sprintf("%g", e24[rng.Intn(len(e24))]*decade) }
	bands := [][2]string{{"1.8MHz", "2MHz"}, {"3.5MHz", "3.8MHz"}, {"7MHz", "7.3MHz"}, {"14MHz", "14.35MHz"}, {"28MHz", "29.7MHz"}}
	b := bands[rng.Intn(len(bands))]
	devices := []string{"2N3904", "2N2222A", "2N4401", "BC547B", "2N5179"}
	load := `[parts.L1]
kind = "inductor"
value = "` + r(1e-6) + `"
nets = ["vcc", "coll"]
resistance = "0.5"
`
	if rng.Intn(2) == 0 {
		load = fmt.Sprintf(`[parts.T1]
kind = "transformer"
core = "toroid-9.5x4.75x3.25-mu800"
windings.primary = { turns = %d, nets = ["vcc", "coll"], resistance = "0.1" }
windings.secondary = { turns = %d, nets = ["rf_out", "gnd"], resistance = "0.05" }
`, 2+rng.Intn(8), 1+rng.Intn(4))
	} else {
		load += `[parts.C5]
kind = "capacitor"
value = "` + r(1e-9) + `"
nets = ["coll", "rf_out"]
`
	}
	return fmt.Sprintf(`[circuit]
name = "generated stage %d"
band = ["%s", "%s"]
ambient = ["0C", "%dC"]

[supplies.vcc]
volts = "%dV"
range = ["%gV", "%gV"]

[ports.in]
net = "rf_in"
direction = "in"

[ports.out]
net = "rf_out"
direction = "out"

[parts.C1]
kind = "capacitor"
value = "%s"
nets = ["rf_in", "base"]

[parts.R1]
kind = "resistor"
value = "%s"
nets = ["vcc", "base"]
rating = "0.125W"

[parts.R2]
kind = "resistor"
value = "%s"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "%s"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "%s"
nets = ["emit", "gnd"]

[parts.C2]
kind = "capacitor"
value = "%s"
nets = ["emit", "gnd"]

[parts.C3]
kind = "capacitor"
value = "%s"
nets = ["vcc", "gnd"]
rating = "16V"

%s`, i, b[0], b[1], 40+rng.Intn(40), 9+rng.Intn(6), 8.0, 15.0,
		r(1e-9), r(1e4), r(1e3), devices[rng.Intn(len(devices))], r(10*float64(1+rng.Intn(10))), r(1e-9), r(1e-8), load)
}
