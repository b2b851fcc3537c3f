package circuit

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"headroom/checker/circuit/tomlfile"
	"headroom/checker/inputfile"
	"headroom/checker/library"
	"headroom/checker/quantity"
	"headroom/checker/spell"
)

// ErrNotCircuit is returned for a TOML file with neither a [circuit] nor a
// [parts] table: not a circuit description, which `check` skips silently.
var ErrNotCircuit = errors.New("not a circuit file: no [circuit] table")

// InputError is a problem with an input file, at the key or value concerned
// (line 1, column 1 when there is none, as for an unreadable or empty file).
type InputError struct {
	Pos Pos
	Msg string
}

func (e *InputError) Error() string {
	return fmt.Sprintf("%s:%d:%d: %s", e.Pos.File, e.Pos.Line, e.Pos.Col, e.Msg)
}

// Options are what the caller knows beyond the circuit file itself.
type Options struct {
	// ReadFile reads the circuit and every library file (nil = inputfile.Read),
	// so that a reader of the git index can be passed for staged checks.
	ReadFile func(path string) ([]byte, error)
	// Libraries are library paths from the rule set, already resolved; they
	// are merged after the base library and before the circuit's own.
	Libraries []string
	// Base is the library everything else is merged over (nil = library.Shipped()).
	Base *library.Library
}

func (o Options) read(path string) ([]byte, error) {
	if o.ReadFile != nil {
		return o.ReadFile(path)
	}
	return inputfile.Read(path)
}

// Load reads and checks the circuit file at path.
func Load(path string, opt Options) (*Circuit, error) {
	data, err := opt.read(path)
	if err != nil {
		return nil, &InputError{Pos: Pos{File: path, Line: 1, Col: 1}, Msg: "cannot read the file: " + inputfile.Reason(err)}
	}
	return LoadBytes(path, data, opt)
}

// LoadBytes checks a circuit file already read; path names it in errors and
// anchors the circuit's relative library paths. Every problem is an
// *InputError; when a file has several, the first in reading order is
// returned (libraries that fail to load are reported before anything else).
func LoadBytes(path string, data []byte, opt Options) (*Circuit, error) {
	if strings.TrimSpace(strings.TrimPrefix(string(data), "\xef\xbb\xbf")) == "" {
		return nil, &InputError{Pos: Pos{File: path, Line: 1, Col: 1}, Msg: "empty file: a circuit file needs a [circuit] table"}
	}
	doc, err := tomlfile.Parse(path, data)
	if err != nil {
		return nil, inputError(err)
	}
	root := doc.Root
	if !root.Has("circuit") && !root.Has("parts") {
		return nil, ErrNotCircuit
	}
	if !root.Has("circuit") {
		return nil, &InputError{Pos: toPos(path, root.DefPos("parts")), Msg: "missing [circuit] table: a file with [parts] must describe its circuit (name, band)"}
	}
	ld := &loader{path: path, doc: doc, c: &Circuit{Path: path}}
	root.What = "circuit file"
	root.Allow("circuit", "supplies", "ports", "parts", "waivers")
	ld.circuitTable(root)
	if err := ld.libraries(opt); err != nil {
		return nil, err
	}
	ld.supplies(root)
	ld.ports(root)
	ld.parts(root)
	ld.waivers(root)
	if err := doc.Err(); err != nil {
		return nil, inputError(err)
	}
	return ld.c, nil
}

func inputError(err error) error {
	var te *tomlfile.Error
	if errors.As(err, &te) {
		return &InputError{Pos: toPos(te.File, te.Pos), Msg: te.Msg}
	}
	return err
}

func toPos(file string, p tomlfile.Pos) Pos { return Pos{File: file, Line: p.Line, Col: p.Col} }

// loader carries one file's state while its tables are read.
type loader struct {
	path    string
	doc     *tomlfile.Doc
	c       *Circuit
	lib     *library.Library
	libPos  []tomlfile.Pos // where each circuit library path is written
	inPort  *Port
	outPort *Port
}

func (ld *loader) pos(p tomlfile.Pos) Pos { return toPos(ld.path, p) }

var (
	netName = regexp.MustCompile(`^[A-Za-z0-9_.+-]+$`)
	// A reference, port or winding name is also a key in corner and change
	// lists ("Q1.hfe", "T1.primary"), so it may not contain a dot.
	refName = regexp.MustCompile(`^[A-Za-z0-9_+-]+$`)
)

