// Package sweep is the wide small-signal sweep the stability checks read: the
// circuit between its in and out ports on a logarithmic grid from a decade
// below the band to twice the fastest transistor's fT, as S-parameters
// referred to the ports' own impedances, with the stability figures of each
// frequency (Edwards–Sinsky μ and μ', Rollett K, |Δ|). Oscillation is seldom
// in band: a stage that behaves at its three band frequencies can still be
// potentially unstable a decade above them, where the transistor still has
// gain and the bias network presents whatever it happens to be.
//
// The sweep goes through ac.Result.PortsEach, which keeps nothing after it
// returns, so a sweep inside the worst-case search does not grow the band
// analysis's per-frequency cache.
package sweep

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"sync"

	"headroom/checker/ac"
	"headroom/checker/circuit"
)

// PerDecade is the grid's density: points per decade of frequency.
const PerDecade = 40

// Cap bounds μ, μ' and K where their denominators vanish (a unilateral or
// isolated two-port): above it a figure means "as stable as it gets", and
// the cap keeps every output number finite.
const Cap = 1e9

// Point is the circuit at one frequency of the sweep.
type Point struct {
	Frequency float64 // Hz
	// S is the scattering matrix referred to RS at the in port (index 0)
	// and RL at the out port (index 1); only S[0][0] or S[1][1] means
	// something in the one-port form.
	S [2][2]complex128
	// Mu and MuPrime are Edwards–Sinsky's load- and source-side μ, K is
	// Rollett's stability factor and Delta is |S11·S22 − S12·S21|; all zero
	// in the one-port form. Mu, MuPrime and K are capped at Cap.
	Mu, MuPrime, K, Delta float64
	// GainDB is the transducer gain 20·log10|S21| between RS and RL, nil
	// in the one-port form or where no signal gets through.
	GainDB *float64
	// VoltageGainDB is 20·log10|Vout/Vin| with the out port loaded by RL,
	// Vin the in port's voltage: Z21·RL/((Z22 + RL)·Zin), Zin = PortZ; nil
	// where GainDB is, and where Zin is zero.
	VoltageGainDB *float64
	// ReturnLossDB is −20·log10|S11| (the in port, the out port loaded by
	// RL), within ±ac.MaxReturnLossDB; in the one-port form, of the port
	// there is against its own impedance.
	ReturnLossDB float64
	// PortZ is the impedance looking into the port from its termination
	// (the in port with the out port loaded; the out port in the one-port
	// form when there is no in port), Ω.
	PortZ complex128
}

// Result is one sweep.
type Result struct {
	// TwoPort: the circuit has an in and an out port, neither AC ground, and
	// μ, K and |Δ| are computed. Otherwise OnePort names the port judged
	// ("in" or "out"), or is "" when there is none.
	TwoPort bool
	OnePort string
	Points  []Point
	// MuMin is the least μ over the sweep and MuMinHz where (two-port).
	MuMin, MuMinHz float64
	// ReMin is the least Re PortZ over the sweep and ReMinHz where (both forms).
	ReMin, ReMinHz float64
	// Bare: the sweep of Stability, whose points leave out ReturnLossDB
	// (zero), GainDB and VoltageGainDB (nil).
	Bare bool
}

var errNoPort = errors.New("no port")

// Grid is the sweep's frequencies, ascending: PerDecade points per decade
// from a decade below the band's lowest frequency to twice the highest
// transistor fT (ten times the band's highest frequency when there is no
// transistor, or when that is higher), plus the band's three points.
func Grid(c *circuit.Circuit) []float64 { return slices.Clone(grid(c)) }

// gridKey is what a grid depends on: the band and the top of the sweep.
type gridKey struct{ lo, hi, top float64 }

// grids memoises the last few grids: every case of a worst-case search
// sweeps over the same band, usually to the same top, and a grid costs a
// power per point.
var grids = struct {
	sync.Mutex
	m map[gridKey][]float64
}{m: map[gridKey][]float64{}}

// grid is Grid, shared: read it, never write it.
func grid(c *circuit.Circuit) []float64 {
	top := 10 * c.Band[1]
	for _, p := range c.Parts {
		if p.Kind.IsBJT() && p.BJT != nil && p.BJT.FT > 0 && !math.IsInf(p.BJT.FT, 0) {
			top = math.Max(top, 2*p.BJT.FT)
		}
	}
	k := gridKey{c.Band[0], c.Band[1], top}
	grids.Lock()
	fs, ok := grids.m[k]
	grids.Unlock()
	if ok {
		return fs
	}
	fs = makeGrid(k)
	grids.Lock()
	if len(grids.m) >= 16 {
		clear(grids.m) // other circuits: a check goes through them one by one
	}
	grids.m[k] = fs
	grids.Unlock()
	return fs
}

