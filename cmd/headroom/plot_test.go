package main

import (
	"bytes"
	"encoding/base64"
	"encoding/json"
	"encoding/xml"
	"image/color"
	"image/png"
	"maps"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/corners"
	"headroom/checker/engine"
	"headroom/checker/picture"
	"headroom/checker/ruleset"
	"headroom/checker/topology"
	"headroom/rules"
)

// The pictures are checked by their numbers and structure, never byte for
// byte (fonts and the plotting library move): each SVG is parsed as XML,
// the axes' transform is recovered from the grid lines and tick labels the
// picture itself carries, and what is plotted is mapped back through it.

// plotInto runs plot on circ with the corners given into a fresh folder.
func plotInto(t *testing.T, circ, corners string) string {
	t.Helper()
	dir := t.TempDir()
	if out, errs, code := runHere(t, "plot", "--corners", corners, "-o", dir, circ); code != 0 {
		t.Fatalf("plot: exit %d\n%s%s", code, out, errs)
	}
	return dir
}

// readSVG reads and parses the picture at path.
func readSVG(t *testing.T, path string) svgDoc {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return parseSVG(t, b)
}

// reportJSON decodes report --format json on circ into v.
func reportJSON(t *testing.T, circ, corners string, v any) {
	t.Helper()
	js, errs, code := runHere(t, "report", "--corners", corners, "--format", "json", circ)
	if code != 0 {
		t.Fatalf("report: exit %d: %s", code, errs)
	}
	if err := json.Unmarshal([]byte(js), v); err != nil {
		t.Fatal(err)
	}
}

// runHere runs the command line in-process.
func runHere(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	var out, errb strings.Builder
	e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }, today: "2026-01-01"}
	code := e.run(args)
	return out.String(), errb.String(), code
}

type svgPath struct {
	dashes       string // stroke-dasharray, "" for a solid line
	pts          [][2]float64
	arcs         [][2]float64 // the end points of A commands (a glyph's circle)
	stroke, fill string
}

type svgText struct {
	x, y float64 // in the drawing's own coordinates (y up)
	s    string
}

type svgDoc struct {
	paths []svgPath
	texts []svgText
}

var (
	styleRe = regexp.MustCompile(`(fill|stroke):(#[0-9A-F]{6}|none)`)
	numRe   = regexp.MustCompile(`-?[0-9.]+(e-?[0-9]+)?`)
)

// parseSVG reads the SVG as XML: every path's vertices (the back end writes
// M and L commands with absolute coordinates, and Z) and every text.
func parseSVG(t *testing.T, b []byte) svgDoc {
	t.Helper()
	if !bytes.Contains(b[:min(len(b), 200)], []byte(picture.Marker)) {
		t.Fatalf("no marker comment at the top of the SVG")
	}
	var doc svgDoc
	d := xml.NewDecoder(bytes.NewReader(b))
	for {
		tok, err := d.Token()
		if err != nil {
			if err.Error() == "EOF" {
				break
			}
			t.Fatalf("SVG is not XML: %v", err)
		}
		se, ok := tok.(xml.StartElement)
		if !ok {
			continue
		}
		attr := map[string]string{}
		for _, a := range se.Attr {
			attr[a.Name.Local] = a.Value
		}
		switch se.Name.Local {
		case "path":
			p := svgPath{}
			for _, m := range styleRe.FindAllStringSubmatch(attr["style"], -1) {
				if m[1] == "fill" {
					p.fill = m[2]
				} else {
					p.stroke = m[2]
				}
			}
			if m := regexp.MustCompile(`stroke-dasharray:([0-9.,]+)`).FindStringSubmatch(attr["style"]); m != nil {
				p.dashes = m[1]
			}
			for _, cmd := range regexp.MustCompile(`[ML][^MLZA]*`).FindAllString(attr["d"], -1) {
				n := numRe.FindAllString(cmd, -1)
				if len(n) != 2 {
					continue
				}
				x, _ := strconv.ParseFloat(n[0], 64)
				y, _ := strconv.ParseFloat(n[1], 64)
				p.pts = append(p.pts, [2]float64{x, y})
			}
			for _, cmd := range regexp.MustCompile(`A[^MLZA]*`).FindAllString(attr["d"], -1) {
				n := numRe.FindAllString(cmd, -1)
				if len(n) != 7 {
					continue
				}
				x, _ := strconv.ParseFloat(n[5], 64)
				y, _ := strconv.ParseFloat(n[6], 64)
				p.arcs = append(p.arcs, [2]float64{x, y})
			}
			doc.paths = append(doc.paths, p)
		case "text":
			var s string
			if err := d.DecodeElement(&s, &se); err != nil {
				t.Fatal(err)
			}
			x, _ := strconv.ParseFloat(attr["x"], 64)
			y, _ := strconv.ParseFloat(attr["y"], 64)
			doc.texts = append(doc.texts, svgText{x, -y, strings.TrimSpace(s)}) // text is flipped back: y is negated
		}
	}
	return doc
}