func (ld *loader) circuitTable(root *tomlfile.Table) {
	t := root.Table("circuit", "[circuit]")
	if t == nil {
		return
	}
	c := ld.c
	c.Pos = ld.pos(t.Pos)
	t.Allow("name", "band", "ambient", "library", "reject")
	if name, ok := t.String("name", true); ok {
		if strings.TrimSpace(name) == "" {
			t.Errorf(t.ValPos("name"), "[circuit] name: must not be empty")
		}
		c.Name = name
	}
	if !t.Has("band") {
		t.Missing("band", `(lowest and highest operating frequency, as in band = ["10.1MHz", "10.15MHz"])`)
	} else if b, ok := t.Pair("band", quantity.Hertz, tomlfile.Positive); ok {
		if b[0] > b[1] {
			t.Errorf(t.ValPos("band"), "[circuit] band: the low end %s is above the high end %s",
				quantity.Format(b[0], quantity.Hertz), quantity.Format(b[1], quantity.Hertz))
		}
		c.Band = b
	}
	c.Ambient = Ambient{Nominal: 25, Lo: 25, Hi: 25}
	if t.Has("ambient") {
		if _, isArray := t.Raw("ambient").([]any); isArray {
			if r, ok := t.Pair("ambient", quantity.Celsius, tomlfile.AnySign); ok {
				if r[0] > r[1] {
					t.Errorf(t.ValPos("ambient"), "[circuit] ambient: the low end %s is above the high end %s",
						quantity.Format(r[0], quantity.Celsius), quantity.Format(r[1], quantity.Celsius))
				}
				nominal := 25.0
				if nominal < r[0] || nominal > r[1] {
					nominal = (r[0] + r[1]) / 2
				}
				c.Ambient = Ambient{Nominal: nominal, Lo: r[0], Hi: r[1]}
			}
		} else if v, ok := t.Quantity("ambient", quantity.Celsius, tomlfile.AnySign); ok {
			c.Ambient = Ambient{Nominal: v, Lo: v, Hi: v}
		}
	}
	ld.rejects(t)
	if libs, ok := t.Strings("library"); ok {
		c.Libraries = libs
		for i := range libs {
			ld.libPos = append(ld.libPos, t.ElemPos("library", i))
		}
	}
}

// Name is what findings about the rejection call it: "reject-14.2MHz".
func (r Reject) Name() string { return "reject-" + quantity.Code(r.Freq, quantity.Hertz) }

// rejects reads reject = [{ freq = "7MHz", min_db = 40 }, ...]: each
// frequency must lie outside the band, where a filter is meant to pass.
func (ld *loader) rejects(t *tomlfile.Table) {
	if !t.Has("reject") {
		return
	}
	band := ld.c.Band
	for _, e := range t.TableArray("reject", func(i int) string { return fmt.Sprintf("[circuit] reject[%d]", i) }) {
		e.Allow("freq", "min_db")
		r := Reject{Pos: ld.pos(e.Pos)}
		if !e.Has("freq") {
			e.Missing("freq", `(the frequency to stop, as in { freq = "7MHz", min_db = 40 })`)
		} else if f, ok := e.Quantity("freq", quantity.Hertz, tomlfile.Positive); ok {
			r.Freq, r.Pos = f, ld.pos(e.ValPos("freq"))
			if band[1] > 0 && f >= band[0] && f <= band[1] {
				e.Errorf(e.ValPos("freq"), "%s freq: %s lies inside the band %s to %s, which a filter passes; a rejection frequency must lie outside it",
					e.What, quantity.Format(f, quantity.Hertz), quantity.Format(band[0], quantity.Hertz), quantity.Format(band[1], quantity.Hertz))
			}
		}
		if !e.Has("min_db") {
			e.Missing("min_db", `(the least loss wanted there, as in min_db = 40)`)
		} else if v, ok := e.Quantity("min_db", quantity.Decibel, tomlfile.Positive); ok {
			r.MinDB = v
		}
		ld.c.Rejects = append(ld.c.Rejects, r)
	}
}

// libraries builds the merged library: base, the rule set's, the circuit's.
func (ld *loader) libraries(opt Options) error {
	lib := library.New()
	if opt.Base != nil {
		lib.Merge(opt.Base)
	} else {
		lib.Merge(library.Shipped())
	}
	for _, p := range opt.Libraries {
		data, err := opt.read(p)
		if err != nil {
			return &InputError{Pos: Pos{File: p, Line: 1, Col: 1}, Msg: "cannot read the library named by the rule set: " + inputfile.Reason(err)}
		}
		l, err := library.Parse(p, data)
		if err != nil {
			return inputError(err)
		}
		lib.Merge(l)
	}
	root, repo := inputfile.Scope(filepath.Dir(ld.path))
	for i, p := range ld.c.Libraries {
		resolved := p
		if !filepath.IsAbs(p) {
			resolved = filepath.Join(filepath.Dir(ld.path), p)
		}
		if !inputfile.Inside(root, resolved) {
			return &InputError{Pos: ld.pos(ld.libPos[i]), Msg: "[circuit] " + inputfile.OutsideMsg("library", p, repo)}
		}
		data, err := opt.read(resolved)
		if err != nil {
			return &InputError{Pos: ld.pos(ld.libPos[i]), Msg: fmt.Sprintf("cannot read library %q (%s): %s", p, resolved, inputfile.Reason(err))}
		}
		l, err := library.Parse(resolved, data)
		if err != nil {
			return inputError(err)
		}
		lib.Merge(l)
	}
	ld.lib = lib
	ld.c.Library = lib
	return nil
}

