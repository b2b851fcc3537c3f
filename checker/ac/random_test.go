package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"headroom/checker/circuit"
)

// randomNet builds a circuit of every part kind, transistors at random
// currents (cut-off included). wide spreads the values over many decades
// (1 mΩ to 10 MΩ, 1 pF to 1 F, settings at the track's ends); otherwise they
// stay in the range of small-signal RF work, where the network is well
// conditioned.
func randomNet(rng *rand.Rand, nets, parts int, wide bool) *net {
	name := func() string {
		if rng.IntN(6) == 0 {
			return "gnd"
		}
		return fmt.Sprintf("n%d", rng.IntN(nets))
	}
	decade := func(lo, hi float64) float64 { return math.Pow(10, lo+rng.Float64()*(hi-lo)) }
	if !wide {
		inner := decade
		decade = func(lo, hi float64) float64 { // the middle third of each range
			return inner(lo+(hi-lo)/3, hi-(hi-lo)/3)
		}
	}
	lo := decade(5, 8)
	n := newNet(lo, lo*decade(0, 1)).supply("n0", 12, []float64{0, 0.2}[rng.IntN(2)]).
		port("in", name(), "in", decade(0, 3)).port("out", name(), "out", decade(0, 3))
	for i := 0; i < parts; i++ {
		ref := fmt.Sprintf("P%d", i)
		switch rng.IntN(6) {
		case 0:
			n.r(ref, name(), name(), decade(-3, 7))
		case 1:
			n.cap(ref, name(), name(), decade(-12, 0))
		case 2:
			n.ind(ref, name(), name(), decade(-9, -2)).c.Parts[len(n.c.Parts)-1].Resistance = []float64{0, decade(-2, 2)}[rng.IntN(2)]
		case 3:
			n.xfmr(ref, decade(-9, -6), 0.5+0.49*rng.Float64(),
				wdg("a", float64(1+rng.IntN(20)), name(), name(), 0), wdg("b", float64(1+rng.IntN(20)), name(), name(), 0.1))
		case 4:
			n.c.Parts = append(n.c.Parts, &circuit.Part{Ref: ref, Kind: circuit.Potentiometer,
				Nets: []string{name(), name(), name()}, Value: decade(1, 5), Setting: []float64{0, rng.Float64(), 1}[rng.IntN(3)]})
			if !wide {
				n.c.Parts[len(n.c.Parts)-1].Setting = 0.1 + 0.8*rng.Float64()
			}
		case 5:
			n.bjt(circuit.NPN, ref, name(), name(), name(), []float64{0, decade(-5, -1)}[rng.IntN(2)], decade(1, 2.5), decade(7, 9.5), decade(-13, -11))
			n.c.Parts[len(n.c.Parts)-1].BJT.RB = []float64{0, decade(-2, 3)}[rng.IntN(2)] // rb on half of them
		}
	}
	return n
}

// Whatever the circuit, Analyze gives finite figures or an error; in
// well-conditioned networks the low-rank impedance agrees with a fresh
// factorisation of the same network.
func TestRandomCircuitsFiniteAndConsistent(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	checked := 0
	for trial := 0; trial < 600; trial++ {
		wide := trial%2 == 0
		n := randomNet(rng, 3+rng.IntN(8), 3+rng.IntN(15), wide)
		res, err := Analyze(n.c, n.op)
		if err != nil {
			continue
		}
		for _, bp := range res.Band {
			vals := []float64{bp.Frequency, real(bp.InputImpedance), imag(bp.InputImpedance), bp.ReturnLossDB}
			if bp.GainDB != nil {
				vals = append(vals, *bp.GainDB, *bp.VoltageGainDB)
			}
			for _, v := range vals {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("trial %d: non-finite band figure %+v", trial, bp)
				}
			}
		}
		lo := res.Band[0].Frequency
		for _, x := range res.Parts {
			if math.IsNaN(x.CircuitImpedance) || math.IsInf(x.CircuitImpedance, 0) {
				t.Fatalf("trial %d: circuit impedance %g", trial, x.CircuitImpedance)
			}
		}
		if wide {
			continue
		}
		// Every part removed in turn (transformers and transistors too),
		// the impedance taken across its first branch.
		for _, p := range n.c.Parts {
			i := res.net.parts[p.Ref]
			u := res.net.elems[i].branches[0]
			if u.from == u.to {
				continue
			}
			mods := []mod{{i, -1}}
			if res.net.source >= 0 {
				mods = append(mods, mod{res.net.source, 1})
			}
			res.mu.Lock()
			fr := res.freqs[lo]
			got, err1 := res.impedance(fr, u, mods, "update "+p.Ref)
			want, err2 := res.freshImpedance(fr, u, mods, "check "+p.Ref)
			res.mu.Unlock()
			if err1 != nil || err2 != nil {
				t.Errorf("trial %d: %s: %v %v", trial, p.Ref, err1, err2)
				continue
			}
			if cmplx.Abs(got-want) > 1e-9*cmplx.Abs(want) {
				t.Errorf("trial %d: %s %s removed: %g, fresh factorisation %g", trial, p.Kind, p.Ref, got, want)
			}
			checked++
		}
	}
	if checked < 1000 {
		t.Errorf("only %d impedances compared", checked)
	}
}
