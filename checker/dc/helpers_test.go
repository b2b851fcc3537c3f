package dc

import (
	"math"
	"testing"

	"headroom/checker/circuit"
)

// The exact SI constants, written out again here so that no expected value
// depends on the package under test (REFERENCES.md §3, SI Brochure 9th ed.).
const (
	kTest = 1.380649e-23    // J/K, exact since 2019
	qTest = 1.602176634e-19 // C, exact since 2019
)

// vtAt is k·T/q at tempC °C.
func vtAt(tempC float64) float64 { return kTest * (tempC + 273.15) / qTest }

// isAt is FORMAT.md §6's IS = ic_ref / e^(VBEref/VT), VBEref = vbe − 2 mV/°C·(T − 25).
func isAt(p *circuit.BJTParams, tempC float64) float64 {
	return p.ICRef / math.Exp((p.VBE-0.002*(tempC-25))/vtAt(tempC))
}

// emForward is FORMAT.md §6's Ebers–Moll transport model (βR = 1), forward sense.
func emForward(is, betaF, vbe, vbc, vt float64) (ic, ib float64) {
	ebe, ebc := math.Exp(vbe/vt), math.Exp(vbc/vt)
	ic = is*(ebe-ebc) - is*(ebc-1)
	ib = is/betaF*(ebe-1) + is*(ebc-1)
	return ic, ib
}

// transistor returns figures with a chosen nominal hFE (hfe_typ), VBE at ic_ref.
func transistor(hfe, vbe, icRef float64) *circuit.BJTParams {
	return &circuit.BJTParams{FT: 300e6, HFEMin: hfe / 2, HFEMax: hfe * 2, HFETyp: hfe, VBE: vbe, ICRef: icRef,
		PD: 0.625, TjMax: 150, ICMax: 0.2, VCEO: 40}
}

// npn3904 is 2N3904-like: hFE 100–300 (REFERENCES.md §6.2, nominal √(100·300)
// = 173.2), VBE 0.65 V at 10 mA as in FORMAT.md §3's library example.
func npn3904() *circuit.BJTParams {
	return &circuit.BJTParams{FT: 300e6, HFEMin: 100, HFEMax: 300, VBE: 0.65, ICRef: 10e-3,
		PD: 0.625, TjMax: 150, ICMax: 0.2, VCEO: 40, Cob: 4e-12}
}

// pnp3906 is 2N3906-like: hFE 100–300, fT 250 MHz, Cob 4.5 pF (REFERENCES.md
// §6.2); VBE 0.65 V at 10 mA is my choice of a typical figure, not a sheet value.
func pnp3906() *circuit.BJTParams {
	return &circuit.BJTParams{FT: 250e6, HFEMin: 100, HFEMax: 300, VBE: 0.65, ICRef: 10e-3,
		PD: 0.625, TjMax: 150, ICMax: 0.2, VCEO: 40, Cob: 4.5e-12}
}

// builder assembles a circuit in Go, standing in for the loader.
type builder struct{ c *circuit.Circuit }

func newCircuit(tempC float64) *builder {
	return &builder{&circuit.Circuit{Name: "test", Band: [2]float64{7e6, 7.2e6},
		Ambient: circuit.Ambient{Nominal: tempC, Lo: tempC, Hi: tempC}}}
}

func (b *builder) supply(net string, volts, impedance float64) *builder {
	b.c.Supplies = append(b.c.Supplies, &circuit.Supply{Net: net, Volts: volts, Range: [2]float64{volts, volts}, Impedance: impedance})
	return b
}

func (b *builder) port(name, net, dir string, z float64) *builder {
	b.c.Ports = append(b.c.Ports, &circuit.Port{Name: name, Net: net, Direction: dir, Impedance: z, Matched: true})
	return b
}

func (b *builder) part(p *circuit.Part) *builder {
	b.c.Parts = append(b.c.Parts, p)
	return b
}

func (b *builder) res(ref, n1, n2 string, ohms float64) *builder {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Resistor, Value: ohms, Tolerance: 0.05, Nets: []string{n1, n2}})
}

func (b *builder) cap(ref, n1, n2 string, farads float64) *builder {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Capacitor, Value: farads, Tolerance: 0.1, Nets: []string{n1, n2}})
}

