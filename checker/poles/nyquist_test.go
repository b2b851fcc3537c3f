package poles

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// logDet is log|det(G + s·C)| and arg det(G + s·C), by Gaussian elimination
// on the pencil's entries (the matrix the band analysis also solves, checked
// in TestPencilAgreesWithBand), independent of the eigen-solver.
func (p *pencil) logDet(s complex128) (float64, float64, error) {
	n := p.n
	a := make([]complex128, n*n)
	for _, e := range p.entries {
		a[e.i*n+e.j] += complex(e.g, 0) + s*complex(e.c, 0)
	}
	mag, arg := 0.0, 0.0
	for k := range n {
		piv := k
		for i := k + 1; i < n; i++ {
			if cmplx.Abs(a[i*n+k]) > cmplx.Abs(a[piv*n+k]) {
				piv = i
			}
		}
		d := a[piv*n+k]
		if d == 0 {
			return 0, 0, fmt.Errorf("singular at %v", s)
		}
		if piv != k {
			for j := range n {
				a[k*n+j], a[piv*n+j] = a[piv*n+j], a[k*n+j]
			}
			arg += math.Pi
		}
		mag += math.Log(cmplx.Abs(d))
		arg += cmplx.Phase(d)
		for i := k + 1; i < n; i++ {
			m := a[i*n+k] / d
			for j := k; j < n; j++ {
				a[i*n+j] -= m * a[k*n+j]
			}
		}
	}
	return mag, arg, nil
}

// rightHalfPlaneByNyquist counts the zeros of det(G + sC) with Re s > 0 by the
// argument principle along the imaginary axis (the Nyquist–Mikhailov form of
// the criterion for the network determinant, a polynomial in s of degree r
// with real coefficients): as ω goes from 0 to ∞ its phase turns by
// (r_left − r_right)·π/2, so r_right = (r − 2·Δφ/π)/2. The degree r is read
// from the slope of log|det| at frequencies above every pole.
func rightHalfPlaneByNyquist(p *pencil) (int, error) {
	// The degree: d log|det| / d log ω, once it has settled on an integer.
	var top float64
	r := -1
	for w := 1e9; w < 1e22; w *= 10 {
		m1, _, err1 := p.logDet(complex(0, w))
		m2, _, err2 := p.logDet(complex(0, 10*w))
		if err1 != nil || err2 != nil {
			return 0, fmt.Errorf("degree: %v %v", err1, err2)
		}
		slope := (m2 - m1) / math.Ln10
		if math.Abs(slope-math.Round(slope)) < 1e-3 && math.Round(slope) == float64(r) {
			top = 10 * w
			break
		}
		r = int(math.Round(slope))
	}
	if top == 0 {
		return 0, fmt.Errorf("the degree did not settle")
	}
	// The phase from ω = 0 (det G, real) to top, unwrapped, with steps
	// halved wherever it turns by more than 0.3 rad.
	phase := func(w float64) float64 {
		_, a, err := p.logDet(complex(0, w))
		if err != nil {
			return math.NaN()
		}
		return a
	}
	prev := phase(0)
	total := 0.0
	step := math.Pow(10, 1.0/50)
	w := 1e-9
	for w < top {
		next := w * step
		ph := phase(next)
		d := wrap(ph - prev)
		for math.Abs(d) > 0.3 && next/w > 1+1e-12 {
			next = w * math.Sqrt(next/w)
			ph = phase(next)
			d = wrap(ph - prev)
		}
		if math.IsNaN(d) {
			return 0, fmt.Errorf("phase lost at %g rad/s", next)
		}
		total += d
		prev, w = ph, next
	}
	rr := (float64(r) - 2*total/math.Pi) / 2
	if math.Abs(rr-math.Round(rr)) > 0.05 {
		return 0, fmt.Errorf("count %g is not an integer (degree %d, phase %g)", rr, r, total)
	}
	return int(math.Round(rr)), nil
}

func wrap(d float64) float64 {
	for d > math.Pi {
		d -= 2 * math.Pi
	}
	for d < -math.Pi {
		d += 2 * math.Pi
	}
	return d
}

