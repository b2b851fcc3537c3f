// Package library holds the part library: registered transistors and toroid
// cores (FORMAT.md §3). The shipped library is built into the binary; files of
// the same form named by a rule set or a circuit are merged over it, later
// entries replacing earlier ones of the same name.
package library

import (
	_ "embed"
	"fmt"
	"math"
	"strings"
	"sync"

	"headroom/checker/circuit/tomlfile"
	"headroom/checker/quantity"
)

// Mu0 is the magnetic constant used for AL, 4π×10⁻⁷ H/m: the value in IEC
// 60205's formulas (pre-2019 exact). It differs from CODATA 2022 by 1.3×10⁻¹⁰,
// far below any AL tolerance (REFERENCES.md §3).
const Mu0 = 4 * math.Pi * 1e-7

// DefaultALTolerance is a core's AL spread when neither core nor part gives one.
const DefaultALTolerance = 0.25

// Library is a set of named transistors and cores.
type Library struct {
	Transistors map[string]*Transistor
	Cores       map[string]*Core
	FETs        map[string]*FET // [fets."NAME"], docs/fet.md
}

// Transistor is a library transistor. A figure of 0 was not given (a library
// file may leave some to the circuit); every figure given is a magnitude, so a
// PNP's vceo of "-40V" is stored as 40.
type Transistor struct {
	Name     string
	Polarity string  // "npn" | "pnp"
	FT       float64 // Hz, minimum transition frequency
	HFEMin   float64
	HFEMax   float64
	HFETyp   float64 // 0 when the sheet gives none
	VBE      float64 // V at ICRef and 25 °C
	ICRef    float64 // A
	PD       float64 // W at 25 °C ambient
	TjMax    float64 // °C: the dissipation rating reaches zero here
	ICMax    float64 // A
	VCEO     float64 // V
	Cob      float64 // F, collector-base capacitance (0 = not given)
	RB       float64 // Ω, base spreading resistance (0 = not given)
	File     string
	Pos      tomlfile.Pos
}

// Core is a toroid core: its geometry and permeability, or its AL directly.
type Core struct {
	Name        string
	Mu          float64    // initial permeability (0 when only al is given)
	OD, ID      float64    // m
	Height      float64    // m
	ALGiven     float64    // H per turn², the explicit al; 0 = computed from geometry
	ALTolerance float64    // fraction
	FRange      [2]float64 // Hz, where the material is meant to be used; zero = not given
	// Q is the typical unloaded Q range of a winding on the core, lowest
	// first, at QFreq (Hz; 0 = the circuit's band centre); zero = not given,
	// and the winding stays lossless.
	Q     [2]float64
	QFreq float64
	File  string
	Pos   tomlfile.Pos
}

// AL is the inductance per turn squared in henries: the explicit al when
// given, else the IEC 60205 result for a ring core of rectangular section,
// µ0·µ·h·ln(OD/ID)/(2π) (identical to µ0·µ/C1 with C1 = 2π/(h·ln(r2/r1))).
func (c *Core) AL() float64 {
	if c.ALGiven > 0 {
		return c.ALGiven
	}
	return Mu0 * c.Mu * c.Height * math.Log(c.OD/c.ID) / (2 * math.Pi)
}

// New returns an empty library.
func New() *Library {
	return &Library{Transistors: map[string]*Transistor{}, Cores: map[string]*Core{}, FETs: map[string]*FET{}}
}

// Merge adds other's entries to l; an entry of other replaces l's entry of the
// same name. Entries are shared, not copied: treat them as read-only.
func (l *Library) Merge(other *Library) {
	if other == nil {
		return
	}
	if l.Transistors == nil {
		l.Transistors = map[string]*Transistor{}
	}
	if l.Cores == nil {
		l.Cores = map[string]*Core{}
	}
	for k, v := range other.Transistors {
		l.Transistors[k] = v
	}
	for k, v := range other.Cores {
		l.Cores[k] = v
	}
	if l.FETs == nil {
		l.FETs = map[string]*FET{}
	}
	for k, v := range other.FETs {
		l.FETs[k] = v
	}
}

//go:embed parts.toml
var shippedTOML []byte

var shipped = sync.OnceValue(func() *Library {
	l, err := Parse("shipped parts.toml", shippedTOML)
	if err != nil {
		panic("the shipped part library does not load: " + err.Error())
	}
	return l
})

