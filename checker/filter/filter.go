// Package filter measures passive filters and tuned circuits from the
// small-signal analysis (checker/ac): the insertion and return loss between
// the ports at any frequency, the passband's centre and 3 dB bandwidth, and
// the resonance and loaded Q of every tank (docs/filters.md). It solves
// nothing itself: every figure is read from ac's two-port and impedances.
package filter

import (
	"errors"
	"math"
	"math/cmplx"

	"headroom/checker/ac"
	"headroom/checker/circuit"
)

// MaxLossDB caps an insertion loss where no signal reaches the out port, so
// the figure stays finite.
const MaxLossDB = 300

// BandPoints is how many frequencies, evenly spaced on a log scale from the
// band's lowest to its highest, the passband is judged at.
const BandPoints = 9

// Point is the filter between its ports at one frequency, each port
// terminated in its own impedance.
type Point struct {
	Frequency       float64 // Hz
	InsertionLossDB float64 // −10·log10 of the transducer gain, dB (≤ MaxLossDB)
	ReturnLossDB    float64 // at the in port, −20·log10|Γ|, dB (within ±ac.MaxReturnLossDB)
}

// Is reports whether c is a filter: one in and one out port joined by
// passive parts only (no transistor).
func Is(c *circuit.Circuit) bool {
	if c.HasTransistor() {
		return false
	}
	ins, outs := 0, 0
	for _, p := range c.Ports {
		switch p.Direction {
		case "in":
			ins++
		case "out":
			outs++
		}
	}
	return ins == 1 && outs == 1
}

// Lossless reports whether no part of c has an unloaded Q: the response is
// then that of ideal parts and the insertion loss in the passband is the
// mismatch alone.
func Lossless(c *circuit.Circuit) bool {
	for _, p := range c.Parts {
		if p.Q > 0 {
			return false
		}
	}
	return true
}

// Response is the filter at each frequency, in order.
func Response(r *ac.Result, freqs []float64) ([]Point, error) {
	out := make([]Point, 0, len(freqs))
	err := r.PortsEach(freqs, func(pp ac.PortPoint) error {
		p, err := point(pp)
		out = append(out, p)
		return err
	})
	return out, err
}

var errNoPorts = errors.New("the circuit has no in and out port to measure between")

// point terminates the open-circuit two-port in RS and RL: with a source E
// behind RS, Zin = Z11 − Z12·Z21/(Z22 + RL) and
// V2/E = Z21·RL/((Z22 + RL)(Zin + RS)); the transducer gain is
// 4·RS/RL·|V2/E|².
func point(pp ac.PortPoint) (Point, error) {
	p := Point{Frequency: pp.Frequency, InsertionLossDB: MaxLossDB}
	if !pp.HasIn || !pp.HasOut {
		return p, errNoPorts
	}
	rs, rl := complex(pp.RS, 0), complex(pp.RL, 0)
	z := pp.Z
	zin := z[0][0] - z[0][1]*z[1][0]/(z[1][1]+rl)
	p.ReturnLossDB = returnLoss(zin, pp.RS)
	v := z[1][0] * rl / ((z[1][1] + rl) * (zin + rs))
	gt := 4 * pp.RS / pp.RL * sq(cmplx.Abs(v))
	if il := -10 * math.Log10(gt); il < MaxLossDB && !math.IsNaN(il) {
		p.InsertionLossDB = il
	}
	return p, nil
}

func returnLoss(z complex128, rs float64) float64 {
	num, den := cmplx.Abs(z-complex(rs, 0)), cmplx.Abs(z+complex(rs, 0))
	if num == 0 || math.IsNaN(num) {
		return ac.MaxReturnLossDB
	}
	if den == 0 {
		return -ac.MaxReturnLossDB
	}
	return math.Max(-ac.MaxReturnLossDB, math.Min(ac.MaxReturnLossDB, -20*math.Log10(num/den)))
}

func sq(x float64) float64 { return x * x }

// LogGrid is n frequencies from lo to hi, evenly spaced on a log scale.
func LogGrid(lo, hi float64, n int) []float64 {
	if n < 2 || !(hi > lo) {
		return []float64{lo}
	}
	fs := make([]float64, n)
	for i := range fs {
		fs[i] = lo * math.Pow(hi/lo, float64(i)/float64(n-1))
	}
	fs[n-1] = hi
	return fs
}

// Passband is the filter across the band: the insertion loss at BandPoints
// frequencies, its largest value and the ripple (largest minus smallest).
type Passband struct {
	Points    []Point
	MaxLossDB float64 // dB
	RippleDB  float64 // dB
	Worst     Point   // where the loss is largest
	MinRLDB   float64 // the smallest return loss across the band, dB
}

