// Package circuit holds the in-memory model of a circuit file (FORMAT.md §2–3)
// and the loader that builds it. Every value is in SI base units except
// temperatures, which are in °C as the file writes them.
package circuit

import (
	"math"
	"slices"
	"strconv"
	"strings"

	"headroom/checker/library"
)

// Gnd is the reference net.
const Gnd = "gnd"

// Pos is a place in an input file: 1-based line and column, columns counted in
// Unicode code points.
type Pos struct {
	File string
	Line int
	Col  int
}

// Kind is a part kind as written in the file.
type Kind string

// The part kinds of FORMAT.md §2.
const (
	Resistor      Kind = "resistor"
	Capacitor     Kind = "capacitor"
	Inductor      Kind = "inductor"
	Transformer   Kind = "transformer"
	Potentiometer Kind = "potentiometer"
	NPN           Kind = "npn"
	PNP           Kind = "pnp"
)

// IsBJT reports whether k is a bipolar transistor.
func (k Kind) IsBJT() bool { return k == NPN || k == PNP }

// Circuit is one loaded circuit file.
type Circuit struct {
	Path      string     // as given on the command line (or "-")
	Name      string     // [circuit] name
	Band      [2]float64 // Hz: lowest, highest
	Ambient   Ambient
	Libraries []string  // library paths as written, resolved relative to Path by the loader
	Supplies  []*Supply // file order
	Ports     []*Port   // file order
	Parts     []*Part   // file order
	Waivers   []*Waiver // file order
	Pos       Pos       // the [circuit] table header
	// Rejects are the frequencies a filter must stop ([circuit] reject,
	// docs/filters.md), file order; read-only, shared by clones.
	Rejects []Reject

	// Library is the merged library the parts were resolved against (shipped,
	// then the rule set's, then the circuit's own): fixes that change a
	// transistor look here, and core.frequency finds a core's f_range here.
	// Shared, read-only.
	Library *library.Library
}

// Reject is one frequency, outside the band, where the insertion loss must
// be at least MinDB.
type Reject struct {
	Freq  float64 // Hz
	MinDB float64 // dB, > 0
	Pos   Pos     // the entry's freq value
}

// Ambient is the ambient temperature in °C: a nominal value and the range the
// worst-case corners sweep (Lo == Hi == Nominal when one value was given).
type Ambient struct {
	Nominal, Lo, Hi float64
}

// Supply is an ideal source between Net and gnd behind Impedance.
type Supply struct {
	Net       string
	Volts     float64    // V, nominal, never 0
	Range     [2]float64 // V, lo ≤ Volts ≤ hi (both = Volts when not given)
	Impedance float64    // Ω, ≥ 0
	Pos       Pos
}

// Port is a signal port: direction "in" (a source behind Impedance) or "out"
// (a load of Impedance).
type Port struct {
	Name      string
	Net       string
	Direction string  // "in" | "out"
	Impedance float64 // Ω, > 0
	Matched   bool    // default true
	Pos       Pos
}

// Part is one [parts.REF] entry. Which fields mean something depends on Kind.
type Part struct {
	Ref  string
	Kind Kind
	Pos  Pos // the [parts.REF] header, or the key when written inline

	// Nets: resistor, capacitor, inductor: [a, b];
	// potentiometer: [a, wiper, b]; npn/pnp: [collector, base, emitter];
	// transformer: empty (see Windings).
	Nets []string

	Value     float64 // Ω, F, or H (inductor given by value; 0 when given by turns)
	Tolerance float64 // fraction, e.g. 0.05 (0 for an inductor given by turns: its spread is ALTolerance)
	Rating    float64 // resistor/potentiometer W, capacitor V; 0 when not given
	Role      string  // explicit role, "" when not given

	// Inductor and transformer.
	Resistance  float64 // inductor DC resistance, Ω (0 = ideal short)
	Turns       float64 // inductor given by turns (0 when given by value)
	AL          float64 // H per turn², from al or the core
	ALTolerance float64 // fraction, default 0.25 (or the core's); 0 for an inductor given by value
	Core        string  // library core name, "" when not given

	// Losses of a capacitor, inductor or transformer (docs/filters.md): the
	// unloaded Q at QFreq, modelled in the AC analysis as a fixed series
	// resistance (QLoss). Q = 0: lossless. QFreq = 0: the band centre.
	// QRange is the core's typical range when Q came from a library core
	// (the corner box moves Q across it), zero otherwise.
	Q      float64
	QFreq  float64 // Hz
	QRange [2]float64

	// Transformer.
	Coupling float64 // k in (0,1), default 0.98
	// CouplingSet: the file gave coupling; false means the default above
	// (report says so).
	CouplingSet bool
	Windings    []*Winding

	// Potentiometer.
	Setting float64 // 0 = wiper at b, 1 = wiper at a

	// Transistor.
	Device string // library name, may be "" when every figure is inline
	BJT    *BJTParams
	FET    *FETParams // njfet, pjfet, dual-gate-mosfet (nets: drain, gate, source[, gate2])
}