func (b *builder) ind(ref, n1, n2 string, henries, dcr float64) *builder {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Inductor, Value: henries, Resistance: dcr, Tolerance: 0.1, Nets: []string{n1, n2}})
}

func (b *builder) pot(ref, a, wiper, bb string, ohms, setting float64) *builder {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Potentiometer, Value: ohms, Setting: setting, Tolerance: 0.2, Nets: []string{a, wiper, bb}})
}

// xfmr adds a transformer; each winding is {name, net1, net2} with a resistance.
func (b *builder) xfmr(ref string, windings ...*circuit.Winding) *builder {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Transformer, AL: 360e-9, ALTolerance: 0.25, Coupling: 0.98, Windings: windings})
}

func winding(name, n1, n2 string, turns, r float64) *circuit.Winding {
	return &circuit.Winding{Name: name, Nets: [2]string{n1, n2}, Turns: turns, Resistance: r}
}

func (b *builder) npn(ref, c, base, e string, p *circuit.BJTParams) *builder {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.NPN, BJT: p, Nets: []string{c, base, e}})
}

func (b *builder) pnp(ref, c, base, e string, p *circuit.BJTParams) *builder {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.PNP, BJT: p, Nets: []string{c, base, e}})
}

// solve runs Solve and fails the test on an error or a non-finite value.
func solve(t testing.TB, c *circuit.Circuit) *Result {
	t.Helper()
	r, err := Solve(c)
	if err != nil {
		t.Fatalf("Solve: %v", err)
	}
	return r
}

func near(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)
}

func checkRel(t testing.TB, what string, got, want, rel float64) {
	t.Helper()
	if !near(got, want, rel) || math.IsNaN(got) {
		t.Errorf("%s = %.7g, want %.7g (±%g relative, off by %.3g)", what, got, want, rel, (got-want)/want)
	}
}

func checkAbs(t testing.TB, what string, got, want, abs float64) {
	t.Helper()
	if !(math.Abs(got-want) <= abs) {
		t.Errorf("%s = %.7g, want %.7g ± %g", what, got, want, abs)
	}
}

func parallel(a, b float64) float64 { return a * b / (a + b) }