func (ld *loader) supplies(root *tomlfile.Table) {
	st := root.Table("supplies", "[supplies]")
	if st == nil {
		return
	}
	for _, t := range st.Tables(func(k string) string { return "supply " + k }) {
		s := &Supply{Net: t.Name, Pos: ld.pos(t.Pos)}
		switch {
		case t.Name == Gnd:
			t.Errorf(t.Pos, "supply gnd: gnd is the reference net; a supply sits between its own net and gnd")
		case !netName.MatchString(t.Name):
			t.Errorf(t.Pos, "supply %q: a net name may hold only letters, digits and _ . + -", t.Name)
		}
		t.Allow("volts", "range", "impedance")
		if !t.Has("volts") {
			t.Missing("volts", "")
		} else if v, ok := t.Quantity("volts", quantity.Volt, tomlfile.NonZero); ok {
			s.Volts = v
		}
		s.Range = [2]float64{s.Volts, s.Volts}
		if r, ok := t.Pair("range", quantity.Volt, tomlfile.NonZero); ok {
			switch {
			case r[0] > r[1]:
				t.Errorf(t.ValPos("range"), "%s range: the low end %s is above the high end %s", t.What,
					quantity.Format(r[0], quantity.Volt), quantity.Format(r[1], quantity.Volt))
			case r[0] < 0 && r[1] > 0:
				t.Errorf(t.ValPos("range"), "%s range: must not cross 0 V (a supply is never zero)", t.What)
			case s.Volts != 0 && (s.Volts < r[0] || s.Volts > r[1]):
				t.Errorf(t.ValPos("range"), "%s range: [%s, %s] does not contain volts = %s", t.What,
					quantity.Format(r[0], quantity.Volt), quantity.Format(r[1], quantity.Volt), quantity.Format(s.Volts, quantity.Volt))
			default:
				s.Range = r
			}
		}
		if v, ok := t.Quantity("impedance", quantity.Ohm, tomlfile.NonNegative); ok {
			s.Impedance = v
		}
		ld.c.Supplies = append(ld.c.Supplies, s)
	}
}

func (ld *loader) ports(root *tomlfile.Table) {
	pt := root.Table("ports", "[ports]")
	if pt == nil {
		return
	}
	for _, t := range pt.Tables(func(k string) string { return "port " + k }) {
		p := &Port{Name: t.Name, Impedance: 50, Matched: true, Pos: ld.pos(t.Pos)}
		if !refName.MatchString(t.Name) {
			t.Errorf(t.Pos, "port %q: a port name may hold only letters, digits and _ + -", t.Name)
		}
		t.Allow("net", "direction", "impedance", "matched")
		if n, ok := t.String("net", true); ok {
			ld.checkNet(t, "net", n, t.ValPos("net"))
			if n == Gnd {
				t.Errorf(t.ValPos("net"), "%s net: a port cannot sit on gnd, the reference net", t.What)
			}
			p.Net = n
		}
		if d, ok := t.String("direction", true); ok {
			switch d {
			case "in", "out":
				p.Direction = d
			default:
				t.Errorf(t.ValPos("direction"), `%s direction: expected "in" or "out", got %q`, t.What, d)
			}
		}
		if v, ok := t.Quantity("impedance", quantity.Ohm, tomlfile.Positive); ok {
			p.Impedance = v
		}
		if m, ok := t.Bool("matched"); ok {
			p.Matched = m
		}
		first := &ld.inPort
		if p.Direction == "out" {
			first = &ld.outPort
		}
		if p.Direction != "" {
			if *first != nil {
				t.Errorf(t.Pos, "%s: a second %q port; a circuit has at most one (the first is %s at line %d)",
					t.What, p.Direction, (*first).Name, (*first).Pos.Line)
			} else {
				*first = p
			}
		}
		ld.c.Ports = append(ld.c.Ports, p)
	}
}

func (ld *loader) checkNet(t *tomlfile.Table, what, n string, p tomlfile.Pos) bool {
	if !netName.MatchString(n) {
		t.Errorf(p, "%s %s: %q is not a net name; a net name holds only letters, digits and _ . + -", t.What, what, n)
		return false
	}
	return true
}