// lines returns the straight two-point strokes of colour c: vertical ones
// as (x, y0, y1) and horizontal ones as (y, x0, x1).
func (d svgDoc) lines(c string) (vert, horiz [][3]float64) {
	for _, p := range d.paths {
		if p.stroke != c || len(p.pts) != 2 {
			continue
		}
		a, b := p.pts[0], p.pts[1]
		switch {
		case a[0] == b[0]:
			vert = append(vert, [3]float64{a[0], math.Min(a[1], b[1]), math.Max(a[1], b[1])})
		case a[1] == b[1]:
			horiz = append(horiz, [3]float64{a[1], math.Min(a[0], b[0]), math.Max(a[0], b[0])})
		}
	}
	return vert, horiz
}

// fit is the least-squares line v = a + b·u.
func fit(t *testing.T, u, v []float64) (a, b float64) {
	t.Helper()
	if len(u) < 2 || len(u) != len(v) {
		t.Fatalf("cannot fit an axis to %d ticks and %d grid lines", len(u), len(v))
	}
	var su, sv, suu, suv float64
	for i := range u {
		su, sv, suu, suv = su+u[i], sv+v[i], suu+u[i]*u[i], suv+u[i]*v[i]
	}
	n := float64(len(u))
	b = (n*suv - su*sv) / (n*suu - su*su)
	a = (sv - b*su) / n
	for i := range u {
		if math.Abs(a+b*u[i]-v[i]) > 0.05 {
			t.Fatalf("tick %g at %g is off the axis line (%g)", u[i], v[i], a+b*u[i])
		}
	}
	return a, b
}

var unitScale = map[string]float64{"Hz": 1, "kHz": 1e3, "MHz": 1e6, "GHz": 1e9}

type sweepJSON struct {
	Stability struct {
		MuMin   float64 `json:"mu_min"`
		MuMinHz float64 `json:"mu_min_hz"`
	} `json:"stability"`
	Band []struct {
		Frequency float64 `json:"frequency"`
	} `json:"band"`
	Sweep []struct {
		Frequency float64  `json:"frequency"`
		GainDB    *float64 `json:"gain_db"`
		VoltageDB *float64 `json:"voltage_gain_db"`
		Return    float64  `json:"return_loss_db"`
	} `json:"sweep"`
}

// TestResponseMapsBack: the response picture's transducer-gain, voltage-gain
// and return-loss curves, read back through the axes drawn beside them, are
// report --format json's swept numbers to 0.5 % at ten frequencies, and the
// band's shading spans the band's edges.
func TestResponseMapsBack(t *testing.T) {
	circ, _ := filepath.Abs("../../testdata/circuits/two-stage-40m.toml")
	dir := plotInto(t, circ, "nominal")
	responseMatches(t, filepath.Join(dir, "two-stage-40m.response.svg"), circ, "nominal")
}

// TestResponseOnePort: a circuit with only its in port shows the input
// return loss alone, read back as TestResponseMapsBack reads it.
func TestResponseOnePort(t *testing.T) {
	dir := t.TempDir()
	text := readText(t, "../../testdata/circuits/preamp-30m.toml")
	one := strings.Replace(text, "[ports.out]\nnet = \"rf_out\"\ndirection = \"out\"\nimpedance = \"50\"\n", "", 1)
	if one == text {
		t.Fatal("the example's out port is not where the test expects it")
	}
	write(t, dir, "one.toml", one)
	circ := filepath.Join(dir, "one.toml")
	responseMatches(t, filepath.Join(plotInto(t, circ, "nominal"), "one.response.svg"), circ, "nominal")
}

// TestReadmePicture: the README's picture is the response of its example
// as the code computes it now (regenerate it with
// `go run ./cmd/headroom plot --corners worst -o docs testdata/circuits/preamp-30m.toml`
// and delete the other two files).
func TestReadmePicture(t *testing.T) {
	if !strings.Contains(readText(t, "../../README.md"), "](docs/preamp-30m.response.svg)") {
		t.Fatal("README does not show docs/preamp-30m.response.svg")
	}
	circ, _ := filepath.Abs("../../testdata/circuits/preamp-30m.toml")
	responseMatches(t, "../../docs/preamp-30m.response.svg", circ, "worst")
}