// makeGrid computes the grid of k.
func makeGrid(k gridKey) []float64 {
	lo, hi := k.lo/10, k.top
	band := [2]float64{k.lo, k.hi}
	n := int(math.Ceil(PerDecade * math.Log10(hi/lo)))
	fs := make([]float64, 0, n+4)
	for k := 0; k <= n; k++ {
		fs = append(fs, lo*math.Pow(hi/lo, float64(k)/float64(n)))
	}
	fs = append(fs, band[0], math.Sqrt(band[0]*band[1]), band[1])
	slices.Sort(fs)
	return slices.Compact(fs)
}

// Run sweeps r (the band analysis of c) over Grid(c).
func Run(c *circuit.Circuit, r *ac.Result) (*Result, error) {
	return RunAt(r, grid(c))
}

// Stability is Run for the stability rules, which read only S, μ, μ', K,
// |Δ| and PortZ (and MuMin, ReMin): the same points, those figures bit for
// bit Run's, without the three logarithms a point of the gains and the
// return loss (Bare).
func Stability(c *circuit.Circuit, r *ac.Result) (*Result, error) {
	return runAt(r, grid(c), true)
}

// RunAt sweeps r over the given frequencies.
func RunAt(r *ac.Result, freqs []float64) (*Result, error) { return runAt(r, freqs, false) }

// runAt is RunAt, bare or not.
func runAt(r *ac.Result, freqs []float64, bare bool) (*Result, error) {
	// The points are written in place: a Point is 144 bytes, and copying
	// each through a return and an append showed in the profiles.
	res := &Result{Points: make([]Point, len(freqs)), MuMin: math.Inf(1), ReMin: math.Inf(1), Bare: bare}
	k := 0 // points written
	first := true
	var gains []float64 // the points' GainDB and VoltageGainDB, in one block
	if !bare {
		gains = make([]float64, 2*len(freqs))
	}
	err := r.PortsEach(freqs, func(pp ac.PortPoint) error {
		if first {
			first = false
			switch {
			case pp.HasIn && pp.HasOut:
				res.TwoPort = true
			case pp.HasIn:
				res.OnePort = "in"
			case pp.HasOut:
				res.OnePort = "out"
			default:
				return errNoPort
			}
		}
		pt := &res.Points[k]
		if bare {
			point(pt, pp, res.TwoPort, res.OnePort, nil, nil)
		} else {
			point(pt, pp, res.TwoPort, res.OnePort, &gains[2*k], &gains[2*k+1])
		}
		k++
		if res.TwoPort && pt.Mu < res.MuMin {
			res.MuMin, res.MuMinHz = pt.Mu, pp.Frequency
		}
		if re := real(pt.PortZ); re < res.ReMin {
			res.ReMin, res.ReMinHz = re, pp.Frequency
		}
		return nil
	})
	res.Points = res.Points[:k]
	if err == errNoPort {
		return &Result{Bare: bare}, nil
	}
	if err != nil {
		return nil, err
	}
	if math.IsInf(res.MuMin, 1) {
		res.MuMin = 0
	}
	if math.IsInf(res.ReMin, 1) {
		res.ReMin = 0
	}
	return res, nil
}

