package noise

import (
	"fmt"
	"math"
)

// ExternalRange is the frequency range of the P.372 curves below, Hz.
var ExternalRange = [2]float64{0.3e6, 250e6}

// line is one P.372 median curve: Fam = c − d·log10(f / 1 MHz), dB above
// kT0·b.
type line struct{ c, d float64 }

// manMade holds the median man-made noise of ITU-R P.372 (editions -8 and
// -11, as three independent public codes give them; ../shared REFERENCES-2
// §2.4) per environment of circuit.Environments.
var manMade = map[string]line{
	"city":        {76.8, 27.7},
	"residential": {72.5, 27.7},
	"rural":       {67.2, 27.7},
	"quiet-rural": {53.6, 28.6},
}

// galactic is P.372's median galactic noise.
var galactic = line{52.0, 23.0}

func (l line) at(f float64) float64 { return l.c - l.d*math.Log10(f/1e6) }

// External is the external noise a receiver hears at f in env: the median
// man-made noise of the environment or the galactic noise, whichever is
// larger (P.372 gives both as medians; where galactic noise dominates, as in
// a quiet rural place at VHF, it sets the floor). Fam is in dB above kT0·b;
// galactic tells which curve set it. It fails outside ExternalRange or for
// an unknown environment.
func External(env string, f float64) (famDB float64, isGalactic bool, err error) {
	mm, ok := manMade[env]
	if !ok {
		return 0, false, fmt.Errorf("no man-made noise for environment %q", env)
	}
	if !(f >= ExternalRange[0] && f <= ExternalRange[1]) {
		return 0, false, fmt.Errorf("%g Hz is outside the P.372 curves (0.3–250 MHz)", f)
	}
	m, g := mm.at(f), galactic.at(f)
	if g > m {
		return g, true, nil
	}
	return m, false, nil
}

// Rise is how much a receiver of noise factor F raises the system's noise
// floor above the external noise fa (a power ratio to kT0·b), dB:
// 10·log10((fa + F − 1)/fa), the system noise factor f = fa + (F − 1) of
// P.372 against fa alone (lossless antenna).
func Rise(fa, f float64) float64 { return 10 * math.Log10((fa+f-1)/fa) }

// AllowedNF is the largest noise figure that raises a floor fa by at most
// riseDB: 10·log10(1 + fa·(10^(riseDB/10) − 1)), dB.
func AllowedNF(fa, riseDB float64) float64 {
	return 10 * math.Log10(1+fa*(math.Pow(10, riseDB/10)-1))
}
