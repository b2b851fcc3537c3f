// Package noise is the small-signal noise analysis of the linearised circuit
// (docs/noise.md): every noise source of the circuit carried to the out port
// by the adjoint transfers of checker/ac, summed in power, and set against the
// noise of the in port's source resistance at the reference temperature
// T0 = 290 K. It gives the noise factor F, the noise figure 10·log10 F, the
// equivalent input noise temperature (F − 1)·T0 and each part's share.
package noise

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"sort"
	"strings"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// Physical constants (SI 2019, exact by definition).
const (
	Boltzmann = 1.380649e-23    // J/K
	Charge    = 1.602176634e-19 // C
	// T0 is the reference temperature of the noise figure, K (IEEE Std
	// 161 and ITU-R P.372 both use 290 K).
	T0 = 290.0
	// Gamma is the channel thermal-noise factor of a FET in saturation,
	// 2/3 for a long channel (A. van der Ziel, Proc. IRE 50, 1962; from
	// memory).
	Gamma  = 2.0 / 3.0
	kelvin = 273.15
)

// Contribution is one noise source's power at the out port.
type Contribution struct {
	Ref    string  // the part
	Source string  // "thermal", "rb thermal", "base shot", "collector shot", "channel thermal", "gate shot"
	Power  float64 // V²/Hz at the out port's net
}

// Point is the noise of the circuit at one frequency.
type Point struct {
	Frequency float64 // Hz
	// Valid: the source reaches the out port, so F is defined. Everything
	// below is zero otherwise.
	Valid bool
	// F is the noise factor: total output noise ÷ output noise due to the
	// source resistance at T0 (the out port's own load excluded).
	F float64
	// NFDB is 10·log10 F, dB.
	NFDB float64
	// TemperatureK is the equivalent input noise temperature (F − 1)·T0, K.
	TemperatureK float64
	// Source is the source's output noise density, V²/Hz.
	Source float64
	// Parts holds every part's contributions, largest first (ties by
	// reference and source, so the order is stable).
	Parts []Contribution
}

// Band computes the noise at the band's three frequencies of r (lowest,
// centre, highest). The three points' contributions share one block, and
// one buffer serves every part's transfers: a worst-case search runs this
// at every case.
func Band(c *circuit.Circuit, op *dc.Result, r *ac.Result) ([3]Point, error) {
	var out [3]Point
	n := maxContributions(c)
	block := make([]Contribution, 0, len(r.Band)*n)
	var h []complex128
	for i, bp := range r.Band {
		p, err := atInto(c, op, r, bp.Frequency, block[len(block):len(block):len(block)+n], &h)
		if err != nil {
			return out, err
		}
		block = block[:len(block)+n]
		out[i] = p
	}
	return out, nil
}

// maxContributions is how many sources c's parts have at most: three a
// transistor, two a FET, one any other part.
func maxContributions(c *circuit.Circuit) int {
	n := 0
	for _, part := range c.Parts {
		switch {
		case part.Kind.IsBJT():
			n += 3
		case part.Kind.IsFET():
			n += 2
		default:
			n++
		}
	}
	return n
}

// At computes the noise at f. The parts are at the case's ambient
// temperature (op.TempC); the source resistance is at T0. Sources: the
// thermal noise of every part from the real part of its admittance (the
// Nyquist–Twiss theorem: current-noise correlation 2kT·(D + Dᴴ) among a
// passive part's branches, so a resistor gives 4kT/R, a lossless capacitor
// nothing, an inductor's or winding's resistance its own share); each
// transistor's rb thermal noise 4kT/rb across b–b′, base shot noise 2q·IB
// across b′–e and collector shot noise 2q·IC across c–e, uncorrelated as the
// simple hybrid-π model has them; each FET's channel thermal noise
// 4kT·γ·gm across drain–source (the saturation formula, used in every
// region; for a dual gate, gm of gate 1 across the whole device) and gate shot noise 2q·|IG| across
// gate–source (the gate diodes' leakage; the induced gate noise of the
// channel is not modelled). Supplies and ports other than the in port
// are noiseless; no flicker noise.
func At(c *circuit.Circuit, op *dc.Result, r *ac.Result, f float64) (Point, error) {
	var h []complex128
	return atInto(c, op, r, f, make([]Contribution, 0, maxContributions(c)), &h)
}