// Part kinds and the keys each accepts (FORMAT.md §2).
var partKeys = map[Kind][]string{
	Resistor:       {"kind", "value", "nets", "tolerance", "rating"},
	Capacitor:      {"kind", "value", "nets", "tolerance", "rating", "role", "q", "q_freq"},
	Inductor:       {"kind", "value", "turns", "core", "al", "al_tolerance", "nets", "tolerance", "resistance", "role", "q", "q_freq"},
	Transformer:    {"kind", "core", "al", "al_tolerance", "coupling", "windings", "q", "q_freq"},
	Potentiometer:  {"kind", "value", "nets", "setting", "rating", "tolerance"},
	NPN:            append([]string{"kind", "device", "nets"}, library.TransistorKeys...),
	PNP:            append([]string{"kind", "device", "nets"}, library.TransistorKeys...),
	NJFET:          append([]string{"kind", "device", "nets"}, library.FETKeys...),
	PJFET:          append([]string{"kind", "device", "nets"}, library.FETKeys...),
	DualGateMOSFET: append([]string{"kind", "device", "nets"}, library.FETKeys...),
}

var kindOrder = []Kind{Resistor, Capacitor, Inductor, Transformer, Potentiometer, NPN, PNP, NJFET, PJFET, DualGateMOSFET}

func kindList() string {
	s := make([]string, len(kindOrder))
	for i, k := range kindOrder {
		s[i] = string(k)
	}
	return strings.Join(s, ", ")
}

func (ld *loader) parts(root *tomlfile.Table) {
	pt := root.Table("parts", "[parts]")
	if pt == nil {
		return
	}
	for _, t := range pt.Tables(func(k string) string { return k }) {
		if p := ld.part(t); p != nil {
			ld.c.Parts = append(ld.c.Parts, p)
		}
	}
}

func (ld *loader) part(t *tomlfile.Table) *Part {
	// Findings point at the part's line, column 1, whether it is a header or
	// an inline key (FORMAT.md §5).
	p := &Part{Ref: t.Name, Pos: ld.pos(tomlfile.Pos{Line: t.Pos.Line, Col: 1})}
	if !refName.MatchString(t.Name) {
		t.Errorf(t.Pos, "part %q: a reference may hold only letters, digits and _ + -", t.Name)
	}
	kind, ok := t.String("kind", true)
	if !ok {
		return nil
	}
	p.Kind = Kind(kind)
	keys, known := partKeys[p.Kind]
	switch {
	case kind == "jfet":
		t.Errorf(t.ValPos("kind"), `%s kind: "jfet" is reserved; write "njfet" or "pjfet" for the channel type; supported kinds: %s`, t.Name, kindList())
		return nil
	case kind == "mosfet":
		t.Errorf(t.ValPos("kind"), `%s kind: "mosfet" is reserved, not supported yet (of the MOSFETs only the n-channel "dual-gate-mosfet" is); supported kinds: %s`, t.Name, kindList())
		return nil
	case kind == "diode":
		t.Errorf(t.ValPos("kind"), "%s kind: %q is reserved, not supported yet; supported kinds: %s", t.Name, kind, kindList())
		return nil
	case !known:
		t.Errorf(t.ValPos("kind"), "%s kind: unknown kind %q; supported kinds: %s", t.Name, kind, kindList())
		return nil
	}
	t.What = fmt.Sprintf("%s (%s)", t.Name, kind)
	t.Allow(keys...)
	t.What = t.Name
	switch p.Kind {
	case Resistor:
		ld.twoNets(t, p)
		p.Value = ld.required(t, "value", quantity.Ohm)
		p.Tolerance = tolerance(t, "tolerance", 0.05)
		p.Rating, _ = t.Quantity("rating", quantity.Watt, tomlfile.Positive)
	case Capacitor:
		ld.twoNets(t, p)
		p.Value = ld.required(t, "value", quantity.Farad)
		p.Tolerance = tolerance(t, "tolerance", 0.10)
		p.Rating, _ = t.Quantity("rating", quantity.Volt, tomlfile.Positive)
		p.Role = role(t, "coupling", "bypass", "decoupling", "tuning")
		ld.quality(t, p)
	case Inductor:
		ld.twoNets(t, p)
		ld.inductor(t, p)
		p.Resistance, _ = t.Quantity("resistance", quantity.Ohm, tomlfile.NonNegative)
		p.Role = role(t, "choke", "tuning")
		ld.quality(t, p)
	case Transformer:
		ld.magnetics(t, p)
		ld.quality(t, p)
		p.Coupling = 0.98
		if k, ok := t.Quantity("coupling", quantity.Ratio, tomlfile.Positive); ok {
			if k >= 1 {
				t.Errorf(t.ValPos("coupling"), "%s coupling: must lie between 0 and 1, exclusive (k = 1 makes the windings' inductance matrix singular); got %g", t.What, k)
			} else {
				p.Coupling, p.CouplingSet = k, true
			}
		}
		ld.windings(t, p)
	case Potentiometer:
		p.Nets = ld.namedNets(t, "a", "wiper", "b")
		p.Value = ld.required(t, "value", quantity.Ohm)
		p.Tolerance = tolerance(t, "tolerance", 0.20)
		p.Rating, _ = t.Quantity("rating", quantity.Watt, tomlfile.Positive)
		p.Setting = 0.5
		if s, ok := t.Quantity("setting", quantity.Ratio, tomlfile.NonNegative); ok {
			if s > 1 {
				t.Errorf(t.ValPos("setting"), "%s setting: must lie in [0, 1] (0 = wiper at b, 1 = wiper at a); got %g", t.What, s)
			} else {
				p.Setting = s
			}
		}
	case NPN, PNP:
		p.Nets = ld.namedNets(t, "collector", "base", "emitter")
		ld.transistor(t, p)
	case NJFET, PJFET:
		p.Nets = ld.namedNets(t, "drain", "gate", "source")
		ld.fet(t, p)
	case DualGateMOSFET:
		if m, ok := t.Raw("nets").(map[string]any); ok && m["gate2"] == nil {
			t.Errorf(t.ValPos("nets"), `%s nets: a dual-gate MOSFET needs gate2, the net of its second gate (held near +4 V by a decoupled divider for full gain), as in nets = { drain = "...", gate = "...", source = "...", gate2 = "..." }`, t.What)
		} else {
			p.Nets = ld.namedNets(t, "drain", "gate", "source", "gate2")
		}
		ld.fet(t, p)
	}
	return p
}