// Winding is one winding of a transformer.
type Winding struct {
	Name       string
	Turns      float64
	Nets       [2]string // the dot is at Nets[0]
	Resistance float64   // Ω
	Pos        Pos
}

// BJTParams are a transistor's figures after library and inline values are
// merged (FORMAT.md §3). Magnitudes: a PNP's vceo is stored positive.
type BJTParams struct {
	FT     float64 // Hz, minimum transition frequency
	HFEMin float64
	HFEMax float64
	HFETyp float64 // 0 when the sheet gives none
	VBE    float64 // V at ICRef and 25 °C (magnitude)
	ICRef  float64 // A (magnitude)
	PD     float64 // W at 25 °C ambient
	TjMax  float64 // °C
	ICMax  float64 // A (magnitude)
	VCEO   float64 // V (magnitude)
	Cob    float64 // F, used as Cμ
	RB     float64 // Ω, base spreading resistance; 0 when not given
}

// NominalHFE is hfe_typ when given, else √(min·max) (FORMAT.md §3).
func (b *BJTParams) NominalHFE() float64 {
	if b.HFETyp > 0 {
		return b.HFETyp
	}
	return math.Sqrt(b.HFEMin * b.HFEMax)
}

// Waiver silences one rule, for one part or the whole file.
type Waiver struct {
	Rule    string
	Part    string // "" = whole file
	Reason  string
	Expires string // "YYYY-MM-DD" or ""
	Pos     Pos
	RulePos Pos // the rule value, for an unknown-rule error from the engine
}

// Inductance is the inductor's nominal inductance in henries.
func (p *Part) Inductance() float64 {
	if p.Turns > 0 {
		return p.AL * p.Turns * p.Turns
	}
	return p.Value
}

// QLoss is the series resistance that gives a reactance of inductance l (H,
// capacitance 0) or capacitance c (F, inductance 0) the part's unloaded Q:
// R = ω·L/Q or 1/(ω·C·Q), ω = 2π·QFreq, or 2π times centre (the band's
// geometric centre, Hz) when QFreq is 0. It is 0 without a Q, and at most
// maxQLoss.
func (p *Part) QLoss(l, c, centre float64) float64 {
	if !(p.Q > 0) || math.IsInf(p.Q, 0) {
		return 0
	}
	f := p.QFreq
	if !(f > 0) {
		f = centre
	}
	w := 2 * math.Pi * f
	r := 0.0
	if l > 0 {
		r = w * l / p.Q
	} else if c > 0 {
		r = 1 / (w * c * p.Q)
	}
	if math.IsNaN(r) {
		return 0
	}
	return math.Min(r, maxQLoss)
}

// maxQLoss caps QLoss where a Q near zero (or a value near the float limits)
// would make it overflow: 1e15 Ω is an open circuit to every analysis.
const maxQLoss = 1e15

// BandCentre is the geometric centre √(lo·hi) of the band, Hz.
func (c *Circuit) BandCentre() float64 { return math.Sqrt(c.Band[0] * c.Band[1]) }

