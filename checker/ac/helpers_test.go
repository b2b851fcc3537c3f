package ac

import (
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// Exact SI constants (2019 redefinition of the SI base units).
const (
	boltzmann = 1.380649e-23    // J/K
	charge    = 1.602176634e-19 // C
)

// vt is the thermal voltage k·T/q at tK kelvin.
func vt(tK float64) float64 { return boltzmann * tK / charge }

// net is a circuit under construction, with its hand-made operating point.
type net struct {
	c  *circuit.Circuit
	op *dc.Result
}

func newNet(lo, hi float64) *net {
	return &net{
		c:  &circuit.Circuit{Name: "test", Band: [2]float64{lo, hi}},
		op: &dc.Result{VT: vt(298.15), BJTs: map[string]*dc.BJT{}},
	}
}

func (n *net) supply(name string, volts, z float64) *net {
	n.c.Supplies = append(n.c.Supplies, &circuit.Supply{Net: name, Volts: volts, Impedance: z})
	return n
}

func (n *net) port(name, nt, dir string, z float64) *net {
	n.c.Ports = append(n.c.Ports, &circuit.Port{Name: name, Net: nt, Direction: dir, Impedance: z, Matched: true})
	return n
}

func (n *net) two(kind circuit.Kind, ref, a, b string, v float64) *circuit.Part {
	p := &circuit.Part{Ref: ref, Kind: kind, Nets: []string{a, b}, Value: v}
	n.c.Parts = append(n.c.Parts, p)
	return p
}

func (n *net) r(ref, a, b string, v float64) *net { n.two(circuit.Resistor, ref, a, b, v); return n }
func (n *net) cap(ref, a, b string, v float64) *net {
	n.two(circuit.Capacitor, ref, a, b, v)
	return n
}
func (n *net) ind(ref, a, b string, v float64) *net {
	n.two(circuit.Inductor, ref, a, b, v)
	return n
}

// bjt adds a transistor and its operating point (IC, hFE).
func (n *net) bjt(kind circuit.Kind, ref, c, b, e string, ic, hfe, ft, cob float64) *net {
	n.c.Parts = append(n.c.Parts, &circuit.Part{Ref: ref, Kind: kind, Nets: []string{c, b, e},
		BJT: &circuit.BJTParams{FT: ft, HFEMin: hfe, HFEMax: hfe, Cob: cob}})
	n.op.BJTs[ref] = &dc.BJT{IC: ic, ICf: ic, HFE: hfe}
	return n
}

// xfmr adds a transformer with windings given as (name, turns, first net, second net, resistance).
func (n *net) xfmr(ref string, al, k float64, ws ...*circuit.Winding) *net {
	n.c.Parts = append(n.c.Parts, &circuit.Part{Ref: ref, Kind: circuit.Transformer, AL: al, Coupling: k, Windings: ws})
	return n
}

func wdg(name string, turns float64, a, b string, r float64) *circuit.Winding {
	return &circuit.Winding{Name: name, Turns: turns, Nets: [2]string{a, b}, Resistance: r}
}

func (n *net) analyze(t testing.TB) *Result {
	t.Helper()
	r, err := Analyze(n.c, n.op)
	if err != nil {
		t.Fatalf("Analyze: %v", err)
	}
	return r
}

// Closed-form circuit algebra used for the expected values.

func par(zs ...complex128) complex128 {
	var y complex128
	for _, z := range zs {
		y += 1 / z
	}
	return 1 / y
}

func zC(c, f float64) complex128 { return 1 / complex(0, 2*math.Pi*f*c) }
func zL(l, f float64) complex128 { return complex(0, 2*math.Pi*f*l) }
func ohm(r float64) complex128   { return complex(r, 0) }

// gammaRL is −20·log10|(z − z0)/(z + z0)|, the definition of REFERENCES §12.
func gammaRL(z complex128, z0 float64) float64 {
	return -20 * math.Log10(cmplx.Abs((z-ohm(z0))/(z+ohm(z0))))
}

func near(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.IsNaN(got) || math.IsInf(got, 0) || math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.7g, want %.7g (±%.2g relative)", what, got, want, rel)
	}
}

func nearAbs(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.IsNaN(got) || math.IsInf(got, 0) || math.Abs(got-want) > tol {
		t.Errorf("%s = %.7g, want %.7g (±%.2g)", what, got, want, tol)
	}
}

func nearZ(t *testing.T, what string, got, want complex128, rel float64) {
	t.Helper()
	if !finite(got) || cmplx.Abs(got-want) > rel*cmplx.Abs(want) {
		t.Errorf("%s = %.7g, want %.7g (±%.2g relative)", what, got, want, rel)
	}
}