// required reads a positive quantity that must be present.
func (ld *loader) required(t *tomlfile.Table, key string, u quantity.Unit) float64 {
	if !t.Has(key) {
		t.Missing(key, "")
		return 0
	}
	v, _ := t.Quantity(key, u, tomlfile.Positive)
	return v
}

// tolerance reads a tolerance in [0, 1), or gives def.
func tolerance(t *tomlfile.Table, key string, def float64) float64 {
	v, ok := t.Quantity(key, quantity.Fraction, tomlfile.NonNegative)
	if !ok {
		return def
	}
	if v >= 1 {
		t.Errorf(t.ValPos(key), "%s %s: must be below 100 %%, got %s", t.What, key, quantity.Format(v, quantity.Fraction))
		return def
	}
	return v
}

func role(t *tomlfile.Table, accepted ...string) string {
	r, ok := t.String("role", false)
	if !ok {
		return ""
	}
	if !slices.Contains(accepted, r) {
		t.Errorf(t.ValPos("role"), "%s role: %q is not a role of this kind; accepted: %s", t.What, r, strings.Join(accepted, ", "))
		return ""
	}
	return r
}

// twoNets reads nets = [a, b].
func (ld *loader) twoNets(t *tomlfile.Table, p *Part) {
	if !t.Has("nets") {
		t.Missing("nets", `(two net names, as in nets = ["vcc", "base"])`)
		return
	}
	if _, ok := t.Raw("nets").([]any); !ok {
		t.Errorf(t.ValPos("nets"), `%s nets: expected an array of two net names, got %s`, t.What, tomlfile.TypeName(t.Raw("nets")))
		return
	}
	nets, ok := t.Strings("nets")
	if !ok {
		return
	}
	if len(nets) != 2 {
		t.Errorf(t.ValPos("nets"), "%s nets: expected two net names, got %d", t.What, len(nets))
		return
	}
	for i, n := range nets {
		if !ld.checkNet(t, fmt.Sprintf("nets[%d]", i), n, t.ElemPos("nets", i)) {
			return
		}
	}
	p.Nets = nets
}

// namedNets reads nets = { name = "net", ... } with exactly the given names.
func (ld *loader) namedNets(t *tomlfile.Table, names ...string) []string {
	form := make([]string, len(names))
	for i, n := range names {
		form[i] = n + ` = "..."`
	}
	if !t.Has("nets") {
		t.Missing("nets", "({ "+strings.Join(form, ", ")+" })")
		return nil
	}
	nt := t.Table("nets", t.What+" nets")
	if nt == nil {
		return nil
	}
	nt.Allow(names...)
	out := make([]string, len(names))
	good := true
	for i, n := range names {
		s, ok := nt.String(n, true)
		if ok {
			ok = ld.checkNet(nt, n, s, nt.ValPos(n))
		}
		out[i] = s
		good = good && ok
	}
	if !good {
		return nil
	}
	return out
}

// inductor reads value, or turns with core or al.
func (ld *loader) inductor(t *tomlfile.Table, p *Part) {
	switch {
	case t.Has("value") && t.Has("turns"):
		t.Errorf(t.KeyPos("turns"), "%s: give value or turns (with core or al), not both", t.What)
	case t.Has("value"):
		for _, k := range []string{"core", "al", "al_tolerance"} {
			if t.Has(k) {
				t.Errorf(t.KeyPos(k), "%s %s: core, al and al_tolerance go with turns, not with value", t.What, k)
			}
		}
		p.Value, _ = t.Quantity("value", quantity.Henry, tomlfile.Positive)
		p.Tolerance = tolerance(t, "tolerance", 0.10)
	case t.Has("turns"):
		if t.Has("tolerance") {
			t.Errorf(t.KeyPos("tolerance"), "%s tolerance: an inductor given by turns varies with its core's AL; write al_tolerance", t.What)
		}
		p.Turns, _ = t.Quantity("turns", quantity.Ratio, tomlfile.Positive)
		ld.magnetics(t, p)
	default:
		t.Errorf(t.Pos, `%s: missing "value" (or "turns" with "core" or "al")`, t.What)
	}
}