// Shipped returns the library built into the binary. It is parsed once; each
// call returns a fresh Library (its maps may be merged into freely) sharing
// the read-only entries.
func Shipped() *Library {
	l := New()
	l.Merge(shipped())
	return l
}

// Parse reads a library file. Errors are *tomlfile.Error values carrying the
// file, line and column; the first one in reading order is returned.
func Parse(path string, data []byte) (*Library, error) {
	doc, err := tomlfile.Parse(path, data)
	if err != nil {
		return nil, err
	}
	root := doc.Root
	root.What = "library"
	root.Allow("transistors", "cores", "fets")
	l := New()
	if ts := root.Table("transistors", "[transistors]"); ts != nil {
		for _, t := range ts.Tables(func(k string) string { return fmt.Sprintf("transistor %q", k) }) {
			if tr := readTransistor(t); tr != nil {
				l.Transistors[t.Name] = tr
			}
		}
	}
	if cs := root.Table("cores", "[cores]"); cs != nil {
		for _, t := range cs.Tables(func(k string) string { return fmt.Sprintf("core %q", k) }) {
			if c := readCore(t); c != nil {
				l.Cores[t.Name] = c
			}
		}
	}
	if fs := root.Table("fets", "[fets]"); fs != nil {
		for _, t := range fs.Tables(func(k string) string { return fmt.Sprintf("FET %q", k) }) {
			if f := readFET(t); f != nil {
				l.FETs[t.Name] = f
			}
		}
	}
	if err := doc.Err(); err != nil {
		return nil, err
	}
	return l, nil
}

// TransistorKeys are the figure keys a transistor accepts, in a library file
// and inline in a circuit.
var TransistorKeys = []string{"ft", "hfe", "hfe_typ", "vbe", "ic_ref", "pd", "tj_max", "ic_max", "vceo", "cob", "rb"}

func readTransistor(t *tomlfile.Table) *Transistor {
	t.Allow(append([]string{"polarity"}, TransistorKeys...)...)
	tr := &Transistor{Name: t.Name, File: t.Doc().File, Pos: t.Pos}
	pol, ok := t.String("polarity", true)
	if ok && pol != "npn" && pol != "pnp" {
		t.Errorf(t.ValPos("polarity"), "%s polarity: expected \"npn\" or \"pnp\", got %q", t.What, pol)
	}
	tr.Polarity = pol
	ReadFigures(t, pol == "pnp", tr)
	if tr.HFETypOutside() {
		t.Errorf(t.ValPos("hfe_typ"), "%s hfe_typ: %g lies outside hfe [%g, %g]", t.What, tr.HFETyp, tr.HFEMin, tr.HFEMax)
	}
	return tr
}

// ReadFigures reads the transistor figures present in t into tr, leaving the
// others alone (so inline figures can override a library entry). With pnp,
// vbe, ic_ref, ic_max and vceo may be written negative and are stored as
// magnitudes.
func ReadFigures(t *tomlfile.Table, pnp bool, tr *Transistor) {
	mag := func(key string, u quantity.Unit, dst *float64) {
		sign := tomlfile.Positive
		if pnp {
			sign = tomlfile.NonZero
		}
		if v, ok := t.Quantity(key, u, sign); ok {
			*dst = math.Abs(v)
		}
	}
	pos := func(key string, u quantity.Unit, dst *float64) {
		if v, ok := t.Quantity(key, u, tomlfile.Positive); ok {
			*dst = v
		}
	}
	pos("ft", quantity.Hertz, &tr.FT)
	if hfe, ok := t.Pair("hfe", quantity.Ratio, tomlfile.Positive); ok {
		if hfe[0] > hfe[1] {
			t.Errorf(t.ValPos("hfe"), "%s hfe: the minimum %g is above the maximum %g", t.What, hfe[0], hfe[1])
		} else {
			tr.HFEMin, tr.HFEMax = hfe[0], hfe[1]
		}
	}
	pos("hfe_typ", quantity.Ratio, &tr.HFETyp)
	mag("vbe", quantity.Volt, &tr.VBE)
	mag("ic_ref", quantity.Ampere, &tr.ICRef)
	pos("pd", quantity.Watt, &tr.PD)
	readTjMax(t, &tr.TjMax)
	mag("ic_max", quantity.Ampere, &tr.ICMax)
	mag("vceo", quantity.Volt, &tr.VCEO)
	if v, ok := t.Quantity("cob", quantity.Farad, tomlfile.NonNegative); ok {
		tr.Cob = v
	}
	if v, ok := t.Quantity("rb", quantity.Ohm, tomlfile.NonNegative); ok {
		tr.RB = v
	}
}