// responseMatches reads the response picture at svg back through its axes
// and compares it with report --format json on circ.
func responseMatches(t *testing.T, svg, circ, corners string) {
	t.Helper()
	var rep sweepJSON
	reportJSON(t, circ, corners, &rep)
	doc := readSVG(t, svg)
	ax := responseAxes(t, doc)
	freqOf, dbOf := ax.freqOf, ax.dbOf

	curve := func(c string) [][2]float64 {
		var best [][2]float64
		for _, p := range doc.paths {
			if p.stroke == c && len(p.pts) > len(best) {
				best = p.pts
			}
		}
		return best
	}
	// Greyscale: the three curves differ in dash pattern, not only colour.
	dashes := map[string]string{}
	for _, p := range doc.paths {
		for _, c := range []color.RGBA{picture.GainColour, picture.VoltageColour, picture.ReturnColour} {
			if p.stroke == picture.Hex(c) && len(p.pts) > 10 {
				dashes[p.stroke] = p.dashes
			}
		}
	}
	patterns := map[string]bool{}
	for _, d := range dashes {
		patterns[d] = true
	}
	twoPort := rep.Stability.MuMinHz > 0
	if len(dashes) != len(patterns) || twoPort && len(dashes) != 3 {
		t.Errorf("the response curves' dash patterns are not all different: %v", dashes)
	}
	// The least μ named in the legend is report's.
	least := regexp.MustCompile(`^least μ ([0-9.]+) at ([0-9.]+) (Hz|kHz|MHz|GHz)$`)
	named := false
	for _, tx := range doc.texts {
		if m := least.FindStringSubmatch(tx.s); m != nil {
			named = true
			mu, _ := strconv.ParseFloat(m[1], 64)
			f, _ := strconv.ParseFloat(m[2], 64)
			f *= unitScale[m[3]]
			if math.Abs(mu-rep.Stability.MuMin) > 0.005*math.Abs(rep.Stability.MuMin)+0.005 || math.Abs(f/rep.Stability.MuMinHz-1) > 0.005 {
				t.Errorf("legend %q, report's least μ %g at %g Hz", tx.s, rep.Stability.MuMin, rep.Stability.MuMinHz)
			}
		}
	}
	if named != twoPort {
		t.Errorf("least μ marked %v, two-port %v", named, twoPort)
	}
	n := len(rep.Sweep)
	for _, s := range []struct {
		name   string
		colour string
		value  func(i int) (float64, bool)
	}{
		{"transducer gain", picture.Hex(picture.GainColour), func(i int) (float64, bool) {
			g := rep.Sweep[i].GainDB
			return deref(g), g != nil
		}},
		{"voltage gain", picture.Hex(picture.VoltageColour), func(i int) (float64, bool) {
			g := rep.Sweep[i].VoltageDB
			return deref(g), g != nil
		}},
		{"input return loss", picture.Hex(picture.ReturnColour), func(i int) (float64, bool) { return rep.Sweep[i].Return, true }},
	} {
		pts := curve(s.colour)
		if _, ok := s.value(0); !ok && !twoPort {
			if len(pts) > 0 {
				t.Errorf("%s drawn for a one-port", s.name)
			}
			continue
		}
		if len(pts) != n {
			t.Fatalf("%s: %d points plotted, the sweep has %d", s.name, len(pts), n)
		}
		for k := range 10 {
			i := k * (n - 1) / 9
			want, ok := s.value(i)
			if !ok {
				t.Fatalf("%s missing at %g Hz", s.name, rep.Sweep[i].Frequency)
			}
			// The plotted vertex nearest the frequency, read back.
			j := 0
			for m := range pts {
				if math.Abs(freqOf(pts[m][0])/rep.Sweep[i].Frequency-1) < math.Abs(freqOf(pts[j][0])/rep.Sweep[i].Frequency-1) {
					j = m
				}
			}
			f, db := freqOf(pts[j][0]), dbOf(pts[j][1])
			if math.Abs(f/rep.Sweep[i].Frequency-1) > 0.005 {
				t.Errorf("%s: plotted frequency %g, swept %g", s.name, f, rep.Sweep[i].Frequency)
			}
			if math.Abs(db-want) > 0.005*math.Max(math.Abs(want), 1) {
				t.Errorf("%s at %g Hz: plotted %.4g dB, swept %.4g dB", s.name, rep.Sweep[i].Frequency, db, want)
			}
		}
	}
	bandShaded(t, doc, ax, rep.Band[0].Frequency, rep.Band[len(rep.Band)-1].Frequency, rep.Sweep[n-1].Frequency)
}

// bandShaded checks that the band's filled polygon in the upper panel
// spans b0 to b1 (polygons reaching past fmax are the legend's swatch).
func bandShaded(t *testing.T, doc svgDoc, ax axes, b0, b1, fmax float64) {
	t.Helper()
	for _, p := range doc.paths {
		if p.fill != picture.Hex(picture.BandColour) || len(p.pts) < 4 || p.pts[0][1] < ax.y0-1 {
			continue
		}
		xs := []float64{}
		for _, q := range p.pts {
			xs = append(xs, q[0])
		}
		lo, hi := ax.freqOf(slices.Min(xs)), ax.freqOf(slices.Max(xs))
		if p.pts[0][1] > ax.y1+1 || hi > fmax*1.001 {
			continue // the legend's swatch
		}
		if math.Abs(lo/b0-1) > 0.005 || math.Abs(hi/b1-1) > 0.005 {
			t.Errorf("band shading spans %g to %g Hz, the band is %g to %g Hz", lo, hi, b0, b1)
		}
		return
	}
	t.Error("no band shading in the upper panel")
}