// magnetics reads core, al and al_tolerance: al wins over the core's AL; the
// part's al_tolerance wins over the core's, which wins over 25 %.
func (ld *loader) magnetics(t *tomlfile.Table, p *Part) {
	var core *library.Core
	if name, ok := t.String("core", false); ok {
		p.Core = name
		core = ld.lib.Cores[name]
		if core == nil {
			t.Errorf(t.ValPos("core"), "%s core: unknown core %q%s; the library has %s", t.What, name,
				coreHint(name, sortedKeys(ld.lib.Cores)), strings.Join(sortedKeys(ld.lib.Cores), ", "))
		}
	}
	p.ALTolerance = library.DefaultALTolerance
	if core != nil {
		p.AL = core.AL()
		p.ALTolerance = core.ALTolerance
	}
	if v, ok := t.Quantity("al", quantity.Henry, tomlfile.Positive); ok {
		p.AL = v
	}
	if !t.Has("core") && !t.Has("al") {
		t.Errorf(t.Pos, `%s: missing "core" (a library core) or "al" (inductance per turn squared, as in al = "360nH")`, t.What)
	}
	p.ALTolerance = tolerance(t, "al_tolerance", p.ALTolerance)
}

// quality reads q and q_freq (the unloaded Q and the frequency it is given
// at); without q, a library core's typical Q range gives the nominal Q (the
// geometric mean of its ends) and the range the corner box sweeps.
func (ld *loader) quality(t *tomlfile.Table, p *Part) {
	if q, ok := t.Quantity("q", quantity.Ratio, tomlfile.Positive); ok {
		p.Q = q
	} else if !t.Has("q") && p.Core != "" {
		if core := ld.lib.Cores[p.Core]; core != nil && core.Q[0] > 0 {
			p.Q = math.Sqrt(core.Q[0] * core.Q[1])
			p.QRange = core.Q
			p.QFreq = core.QFreq
		}
	}
	if f, ok := t.Quantity("q_freq", quantity.Hertz, tomlfile.Positive); ok {
		if !t.Has("q") {
			t.Errorf(t.KeyPos("q_freq"), "%s q_freq: the frequency a Q is given at needs q beside it, as in q = 150", t.What)
		}
		p.QFreq = f
	}
}

func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

func (ld *loader) windings(t *tomlfile.Table, p *Part) {
	if !t.Has("windings") {
		t.Missing("windings", `(two or more, as in windings.primary = { turns = 12, nets = ["vcc", "coll"] })`)
		return
	}
	wt := t.Table("windings", t.What+" windings")
	if wt == nil {
		return
	}
	for _, w := range wt.Tables(func(k string) string { return t.What + " winding " + k }) {
		win := &Winding{Name: w.Name, Pos: ld.pos(w.Pos)}
		if !refName.MatchString(w.Name) {
			w.Errorf(w.Pos, "%s: a winding name may hold only letters, digits and _ + -", w.What)
		}
		w.Allow("turns", "nets", "resistance")
		if !w.Has("turns") {
			w.Missing("turns", "")
		} else {
			win.Turns, _ = w.Quantity("turns", quantity.Ratio, tomlfile.Positive)
		}
		var two Part
		ld.twoNets(w, &two)
		if len(two.Nets) == 2 {
			win.Nets = [2]string{two.Nets[0], two.Nets[1]}
		}
		win.Resistance, _ = w.Quantity("resistance", quantity.Ohm, tomlfile.NonNegative)
		p.Windings = append(p.Windings, win)
	}
	if len(p.Windings) < 2 {
		t.Errorf(t.ValPos("windings"), "%s windings: a transformer needs two or more windings, got %d", t.What, len(p.Windings))
	}
}

// requiredFigures are the transistor figures FORMAT.md §2 requires.
var requiredFigures = []string{"ft", "hfe", "vbe", "ic_ref", "pd", "tj_max", "ic_max", "vceo"}

// coreName reads a library core name: toroid-OD x ID x H (mm) -muN.
var coreName = regexp.MustCompile(`^toroid-([0-9.]+)x([0-9.]+)x([0-9.]+)-mu([0-9.]+)$`)

