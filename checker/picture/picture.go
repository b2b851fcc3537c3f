// Package picture draws what a design review pins on the wall, as SVG: the
// swept response with the stability margin μ below it, every judged item's
// distance from its limit, and each transistor's operating point against
// its ratings. It only draws; gather.go turns an analysed circuit and a
// check into the plain inputs the drawings take.
//
// Drawings use gonum's plot with its SVG back end. Every series differs in
// line style or marker as well as colour, so a greyscale print still reads.
package picture

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"regexp"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Marker is the comment every drawing carries after its XML declaration:
// `headroom plot` overwrites only files that hold it.
const Marker = "<!-- drawn by headroom -->"

// The series' stroke colours, exported for tests that find a curve in the
// SVG by its stroke.
var (
	GainColour    = color.RGBA{0x1b, 0x4f, 0x9c, 0xff} // transducer gain: solid
	VoltageColour = color.RGBA{0x1a, 0x7a, 0x3a, 0xff} // voltage gain: dashed
	ReturnColour  = color.RGBA{0x7b, 0x2d, 0x8e, 0xff} // input return loss: dotted
	MuColour      = color.RGBA{0x20, 0x20, 0x20, 0xff} // μ: solid
	// BandColour fills the band's stretch of both panels.
	BandColour   = color.RGBA{0xe8, 0xe0, 0xb0, 0xff}
	GridColour   = color.RGBA{0xd8, 0xd8, 0xd8, 0xff} // grid lines, at the labelled ticks
	unstableFill = color.NRGBA{0xc0, 0x30, 0x20, 0x50}
	passColour   = color.RGBA{0x70, 0x70, 0x70, 0xff}
)

// Severity colours, darkest for the most serious so greyscale keeps the order.
var severityColours = map[string]color.RGBA{
	"error":   {0x8c, 0x10, 0x18, 0xff},
	"warning": {0xc8, 0x70, 0x00, 0xff},
	"info":    {0x9c, 0xc4, 0xe8, 0xff},
}

// SeverityColour is the fill of a failing item of severity s.
func SeverityColour(s string) color.RGBA {
	if c, ok := severityColours[s]; ok {
		return c
	}
	return passColour
}

// Hex is a colour as the SVG back end writes it ("#1B4F9C").
func Hex(c color.Color) string {
	r, g, b, _ := c.RGBA()
	return fmt.Sprintf("#%02X%02X%02X", r>>8, g>>8, b>>8)
}

// tint mixes c with white: f = 0 white, 1 c.
func tint(c color.RGBA, f float64) color.RGBA {
	m := func(x uint8) uint8 { return uint8(255 - f*(255-float64(x))) }
	return color.RGBA{m(c.R), m(c.G), m(c.B), 0xff}
}

// render draws onto a fresh SVG canvas of w × h and writes it to out with
// the Marker after the XML declaration.
func render(out io.Writer, w, h vg.Length, paint func(dc draw.Canvas)) error {
	c := vgsvg.New(w, h)
	dc := draw.New(c)
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	paint(dc)
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return err
	}
	s := buf.String()
	if nonFinite.MatchString(s) {
		return errorString("a coordinate is not a finite number")
	}
	if i := strings.Index(s, "?>"); i >= 0 {
		s = s[:i+2] + "\n" + Marker + s[i+2:]
	} else {
		s = Marker + "\n" + s
	}
	_, err := io.WriteString(out, s)
	return err
}

// nonFinite finds a NaN or infinite coordinate in a path or a text's place.
var nonFinite = regexp.MustCompile(`(d|x|y)="[^"]*(NaN|Inf)`)

// finite reports whether x is an ordinary number.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// hz writes a frequency for a tick label with an SI prefix: "10 MHz".
func hz(f float64) string { return si(f, "Hz") }

func trim(x float64) string { return strings.TrimSuffix(fmt.Sprintf("%.3g", x), ".0") }

// logTicks marks every decade (labelled by label) and its 2…9 multiples
// between lo and hi; over less than a decade and a half the 2, 3 and 5
// multiples are labelled too, so a narrow range still has two labels to
// read it by.
type logTicks struct {
	label func(float64) string
}

func (t logTicks) Ticks(lo, hi float64) []plot.Tick {
	var ts []plot.Tick
	for d := math.Pow(10, math.Floor(math.Log10(lo))); d <= hi*1.0001; d *= 10 {
		for k := 1; k < 10; k++ {
			v := d * float64(k)
			if v < lo*0.9999 || v > hi*1.0001 {
				continue
			}
			tk := plot.Tick{Value: v}
			if k == 1 || hi/lo < 30 && (k == 2 || k == 3 || k == 5) {
				tk.Label = t.label(v)
			}
			ts = append(ts, tk)
		}
	}
	return ts
}

// alignX pads two stacked canvases so their plots' data areas line up.
func alignX(a, b *plot.Plot, ca, cb draw.Canvas) (draw.Canvas, draw.Canvas) {
	da, db := a.DataCanvas(ca), b.DataCanvas(cb)
	la, lb := da.Min.X-ca.Min.X, db.Min.X-cb.Min.X
	ra, rb := ca.Max.X-da.Max.X, cb.Max.X-db.Max.X
	l, r := max(la, lb), max(ra, rb)
	return draw.Crop(ca, l-la, -(r - ra), 0, 0), draw.Crop(cb, l-lb, -(r - rb), 0, 0)
}

var errNoSweep = errorString("no sweep to draw: the circuit has no port to sweep between")

type errorString string

func (e errorString) Error() string { return string(e) }

// legendWidth is the strip right of a plot that holds its legend.
const legendWidth = 2.1 * vg.Inch

// besideLegend draws p with lg in a strip at its right, where it covers
// nothing.
func besideLegend(dc draw.Canvas, p *plot.Plot, lg plot.Legend) {
	p.Draw(draw.Crop(dc, 0, -legendWidth, 0, 0))
	legendAt(dc, lg)
}

// legendAt draws lg in the legend strip at the right of dc.
func legendAt(dc draw.Canvas, lg plot.Legend) {
	lg.Top = true
	lg.Left = true
	lg.Padding = vg.Points(3)
	lg.Draw(draw.Crop(dc, dc.Max.X-dc.Min.X-legendWidth+vg.Points(6), 0, 0, -vg.Points(24)))
}