// axes is the upper response panel's transform, recovered from the
// picture: the grid lines are drawn at the labelled ticks.
type axes struct {
	freqOf, dbOf func(float64) float64 // from the drawing's x and y
	xOf, yOf     func(float64) float64 // to them
	y0, y1       float64               // the panel's extent
}

func responseAxes(t *testing.T, doc svgDoc) axes {
	t.Helper()
	grid := picture.Hex(picture.GridColour)
	vert, horiz := doc.lines(grid)
	if len(vert) == 0 {
		t.Fatal("no vertical grid lines")
	}
	// The upper panel is the one whose vertical grid lines reach highest.
	top := vert[0]
	for _, v := range vert {
		if v[2] > top[2] {
			top = v
		}
	}
	y0, y1 := top[1], top[2]
	var gx []float64
	for _, v := range vert {
		if v[1] == y0 && v[2] == y1 {
			gx = append(gx, v[0])
		}
	}
	var gy []float64
	left := slices.Min(gx)
	for _, h := range horiz {
		if h[0] >= y0 && h[0] <= y1 {
			gy = append(gy, h[0])
		}
	}
	sort.Float64s(gx)
	sort.Float64s(gy)
	// Tick labels: frequencies below the upper panel, dB left of it.
	fRe := regexp.MustCompile(`^([0-9.]+) (Hz|kHz|MHz|GHz)$`)
	var fv, dbv []float64
	for _, tx := range doc.texts {
		if m := fRe.FindStringSubmatch(tx.s); m != nil && tx.y < y0 && tx.y > y0-30 {
			v, _ := strconv.ParseFloat(m[1], 64)
			fv = append(fv, math.Log10(v*unitScale[m[2]]))
		}
		if v, err := strconv.ParseFloat(tx.s, 64); err == nil && tx.x < left && tx.y > y0-10 && tx.y < y1+10 {
			dbv = append(dbv, v)
		}
	}
	sort.Float64s(fv)
	sort.Float64s(dbv)
	ax, bx := fit(t, fv, gx)
	ay, by := fit(t, dbv, gy)
	return axes{
		freqOf: func(x float64) float64 { return math.Pow(10, (x-ax)/bx) },
		dbOf:   func(y float64) float64 { return (y - ay) / by },
		xOf:    func(f float64) float64 { return ax + bx*math.Log10(f) },
		yOf:    func(db float64) float64 { return ay + by*db },
		y0:     y0, y1: y1,
	}

}