// point turns one two-port into S-parameters and stability figures, written
// into pt (zero); gain and vgain hold the point's GainDB and VoltageGainDB
// when it has them. With gain nil (a bare sweep) the return loss and the
// gains are left out.
func point(pt *Point, pp ac.PortPoint, two bool, one string, gain, vgain *float64) {
	pt.Frequency = pp.Frequency
	if !two {
		z, z0 := pp.Z[0][0], pp.RS
		if one == "out" {
			z, z0 = pp.Z[1][1], pp.RL
		}
		pt.PortZ = z
		g := (z - complex(z0, 0)) / (z + complex(z0, 0))
		pt.S[0][0] = g
		if gain != nil {
			pt.ReturnLossDB = returnLoss(cmplx.Abs(g))
		}
		return
	}
	pt.S = ToS(pp.Z, pp.RS, pp.RL)
	s21 := pt.S[1][0]
	abs11 := cmplx.Abs(pt.S[0][0])
	pt.Mu, pt.MuPrime, pt.K, pt.Delta = figures(pt.S, abs11)
	// The in port's impedance with the out port loaded by RL.
	z := pp.Z
	pt.PortZ = z[0][0] - z[0][1]*z[1][0]/(z[1][1]+complex(pp.RL, 0))
	if gain == nil {
		return
	}
	pt.ReturnLossDB = returnLoss(abs11)
	if a := cmplx.Abs(s21); a > 0 {
		*gain = 20 * math.Log10(a)
		pt.GainDB = gain
	}
	if pt.GainDB != nil && pt.PortZ != 0 {
		av := cmplx.Abs(z[1][0] * complex(pp.RL, 0) / ((z[1][1] + complex(pp.RL, 0)) * pt.PortZ))
		if g := 20 * math.Log10(av); !math.IsInf(g, 0) && !math.IsNaN(g) {
			*vgain = g
			pt.VoltageGainDB = vgain
		}
	}
}

// ToS converts an open-circuit impedance matrix to S-parameters referred to
// real r1 at port 1 and r2 at port 2: with z = R^−½·Z·R^−½,
// S = (z − I)(z + I)⁻¹ (the power-wave definition for real references).
func ToS(z [2][2]complex128, r1, r2 float64) [2][2]complex128 {
	a, b := complex(math.Sqrt(r1), 0), complex(math.Sqrt(r2), 0)
	z11, z12, z21, z22 := z[0][0]/(a*a), z[0][1]/(a*b), z[1][0]/(a*b), z[1][1]/(b*b)
	d := (z11+1)*(z22+1) - z12*z21
	return [2][2]complex128{
		{((z11-1)*(z22+1) - z12*z21) / d, 2 * z12 / d},
		{2 * z21 / d, ((z11+1)*(z22-1) - z12*z21) / d},
	}
}

// Figures returns μ, μ', K and |Δ| of a scattering matrix:
// Δ = S11·S22 − S12·S21,
// μ = (1 − |S11|²)/(|S22 − Δ·S11*| + |S12·S21|),
// μ' = (1 − |S22|²)/(|S11 − Δ·S22*| + |S12·S21|),
// K = (1 − |S11|² − |S22|² + |Δ|²)/(2·|S12·S21|), each capped at ±Cap.
func Figures(s [2][2]complex128) (mu, muPrime, k, delta float64) {
	return figures(s, cmplx.Abs(s[0][0]))
}

// figures is Figures given |S11|, which the return loss needs too.
func figures(s [2][2]complex128, abs11 float64) (mu, muPrime, k, delta float64) {
	s11, s12, s21, s22 := s[0][0], s[0][1], s[1][0], s[1][1]
	d := s11*s22 - s12*s21
	p := cmplx.Abs(s12 * s21)
	a11, a22 := sq(abs11), sq(cmplx.Abs(s22))
	mu = ratio(1-a11, cmplx.Abs(s22-d*cmplx.Conj(s11))+p)
	muPrime = ratio(1-a22, cmplx.Abs(s11-d*cmplx.Conj(s22))+p)
	k = ratio(1-a11-a22+sq(cmplx.Abs(d)), 2*p)
	return mu, muPrime, k, cmplx.Abs(d)
}

func ratio(num, den float64) float64 {
	if den == 0 || math.Abs(num) > Cap*den {
		switch {
		case num > 0:
			return Cap
		case num < 0:
			return -Cap
		}
		return 0
	}
	return num / den
}

func sq(x float64) float64 { return x * x }

// returnLoss is −20·log10 a within ±ac.MaxReturnLossDB, a = |Γ|.
func returnLoss(a float64) float64 {
	if a == 0 || math.IsNaN(a) {
		return ac.MaxReturnLossDB
	}
	return math.Max(-ac.MaxReturnLossDB, math.Min(ac.MaxReturnLossDB, -20*math.Log10(a)))
}

// String is a one-line summary for test failures.
func (r *Result) String() string {
	if r.TwoPort {
		return fmt.Sprintf("two-port, %d points, μ min %.4g at %.4g Hz", len(r.Points), r.MuMin, r.MuMinHz)
	}
	return fmt.Sprintf("one-port %q, %d points, Re Z min %.4g Ω at %.4g Hz", r.OnePort, len(r.Points), r.ReMin, r.ReMinHz)
}