// stage is a generated single-transistor stage: common emitter or emitter
// follower, a tank or resistor in the collector, an optional feedback
// capacitor, a capacitive or resistive emitter, an inductive source.
func stage(rng *rand.Rand) (string, float64) {
	pick := func(lo, hi float64) float64 { return lo * math.Pow(hi/lo, rng.Float64()) }
	var b []byte
	add := func(f string, a ...any) { b = fmt.Appendf(b, f+"\n", a...) }
	add("[circuit]\nname = \"gen\"\nband = [\"5MHz\", \"6MHz\"]\nambient = \"25C\"")
	add("[supplies.vcc]\nvolts = \"12V\"")
	add("[ports.in]\nnet = \"src\"\ndirection = \"in\"\nimpedance = \"%g\"", pick(10, 500))
	add("[parts]")
	add(`CC = { kind = "capacitor", value = "100n", nets = ["src", "x"] }`)
	add(`LS = { kind = "inductor", value = "%g", nets = ["x", "base"] }`, pick(1e-8, 3e-6))
	add(`R1 = { kind = "resistor", value = "10k", nets = ["vcc", "base"] }`)
	add(`R2 = { kind = "resistor", value = "4.7k", nets = ["base", "gnd"] }`)
	coll := "vcc"
	if rng.IntN(2) == 0 {
		coll = "coll"
		add(`LC = { kind = "inductor", value = "%g", resistance = "%g", nets = ["coll", "vcc"] }`, pick(1e-7, 1e-5), pick(0.01, 5))
		add(`RC = { kind = "resistor", value = "%g", nets = ["coll", "vcc"] }`, pick(100, 1e5))
		if rng.IntN(2) == 0 {
			add(`CF = { kind = "capacitor", value = "%g", nets = ["coll", "base"] }`, pick(1e-12, 1e-10))
		}
		add(`CT = { kind = "capacitor", value = "%g", nets = ["coll", "gnd"] }`, pick(1e-12, 1e-9))
	}
	add(`Q1 = { kind = "npn", device = "2N3904", nets = { collector = "%s", base = "base", emitter = "emit" } }`, coll)
	add(`RE = { kind = "resistor", value = "%g", nets = ["emit", "gnd"] }`, pick(300, 2000))
	add(`CE = { kind = "capacitor", value = "%g", nets = ["emit", "gnd"] }`, pick(1e-11, 1e-7))
	rb := 0.0
	if rng.IntN(2) == 0 {
		rb = pick(1, 100)
	}
	return string(b), rb
}

// TestPolesAgreeWithNyquist: on generated stages, the eigen-solver finds a
// pole with a positive real part exactly when the argument principle counts
// a zero of the network determinant in the right half-plane, and both count
// the same number.
func TestPolesAgreeWithNyquist(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 7))
	unstable, stable, skipped := 0, 0, 0
	for range 120 {
		text, rb := stage(rng)
		cs := analyse(t, text, map[string]float64{"Q1": rb})
		r := find(t, cs)
		eig, ambiguous := 0, false
		for _, s := range r.all {
			z := -real(s) / cmplx.Abs(s)
			if math.Abs(z) < 1e-6 {
				ambiguous = true
			}
			if real(s) > 0 {
				eig++
			}
		}
		if ambiguous {
			skipped++
			continue
		}
		ny, err := rightHalfPlaneByNyquist(r.pen)
		if err != nil {
			t.Logf("skipped (%v)", err)
			skipped++
			continue
		}
		if ny != eig {
			t.Errorf("eigen-solver %d right-half-plane poles, Nyquist %d\n%s rb %g\npoles %v", eig, ny, text, rb, r.all)
		}
		if len(r.Growing()) > 0 != (eig > 0) {
			t.Errorf("Growing() disagrees with the count %d", eig)
		}
		if eig > 0 {
			unstable++
		} else {
			stable++
		}
	}
	t.Logf("%d unstable, %d stable, %d skipped", unstable, stable, skipped)
	if unstable < 10 || stable < 10 {
		t.Errorf("the generator gives too few of one kind: %d unstable, %d stable", unstable, stable)
	}
}