func deref(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// TestMarginsListEveryItem: every item the rules judge (engine.Evaluate on
// the nominal analysis, as the engine documents it) is a row of the margin
// chart exactly once, under its rule's heading, and the chart has no other
// row.
func TestMarginsListEveryItem(t *testing.T) {
	for _, run := range [][2]string{{"two-stage-40m.toml", "nominal"}, {"pnp-160m.toml", "nominal"}, {"two-stage-40m.toml", "worst"}} {
		name, mode := run[0], run[1]
		dir := t.TempDir()
		text := readText(t, "../../testdata/circuits/"+name)
		if name == "two-stage-40m.toml" { // a waiver of a failing item: its row is marked
			text += "\n[[waivers]]\nrule = \"bias.divider-stiffness\"\npart = \"R4\"\nreason = \"test: the divider was measured stiff enough\"\n"
		}
		write(t, dir, name, text)
		circ := filepath.Join(dir, name)
		if out, errs, code := runHere(t, "plot", "--corners", mode, "-o", dir, circ); code != 0 {
			t.Fatalf("plot: exit %d\n%s%s", code, out, errs)
		}
		b, err := os.ReadFile(filepath.Join(dir, strings.TrimSuffix(name, ".toml")+".margins.svg"))
		if err != nil {
			t.Fatal(err)
		}
		doc := parseSVG(t, b)

		// What the rules judge, from the engine directly.
		set, err := (&ruleset.Loader{Rules: rules.All(), ReadFile: os.ReadFile}).Load("default")
		if err != nil {
			t.Fatal(err)
		}
		c, err := circuit.Load(circ, circuit.Options{Libraries: set.Libraries})
		if err != nil {
			t.Fatal(err)
		}
		cfg := set.Config(rules.All())
		topo := topology.Analyze(c)
		nominal := analysis.Run(c, topo)
		fs, err := engine.Evaluate(nominal, nil, cfg)
		if err != nil {
			t.Fatal(err)
		}
		if mode == "worst" { // and the items only the worst-case search judges
			wfs, err := corners.Worst(c, topo, nominal, cfg)
			if err != nil {
				t.Fatal(err)
			}
			seen := map[engine.Key]bool{}
			for i := range fs {
				seen[engine.KeyOf(&fs[i])] = true
			}
			for _, f := range wfs {
				if !seen[engine.KeyOf(&f)] {
					fs = append(fs, f)
				}
			}
		}
		want := map[string]int{}
		ruleIDs := map[string]bool{}
		for _, f := range fs {
			label := f.Part
			if label == "" {
				label = "circuit"
			}
			if f.Bound != "" {
				label += " " + f.Bound
			}
			want[f.Rule+" / "+label]++
			ruleIDs[f.Rule] = true
		}

		// The rows: the texts left of the plot, top to bottom.
		vert, _ := doc.lines(picture.Hex(picture.GridColour))
		left, y0, y1 := math.Inf(1), math.Inf(1), math.Inf(-1)
		for _, v := range vert {
			left, y0, y1 = math.Min(left, v[0]), math.Min(y0, v[1]), math.Max(y1, v[2])
		}
		var rows []svgText
		for _, tx := range doc.texts {
			if tx.x < left && tx.y > y0 && tx.y < y1 {
				rows = append(rows, tx)
			}
		}
		sort.Slice(rows, func(i, j int) bool { return rows[i].y > rows[j].y })
		// Which failing items a waiver covers, from check.
		cj, _, _ := runHere(t, "check", "--corners", mode, "--format", "json", circ)
		var chk struct {
			Findings []struct {
				Rule, Part string
				Waived     bool
			}
		}
		if err := json.Unmarshal([]byte(cj), &chk); err != nil {
			t.Fatal(err)
		}
		wantWaived := map[string]bool{}
		for _, f := range chk.Findings {
			if f.Waived {
				wantWaived[f.Rule+" / "+f.Part] = true
			}
		}
		if name == "two-stage-40m.toml" && !wantWaived["bias.divider-stiffness / R4"] {
			t.Fatalf("the test's waiver covers nothing: %s", cj)
		}
		gotWaived := map[string]bool{}

		got := map[string]int{}
		rule := ""
		for _, r := range rows {
			if ruleIDs[r.s] {
				if rule == r.s {
					t.Errorf("%s: heading %s twice", name, r.s)
				}
				rule = r.s
				continue
			}
			if rule == "" {
				t.Fatalf("%s: row %q before any rule heading", name, r.s)
			}
			label, waived := strings.CutSuffix(r.s, " (waived)")
			got[rule+" / "+label]++
			if waived {
				part, _, _ := strings.Cut(label, " ")
				gotWaived[rule+" / "+part] = true
			}
		}
		if !maps.Equal(gotWaived, wantWaived) {
			t.Errorf("%s: rows marked waived %v, check's waived findings %v", name, gotWaived, wantWaived)
		}
		for k, n := range want {
			if got[k] != n {
				t.Errorf("%s: %s judged %d times, on the chart %d times", name, k, n, got[k])
			}
		}
		for k, n := range got {
			if want[k] == 0 {
				t.Errorf("%s: chart row %s (%d) that no rule judged", name, k, n)
			}
		}
		if len(want) == 0 {
			t.Fatalf("%s: no judged items", name)
		}
	}
}

// TestPlotKeepsOtherFiles: plot never overwrites a file it did not write
// unless --force, and replaces its own.
func TestPlotKeepsOtherFiles(t *testing.T) {
	circ, _ := filepath.Abs("../../testdata/circuits/pnp-160m.toml")
	dir := t.TempDir()
	foreign := filepath.Join(dir, "pnp-160m.margins.svg")
	write(t, dir, "pnp-160m.margins.svg", "<svg>someone's drawing</svg>\n")
	if _, errs, code := runHere(t, "plot", "--corners", "nominal", "-o", dir, circ); code != 2 || !strings.Contains(errs, "--force") {
		t.Fatalf("plot over a foreign file: exit %d, %q", code, errs)
	}
	if b, _ := os.ReadFile(foreign); string(b) != "<svg>someone's drawing</svg>\n" {
		t.Fatal("the foreign file was changed")
	}
	if _, err := os.Stat(filepath.Join(dir, "pnp-160m.response.svg")); err == nil {
		t.Fatal("a picture was written although the run stopped")
	}
	if _, errs, code := runHere(t, "plot", "--corners", "nominal", "--force", "-o", dir, circ); code != 0 {
		t.Fatalf("plot --force: exit %d: %s", code, errs)
	}
	if _, errs, code := runHere(t, "plot", "--corners", "nominal", "-o", dir, circ); code != 0 {
		t.Fatalf("plot over its own files: exit %d: %s", code, errs)
	}
}

// TestReportEmbedsPictures: Markdown and HTML carry the three pictures as
// data: URIs that decode to headroom's SVG; --pictures none leaves them out.
func TestReportEmbedsPictures(t *testing.T) {
	circ, _ := filepath.Abs("../../testdata/circuits/two-stage-40m.toml")
	uri := regexp.MustCompile(`data:image/svg\+xml;base64,([A-Za-z0-9+/=]+)`)
	for _, format := range []string{"markdown", "html"} {
		out, errs, code := runHere(t, "report", "--corners", "nominal", "--format", format, circ)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", format, code, errs)
		}
		ms := uri.FindAllStringSubmatch(out, -1)
		if len(ms) != 3 {
			t.Fatalf("%s: %d embedded pictures, want 3", format, len(ms))
		}
		for _, m := range ms {
			b, err := base64.StdEncoding.DecodeString(m[1])
			if err != nil {
				t.Fatal(err)
			}
			parseSVG(t, b)
		}
		if strings.Contains(out, "http://") && format == "html" && strings.Count(out, "http://") != strings.Count(out, "http://www.w3.org") {
			t.Errorf("html refers to the network")
		}
		out, _, _ = runHere(t, "report", "--corners", "nominal", "--format", format, "--pictures", "none", circ)
		if strings.Contains(out, "data:image") || strings.Contains(out, "Pictures") {
			t.Errorf("%s --pictures none still shows pictures", format)
		}
	}
	// Markdown with a folder: the files are written and linked.
	dir := t.TempDir()
	out, errs, code := runHere(t, "report", "--corners", "nominal", "--format", "markdown", "--pictures", dir, circ)
	if code != 0 {
		t.Fatalf("markdown --pictures %s: exit %d: %s", dir, code, errs)
	}
	for _, kind := range []string{"response", "margins", "bias"} {
		f := filepath.Join(dir, "two-stage-40m."+kind+".svg")
		if !strings.Contains(out, "](<"+f+">)") {
			t.Errorf("markdown does not link %s", f)
		}
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		parseSVG(t, b)
	}
	if _, _, code := runHere(t, "report", "--format", "html", "--pictures", dir, circ); code != 2 {
		t.Errorf("html with a pictures folder: exit %d, want 2", code)
	}
}