// HasTransistor reports whether any part is a transistor (bipolar or FET).
func (c *Circuit) HasTransistor() bool {
	for _, p := range c.Parts {
		if p.BJT != nil || p.FET != nil || p.Kind.IsBJT() || p.Kind.IsFET() {
			return true
		}
	}
	return false
}

// Part returns the part with the given reference, or nil.
func (c *Circuit) Part(ref string) *Part {
	for _, p := range c.Parts {
		if p.Ref == ref {
			return p
		}
	}
	return nil
}

// Supply returns the supply on net, or nil.
func (c *Circuit) Supply(net string) *Supply {
	for _, s := range c.Supplies {
		if s.Net == net {
			return s
		}
	}
	return nil
}

// InPort and OutPort return the circuit's in and out ports, or nil.
func (c *Circuit) InPort() *Port  { return c.port("in") }
func (c *Circuit) OutPort() *Port { return c.port("out") }

func (c *Circuit) port(dir string) *Port {
	for _, p := range c.Ports {
		if p.Direction == dir {
			return p
		}
	}
	return nil
}

// PartNets lists every net a part touches, windings included, in order.
func (p *Part) PartNets() []string {
	if p.Kind == Transformer {
		var n []string
		for _, w := range p.Windings {
			n = append(n, w.Nets[0], w.Nets[1])
		}
		return n
	}
	return p.Nets
}

// Nets lists every net named in the circuit except gnd, sorted, once each.
// It sorts a slice rather than building a set: the worst-case search asks
// for it for every case it analyses.
func (c *Circuit) Nets() []string {
	n := len(c.Supplies) + len(c.Ports)
	for _, p := range c.Parts {
		n += len(p.PartNets())
	}
	nets := make([]string, 0, n)
	for _, s := range c.Supplies {
		nets = append(nets, s.Net)
	}
	for _, p := range c.Ports {
		nets = append(nets, p.Net)
	}
	for _, p := range c.Parts {
		nets = append(nets, p.PartNets()...)
	}
	nets = slices.DeleteFunc(nets, func(n string) bool { return n == Gnd })
	slices.Sort(nets)
	return slices.Compact(nets)
}

// Clone returns a deep copy, so that worst-case corners can vary values
// without touching the loaded circuit.
func (c *Circuit) Clone() *Circuit {
	d := *c
	d.Supplies = make([]*Supply, len(c.Supplies))
	for i, s := range c.Supplies {
		x := *s
		d.Supplies[i] = &x
	}
	d.Ports = make([]*Port, len(c.Ports))
	for i, p := range c.Ports {
		x := *p
		d.Ports[i] = &x
	}
	d.Parts = make([]*Part, len(c.Parts))
	for i, p := range c.Parts {
		x := *p
		x.Nets = append([]string(nil), p.Nets...)
		if p.Windings != nil {
			x.Windings = make([]*Winding, len(p.Windings))
			for j, w := range p.Windings {
				y := *w
				x.Windings[j] = &y
			}
		}
		if p.BJT != nil {
			b := *p.BJT
			x.BJT = &b
		}
		if p.FET != nil {
			f := *p.FET
			x.FET = &f
		}
		d.Parts[i] = &x
	}
	return &d
}

// WiringKey describes how c is wired — every net of every supply, port and
// part, with the part boundaries — and nothing of its values, so that the
// analyses can remember work done for one wiring across the hundreds of
// corner cases of a worst-case search. Every name is written with its
// length, so no two wirings share a key.
func (c *Circuit) WiringKey() string {
	var k strings.Builder
	name := func(n string) {
		k.WriteString(strconv.Itoa(len(n)))
		k.WriteByte(':')
		k.WriteString(n)
	}
	for _, s := range c.Supplies {
		name(s.Net)
		k.WriteByte(';')
	}
	k.WriteByte('|')
	for _, p := range c.Ports {
		name(p.Net)
	}
	for _, p := range c.Parts {
		k.WriteByte('|')
		for _, n := range p.PartNets() {
			name(n)
		}
	}
	return k.String()
}