// coreHint is " (did you mean X?)" for an unknown core: a name that reads
// as a toroid gets the library core of the same permeability nearest in
// size (the sum of |ln| of the three dimension ratios); others get the
// nearest spelling.
func coreHint(name string, cores []string) string {
	m := coreName.FindStringSubmatch(name)
	if m == nil {
		return didYouMean(name, cores)
	}
	dims := func(m []string) (d [4]float64) {
		for i := range d {
			d[i], _ = strconv.ParseFloat(m[i+1], 64)
		}
		return d
	}
	want := dims(m)
	best, bestD := "", math.Inf(1)
	for _, c := range cores {
		cm := coreName.FindStringSubmatch(c)
		if cm == nil {
			continue
		}
		have := dims(cm)
		if have[3] != want[3] {
			continue
		}
		d := 0.0
		for i := 0; i < 3; i++ {
			if want[i] > 0 && have[i] > 0 {
				d += math.Abs(math.Log(want[i] / have[i]))
			}
		}
		if d < bestD {
			best, bestD = c, d
		}
	}
	if best == "" {
		return didYouMean(name, cores)
	}
	return fmt.Sprintf(" (did you mean %s?)", best)
}

// didYouMean is " (did you mean X?)" for the candidate close to name, or "".
func didYouMean(name string, candidates []string) string {
	if s := spell.Suggest(name, candidates); s != "" {
		return fmt.Sprintf(" (did you mean %s?)", s)
	}
	return ""
}

func (ld *loader) transistor(t *tomlfile.Table, p *Part) {
	var tr library.Transistor
	from := ""
	unknown := "" // the error for a device the library lacks, when figures are missing too
	if name, ok := t.String("device", false); ok {
		p.Device = name
		lt := ld.lib.Transistors[name]
		switch {
		case lt == nil:
			// A device the library lacks is fine when every figure is
			// given inline: the part keeps the name it was given.
			var same []string
			for _, k := range sortedKeys(ld.lib.Transistors) {
				if ld.lib.Transistors[k].Polarity == string(p.Kind) {
					same = append(same, k)
				}
			}
			types := "none"
			if len(same) > 0 {
				types = strings.Join(same, ", ")
			}
			unknown = fmt.Sprintf("%s device: unknown transistor %q%s; the library's %s types are %s. A device not in the "+
				"library may be used with every figure given inline", t.What, name, didYouMean(name, sortedKeys(ld.lib.Transistors)),
				p.Kind, types)
		case lt.Polarity != string(p.Kind):
			t.Errorf(t.ValPos("device"), "%s device: %s is a %s transistor, but kind is %q", t.What, name, lt.Polarity, p.Kind)
			return
		}
		if lt != nil {
			tr = *lt
			from = fmt.Sprintf(" (device %s)", name)
		}
	}
	library.ReadFigures(t, p.Kind == PNP, &tr)
	have := map[string]bool{"ft": tr.FT > 0, "hfe": tr.HFEMax > 0, "vbe": tr.VBE > 0, "ic_ref": tr.ICRef > 0,
		"pd": tr.PD > 0, "tj_max": tr.TjMax > 0, "ic_max": tr.ICMax > 0, "vceo": tr.VCEO > 0}
	var missing []string
	for _, k := range requiredFigures {
		// A figure present but unreadable has its own error already.
		if !have[k] && !t.Has(k) {
			missing = append(missing, k)
		}
	}
	switch {
	case len(missing) > 0 && unknown != "":
		t.Errorf(t.ValPos("device"), "%s; missing here: %s", unknown, strings.Join(missing, ", "))
	case len(missing) > 0:
		how := "name a library device with device = \"...\" or give them inline"
		if p.Device != "" {
			how = "give them inline"
		}
		t.Errorf(t.Pos, "%s: transistor figures missing%s: %s; %s", t.What, from, strings.Join(missing, ", "), how)
	}
	if tr.HFETypOutside() {
		at := t.ValPos("device")
		switch {
		case t.Has("hfe_typ"):
			at = t.ValPos("hfe_typ")
		case t.Has("hfe"):
			at = t.ValPos("hfe")
		}
		note := ""
		if !t.Has("hfe_typ") && from != "" {
			note = fmt.Sprintf(" (hfe_typ from device %s: give hfe_typ inline too)", p.Device)
		}
		t.Errorf(at, "%s hfe_typ: %g lies outside hfe [%g, %g]%s", t.What, tr.HFETyp, tr.HFEMin, tr.HFEMax, note)
	}
	p.BJT = &BJTParams{FT: tr.FT, HFEMin: tr.HFEMin, HFEMax: tr.HFEMax, HFETyp: tr.HFETyp, VBE: tr.VBE,
		ICRef: tr.ICRef, PD: tr.PD, TjMax: tr.TjMax, ICMax: tr.ICMax, VCEO: tr.VCEO, Cob: tr.Cob, RB: tr.RB}
}