// TestHTMLInBrowser renders the HTML report in headless Chromium, when one
// is installed, and checks the screenshot has the size asked for and is
// not blank.
func TestHTMLInBrowser(t *testing.T) {
	var browser string
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			browser = p
			break
		}
	}
	if browser == "" {
		t.Skip("no chromium on PATH")
	}
	circ, _ := filepath.Abs("../../testdata/circuits/two-stage-40m.toml")
	out, errs, code := runHere(t, "report", "--corners", "nominal", "--format", "html", circ)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	dir := t.TempDir()
	page := filepath.Join(dir, "report.html")
	shot := filepath.Join(dir, "shot.png")
	write(t, dir, "report.html", out)
	// The browser's profile lives outside the test's folder: a helper
	// process still closing must not make the folder's clean-up fail.
	profile, err := os.MkdirTemp("", "headroom-chromium")
	if err != nil {
		t.Fatal(err)
	}
	defer os.RemoveAll(profile)
	cmd := exec.Command(browser, "--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars",
		"--user-data-dir="+profile, "--window-size=900,3000", "--screenshot="+shot, "file://"+page)
	done := make(chan error, 1)
	var so bytes.Buffer
	cmd.Stdout, cmd.Stderr = &so, &so
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { done <- cmd.Wait() }()
	select {
	case err := <-done:
		if err != nil {
			t.Fatalf("chromium: %v\n%s", err, so.String())
		}
	case <-time.After(90 * time.Second):
		cmd.Process.Kill()
		t.Fatal("chromium took more than 90 s")
	}
	f, err := os.Open(shot)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	if b := img.Bounds(); b.Dx() != 900 || b.Dy() != 3000 {
		t.Fatalf("screenshot %v, want 900×3000", b)
	}
	// Not blank: a fair share of the pixels is not white, and the pictures'
	// colours are there (the transducer gain's blue among them).
	dark, blue := 0, 0
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bb, _ := img.At(x, y).RGBA()
			if r < 0xe000 || g < 0xe000 || bb < 0xe000 {
				dark++
			}
			if bb > r+0x4000 && bb > g+0x2000 {
				blue++
			}
		}
	}
	total := b.Dx() * b.Dy() / 4
	if dark < total/50 {
		t.Errorf("screenshot nearly blank: %d of %d sampled pixels not white", dark, total)
	}
	if blue == 0 {
		t.Error("no blue in the screenshot: the response picture did not render")
	}
}

// TestResponseSpread: with worst-case corners each curve's translucent band
// reaches, at the band's three points, the ranges report --format json
// gives there (report finds them with the band analysis, the picture with
// the sweep: two routes to the same figures).
func TestResponseSpread(t *testing.T) {
	circ, _ := filepath.Abs("../../testdata/circuits/two-stage-40m.toml")
	dir := plotInto(t, circ, "worst")
	var rep struct {
		Band bandRanges `json:"band"`
	}
	reportJSON(t, circ, "worst", &rep)
	doc := readSVG(t, filepath.Join(dir, "two-stage-40m.response.svg"))
	ax := responseAxes(t, doc)
	for _, s := range []struct {
		key    string
		colour color.RGBA
	}{{"gain_db", picture.GainColour}, {"return_loss_db", picture.ReturnColour}} {
		for _, bp := range rep.Band {
			want, ok := bp.Ranges[s.key]
			if !ok {
				t.Fatalf("report gives no %s range at %g Hz", s.key, bp.Frequency)
			}
			spreadIs(t, doc, ax, s.key, s.colour, bp.Frequency, want)
		}
	}
}

