package main

import (
	"encoding/base64"
	"math"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"headroom/checker/picture"
)

// TestFilterResponsePicture: a passive filter's response picture, read
// back through its drawn axes, is report --format json's filter figures:
// the transducer gain (−insertion loss) and −(input return loss) at ten of
// the shape sweep's frequencies to 0.5 %, the curve through each rejection
// frequency at report's loss there, each rejection limit a bar centred on
// its frequency at −min_db, the band shaded, one panel and no μ, and with
// worst-case corners the ranges report gives at the band's three points.
// The filter's figures themselves are checked against Zverev's tables and
// Bowick's examples in checker/filter; this test checks the drawing.
func TestFilterResponsePicture(t *testing.T) {
	circ, _ := filepath.Abs("../../testdata/circuits/bpf-40m.toml")
	dir := plotInto(t, circ, "worst")
	var rep struct {
		Band   bandRanges `json:"band"`
		Filter struct {
			Sweep []struct {
				Frequency float64 `json:"frequency"`
				IL        float64 `json:"insertion_loss_db"`
				RL        float64 `json:"return_loss_db"`
			} `json:"sweep"`
			Rejects []struct {
				Frequency float64 `json:"frequency"`
				IL        float64 `json:"insertion_loss_db"`
				MinDB     float64 `json:"min_db"`
			} `json:"rejects"`
		} `json:"filter"`
	}
	reportJSON(t, circ, "worst", &rep)
	if len(rep.Filter.Sweep) < 100 || len(rep.Filter.Rejects) != 2 || len(rep.Band) != 3 {
		t.Fatalf("report's filter figures are not there: %d sweep points, %d rejects, %d band points",
			len(rep.Filter.Sweep), len(rep.Filter.Rejects), len(rep.Band))
	}
	doc := readSVG(t, filepath.Join(dir, "bpf-40m.response.svg"))
	ax := responseAxes(t, doc)

	// One panel, no μ: every vertical grid line spans the same height.
	vert, _ := doc.lines(picture.Hex(picture.GridColour))
	for _, v := range vert {
		if v[1] != ax.y0 || v[2] != ax.y1 {
			t.Fatalf("a second panel (grid line from %g to %g)", v[1], v[2])
		}
	}
	said := false
	for _, tx := range doc.texts {
		said = said || strings.Contains(tx.s, "no μ panel")
		if strings.HasPrefix(tx.s, "least μ") || tx.s == "μ" {
			t.Errorf("a passive filter's picture shows μ: %q", tx.s)
		}
	}
	if !said {
		t.Error("the picture does not say why it has no μ panel")
	}

	longest := func(c string) [][2]float64 {
		var best [][2]float64
		for _, p := range doc.paths {
			if p.stroke == c && len(p.pts) > len(best) {
				best = p.pts
			}
		}
		return best
	}
	gain, ret := longest(picture.Hex(picture.GainColour)), longest(picture.Hex(picture.ReturnColour))
	if len(gain) < 10 || len(ret) != len(gain) {
		t.Fatalf("curves of %d and %d points", len(gain), len(ret))
	}
	fLo, fHi := ax.freqOf(gain[0][0]), ax.freqOf(gain[len(gain)-1][0])
	// at is the drawn value of curve pts at its vertex nearest f.
	at := func(name string, pts [][2]float64, f float64) float64 {
		j := 0
		for m := range pts {
			if math.Abs(math.Log(ax.freqOf(pts[m][0])/f)) < math.Abs(math.Log(ax.freqOf(pts[j][0])/f)) {
				j = m
			}
		}
		if got := ax.freqOf(pts[j][0]); math.Abs(got/f-1) > 0.005 {
			t.Errorf("%s: no point drawn at %g Hz (nearest %g Hz)", name, f, got)
		}
		return ax.dbOf(pts[j][1])
	}
	within := func(what string, got, want float64) {
		if math.Abs(got-want) > 0.005*math.Max(math.Abs(want), 1) {
			t.Errorf("%s: drawn %.4g dB, report %.4g dB", what, got, want)
		}
	}
	var inRange []int
	for i, p := range rep.Filter.Sweep {
		if p.Frequency >= fLo && p.Frequency <= fHi {
			inRange = append(inRange, i)
		}
	}
	if len(inRange) < 10 || len(gain) < len(inRange) {
		t.Fatalf("%d of report's sweep points in the drawn range %g to %g Hz, %d drawn", len(inRange), fLo, fHi, len(gain))
	}
	for k := range 10 {
		p := rep.Filter.Sweep[inRange[k*(len(inRange)-1)/9]]
		within("−insertion loss at "+hz(p.Frequency), at("gain", gain, p.Frequency), -p.IL)
		within("−return loss at "+hz(p.Frequency), at("return", ret, p.Frequency), -p.RL)
	}

	// The rejection limits: a bar each, centred on the frequency, at −min_db.
	_, horiz := doc.lines(picture.Hex(picture.RejectColour))
	var bars [][3]float64
	for _, h := range horiz {
		if h[1] < gain[len(gain)-1][0] { // the legend's swatch lies right of the panel
			bars = append(bars, h)
		}
	}
	if len(bars) != len(rep.Filter.Rejects) {
		t.Fatalf("%d rejection bars, report has %d rejection frequencies", len(bars), len(rep.Filter.Rejects))
	}
	for _, rj := range rep.Filter.Rejects {
		found := false
		for _, b := range bars {
			f := math.Sqrt(ax.freqOf(b[1]) * ax.freqOf(b[2]))
			if math.Abs(f/rj.Frequency-1) > 0.005 {
				continue
			}
			found = true
			within("rejection limit at "+hz(rj.Frequency), ax.dbOf(b[0]), -rj.MinDB)
		}
		if !found {
			t.Errorf("no rejection bar at %g Hz", rj.Frequency)
		}
		within("−insertion loss at the rejection frequency "+hz(rj.Frequency), at("gain", gain, rj.Frequency), -rj.IL)
	}

	bandShaded(t, doc, ax, rep.Band[0].Frequency, rep.Band[2].Frequency, fHi)
	// Worst case: the drawn ranges are report's, the return loss turned
	// downward as its curve is.
	for _, bp := range rep.Band {
		g, r := bp.Ranges["gain_db"], bp.Ranges["return_loss_db"]
		if g == [2]float64{} || r == [2]float64{} {
			t.Fatalf("report gives no ranges at %g Hz", bp.Frequency)
		}
		spreadIs(t, doc, ax, "gain_db", picture.GainColour, bp.Frequency, g)
		spreadIs(t, doc, ax, "return_loss_db", picture.ReturnColour, bp.Frequency, [2]float64{-r[1], -r[0]})
	}
}