// kclWorst recomputes every branch current from the node voltages in r with
// the test's own Ebers–Moll model and returns the worst |Σ I| ÷ Σ|I| over
// the nets (branches with no resistance take the current Solve reports).
// What double precision cannot resolve is forgiven: a resistor's current is
// known only to about 4ε·(|Va| + |Vb|)/R, so a cut-off collector 0.1 nV below
// a 12 V rail balances to no better than that; and an LU solve with partial
// pivoting leaves residuals of about ε·‖G‖·‖V‖ on every row, so 64ε times the
// largest Σ(|Va| + |Vb|)/R over the nets is forgiven everywhere (it matters
// only beside milliohms or on nets held by nothing but the 1e-12 S aid).
// absFloor, A, is a residual small enough not to matter at all.
func kclWorst(t testing.TB, c *circuit.Circuit, r *Result, absFloor float64) (float64, string) {
	t.Helper()
	const eps = 2.220446049250313e-16
	sum := map[string]float64{}
	abs := map[string]float64{}
	floor := map[string]float64{}
	scale := map[string]float64{}
	leave := func(net string, i, res float64) { // i leaves net, known to ±res
		if net == circuit.Gnd {
			return
		}
		sum[net] += i
		abs[net] += math.Abs(i)
		floor[net] += res + 4*eps*math.Abs(i)
		scale[net] += res/(4*eps) + math.Abs(i)
	}
	inner := map[string]float64{} // the internal base of each transistor with rb
	v := func(n string) float64 {
		if x, ok := inner[n]; ok {
			return x
		}
		x, ok := r.V[n]
		if !ok {
			t.Fatalf("no voltage for net %s", n)
		}
		return x
	}
	vt := vtAt(c.Ambient.Nominal)
	for _, n := range c.Nets() {
		leave(n, 1e-12*v(n), 0) // FORMAT.md §6: 1e-12 S from every net to gnd
	}
	for _, s := range c.Supplies {
		e := 0.0
		if s.Impedance > 0 {
			e = 4 * eps * (math.Abs(s.Volts) + math.Abs(v(s.Net))) / s.Impedance
		}
		leave(s.Net, -r.SupplyCurrent[s.Net], e)
	}
	for _, p := range c.Ports {
		leave(p.Net, v(p.Net)/p.Impedance, 0)
	}
	res := func(a, b string, ohms float64) {
		va, vb := v(a), v(b)
		i := (va - vb) / ohms
		e := 4 * eps * (math.Abs(va) + math.Abs(vb)) / ohms
		leave(a, i, e)
		leave(b, -i, e)
	}
	short := func(a, b string, i float64) { leave(a, i, 0); leave(b, -i, 0) }
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Resistor:
			res(p.Nets[0], p.Nets[1], p.Value)
		case circuit.Inductor:
			if p.Resistance > 0 {
				res(p.Nets[0], p.Nets[1], p.Resistance)
			} else {
				short(p.Nets[0], p.Nets[1], r.Parts[p.Ref].Current)
			}
		case circuit.Transformer:
			for _, w := range p.Windings {
				if w.Resistance > 0 {
					res(w.Nets[0], w.Nets[1], w.Resistance)
				} else {
					short(w.Nets[0], w.Nets[1], r.Parts[p.Ref].Windings[w.Name])
				}
			}
		case circuit.Potentiometer:
			res(p.Nets[0], p.Nets[1], math.Max(p.Value*(1-p.Setting), 1e-3))
			res(p.Nets[1], p.Nets[2], math.Max(p.Value*p.Setting, 1e-3))
		case circuit.NPN, circuit.PNP:
			pol := 1.0
			if p.Kind == circuit.PNP {
				pol = -1
			}
			vc, vb, ve := v(p.Nets[0]), v(p.Nets[1]), v(p.Nets[2])
			// With a base resistance the junctions sit at the internal base
			// b', VBJf from the emitter (as Solve reports it): rb joins the
			// base pin to b', which (like every net) has 1e-12 S to gnd, and
			// KCL is checked at b' as at a net.
			base := p.Nets[1]
			if rb := p.BJT.RB; rb > 0 {
				base = p.Ref + ":b'"
				vb = ve + pol*r.BJTs[p.Ref].VBJf
				inner[base] = vb
				leave(base, 1e-12*vb, 0)
				// rb's current, known to the rounding of Vb' = Ve + VBJf too
				vp, vj := v(p.Nets[1]), r.BJTs[p.Ref].VBJf
				i, e := (vp-vb)/rb, 4*eps*(math.Abs(vp)+math.Abs(vb)+math.Abs(ve)+math.Abs(vj))/rb
				leave(p.Nets[1], i, e)
				leave(base, -i, e)
			}
			is := isAt(p.BJT, c.Ambient.Nominal)
			vbe, vbc := pol*(vb-ve), pol*(vb-vc)
			ic, ib := emForward(is, p.BJT.NominalHFE(), vbe, vbc, vt)
			// A junction voltage is known to about 4ε·(|Vb| + |Ve| + |Vc|),
			// its current to that times the junction conductances.
			g := is / vt * (math.Exp(vbe/vt) + 3*math.Exp(vbc/vt))
			gj := g * 4 * eps * (math.Abs(vb) + math.Abs(ve) + math.Abs(vc))
			leave(p.Nets[0], pol*ic, gj)
			leave(base, pol*ib, gj)
			leave(p.Nets[2], -pol*(ic+ib), gj)
		}
	}
	largest := 0.0
	for _, a := range scale {
		largest = math.Max(largest, a)
	}
	worst, at := 0.0, ""
	for n, s := range sum {
		if abs[n] == 0 {
			continue
		}
		if e := math.Max(math.Abs(s)-floor[n]-64*eps*largest-absFloor, 0) / abs[n]; e > worst || math.IsNaN(e) {
			worst, at = e, n
		}
	}
	return worst, at
}

// checkKCL fails the test when any net's currents do not balance to rel.
func checkKCL(t testing.TB, c *circuit.Circuit, r *Result, rel float64) {
	t.Helper()
	if worst, at := kclWorst(t, c, r, 0); !(worst <= rel) {
		t.Errorf("KCL at net %s off by %.3g of the current through it (limit %g)", at, worst, rel)
	}
}