func (ld *loader) waivers(root *tomlfile.Table) {
	if !root.Has("waivers") {
		return
	}
	names := map[string]bool{}
	for _, p := range ld.c.Parts {
		names[p.Ref] = true
		for _, w := range p.Windings {
			names[p.Ref+"."+w.Name] = true // a tuned winding's findings (tank.tuning)
		}
	}
	for _, r := range ld.c.Rejects {
		names[r.Name()] = true // filter.rejection's items
	}
	for _, p := range ld.c.Ports {
		names[p.Name] = true
	}
	for _, s := range ld.c.Supplies {
		names[s.Net] = true
	}
	for _, t := range root.TableArray("waivers", func(i int) string { return fmt.Sprintf("waiver %d", i+1) }) {
		w := &Waiver{Pos: ld.pos(t.Pos)}
		t.Allow("rule", "part", "reason", "expires")
		if r, ok := t.String("rule", true); ok {
			if strings.TrimSpace(r) == "" {
				t.Errorf(t.ValPos("rule"), "%s rule: must name a rule", t.What)
			}
			w.Rule = r
			w.RulePos = ld.pos(t.ValPos("rule"))
		}
		if p, ok := t.String("part", false); ok {
			if !names[p] {
				t.Errorf(t.ValPos("part"), "%s part: %q is not a part, port or supply of this circuit", t.What, p)
			}
			w.Part = p
		}
		if r, ok := t.String("reason", false); ok && strings.TrimSpace(r) != "" {
			w.Reason = r
		} else if ok {
			t.Errorf(t.ValPos("reason"), "%s reason: must say why the rule does not apply", t.What)
		} else if !t.Has("reason") {
			t.Missing("reason", "(a waiver must say why)")
		}
		w.Expires, _ = t.Date("expires")
		ld.c.Waivers = append(ld.c.Waivers, w)
	}
}

// requiredFETFigures are the FET figures a part must end up with (docs/fet.md).
var requiredFETFigures = []string{"idss", "vp", "vds_max", "pd", "tj_max"}

// fet reads a field-effect transistor: its library device, then the inline
// figures over it.
func (ld *loader) fet(t *tomlfile.Table, p *Part) {
	var f library.FET
	from := ""
	if name, ok := t.String("device", false); ok {
		p.Device = name
		lf := ld.lib.FETs[name]
		switch {
		case lf == nil:
			var same []string
			for _, k := range sortedKeys(ld.lib.FETs) {
				if ld.lib.FETs[k].Polarity == string(p.Kind) {
					same = append(same, k)
				}
			}
			t.Errorf(t.ValPos("device"), "%s device: unknown %s %q; the library's %s types are %s", t.What, p.Kind, name, p.Kind, strings.Join(same, ", "))
			return
		case lf.Polarity != string(p.Kind):
			t.Errorf(t.ValPos("device"), "%s device: %s is a %s, but kind is %q", t.What, name, lf.Polarity, p.Kind)
			return
		}
		f = *lf
		from = fmt.Sprintf(" (device %s)", name)
	}
	library.ReadFETFigures(t, string(p.Kind), &f)
	have := map[string]bool{"idss": f.IDSSMax > 0, "vp": f.VPMax > 0, "vds_max": f.VDSMax > 0, "pd": f.PD > 0, "tj_max": f.TjMax > 0}
	missingFigures(t, p, "FET", from, requiredFETFigures, have)
	if bad := f.TypOutside(); bad != "" {
		at := t.Pos
		for _, k := range []string{"idss_typ", "vp_typ", "idss", "vp", "device"} {
			if t.Has(k) {
				at = t.ValPos(k)
				break
			}
		}
		t.Errorf(at, "%s: %s", t.What, bad)
	}
	p.FET = &FETParams{IDSSMin: f.IDSSMin, IDSSMax: f.IDSSMax, IDSSTyp: f.IDSSTyp, VPMin: f.VPMin, VPMax: f.VPMax,
		VPTyp: f.VPTyp, VDSMax: f.VDSMax, PD: f.PD, TjMax: f.TjMax, Ciss: f.Ciss, Crss: f.Crss, Coss: f.Coss}
	if f.IDSSMax > 0 && f.VPMax > 0 {
		p.FET.IDSS, p.FET.VP = p.FET.NominalIDSS(), p.FET.NominalVP()
	}
}

// missingFigures reports the required figures that neither the library
// device nor the part gives (a figure present but unreadable has its own
// error already).
func missingFigures(t *tomlfile.Table, p *Part, what, from string, required []string, have map[string]bool) {
	var missing []string
	for _, k := range required {
		if !have[k] && !t.Has(k) {
			missing = append(missing, k)
		}
	}
	if len(missing) > 0 {
		how := "name a library device with device = \"...\" or give them inline"
		if p.Device != "" {
			how = "give them inline"
		}
		t.Errorf(t.Pos, "%s: %s figures missing%s: %s; %s", t.What, what, from, strings.Join(missing, ", "), how)
	}
}