func hz(f float64) string { return strconv.FormatFloat(f/1e6, 'g', 6, 64) + " MHz" }

// TestFilterReportHTML: the HTML report of a passive filter embeds the
// filter's response picture under its own caption, and shows no empty
// table (a filter has no supplies).
func TestFilterReportHTML(t *testing.T) {
	circ, _ := filepath.Abs("../../testdata/circuits/bpf-40m.toml")
	page, errs, code := runHere(t, "report", "--corners", "nominal", "--format", "html", circ)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	fig := regexp.MustCompile(`<img alt="Filter response: insertion and return loss" src="data:image/svg\+xml;base64,([A-Za-z0-9+/=]+)">`)
	m := fig.FindStringSubmatch(page)
	if m == nil {
		t.Fatal("no filter response picture in the page")
	}
	b, err := base64.StdEncoding.DecodeString(m[1])
	if err != nil {
		t.Fatal(err)
	}
	doc := parseSVG(t, b)
	if len(doc.paths) == 0 || !strings.Contains(string(b), "no μ panel") {
		t.Error("the embedded picture is not the filter's response")
	}
	for _, tb := range regexp.MustCompile(`(?s)<table>.*?</table>`).FindAllString(page, -1) {
		if !strings.Contains(tb, "<td>") {
			t.Errorf("an empty table: %s", tb)
		}
	}
}
