package circuit

import (
	"errors"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"headroom/checker/library"
)

const demo = "../../testdata/circuits/"

func load(t *testing.T, src string, files map[string]string, opt Options) *Circuit {
	t.Helper()
	c, err := loadErr(src, files, opt)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func loadErr(src string, files map[string]string, opt Options) (*Circuit, error) {
	opt.ReadFile = func(p string) ([]byte, error) {
		if d, ok := files[filepath.ToSlash(p)]; ok {
			return []byte(d), nil
		}
		return nil, &fs.PathError{Op: "open", Path: p, Err: fs.ErrNotExist}
	}
	return LoadBytes("board/c.toml", []byte(src), opt)
}

func nearly(a, b float64) bool { return math.Abs(a-b) <= 1e-12*math.Max(math.Abs(a), math.Abs(b)) }

// The 30 m preamp: every field as written in the file, and the AL of its
// core from REFERENCES.md §7 (360.44 nH/N², the IEC 60205 worked example).
func TestDemoPreamp30m(t *testing.T) {
	c, err := Load(demo+"preamp-30m.toml", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if c.Name != "30 m receive preamp" || c.Band != [2]float64{10.1e6, 10.15e6} {
		t.Errorf("name %q band %v", c.Name, c.Band)
	}
	// ambient ["0C", "40C"]: 25 °C lies inside, so it is the nominal (FORMAT.md §2).
	if c.Ambient != (Ambient{Nominal: 25, Lo: 0, Hi: 40}) {
		t.Errorf("ambient %+v", c.Ambient)
	}
	if c.Pos.Line != 13 || c.Pos.Col != 1 {
		t.Errorf("[circuit] at %+v, want line 13", c.Pos)
	}
	vcc := c.Supply("vcc")
	if vcc == nil || vcc.Volts != 12 || vcc.Range != [2]float64{10.8, 13.8} || vcc.Impedance != 0.2 {
		t.Fatalf("vcc %+v", vcc)
	}
	in, out := c.InPort(), c.OutPort()
	if in == nil || in.Net != "rf_in" || in.Impedance != 50 || !in.Matched {
		t.Errorf("in port %+v", in)
	}
	if out == nil || out.Net != "rf_out" || out.Impedance != 50 {
		t.Errorf("out port %+v", out)
	}
	var refs []string
	for _, p := range c.Parts {
		refs = append(refs, p.Ref)
	}
	if want := []string{"R5", "C1", "R1", "R2", "Q1", "R3", "C3", "T1", "C4"}; !reflect.DeepEqual(refs, want) {
		t.Errorf("parts in file order %v, want %v", refs, want)
	}
	r1 := c.Part("R1")
	if r1.Value != 10e3 || r1.Tolerance != 0.05 || r1.Rating != 0.25 || !reflect.DeepEqual(r1.Nets, []string{"vcc", "base"}) {
		t.Errorf("R1 %+v", r1)
	}
	if r1.Pos.Line != 43 || r1.Pos.Col != 1 {
		t.Errorf("R1 at %+v, want its header at line 43", r1.Pos)
	}
	if r3 := c.Part("R3"); r3.Value != 120 || r3.Tolerance != 0.01 {
		t.Errorf("R3 %+v", r3)
	}
	if c1 := c.Part("C1"); c1.Value != 10e-9 || c1.Tolerance != 0.10 || c1.Rating != 50 || c1.Role != "" {
		t.Errorf("C1 %+v", c1)
	}
	if c3 := c.Part("C3"); c3.Role != "bypass" {
		t.Errorf("C3 role %q", c3.Role)
	}
	q1 := c.Part("Q1")
	if q1.Device != "2N3904" || !reflect.DeepEqual(q1.Nets, []string{"coll", "base", "emit"}) {
		t.Errorf("Q1 %+v", q1)
	}
	// The 2N3904 figures of REFERENCES.md §6.1–6.2.
	if b := q1.BJT; b.FT != 300e6 || b.HFEMin != 100 || b.HFEMax != 300 || b.PD != 0.625 || b.TjMax != 150 ||
		b.ICMax != 0.2 || b.VCEO != 40 || b.Cob != 4e-12 {
		t.Errorf("Q1 figures %+v", b)
	}
	t1 := c.Part("T1")
	if t1.Core != "toroid-9.5x4.75x3.25-mu800" || math.Abs(t1.AL-360.44e-9) > 0.01e-9 || t1.ALTolerance != 0.25 || t1.Coupling != 0.98 {
		t.Errorf("T1 %+v", t1)
	}
	if len(t1.Windings) != 2 {
		t.Fatalf("T1 windings %d", len(t1.Windings))
	}
	p, s := t1.Windings[0], t1.Windings[1]
	if p.Name != "primary" || p.Turns != 10 || p.Nets != [2]string{"vcc", "coll"} || p.Resistance != 0.1 || p.Pos.Line != 74 {
		t.Errorf("primary %+v", p)
	}
	if s.Name != "secondary" || s.Turns != 5 || s.Nets != [2]string{"rf_out", "gnd"} || s.Resistance != 0.05 {
		t.Errorf("secondary %+v", s)
	}
	if c.Library == nil || c.Library.Transistors["2N3904"] == nil {
		t.Error("the merged library is not kept")
	}
	if want := []string{"base", "coll", "emit", "rf_in", "rf_out", "vcc"}; !reflect.DeepEqual(c.Nets(), want) {
		t.Errorf("nets %v", c.Nets())
	}
}

// The 20 m buffer: parts written inline under [parts], a bridging input, a
// single ambient and a supply given as a bare number of volts.
func TestDemoBuffer20m(t *testing.T) {
	c, err := Load(demo+"buffer-20m.toml", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if c.Ambient != (Ambient{Nominal: 30, Lo: 30, Hi: 30}) {
		t.Errorf("ambient %+v", c.Ambient)
	}
	if vcc := c.Supply("vcc"); vcc.Volts != 9 || vcc.Range != [2]float64{8.5, 9.5} || vcc.Impedance != 0 {
		t.Errorf("vcc %+v", vcc)
	}
	if in := c.InPort(); in.Matched {
		t.Error("in port: matched = false was ignored")
	}
	q1 := c.Part("Q1")
	if q1.Pos.Line != 33 || q1.Pos.Col != 1 || q1.Device != "2N4401" || q1.Nets[0] != "vcc" {
		t.Errorf("Q1 %+v", q1)
	}
	if b := q1.BJT; b.FT != 250e6 || b.ICMax != 0.6 || b.Cob != 6.5e-12 {
		t.Errorf("Q1 figures %+v", b)
	}
	if c3 := c.Part("C3"); c3.Tolerance != 0.20 {
		t.Errorf("C3 tolerance %g", c3.Tolerance)
	}
	if r3 := c.Part("R3"); r3.Value != 390 || r3.Rating != 0.25 {
		t.Errorf("R3 %+v", r3)
	}
}

// The 160 m PNP stage: a PNP with a negative vceo written inline, an inductor
// given by turns on a library core, a potentiometer and a waiver.
func TestDemoPNP160m(t *testing.T) {
	c, err := Load(demo+"pnp-160m.toml", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if c.Ambient != (Ambient{Nominal: 25, Lo: 25, Hi: 25}) {
		t.Errorf("default ambient %+v, want 25 °C", c.Ambient)
	}
	if vcc := c.Supply("vcc"); vcc.Range != [2]float64{11, 13} {
		t.Errorf("vcc %+v", vcc)
	}
	q1 := c.Part("Q1")
	if q1.Kind != PNP || q1.BJT.VCEO != 40 || q1.BJT.FT != 250e6 || q1.BJT.Cob != 4.5e-12 {
		t.Errorf("Q1 %+v %+v", q1, q1.BJT)
	}
	// 20 turns on the 12.7 × 7.15 × 4.9 mm core at µ 800:
	// AL = 2e-7 · 800 · 4.9e-3 · ln(12.7/7.15) = 450.40 nH (IEC 60205 ring core).
	l1 := c.Part("L1")
	if l1.Turns != 20 || math.Abs(l1.AL-450.40e-9) > 0.01e-9 || l1.ALTolerance != 0.25 || l1.Tolerance != 0 ||
		l1.Resistance != 0.3 || l1.Role != "choke" || l1.Value != 0 {
		t.Errorf("L1 %+v", l1)
	}
	if math.Abs(l1.Inductance()-180.16e-6) > 0.01e-6 {
		t.Errorf("L1 inductance %g", l1.Inductance())
	}
	rv1 := c.Part("RV1")
	if rv1.Value != 500 || rv1.Setting != 0.8 || rv1.Tolerance != 0.20 || rv1.Rating != 0.25 ||
		!reflect.DeepEqual(rv1.Nets, []string{"lvl", "rf_out", "gnd"}) {
		t.Errorf("RV1 %+v", rv1)
	}
	if len(c.Waivers) != 1 {
		t.Fatalf("waivers %v", c.Waivers)
	}
	w := c.Waivers[0]
	if w.Rule != "bias.drift" || w.Part != "Q1" || w.Expires != "2027-06-30" || !strings.HasPrefix(w.Reason, "bench-tested") {
		t.Errorf("waiver %+v", w)
	}
	if w.Pos.Line != 89 || w.Pos.Col != 1 || w.RulePos.Line != 90 || w.RulePos.Col != 8 {
		t.Errorf("waiver at %+v, rule at %+v", w.Pos, w.RulePos)
	}
}

// Defaults of FORMAT.md §2 for keys left out.
func TestDefaults(t *testing.T) {
	c := load(t, `[circuit]
name = "defaults"
band = ["3.5MHz", "3.8MHz"]
ambient = ["30C", "60C"]
[supplies.vee]
volts = "-9V"
[ports.out]
net = "a"
direction = "out"
[parts.R1]
kind = "resistor"
value = "1k"
nets = ["vee", "a"]
[parts.C1]
kind = "capacitor"
value = "1n"
nets = ["a", "gnd"]
[parts.L1]
kind = "inductor"
value = "10u"
nets = ["a", "b"]
[parts.L2]
kind = "inductor"
turns = 12
al = "5nH"
nets = ["b", "gnd"]
[parts.L3]
kind = "inductor"
turns = 12
core = "toroid-12.7x7.7x4.83-mu10"
nets = ["b", "gnd"]
[parts.RV1]
kind = "potentiometer"
value = "10k"
nets = { a = "a", wiper = "b", b = "gnd" }
[parts.T1]
kind = "transformer"
core = "toroid-9.5x4.75x3.25-mu800"
al = "300nH"
windings.one = { turns = 3, nets = ["a", "gnd"] }
windings.two = { turns = 6, nets = ["b", "gnd"] }
`, nil, Options{})
	// An ambient range without 25 °C: the nominal is its middle.
	if c.Ambient != (Ambient{Nominal: 45, Lo: 30, Hi: 60}) {
		t.Errorf("ambient %+v", c.Ambient)
	}
	if vee := c.Supply("vee"); vee.Volts != -9 || vee.Range != [2]float64{-9, -9} || vee.Impedance != 0 {
		t.Errorf("vee %+v", vee)
	}
	if out := c.OutPort(); out.Impedance != 50 || !out.Matched || c.InPort() != nil {
		t.Errorf("ports %+v", c.Ports)
	}
	want := map[string]float64{"R1": 0.05, "C1": 0.10, "L1": 0.10, "RV1": 0.20}
	for ref, tol := range want {
		if got := c.Part(ref).Tolerance; got != tol {
			t.Errorf("%s tolerance %g, want %g", ref, got, tol)
		}
	}
	if l1 := c.Part("L1"); l1.Value != 10e-6 || l1.Resistance != 0 || l1.ALTolerance != 0 {
		t.Errorf("L1 %+v", l1)
	}
	if l2 := c.Part("L2"); l2.AL != 5e-9 || l2.ALTolerance != 0.25 || !nearly(l2.Inductance(), 144*5e-9) {
		t.Errorf("L2 %+v", l2)
	}
	// A core's own al_tolerance is the default for a part on it (10 % for the
	// shipped iron-powder cores).
	if l3 := c.Part("L3"); l3.ALTolerance != 0.10 || l3.Core != "toroid-12.7x7.7x4.83-mu10" {
		t.Errorf("L3 %+v", l3)
	}
	if rv := c.Part("RV1"); rv.Setting != 0.5 {
		t.Errorf("RV1 setting %g", rv.Setting)
	}
	// al wins over the core; the core still names the material.
	if t1 := c.Part("T1"); t1.AL != 300e-9 || t1.Coupling != 0.98 || t1.Core != "toroid-9.5x4.75x3.25-mu800" {
		t.Errorf("T1 %+v", t1)
	}
}

// Inline transistor figures override the library; a PNP's negative figures
// are stored as magnitudes; a transistor may be described wholly inline.
func TestTransistorFigures(t *testing.T) {
	c := load(t, `[circuit]
name = "figures"
band = ["7MHz", "7.2MHz"]
[parts.Q1]
kind = "npn"
device = "2N3904"
ft = "250MHz"
hfe_typ = 150
nets = { collector = "c", base = "b", emitter = "e" }
[parts.Q2]
kind = "pnp"
ft = "250MHz"
hfe = [100, 300]
vbe = "-0.7V"
ic_ref = "-10mA"
pd = "625mW"
tj_max = "150C"
ic_max = "-200mA"
vceo = "-40V"
nets = { collector = "c", base = "b", emitter = "e" }
`, nil, Options{})
	q1 := c.Part("Q1").BJT
	if q1.FT != 250e6 || q1.HFETyp != 150 || q1.NominalHFE() != 150 || q1.PD != 0.625 || q1.VCEO != 40 {
		t.Errorf("Q1 %+v", q1)
	}
	q2 := c.Part("Q2").BJT
	want := BJTParams{FT: 250e6, HFEMin: 100, HFEMax: 300, VBE: 0.7, ICRef: 0.01, PD: 0.625, TjMax: 150, ICMax: 0.2, VCEO: 40}
	if *q2 != want {
		t.Errorf("Q2 %+v, want %+v", *q2, want)
	}
	if c.Part("Q2").Device != "" {
		t.Error("Q2 has a device")
	}
	if shipped := library.Shipped(); shipped.Transistors["2N3904"].FT != 300e6 {
		t.Error("an inline figure changed the shipped library")
	}
}

// Libraries: shipped (or Options.Base), then the rule set's, then the
// circuit's own (relative to the circuit file); later entries win.
func TestLibraryOrder(t *testing.T) {
	files := map[string]string{
		"rules/club.toml": `[transistors.X1]
polarity = "npn"
ft = "100MHz"
[transistors."2N3904"]
polarity = "npn"
ft = "111MHz"
`,
		"board/parts/mine.toml": `[transistors.X1]
polarity = "npn"
ft = "222MHz"
[cores.c1]
al = "1uH"
`,
	}
	src := `[circuit]
name = "libs"
band = ["7MHz", "7.2MHz"]
library = ["parts/mine.toml"]
[parts.L1]
kind = "inductor"
turns = 3
core = "c1"
nets = ["a", "gnd"]
`
	c := load(t, src, files, Options{Libraries: []string{"rules/club.toml"}})
	if c.Libraries[0] != "parts/mine.toml" {
		t.Errorf("Libraries %v, want the path as written", c.Libraries)
	}
	if got := c.Library.Transistors["X1"].FT; got != 222e6 {
		t.Errorf("X1 ft %g: the circuit's library must win over the rule set's", got)
	}
	if got := c.Library.Transistors["2N3904"].FT; got != 111e6 {
		t.Errorf("2N3904 ft %g: the rule set's library must win over the shipped one", got)
	}
	if l1 := c.Part("L1"); l1.AL != 1e-6 || !nearly(l1.Inductance(), 9e-6) {
		t.Errorf("L1 %+v", l1)
	}
	// Options.Base replaces the shipped library.
	_, err := loadErr(`[circuit]
name = "base"
band = ["7MHz", "7.2MHz"]
[parts.Q1]
kind = "npn"
device = "2N3904"
nets = { collector = "c", base = "b", emitter = "e" }
`, nil, Options{Base: library.New()})
	if err == nil || !strings.Contains(err.Error(), `unknown transistor "2N3904"`) {
		t.Errorf("with an empty base library: %v", err)
	}
}

// Part.Pos: a header at column 1; a part written inline at its key.
func TestPartPositions(t *testing.T) {
	c := load(t, `parts.R1 = { kind = "resistor", value = "1k", nets = ["a", "gnd"] }
[circuit]
name = "positions"
band = ["7MHz", "7.2MHz"]
[parts]
  R2 = { kind = "resistor", value = "1k", nets = ["a", "gnd"] }
  R3.kind = "resistor"
  R3.value = "1k"
  R3.nets = ["a", "gnd"]
    [parts.R4]
kind = "resistor"
value = "1k"
nets = ["a", "gnd"]
[supplies]
  vcc = { volts = "5V" }
[[waivers]]
rule = "x.y"
reason = "r"
`, nil, Options{})
	// FORMAT.md §5: the line of the header or inline key, column 1, however
	// the line is indented.
	want := map[string][2]int{"R1": {1, 1}, "R2": {6, 1}, "R3": {7, 1}, "R4": {10, 1}}
	for ref, lc := range want {
		p := c.Part(ref)
		if p.Pos.Line != lc[0] || p.Pos.Col != lc[1] || p.Pos.File != "board/c.toml" {
			t.Errorf("%s at %+v, want %d:%d", ref, p.Pos, lc[0], lc[1])
		}
	}
	if s := c.Supply("vcc"); s.Pos.Line != 15 || s.Pos.Col != 3 {
		t.Errorf("vcc at %+v", s.Pos)
	}
	if w := c.Waivers[0]; w.Pos.Line != 16 || w.Pos.Col != 1 || w.RulePos.Line != 17 || w.RulePos.Col != 8 || w.Part != "" {
		t.Errorf("waiver %+v", w)
	}
}

// Waivers written as an inline array of tables, with a waiver on a port and
// one on a supply.
func TestInlineWaivers(t *testing.T) {
	c := load(t, `waivers = [
  { rule = "match.input", part = "in", reason = "bridging" },
  { rule = "safety.voltage", part = "vcc", reason = "bench supply", expires = 2030-01-01 },
]
[circuit]
name = "waivers"
band = ["7MHz", "7.2MHz"]
[supplies.vcc]
volts = "5V"
[ports.in]
net = "x"
direction = "in"
`, nil, Options{})
	if len(c.Waivers) != 2 {
		t.Fatalf("waivers %v", c.Waivers)
	}
	w0, w1 := c.Waivers[0], c.Waivers[1]
	if w0.Part != "in" || w0.Pos.Line != 2 || w0.Pos.Col != 3 || w0.RulePos.Line != 2 || w0.RulePos.Col != 12 {
		t.Errorf("w0 %+v", w0)
	}
	if w1.Part != "vcc" || w1.Expires != "2030-01-01" || w1.Pos.Line != 3 {
		t.Errorf("w1 %+v", w1)
	}
}

// A TOML file that is neither [circuit] nor [parts] is skipped silently.
func TestNotCircuit(t *testing.T) {
	for _, src := range []string{
		"name = \"club\"\nextends = \"default\"\n[rules.\"bias.region\"]\nseverity = \"off\"\n",
		"# only a comment\n",
		"[supplies.vcc]\nvolts = 5\n",
	} {
		if _, err := loadErr(src, nil, Options{}); !errors.Is(err, ErrNotCircuit) {
			t.Errorf("%q: got %v, want ErrNotCircuit", src, err)
		}
	}
}

// Windows line ends and a byte-order mark change nothing.
func TestCRLFAndBOM(t *testing.T) {
	data, err := os.ReadFile(demo + "preamp-30m.toml")
	if err != nil {
		t.Fatal(err)
	}
	crlf := "\xef\xbb\xbf" + strings.ReplaceAll(string(data), "\n", "\r\n")
	c, err := LoadBytes("x.toml", []byte(crlf), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if r1 := c.Part("R1"); r1.Pos.Line != 43 || r1.Pos.Col != 1 || r1.Value != 10e3 {
		t.Errorf("R1 %+v", r1)
	}
	bad := strings.Replace(crlf, `value = "2k2"`, `value = "2k2x"`, 1)
	_, err = LoadBytes("x.toml", []byte(bad), Options{})
	var ie *InputError
	if !errors.As(err, &ie) || ie.Pos.Line != 51 || ie.Pos.Col != 9 {
		t.Errorf("got %v, want x.toml:51:9", err)
	}
}

func BenchmarkLoad(b *testing.B) {
	paths, _ := filepath.Glob(demo + "*.toml")
	var files [][]byte
	for _, p := range paths {
		d, err := os.ReadFile(p)
		if err != nil {
			b.Fatal(err)
		}
		files = append(files, d)
	}
	library.Shipped()
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		for i, d := range files {
			if _, err := LoadBytes(paths[i], d, Options{}); err != nil {
				b.Fatal(err)
			}
		}
	}
}

// hfe_typ from the library must still lie inside an hfe given inline; the
// error points at the inline hfe (a club library with hfe_typ 150 here).
func TestInlineHFEAgainstLibraryTyp(t *testing.T) {
	files := map[string]string{"board/lib.toml": `[transistors.T1]
polarity = "npn"
ft = "300MHz"
hfe = [100, 300]
hfe_typ = 150
vbe = "0.7V"
ic_ref = "10mA"
pd = "625mW"
tj_max = "150C"
ic_max = "200mA"
vceo = "40V"
`}
	_, err := loadErr(`[circuit]
name = "typ"
band = ["7MHz", "7.2MHz"]
library = ["lib.toml"]
[parts.Q1]
kind = "npn"
device = "T1"
hfe = [50, 100]
nets = { collector = "c", base = "b", emitter = "e" }
`, files, Options{})
	var ie *InputError
	if !errors.As(err, &ie) || ie.Pos.Line != 8 || ie.Pos.Col != 7 || !strings.Contains(ie.Msg, "hfe_typ from device T1") {
		t.Errorf("got %v, want board/c.toml:8:7 naming the device", err)
	}
}
