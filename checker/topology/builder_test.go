package topology

import (
	"testing"

	"headroom/checker/circuit"
)

// ckt builds a *circuit.Circuit in a few lines, so tests do not depend on the
// loader. Only the fields topology reads are filled; values are placeholders
// (topology never reads them) except where a test says otherwise.
type ckt struct{ c *circuit.Circuit }

func newCkt() *ckt {
	return &ckt{c: &circuit.Circuit{Path: "t.toml", Name: "test", Band: [2]float64{7e6, 7.2e6}}}
}

func (b *ckt) pos() circuit.Pos {
	return circuit.Pos{File: "t.toml", Line: len(b.c.Parts) + len(b.c.Supplies) + len(b.c.Ports) + 1, Col: 1}
}

func (b *ckt) supply(net string, volts float64) *ckt {
	b.c.Supplies = append(b.c.Supplies, &circuit.Supply{Net: net, Volts: volts, Range: [2]float64{volts, volts}, Pos: b.pos()})
	return b
}

func (b *ckt) port(name, net, dir string) *ckt {
	b.c.Ports = append(b.c.Ports, &circuit.Port{Name: name, Net: net, Direction: dir, Impedance: 50, Matched: true, Pos: b.pos()})
	return b
}

func (b *ckt) part(p *circuit.Part) *ckt {
	p.Pos = b.pos()
	b.c.Parts = append(b.c.Parts, p)
	return b
}

func (b *ckt) r(ref, n1, n2 string) *ckt {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Resistor, Nets: []string{n1, n2}, Value: 1000, Tolerance: 0.05})
}

func (b *ckt) cap(ref, n1, n2 string) *ckt {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Capacitor, Nets: []string{n1, n2}, Value: 1e-7, Tolerance: 0.1})
}

// capRole is a capacitor with an explicit role.
func (b *ckt) capRole(ref, n1, n2, role string) *ckt {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Capacitor, Nets: []string{n1, n2}, Value: 1e-7, Role: role})
}

// l is an inductor with a DC resistance of 1 Ω; l0 an ideal one.
func (b *ckt) l(ref, n1, n2 string) *ckt {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Inductor, Nets: []string{n1, n2}, Value: 1e-5, Resistance: 1})
}

func (b *ckt) l0(ref, n1, n2 string) *ckt {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Inductor, Nets: []string{n1, n2}, Value: 1e-5})
}

func (b *ckt) lRole(ref, n1, n2, role string) *ckt {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Inductor, Nets: []string{n1, n2}, Value: 1e-5, Resistance: 1, Role: role})
}

func (b *ckt) pot(ref, a, wiper, bn string) *ckt {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.Potentiometer, Nets: []string{a, wiper, bn}, Value: 1000, Setting: 0.5})
}

// xfmr adds a transformer; windings are given as name, net1, net2 triples,
// each with resistance r.
func (b *ckt) xfmr(ref string, r float64, w ...string) *ckt {
	p := &circuit.Part{Ref: ref, Kind: circuit.Transformer, AL: 3.6e-7, Coupling: 0.98}
	for i := 0; i+2 < len(w); i += 3 {
		p.Windings = append(p.Windings, &circuit.Winding{Name: w[i], Turns: 10, Nets: [2]string{w[i+1], w[i+2]}, Resistance: r})
	}
	return b.part(p)
}

func (b *ckt) npn(ref, c, base, e string) *ckt {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.NPN, Nets: []string{c, base, e}, Device: "2N3904"})
}

func (b *ckt) pnp(ref, c, base, e string) *ckt {
	return b.part(&circuit.Part{Ref: ref, Kind: circuit.PNP, Nets: []string{c, base, e}, Device: "2N3906"})
}

func (b *ckt) analyze() *Topology { return Analyze(b.c) }

// bjt returns the facts of transistor ref or fails the test.
func bjt(t *testing.T, topo *Topology, ref string) *BJT {
	t.Helper()
	q := topo.BJTs[ref]
	if q == nil {
		t.Fatalf("no transistor %s in topology", ref)
	}
	return q
}

// ceStage is a 20 m receive-preamp-like common-emitter NPN stage on a 12 V
// rail: divider bias R1/R2, emitter resistor R3 bypassed by C3, resistive
// collector load R4, input and output coupling capacitors. (Demo topology of
// our own; no values matter here.)
func ceStage() *ckt {
	return newCkt().
		supply("vcc", 12).
		port("in", "rf_in", "in").
		port("out", "rf_out", "out").
		cap("C1", "rf_in", "base").
		r("R1", "vcc", "base").
		r("R2", "base", "gnd").
		npn("Q1", "coll", "base", "emit").
		r("R3", "emit", "gnd").
		cap("C3", "emit", "gnd").
		r("R4", "vcc", "coll").
		cap("C4", "coll", "rf_out").
		cap("C5", "vcc", "gnd")
}
