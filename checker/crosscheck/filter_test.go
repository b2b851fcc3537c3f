package crosscheck

// An independent computation of a passive filter's response (docs/filters.md)
// compared with checker/filter, which reads checker/ac's two-port. Written
// from the definitions, sharing nothing with either: every part is an
// admittance between two nodes (a transformer a block of them, from the
// inverse of its impedance matrix Z = R + jωL, Lij = k·√(Li·Lj)), a part's
// unloaded Q is the series resistance ωL/Q or 1/(ωCQ) at q_freq (or the
// band's geometric centre), the source is a 1 V EMF behind RS, the load RL,
// and the node voltages come from Gaussian elimination with partial pivoting
// on the dense complex matrix. The insertion loss is then
// −10·log10(4·RS/RL·|V_out|²).

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand"
	"os"
	"strings"
	"testing"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/filter"
)

// refLoss is the insertion loss of c at f, in dB, by the direct solve.
func refLoss(c *circuit.Circuit, f float64) (float64, error) {
	idx := map[string]int{}
	for _, n := range c.Nets() {
		idx[n] = len(idx)
	}
	n := len(idx)
	y := make([][]complex128, n)
	for i := range y {
		y[i] = make([]complex128, n+1) // the last column is the right-hand side
		y[i][i] += 1e-12               // Gmin, as the model has it
	}
	node := func(net string) int {
		if net == circuit.Gnd {
			return -1
		}
		return idx[net]
	}
	between := func(a, b int, g complex128) {
		if a >= 0 {
			y[a][a] += g
		}
		if b >= 0 {
			y[b][b] += g
		}
		if a >= 0 && b >= 0 {
			y[a][b] -= g
			y[b][a] -= g
		}
	}
	w := 2 * math.Pi * f
	centre := math.Sqrt(c.Band[0] * c.Band[1])
	qLoss := func(p *circuit.Part, l, cap float64) float64 {
		if p.Q <= 0 {
			return 0
		}
		fq := p.QFreq
		if fq <= 0 {
			fq = centre
		}
		if l > 0 {
			return 2 * math.Pi * fq * l / p.Q
		}
		return 1 / (2 * math.Pi * fq * cap * p.Q)
	}
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Resistor:
			between(node(p.Nets[0]), node(p.Nets[1]), complex(1/p.Value, 0))
		case circuit.Capacitor:
			z := complex(qLoss(p, 0, p.Value), -1/(w*p.Value))
			between(node(p.Nets[0]), node(p.Nets[1]), 1/z)
		case circuit.Inductor:
			l := p.Value
			if p.Turns > 0 {
				l = p.AL * p.Turns * p.Turns
			}
			z := complex(p.Resistance+qLoss(p, l, 0), w*l)
			between(node(p.Nets[0]), node(p.Nets[1]), 1/z)
		case circuit.Transformer:
			m := len(p.Windings)
			z := make([][]complex128, m)
			for i, wi := range p.Windings {
				z[i] = make([]complex128, 2*m)
				li := p.AL * wi.Turns * wi.Turns
				for j, wj := range p.Windings {
					lj := p.AL * wj.Turns * wj.Turns
					if i == j {
						z[i][j] = complex(wi.Resistance+qLoss(p, li, 0), w*li)
					} else {
						z[i][j] = complex(0, w*p.Coupling*math.Sqrt(li*lj))
					}
				}
				z[i][m+i] = 1
			}
			if err := eliminate(z, m); err != nil {
				return 0, err
			}
			for i, wi := range p.Windings {
				for j, wj := range p.Windings {
					g := z[i][m+j] // (Z⁻¹)ij: current into winding i per volt across winding j
					a, b := node(wi.Nets[0]), node(wi.Nets[1])
					cc, d := node(wj.Nets[0]), node(wj.Nets[1])
					add := func(r, s int, v complex128) {
						if r >= 0 && s >= 0 {
							y[r][s] += v
						}
					}
					add(a, cc, g)
					add(a, d, -g)
					add(b, cc, -g)
					add(b, d, g)
				}
			}
		default:
			return 0, fmt.Errorf("part %s: kind %s is not passive", p.Ref, p.Kind)
		}
	}
	in, out := c.InPort(), c.OutPort()
	between(node(in.Net), -1, complex(1/in.Impedance, 0))
	between(node(out.Net), -1, complex(1/out.Impedance, 0))
	y[node(in.Net)][n] = complex(1/in.Impedance, 0) // Norton form of 1 V behind RS
	if err := eliminate(y, n); err != nil {
		return 0, err
	}
	vout := y[node(out.Net)][n]
	return -10 * math.Log10(4*in.Impedance/out.Impedance*cmplx.Abs(vout)*cmplx.Abs(vout)), nil
}

// eliminate reduces the n×n left block of a to the identity by Gauss–Jordan
// elimination with partial pivoting, carrying the columns to its right.
func eliminate(a [][]complex128, n int) error {
	for k := 0; k < n; k++ {
		p := k
		for i := k + 1; i < n; i++ {
			if cmplx.Abs(a[i][k]) > cmplx.Abs(a[p][k]) {
				p = i
			}
		}
		if a[p][k] == 0 {
			return fmt.Errorf("singular at column %d", k)
		}
		a[k], a[p] = a[p], a[k]
		piv := a[k][k]
		for j := range a[k] {
			a[k][j] /= piv
		}
		for i := 0; i < n; i++ {
			if i == k || a[i][k] == 0 {
				continue
			}
			f := a[i][k]
			for j := range a[i] {
				a[i][j] -= f * a[k][j]
			}
		}
	}
	return nil
}