// atInto is At appending the contributions to parts (which must have room for
// maxContributions(c), so that nothing grows) and each part's transfers to
// the buffer *hbuf.
func atInto(c *circuit.Circuit, op *dc.Result, r *ac.Result, f float64, parts []Contribution, hbuf *[]complex128) (Point, error) {
	p := Point{Frequency: f}
	if !r.HasGain {
		return p, nil
	}
	if op == nil {
		op = &dc.Result{TempC: 25}
	}
	t := op.TempC + kelvin
	if !(t > 0) || math.IsInf(t, 0) {
		return p, fmt.Errorf("ambient %g °C is not a temperature", op.TempC)
	}
	adj, err := r.Adjoint(f)
	if err != nil {
		return p, err
	}
	hs, rs := adj.Source()
	p.Source = sq(cmplx.Abs(hs)) * 4 * Boltzmann * T0 / rs
	total := p.Source
	p.Parts = parts
	for _, part := range c.Parts {
		h, d, err := adj.BranchesAppend((*hbuf)[:0], part.Ref)
		if err != nil {
			return p, err
		}
		*hbuf = h
		switch {
		case part.Kind.IsBJT():
			bjtNoise(&p, &total, part, op, t, h)
		case part.Kind.IsFET():
			if q := op.FETs[part.Ref]; q != nil && len(h) > 0 {
				gm := math.Abs(q.Jac[0][1])
				p.add(&total, Contribution{part.Ref, "channel thermal", sq(cmplx.Abs(h[0])) * 4 * Boltzmann * t * Gamma * gm})
				p.add(&total, Contribution{part.Ref, "gate shot", sq(cmplx.Abs(h[1])) * 2 * Charge * math.Abs(q.IG)})
			}
		default:
			if pw := passive(h, d, t); pw > 0 {
				p.add(&total, Contribution{part.Ref, "thermal", pw})
			}
		}
	}
	slices.SortStableFunc(p.Parts, func(a, b Contribution) int {
		if a.Power != b.Power {
			if a.Power > b.Power {
				return -1
			}
			return 1
		}
		if c := strings.Compare(a.Ref, b.Ref); c != 0 {
			return c
		}
		return strings.Compare(a.Source, b.Source)
	})
	if len(p.Parts) == 0 {
		p.Parts = nil
	}
	if !(p.Source > 0) || math.IsInf(total, 0) || math.IsNaN(total) {
		p.Parts = nil
		return p, nil
	}
	p.Valid = true
	p.F = total / p.Source
	p.NFDB = 10 * math.Log10(p.F)
	p.TemperatureK = (p.F - 1) * T0
	return p, nil
}

// passive is hᵀ·C·h* with C = 2kT·(D + Dᴴ): the output noise of a passive
// element at temperature t.
func passive(h, d []complex128, t float64) float64 {
	r := len(h)
	var s complex128
	for k := range r {
		for l := range r {
			c := d[k*r+l] + cmplx.Conj(d[l*r+k])
			if c != 0 {
				s += h[k] * c * cmplx.Conj(h[l])
			}
		}
	}
	return 2 * Boltzmann * t * real(s)
}

// add counts a contribution that is a positive, finite power.
func (p *Point) add(total *float64, x Contribution) {
	if x.Power > 0 && !math.IsInf(x.Power, 0) {
		p.Parts = append(p.Parts, x)
		*total += x.Power
	}
}

// bjtNoise adds a transistor's three (or, with rb = 0, two) sources on its
// branches [b′–e, b′–c, c–e, b–b′].
func bjtNoise(p *Point, total *float64, part *circuit.Part, op *dc.Result, t float64, h []complex128) {
	q := op.BJTs[part.Ref]
	if q == nil || len(h) < 3 {
		return
	}
	p.add(total, Contribution{part.Ref, "base shot", sq(cmplx.Abs(h[0])) * 2 * Charge * math.Abs(q.IB)})
	p.add(total, Contribution{part.Ref, "collector shot", sq(cmplx.Abs(h[2])) * 2 * Charge * math.Abs(q.IC)})
	if len(h) == 4 && part.BJT != nil && part.BJT.RB > 0 {
		p.add(total, Contribution{part.Ref, "rb thermal", sq(cmplx.Abs(h[3])) * 4 * Boltzmann * t / part.BJT.RB})
	}
}

func sq(x float64) float64 { return x * x }

// Share is the fraction of the stage's own output noise (total less the
// source's) that each part contributes, summed over its sources, largest
// first.
type Share struct {
	Ref      string
	Fraction float64
}

// Shares sums p.Parts by part.
func (p Point) Shares() []Share {
	own := 0.0
	by := map[string]float64{}
	for _, x := range p.Parts {
		own += x.Power
		by[x.Ref] += x.Power
	}
	var s []Share
	if own <= 0 {
		return s
	}
	for ref, v := range by {
		s = append(s, Share{ref, v / own})
	}
	sort.Slice(s, func(i, j int) bool {
		if s[i].Fraction != s[j].Fraction {
			return s[i].Fraction > s[j].Fraction
		}
		return s[i].Ref < s[j].Ref
	})
	return s
}
