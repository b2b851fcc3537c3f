package poles

import (
	"math"
	"math/cmplx"
	"os"
	"strings"
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

// template reads a circuit template of testdata/stability and fills it in:
// kv holds name, value pairs; names left over read as the plain stage (base
// net "base", nothing extra).
func template(t testing.TB, name string, kv ...string) string {
	t.Helper()
	b, err := os.ReadFile("../../testdata/stability/" + name + ".toml.in")
	if err != nil {
		t.Fatal(err)
	}
	var pairs []string
	for i := 0; i+1 < len(kv); i += 2 {
		pairs = append(pairs, "{{"+kv[i]+"}}", kv[i+1])
	}
	pairs = append(pairs, "{{BASE}}", "base", "{{EXTRA}}", "")
	return strings.NewReplacer(pairs...).Replace(string(b))
}

// colpitts is testdata/stability/colpitts.toml.in: a common-base Colpitts
// stage, tank 5.279 MHz, with the feedback capacitor C1 to feedback and the
// tank loaded by RL = rload.
func colpitts(t testing.TB, feedback, rload string) string {
	return template(t, "colpitts", "FEEDBACK", feedback, "RLOAD", rload)
}

func TestColpittsOscillatesAtTank(t *testing.T) {
	cs := analyse(t, colpitts(t, "emit", "4k7"), nil)
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
	cs := analyse(t, colpitts(t, "gnd", "4k7"), nil)
	r := find(t, cs)
	if g := r.Growing(); len(g) > 0 {
		t.Fatalf("growing pole %+v with the feedback broken", g)
	}
	t.Logf("least damped %+v", r.Poles[0])
}

// follower is testdata/stability/follower.toml.in: an emitter follower
// driving a capacitive load (CE 1 nF) from an inductive source (1 µH in
// series with the 50 Ω port).
func follower(t testing.TB) string { return template(t, "follower") }

func TestFollowerCapacitiveLoadOscillates(t *testing.T) {
	r := find(t, analyse(t, follower(t), nil))
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
		r = find(t, analyse(t, follower(t), map[string]float64{"Q1": c.rb}))
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