// randomFilter is a ladder of shunt resonators (an inductor by value or by
// turns, or a transformer winding with a link at the ends), joined by
// series capacitors or inductors, with random values, tolerances, Qs and
// port impedances.
func randomFilter(rng *rand.Rand, i int) string {
	var b strings.Builder
	f0 := 1e6 * math.Exp(rng.Float64()*math.Log(100)) // 1 to 100 MHz
	n := 1 + rng.Intn(4)
	fmt.Fprintf(&b, "[circuit]\nname = \"random filter %d\"\nband = [%g, %g]\n\n", i, f0*0.98, f0*1.02)
	fmt.Fprintf(&b, "[ports.in]\nnet = \"n1\"\ndirection = \"in\"\nimpedance = %g\n\n", 10+rng.Float64()*990)
	fmt.Fprintf(&b, "[ports.out]\nnet = \"n%d\"\ndirection = \"out\"\nimpedance = %g\n\n", n, 10+rng.Float64()*990)
	l := 1 / (2 * math.Pi * f0) * (20 + rng.Float64()*200)
	cn := 1 / (math.Pow(2*math.Pi*f0, 2) * l)
	q := func() string {
		if rng.Intn(3) == 0 {
			return ""
		}
		s := fmt.Sprintf("q = %g\n", 20+rng.Float64()*300)
		if rng.Intn(2) == 0 {
			s += fmt.Sprintf("q_freq = %g\n", f0*(0.5+rng.Float64()))
		}
		return s
	}
	for k := 1; k <= n; k++ {
		switch rng.Intn(3) {
		case 0:
			fmt.Fprintf(&b, "[parts.L%d]\nkind = \"inductor\"\nvalue = %g\nnets = [\"n%d\", \"gnd\"]\nresistance = %g\n%s\n", k, l, k, rng.Float64(), q())
		case 1:
			al := 5e-9 * (1 + rng.Float64())
			fmt.Fprintf(&b, "[parts.L%d]\nkind = \"inductor\"\nturns = %d\nal = %g\nnets = [\"n%d\", \"gnd\"]\n%s\n", k, int(math.Max(1, math.Round(math.Sqrt(l/al)))), al, k, q())
		default:
			fmt.Fprintf(&b, "[parts.T%d]\nkind = \"transformer\"\nal = %g\ncoupling = %g\n%s", k, l/100, 0.9+rng.Float64()*0.09, q())
			fmt.Fprintf(&b, "windings.tank = { turns = 10, nets = [\"n%d\", \"gnd\"] }\nwindings.link = { turns = %d, nets = [\"x%d\", \"gnd\"], resistance = 0.1 }\n\n", k, 1+rng.Intn(5), k)
			fmt.Fprintf(&b, "[parts.RX%d]\nkind = \"resistor\"\nvalue = %g\nnets = [\"x%d\", \"gnd\"]\n\n", k, 1+rng.Float64()*100, k)
		}
		fmt.Fprintf(&b, "[parts.C%d]\nkind = \"capacitor\"\nvalue = %g\nnets = [\"n%d\", \"gnd\"]\n%s\n", k, cn*(0.7+0.3*rng.Float64()), k, q())
		if k < n {
			if rng.Intn(4) == 0 {
				fmt.Fprintf(&b, "[parts.LS%d]\nkind = \"inductor\"\nvalue = %g\nnets = [\"n%d\", \"n%d\"]\n\n", k, l*(5+rng.Float64()*20), k, k+1)
			} else {
				fmt.Fprintf(&b, "[parts.CS%d]\nkind = \"capacitor\"\nvalue = %g\nnets = [\"n%d\", \"n%d\"]\n%s\n", k, cn*(0.02+0.2*rng.Float64()), k, k+1, q())
			}
		}
	}
	return b.String()
}

// TestFilterResponse compares checker/filter's insertion loss with the direct
// solve on the shipped 40 m filter and on random filters, at frequencies from
// a decade below to a decade above each band, to 1e-6 dB or 1e-7 relative
// (the two differ only in rounding; a loss near 300 dB is where checker/filter
// caps it, and is skipped).
func TestFilterResponse(t *testing.T) {
	var srcs []string
	if b, err := os.ReadFile("../../testdata/circuits/bpf-40m.toml"); err == nil {
		srcs = append(srcs, string(b))
	} else {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewSource(19))
	for i := range 200 {
		srcs = append(srcs, randomFilter(rng, i))
	}
	compared := 0
	for i, src := range srcs {
		c, err := circuit.LoadBytes(fmt.Sprintf("filter-%d.toml", i), []byte(src), circuit.Options{})
		if err != nil {
			t.Fatalf("circuit %d: %v\n%s", i, err, src)
		}
		r, err := ac.Analyze(c, nil)
		if err != nil {
			t.Fatalf("circuit %d: %v", i, err)
		}
		fs := filter.LogGrid(c.Band[0]/10, c.Band[1]*10, 31)
		pts, err := filter.Response(r, fs)
		if err != nil {
			t.Fatal(err)
		}
		for k, f := range fs {
			want, err := refLoss(c, f)
			if err != nil {
				t.Fatalf("circuit %d: %v", i, err)
			}
			got := pts[k].InsertionLossDB
			if want > 250 {
				continue
			}
			compared++
			if math.Abs(got-want) > math.Max(1e-6, 1e-7*math.Abs(want)) {
				t.Errorf("circuit %d at %g Hz: filter %.9f dB, direct solve %.9f dB\n%s", i, f, got, want, src)
				break
			}
		}
	}
	t.Logf("%d frequencies of %d filters compared", compared, len(srcs))
}
