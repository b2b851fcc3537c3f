// Package corpus writes circuit files for tests and benchmarks: amplifier
// stages of every configuration with values drawn from a seeded generator,
// so that the property tests, the brute-force comparisons and the speed
// benchmarks share one set of generators and every run sees the same files.
// Every value is invented (demo data), chosen to provoke findings, not to be
// a good design.
package corpus

import (
	"fmt"
	"math"
	"math/rand"
	randv2 "math/rand/v2"
	"strings"
)

// Stage writes a common-emitter stage with deliberately careless
// values: E24 resistors over wide ranges, small coupling and bypass
// capacitors, a choke or a transformer collector load, some ratings given.
// (Invented values: the point is to provoke findings whose fixes can be
// checked, not to be good designs.)
func Stage(rng *rand.Rand, i int) string {
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

// BaseStage writes a grounded-base stage (input at the emitter, the
// base held by a capacitor) and Follower an emitter follower, with
// careless values like Stage's. (Invented values, to provoke fixes.)
func BaseStage(rng *rand.Rand, i int) string {
	return other(rng, i, "common base", `[parts.C1]
kind = "capacitor"
value = "%s"
nets = ["rf_in", "emit"]

[parts.R3]
kind = "resistor"
value = "%s"
nets = ["emit", "gnd"]

[parts.C2]
kind = "capacitor"
value = "%s"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "%s"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.L1]
kind = "inductor"
value = "%s"
nets = ["vcc", "coll"]
resistance = "0.5"

[parts.C5]
kind = "capacitor"
value = "%s"
nets = ["coll", "rf_out"]
`)
}

func Follower(rng *rand.Rand, i int) string {
	return other(rng, i, "common collector", `[parts.C1]
kind = "capacitor"
value = "%s"
nets = ["rf_in", "base"]

[parts.R3]
kind = "resistor"
value = "%s"
nets = ["emit", "gnd"]

[parts.C2]
kind = "capacitor"
value = "%s"
nets = ["vcc", "gnd"]

[parts.Q1]
kind = "npn"
device = "%s"
nets = { collector = "vcc", base = "base", emitter = "emit" }

[parts.L1]
kind = "inductor"
value = "%s"
nets = ["emit", "gnd"]
resistance = "1k"
role = "choke"

[parts.C5]
kind = "capacitor"
value = "%s"
nets = ["emit", "rf_out"]
`)
}

func other(rng *rand.Rand, i int, what, body string) string {
	e24 := []float64{1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2}
	r := func(decade float64) string { return fmt.Sprintf("%g", e24[rng.Intn(len(e24))]*decade) }
	bands := [][2]string{{"1.8MHz", "2MHz"}, {"3.5MHz", "3.8MHz"}, {"7MHz", "7.3MHz"}, {"14MHz", "14.35MHz"}, {"28MHz", "29.7MHz"}}
	b := bands[rng.Intn(len(bands))]
	devices := []string{"2N3904", "2N2222A", "2N4401", "BC547B", "2N5179"}
	head := fmt.Sprintf(`[circuit]
name = "generated %s stage %d"
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

[parts.R1]
kind = "resistor"
value = "%s"
nets = ["vcc", "base"]

[parts.R2]
kind = "resistor"
value = "%s"
nets = ["base", "gnd"]

`, what, i, b[0], b[1], 40+rng.Intn(40), 9+rng.Intn(6), 8.0, 15.0, r(1e4), r(1e3*float64(1+rng.Intn(9))))
	return head + fmt.Sprintf(body, r(1e-9), r(100*float64(1+rng.Intn(9))), r(1e-10*float64(1+rng.Intn(100))),
		devices[rng.Intn(len(devices))], r(1e-6), r(1e-9))
}

// Preamps returns n circuit files: a divider-biased 2N3904 stage with a
// toroid output transformer, its values drawn from the E12 series with a
// fixed seed (invented demo values, for timing only).
func Preamps(n int) [][]byte {
	rng := rand.New(rand.NewSource(1))
	e12 := []float64{1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2}
	pick := func(decade float64) string { return fmt.Sprintf("%g", e12[rng.Intn(len(e12))]*decade) }
	out := make([][]byte, n)
	for i := range out {
		out[i] = []byte(fmt.Sprintf(`[circuit]
name = "generated preamp %d"
band = ["7MHz", "7.3MHz"]
ambient = ["0C", "45C"]

[supplies.vcc]
volts = "12V"
range = ["11V", "13.8V"]

[ports.in]
net = "rf_in"
direction = "in"

[ports.out]
net = "rf_out"
direction = "out"

[parts.C1]
kind = "capacitor"
value = "%sn"
nets = ["rf_in", "base"]

[parts.R1]
kind = "resistor"
value = "%s"
nets = ["vcc", "base"]

[parts.R2]
kind = "resistor"
value = "%s"
nets = ["base", "gnd"]

[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "coll", base = "base", emitter = "emit" }

[parts.R3]
kind = "resistor"
value = "%s"
nets = ["emit", "gnd"]

[parts.C2]
kind = "capacitor"
value = "%sn"
nets = ["emit", "gnd"]

[parts.T1]
kind = "transformer"
core = "toroid-9.5x4.75x3.25-mu800"
windings.primary = { turns = %d, nets = ["vcc", "coll"] }
windings.secondary = { turns = %d, nets = ["rf_out", "gnd"] }

[parts.C3]
kind = "capacitor"
value = "100n"
nets = ["vcc", "gnd"]
`, i, pick(10), pick(1e4), pick(1e3), pick(100), pick(100), 6+rng.Intn(6), 3+rng.Intn(3)))
	}
	return out
}

// Amplifier writes a random amplifier: one or two stages, each a
// common-emitter stage (resistor, choke or transformer load; bypassed or
// degenerated emitter) or an emitter follower, NPN or PNP, between 50 Ω
// ports, on an HF band. Invented values, for exercising the search.
func Amplifier(rng *randv2.Rand, n int) string {
	bands := [][2]float64{{1.8e6, 2e6}, {3.5e6, 3.8e6}, {7e6, 7.2e6}, {10.1e6, 10.15e6}, {14e6, 14.35e6}, {21e6, 21.45e6}, {28e6, 29.7e6}}
	band := bands[rng.IntN(len(bands))]
	tol := func() string { return []string{"1%", "2%", "5%", "10%"}[rng.IntN(4)] }
	pick := func(xs ...float64) float64 { return xs[rng.IntN(len(xs))] }
	var b strings.Builder
	fmt.Fprintf(&b, "[circuit]\nname = \"generated %d\"\nband = [%g, %g]\n", n, band[0], band[1])
	if rng.IntN(2) == 0 {
		b.WriteString("ambient = [\"0C\", \"50C\"]\n")
	}
	vcc := pick(9, 12, 13.8)
	pnp := rng.IntN(4) == 0
	rail := "vcc"
	fmt.Fprintf(&b, "[supplies.vcc]\nvolts = %g\n", vcc)
	if rng.IntN(2) == 0 {
		fmt.Fprintf(&b, "range = [%g, %g]\n", vcc*0.9, vcc*1.1)
	}
	b.WriteString("[ports.in]\nnet = \"in\"\ndirection = \"in\"\n[ports.out]\nnet = \"out\"\ndirection = \"out\"\n")
	part := func(ref, kind string, v float64, nets ...string) {
		fmt.Fprintf(&b, "[parts.%s]\nkind = %q\nvalue = %g\nnets = [%q, %q]\ntolerance = %q\n", ref, kind, v, nets[0], nets[1], tol())
	}
	part("CD", "capacitor", pick(10e-9, 100e-9), rail, "gnd")
	in := "in"
	stages := 1 + rng.IntN(2)
	for s := 1; s <= stages; s++ {
		x := func(name string) string { return fmt.Sprintf("%s%d", name, s) }
		base, emit, coll := x("b"), x("e"), x("c")
		// Bias: the base at 15–30 % of the supply, IE 1–15 mA.
		vb := vcc * (0.15 + 0.15*rng.Float64())
		ie := 1e-3 * (1 + 14*rng.Float64())
		re := (vb - 0.7) / ie
		rb := pick(1e3, 2.2e3, 4.7e3, 10e3)
		ra := rb * (vcc - vb) / vb
		top, bottom := rail, "gnd"
		device := pick(0, 1, 2, 3)
		dev := []string{"2N3904", "2N2222A", "2N4401", "BC547B"}[int(device)]
		kind := "npn"
		if pnp {
			top, bottom = "gnd", rail // the PNP's emitter sits at the supply
			dev, kind = "2N3906", "pnp"
		}
		part(x("C"), "capacitor", pick(10e-9, 100e-9), in, base)
		part(x("RA"), "resistor", ra, top, base)
		part(x("RB"), "resistor", rb, base, bottom)
		part(x("RE"), "resistor", re, emit, bottom)
		follower := s == 2 && rng.IntN(2) == 0 || rng.IntN(5) == 0
		if follower {
			fmt.Fprintf(&b, "[parts.%s]\nkind = %q\ndevice = %q\nnets = { collector = %q, base = %q, emitter = %q }\n", x("Q"), kind, dev, top, base, emit)
			in = emit
			continue
		}
		if rng.IntN(2) == 0 {
			part(x("CE"), "capacitor", pick(10e-9, 100e-9), emit, bottom)
		}
		fmt.Fprintf(&b, "[parts.%s]\nkind = %q\ndevice = %q\nnets = { collector = %q, base = %q, emitter = %q }\n", x("Q"), kind, dev, coll, base, emit)
		switch rng.IntN(3) {
		case 0: // resistor load
			rc := math.Min(0.4*vcc/ie, pick(470, 1e3, 2.2e3))
			part(x("RC"), "resistor", rc, top, coll)
			in = coll
		case 1: // choke feed
			fmt.Fprintf(&b, "[parts.%s]\nkind = \"inductor\"\nvalue = %g\nnets = [%q, %q]\nresistance = 0.5\n", x("L"), pick(10e-6, 22e-6, 100e-6), top, coll)
			in = coll
		default: // transformer into the next stage or the port
			sec := x("s")
			fmt.Fprintf(&b, "[parts.%s]\nkind = \"transformer\"\ncore = %q\nwindings.primary = { turns = %d, nets = [%q, %q], resistance = 0.1 }\nwindings.secondary = { turns = %d, nets = [%q, \"gnd\"], resistance = 0.05 }\n",
				x("T"), pick2(rng, "toroid-9.5x4.75x3.25-mu800", "toroid-12.7x7.15x4.9-mu125"), 6+rng.IntN(10), top, coll, 2+rng.IntN(6), sec)
			in = sec
		}
	}
	part("CO", "capacitor", pick(10e-9, 100e-9), in, "out")
	return b.String()
}

func pick2(rng *randv2.Rand, a, b string) string {
	if rng.IntN(2) == 0 {
		return a
	}
	return b
}

// Mixed returns n files of every generator in turn (common-emitter stages,
// grounded-base stages, followers, transformer preamps, one- and two-stage
// amplifiers), each generator on its own fixed seed: the corpus the speed
// benchmarks decode and check.
func Mixed(n int) [][]byte {
	v1 := rand.New(rand.NewSource(16))
	v2 := randv2.New(randv2.NewPCG(16, 2027))
	pre := Preamps((n + 4) / 5)
	out := make([][]byte, 0, n)
	for i := 0; len(out) < n; i++ {
		switch i % 5 {
		case 0:
			out = append(out, []byte(Stage(v1, i)))
		case 1:
			out = append(out, []byte(BaseStage(v1, i)))
		case 2:
			out = append(out, []byte(Follower(v1, i)))
		case 3:
			out = append(out, pre[i/5])
		default:
			out = append(out, []byte(Amplifier(v2, i)))
		}
	}
	return out
}