// Band measures the passband of c.
func Band(c *circuit.Circuit, r *ac.Result) (Passband, error) {
	pts, err := Response(r, LogGrid(c.Band[0], c.Band[1], BandPoints))
	if err != nil {
		return Passband{}, err
	}
	pb := Passband{Points: pts, Worst: pts[0], MinRLDB: math.Inf(1)}
	lo := math.Inf(1)
	for _, p := range pts {
		if p.InsertionLossDB > pb.Worst.InsertionLossDB {
			pb.Worst = p
		}
		lo = math.Min(lo, p.InsertionLossDB)
		pb.MinRLDB = math.Min(pb.MinRLDB, p.ReturnLossDB)
	}
	pb.MaxLossDB = pb.Worst.InsertionLossDB
	pb.RippleDB = pb.MaxLossDB - lo
	return pb, nil
}

// Shape is the passband found by a sweep: where the loss is least, and the
// 3 dB points on either side of it.
type Shape struct {
	PeakHz, PeakLossDB float64
	// CenterHz is the geometric centre √(f1·f2) of the 3 dB points and
	// BandwidthHz their distance f2 − f1; both 0 when a 3 dB point lies
	// outside the sweep (Found false).
	CenterHz, BandwidthHz float64
	Found                 bool
	Sweep                 []Point // the response over the sweep, for the report
}

// SweepPoints is the number of frequencies of the shape sweep, a decade on
// either side of the band.
const SweepPoints = 241

// Measure sweeps c a decade either side of its band (SweepPoints on a log
// scale), takes the least loss, and finds the 3 dB points by bisection.
func Measure(c *circuit.Circuit, r *ac.Result) (Shape, error) {
	grid := LogGrid(c.Band[0]/10, c.Band[1]*10, SweepPoints)
	pts, err := Response(r, grid)
	if err != nil {
		return Shape{}, err
	}
	s := Shape{Sweep: pts}
	best := 0
	for i, p := range pts {
		if p.InsertionLossDB < pts[best].InsertionLossDB {
			best = i
		}
	}
	il := func(f float64) float64 {
		q, err := Response(r, []float64{f})
		if err != nil {
			return MaxLossDB
		}
		return q[0].InsertionLossDB
	}
	// Refine the least loss by golden section between the neighbours.
	a, b := grid[max(best-1, 0)], grid[min(best+1, len(grid)-1)]
	s.PeakHz = golden(a, b, il)
	s.PeakLossDB = math.Min(il(s.PeakHz), pts[best].InsertionLossDB)
	if pts[best].InsertionLossDB <= s.PeakLossDB {
		s.PeakHz = grid[best]
	}
	edge := s.PeakLossDB + 3
	above := func(f float64) bool { return il(f) > edge }
	f1, ok1 := crossing(grid, pts, best, -1, edge, above)
	f2, ok2 := crossing(grid, pts, best, +1, edge, above)
	if ok1 && ok2 {
		s.Found = true
		s.CenterHz = math.Sqrt(f1 * f2)
		s.BandwidthHz = f2 - f1
	}
	return s, nil
}

// crossing walks the grid from index i in direction dir to the first point
// whose loss exceeds edge and bisects (on a log scale) between it and the
// point before.
func crossing(grid []float64, pts []Point, i, dir int, edge float64, above func(float64) bool) (float64, bool) {
	for j := i + dir; j >= 0 && j < len(grid); j += dir {
		if pts[j].InsertionLossDB > edge {
			in, out := grid[j-dir], grid[j]
			for range 50 {
				mid := math.Sqrt(in * out)
				if above(mid) {
					out = mid
				} else {
					in = mid
				}
			}
			return math.Sqrt(in * out), true
		}
	}
	return 0, false
}

// golden finds the minimum of g on [a, b] by golden-section search on a log
// scale of frequency.
func golden(a, b float64, g func(float64) float64) float64 { return goldenN(a, b, 60, g) }

// goldenN is golden with n steps, each shrinking the bracket by 0.618.
func goldenN(a, b float64, n int, g func(float64) float64) float64 {
	la, lb := math.Log(a), math.Log(b)
	phi := (math.Sqrt(5) - 1) / 2
	c, d := lb-phi*(lb-la), la+phi*(lb-la)
	gc, gd := g(math.Exp(c)), g(math.Exp(d))
	for range n {
		if gc < gd {
			lb, d, gd = d, c, gc
			c = lb - phi*(lb-la)
			gc = g(math.Exp(c))
		} else {
			la, c, gc = c, d, gd
			d = la + phi*(lb-la)
			gd = g(math.Exp(d))
		}
	}
	return math.Exp((la + lb) / 2)
}