// bandRanges is report --format json's band points with their worst-case
// ranges.
type bandRanges []struct {
	Frequency float64               `json:"frequency"`
	Ranges    map[string][2]float64 `json:"ranges"`
}

// spreadIs checks that the translucent range of the curve in colour c
// spans want (dB, as drawn) at frequency f.
func spreadIs(t *testing.T, doc svgDoc, ax axes, key string, c color.RGBA, f float64, want [2]float64) {
	t.Helper()
	near := func(hex string) bool {
		v, err := strconv.ParseUint(strings.TrimPrefix(hex, "#"), 16, 32)
		if err != nil {
			return false
		}
		d := func(a uint64, b uint8) bool { return math.Abs(float64(a)-float64(b)) <= 3 }
		return d(v>>16&0xff, c.R) && d(v>>8&0xff, c.G) && d(v&0xff, c.B)
	}
	var poly [][2]float64
	for _, p := range doc.paths {
		if p.stroke == "" && near(p.fill) && len(p.pts) > len(poly) {
			poly = p.pts
		}
	}
	if len(poly) == 0 {
		t.Fatalf("%s: no spread drawn", key)
	}
	x := ax.xOf(f)
	var ys []float64
	for _, q := range poly {
		if math.Abs(q[0]-x) < 0.02 {
			ys = append(ys, ax.dbOf(q[1]))
		}
	}
	if len(ys) < 2 {
		t.Fatalf("%s: spread has %d vertices at %g Hz", key, len(ys), f)
	}
	lo, hi := slices.Min(ys), slices.Max(ys)
	tol := func(v float64) float64 { return 0.005*math.Max(math.Abs(v), 1) + 0.02 }
	if math.Abs(lo-want[0]) > tol(want[0]) || math.Abs(hi-want[1]) > tol(want[1]) {
		t.Errorf("%s at %g Hz: spread drawn %.4g to %.4g dB, report's range %.4g to %.4g dB", key, f, lo, hi, want[0], want[1])
	}
}

// BenchmarkReportPictures measures what the pictures add to an HTML report
// of the README's example with worst-case corners: compare the two
// sub-benchmarks' times as a ratio (docs/pictures.md quotes it).
//
//	go test -run '^$' -bench ReportPictures ./cmd/headroom
func BenchmarkReportPictures(b *testing.B) {
	circ, _ := filepath.Abs("../../testdata/circuits/preamp-30m.toml")
	for _, pics := range []string{"none", "inline"} {
		b.Run(pics, func(b *testing.B) {
			for b.Loop() {
				var out, errb strings.Builder
				e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }}
				if code := e.run([]string{"report", "--corners", "worst", "--format", "html", "--pictures", pics, circ}); code > 1 {
					b.Fatalf("exit %d: %s", code, errb.String())
				}
			}
		})
	}
}

// TestPlotEscapes: control characters in a circuit's name reach the
// pictures and the HTML page escaped (XML forbids most of them, and a
// review page must not carry terminal escapes).
func TestPlotEscapes(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, "board.toml", "[circuit]\nname = \"\\u001b[31mload\\u0007\\u202e\"\nband = [\"28MHz\", \"29.7MHz\"]\n\n"+
		"[supplies.vcc]\nvolts = \"9V\"\n\n[parts.R1]\nkind = \"resistor\"\nvalue = \"1k\"\nnets = [\"vcc\", \"gnd\"]\n")
	circ := filepath.Join(dir, "board.toml")
	runHere(t, "plot", "--corners", "nominal", circ)
	b, err := os.ReadFile(filepath.Join(dir, "board.margins.svg"))
	if err != nil {
		t.Fatal(err)
	}
	doc := parseSVG(t, b) // fails on a control character
	found := false
	for _, tx := range doc.texts {
		found = found || strings.Contains(tx.s, `\x1b[31mload\x07\u202e`)
	}
	if !found {
		t.Errorf("the escaped name is not in the picture's title")
	}
	page, _, _ := runHere(t, "report", "--corners", "nominal", "--format", "html", circ)
	if strings.ContainsAny(page, "\x1b\x07\u202e") {
		t.Error("the HTML page carries a raw control character")
	}
}

