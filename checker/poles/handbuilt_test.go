package poles

import (
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
)

// analyse loads a circuit from text, sets each named transistor's rb and
// analyses it.
func analyse(t testing.TB, text string, rb map[string]float64) *analysis.Case {
	t.Helper()
	c, err := circuit.LoadBytes("test.toml", []byte(text), circuit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	for ref, v := range rb {
		c.Part(ref).BJT.RB = v
	}
	cs := analysis.Run(c, nil)
	if cs.AC == nil {
		t.Fatalf("%v %v", cs.OPErr, cs.ACErr)
	}
	return cs
}

func find(t testing.TB, cs *analysis.Case) *Result {
	t.Helper()
	r, err := Find(cs.Circuit, cs.AC)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// colpitts is a common-base Colpitts stage: the base held at AC ground by
// CB, the tank L1 from the collector to the supply, C1 from the collector to
// the emitter and C2 from the emitter to gnd feeding back. Tank frequency
// 1/(2π·√(L1·C1·C2/(C1 + C2))) = 5.542 MHz (1 µH, 1 nF in series with
// 4.7 nF = 824.6 pF). The feedback-broken variant moves C1 to gnd.
const colpitts = `
[circuit]
name = "colpitts"
band = ["5MHz", "6MHz"]
ambient = "25C"

[supplies.vcc]
volts = "12V"

[parts]
R1 = { kind = "resistor", value = "10k", nets = ["vcc", "base"] }
R2 = { kind = "resistor", value = "4k7", nets = ["base", "gnd"] }
CB = { kind = "capacitor", value = "100n", nets = ["base", "gnd"] }
Q1 = { kind = "npn", device = "2N3904", nets = { collector = "coll", base = "base", emitter = "emit" } }
RE = { kind = "resistor", value = "6k8", nets = ["emit", "gnd"] }
L1 = { kind = "inductor", value = "1u", resistance = "0.5", nets = ["coll", "vcc"] }
RL = { kind = "resistor", value = "RLOAD", nets = ["coll", "vcc"] }
C1 = { kind = "capacitor", value = "1n", nets = ["coll", "FEEDBACK"] }
C2 = { kind = "capacitor", value = "10n", nets = ["emit", "gnd"] }
`

func TestColpittsOscillatesAtTank(t *testing.T) {
	cs := analyse(t, replace(replace(colpitts, "FEEDBACK", "emit"), "RLOAD", "4k7"), nil)
	r := find(t, cs)
	g := r.Growing()
	if len(g) == 0 {
		t.Fatalf("no growing pole; poles %+v", r.Poles)
	}
	// Tank frequency, LC resonance (any circuit-theory text): f0 = 1/(2π√(LC)).
	f0 := 1 / (2 * math.Pi * math.Sqrt(1e-6*(1e-9*10e-9/(1e-9+10e-9))))
	if d := math.Abs(g[0].Freq()/f0 - 1); d > 0.01 {
		t.Errorf("oscillates at %.4g Hz, tank %.4g Hz: off by %.2g", g[0].Freq(), f0, d)
	}
	t.Logf("pole %v: %.4g Hz, %.3g dB/µs", g[0].S, g[0].Freq(), g[0].GrowthDBPerMicrosecond())
	sh, err := r.Participation(g[0])
	if err != nil {
		t.Fatal(err)
	}
	// The tank sets the frequency (common practice, no published source):
	// its three parts must lead the participation list.
	top := map[string]bool{}
	for _, x := range sh[:3] {
		top[x.Part] = true
	}
	if !top["L1"] || !top["C1"] || !top["C2"] {
		t.Errorf("participation %+v: the tank L1, C1, C2 should lead", sh)
	}
}

func TestColpittsBrokenFeedbackIsStable(t *testing.T) {
	cs := analyse(t, replace(replace(colpitts, "FEEDBACK", "gnd"), "RLOAD", "4k7"), nil)
	r := find(t, cs)
	if g := r.Growing(); len(g) > 0 {
		t.Fatalf("growing pole %+v with the feedback broken", g)
	}
	t.Logf("least damped %+v", r.Poles[0])
}

// follower is an emitter follower driving a capacitive load (CE 1 nF) from
// an inductive source (L1 1 µH in series with the 50 Ω port): the
// capacitive emitter load reflects a negative resistance into the base,
// about −ωT/(ω²·CE) where β(f) ≫ 1 (REFERENCES-2 §1.1), which the source
// inductance tunes.
const follower = `
[circuit]
name = "follower"
band = ["7MHz", "7.3MHz"]
ambient = "25C"

[supplies.vcc]
volts = "12V"

[ports.in]
net = "src"
direction = "in"
impedance = "50"

[parts]
CC = { kind = "capacitor", value = "100n", nets = ["src", "x"] }
L1 = { kind = "inductor", value = "1u", nets = ["x", "base"] }
R1 = { kind = "resistor", value = "10k", nets = ["vcc", "base"] }
R2 = { kind = "resistor", value = "10k", nets = ["base", "gnd"] }
Q1 = { kind = "npn", device = "2N3904", nets = { collector = "vcc", base = "base", emitter = "emit" } }
RE = { kind = "resistor", value = "470", nets = ["emit", "gnd"] }
CE = { kind = "capacitor", value = "1n", nets = ["emit", "gnd"] }
`

func TestFollowerCapacitiveLoadOscillates(t *testing.T) {
	r := find(t, analyse(t, follower, nil))
	g := r.Growing()
	if len(g) == 0 {
		t.Fatalf("no growing pole; poles %+v", r.Poles)
	}
	t.Logf("pole %v: %.4g Hz", g[0].S, g[0].Freq())
	// The usual cure is resistance in series with the base (REFERENCES-2
	// §1.5, a base stopper of tens to hundreds of ohms); rb is such a
	// resistor inside the transistor. 10 Ω is not enough here.
	for _, c := range []struct {
		rb     float64
		stable bool
	}{{10, false}, {10 + 470, true}} {
		r = find(t, analyse(t, follower, map[string]float64{"Q1": c.rb}))
		if got := len(r.Growing()) == 0; got != c.stable {
			t.Errorf("rb %g Ω: stable %v, want %v (poles %+v)", c.rb, got, c.stable, r.Poles[:2])
		}
	}
}

// TestSeriesRLC: a series R–L–C loop closed through a 50 Ω port has the
// textbook natural frequencies s = −α ± j·√(ω0² − α²), α = R/(2L),
// ω0 = 1/√(LC) (any circuit-theory text), with R the port's 50 Ω plus the
// coil's resistance.
func TestSeriesRLC(t *testing.T) {
	cs := analyse(t, `
[circuit]
name = "rlc"
band = ["1MHz", "2MHz"]
ambient = "25C"

[ports.in]
net = "a"
direction = "in"
impedance = "50"

[parts]
L1 = { kind = "inductor", value = "10u", resistance = "2", nets = ["a", "b"] }
C1 = { kind = "capacitor", value = "1n", nets = ["b", "gnd"] }
`, nil)
	r := find(t, cs)
	alpha := 52 / (2 * 10e-6)
	w0 := 1 / math.Sqrt(10e-6*1e-9)
	want := complex(-alpha, math.Sqrt(w0*w0-alpha*alpha))
	var got []Pole
	for _, p := range r.Poles {
		if p.Freq() > 1e3 {
			got = append(got, p)
		}
	}
	if len(got) != 1 || cmplx.Abs(got[0].S-want) > 1e-6*cmplx.Abs(want) {
		t.Fatalf("poles %+v, want one at %v", r.Poles, want)
	}
}

func replace(s, old, new string) string {
	out := ""
	for {
		i := indexOf(s, old)
		if i < 0 {
			return out + s
		}
		out += s[:i] + new
		s = s[i+len(old):]
	}
}

func indexOf(s, sub string) int {
	for i := 0; i+len(sub) <= len(s); i++ {
		if s[i:i+len(sub)] == sub {
			return i
		}
	}
	return -1
}