// HFETypOutside reports whether hfe_typ is given and lies outside [min, max].
func (tr *Transistor) HFETypOutside() bool {
	return tr.HFETyp > 0 && tr.HFEMax > 0 && (tr.HFETyp < tr.HFEMin || tr.HFETyp > tr.HFEMax)
}

var coreKeys = []string{"mu", "od", "id", "height", "al", "al_tolerance", "f_range", "q", "q_freq"}

func readCore(t *tomlfile.Table) *Core {
	t.Allow(coreKeys...)
	c := &Core{Name: t.Name, ALTolerance: DefaultALTolerance, File: t.Doc().File, Pos: t.Pos}
	if v, ok := t.Quantity("al", quantity.Henry, tomlfile.Positive); ok {
		c.ALGiven = v
	}
	read := func(key string, u quantity.Unit, dst *float64) {
		if v, ok := t.Quantity(key, u, tomlfile.Positive); ok {
			*dst = v
		}
	}
	read("mu", quantity.Ratio, &c.Mu)
	read("od", quantity.Metre, &c.OD)
	read("id", quantity.Metre, &c.ID)
	read("height", quantity.Metre, &c.Height)
	if c.OD > 0 && c.ID > 0 && c.ID >= c.OD {
		t.Errorf(t.ValPos("id"), "%s id: the inner diameter %s must be smaller than the outer diameter %s",
			t.What, quantity.Format(c.ID, quantity.Metre), quantity.Format(c.OD, quantity.Metre))
	}
	if !t.Has("al") {
		var missing []string
		for _, k := range []string{"mu", "od", "id", "height"} {
			if !t.Has(k) {
				missing = append(missing, k)
			}
		}
		if len(missing) > 0 {
			t.Errorf(t.Pos, "%s: give al, or all of mu, od, id and height (missing %s)", t.What, strings.Join(missing, ", "))
		}
	}
	if v, ok := t.Quantity("al_tolerance", quantity.Fraction, tomlfile.NonNegative); ok {
		if v >= 1 {
			t.Errorf(t.ValPos("al_tolerance"), "%s al_tolerance: must be below 100 %%, got %s", t.What, quantity.Format(v, quantity.Fraction))
		} else {
			c.ALTolerance = v
		}
	}
	if r, ok := t.Pair("f_range", quantity.Hertz, tomlfile.Positive); ok {
		if r[0] > r[1] {
			t.Errorf(t.ValPos("f_range"), "%s f_range: the low end %s is above the high end %s",
				t.What, quantity.Format(r[0], quantity.Hertz), quantity.Format(r[1], quantity.Hertz))
		} else {
			c.FRange = r
		}
	}
	if r, ok := t.Pair("q", quantity.Ratio, tomlfile.Positive); ok {
		if r[0] > r[1] {
			t.Errorf(t.ValPos("q"), "%s q: the low end %g is above the high end %g", t.What, r[0], r[1])
		} else {
			c.Q = r
		}
	}
	if v, ok := t.Quantity("q_freq", quantity.Hertz, tomlfile.Positive); ok {
		if !t.Has("q") {
			t.Errorf(t.KeyPos("q_freq"), "%s q_freq: the frequency a Q is given at needs the q range beside it", t.What)
		}
		c.QFreq = v
	}
	return c
}

// readTjMax reads tj_max, which must lie above 25 °C (where pd applies).
func readTjMax(t *tomlfile.Table, dst *float64) {
	if v, ok := t.Quantity("tj_max", quantity.Celsius, tomlfile.AnySign); ok {
		if v <= 25 {
			t.Errorf(t.ValPos("tj_max"), "%s tj_max: must be above 25 °C, where the dissipation rating pd applies; got %s", t.What, quantity.Format(v, quantity.Celsius))
		} else {
			*dst = v
		}
	}
}