// TestBiasPicture: each transistor's panel, read back through its log
// axes, puts the dot at report's nominal VCE and IC and the limits where
// the 2N3904's datasheet puts them (ON Semiconductor 2N3904/D: VCEO 40 V,
// IC 200 mA continuous, PD 625 mW at 25 °C derated 5.0 mW/°C above 25 °C,
// so 550 mW at the 40 °C top of the circuit's ambient range).
func TestBiasPicture(t *testing.T) {
	circ, _ := filepath.Abs("../../testdata/circuits/two-stage-40m.toml")
	dir := plotInto(t, circ, "nominal")
	var rep struct {
		Parts map[string]map[string]any `json:"parts"`
	}
	reportJSON(t, circ, "nominal", &rep)
	doc := readSVG(t, filepath.Join(dir, "two-stage-40m.bias.svg"))
	vert, horiz := doc.lines(picture.Hex(picture.GridColour))
	panels := map[[2]float64][]float64{} // a panel's y extent → its vertical grid lines
	for _, v := range vert {
		k := [2]float64{v[1], v[2]}
		panels[k] = append(panels[k], v[0])
	}
	var keys [][2]float64
	for k := range panels {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(i, j int) bool { return keys[i][1] > keys[j][1] }) // top panel first
	if len(keys) != 2 {
		t.Fatalf("%d panels, want 2 (Q1, Q2)", len(keys))
	}
	lbl := regexp.MustCompile(`^([0-9.]+) (µ|m|)(V|A)$`)
	scale := map[string]float64{"µ": 1e-6, "m": 1e-3, "": 1}
	black := "#000000"
	bv, bh := doc.lines(black)
	for n, ref := range []string{"Q1", "Q2"} {
		y0, y1 := keys[n][0], keys[n][1]
		gx := panels[keys[n]]
		sort.Float64s(gx)
		x0, x1 := gx[0], gx[len(gx)-1]
		var gy []float64
		for _, h := range horiz {
			if h[0] >= y0 && h[0] <= y1 && h[1] >= x0-1 {
				gy = append(gy, h[0])
			}
		}
		sort.Float64s(gy)
		var vs, is []float64
		for _, tx := range doc.texts {
			m := lbl.FindStringSubmatch(tx.s)
			if m == nil {
				continue
			}
			v, _ := strconv.ParseFloat(m[1], 64)
			v = math.Log10(v * scale[m[2]])
			switch {
			case m[3] == "V" && tx.y < y0 && tx.y > y0-30:
				vs = append(vs, v)
			case m[3] == "A" && tx.x < x0 && tx.y > y0-10 && tx.y < y1+10:
				is = append(is, v)
			}
		}
		sort.Float64s(vs)
		sort.Float64s(is)
		ax, bx := fit(t, vs, gx)
		ay, by := fit(t, is, gy)
		volts := func(x float64) float64 { return math.Pow(10, (x-ax)/bx) }
		amps := func(y float64) float64 { return math.Pow(10, (y-ay)/by) }
		within := func(what string, got, want float64) {
			if math.Abs(got/want-1) > 0.005 {
				t.Errorf("%s %s: drawn at %.4g, want %.4g", ref, what, got, want)
			}
		}
		// The dot: a filled circle inside the panel.
		dots := 0
		for _, p := range doc.paths {
			if p.fill != picture.Hex(picture.GainColour) || len(p.arcs) == 0 || len(p.pts) == 0 {
				continue
			}
			cx, cy := (p.pts[0][0]+p.arcs[0][0])/2, (p.pts[0][1]+p.arcs[0][1])/2
			if cx < x0 || cx > x1 || cy < y0 || cy > y1 {
				continue
			}
			dots++
			within("VCE", volts(cx), math.Abs(rep.Parts[ref]["vce"].(float64)))
			within("IC", amps(cy), math.Abs(rep.Parts[ref]["ic"].(float64)))
		}
		if dots != 1 {
			t.Errorf("%s: %d dots in its panel", ref, dots)
		}
		// ic_max and vceo: black lines across the panel.
		var icMax, vceo []float64
		for _, h := range bh {
			if h[0] > y0 && h[0] < y1 && h[1] <= x0+1 && h[2] >= x1-1 {
				icMax = append(icMax, amps(h[0]))
			}
		}
		for _, v := range bv {
			if v[0] > x0 && v[0] < x1 && v[1] <= y0+1 && v[2] >= y1-1 {
				vceo = append(vceo, volts(v[0]))
			}
		}
		if len(icMax) != 1 || len(vceo) != 1 {
			t.Fatalf("%s: %d ic_max and %d vceo lines", ref, len(icMax), len(vceo))
		}
		within("ic_max", icMax[0], 0.200)
		within("vceo", vceo[0], 40)
		// The pd line: every vertex dissipates 625 mW − 5.0 mW/°C × 15 °C.
		pd := 0.625 - 0.005*(40-25)
		found := false
		for _, p := range doc.paths {
			if p.stroke != black || len(p.pts) < 10 || p.pts[0][1] < y0-1 || p.pts[0][1] > y1+1 {
				continue
			}
			found = true
			for _, q := range p.pts {
				if q[0] > x0+1 && q[0] < x1-1 && q[1] > y0+1 && q[1] < y1-1 { // the clipped ends lie on the frame
					within("VCE·IC on the pd line", volts(q[0])*amps(q[1]), pd)
				}
			}
		}
		if !found {
			t.Errorf("%s: no pd line", ref)
		}
	}
}
