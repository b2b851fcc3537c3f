package picture

import (
	"image/color"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"headroom/checker/printable"
)

// Response is the swept circuit between its ports and, with worst-case
// corners, how far each curve moves over the corner box.
type Response struct {
	Title string
	Band  [2]float64 // Hz, the band's edges
	Freq  []float64  // Hz, ascending
	// Gain is the transducer gain, Voltage the voltage gain and Return the
	// input return loss, dB; Mu is Edwards–Sinsky μ, nil for a one-port.
	// NaN marks a frequency where a figure does not exist (no path).
	Gain, Voltage, Return, Mu []float64
	// SpreadFreq and Spread are the worst-case ranges ([lowest, highest]
	// over the box) at a coarser set of frequencies, keyed "gain",
	// "voltage", "return" and "mu"; nil in nominal mode.
	SpreadFreq []float64
	Spread     map[string][][2]float64
	// OutOnly says the circuit's one port is its out port: Return is that
	// port's return loss.
	OutOnly bool
	// Filter draws a passive filter as the trade draws one: the
	// transducer gain (−insertion loss) and the input return loss turned
	// downward (−RL), both with 0 dB at the top, Rejects marked at −MinDB,
	// no voltage gain and no μ panel (Mu is nil: a passive two-port cannot
	// oscillate).
	Filter  bool
	Rejects []Reject
}

// Reject is one rejection limit of a filter: at Freq the insertion loss
// must be at least MinDB.
type Reject struct{ Freq, MinDB float64 }

// RejectColour strokes the rejection limits' bars and fills their marks.
var RejectColour = color.RGBA{0xb0, 0x20, 0x20, 0xff}

// MuShown is the highest μ the stability panel shows: above it the circuit
// is comfortably stable and the detail does not matter.
const MuShown = 3.0

type series struct {
	key, name string
	ys        []float64
	colour    color.RGBA
	dashes    []vg.Length
	spread    [][2]float64 // the worst-case range, in the drawn sign
}

func (r *Response) series() []series {
	rl := "input return loss"
	if r.OutOnly {
		rl = "output return loss"
	}
	dotted := []vg.Length{vg.Points(1.5), vg.Points(2.5)}
	if r.Filter {
		return []series{
			{"gain", "−insertion loss", r.Gain, GainColour, nil, r.Spread["gain"]},
			{"return", "−input return loss", negate(r.Return), ReturnColour, dotted, negateRanges(r.Spread["return"])},
		}
	}
	return []series{
		{"gain", "transducer gain", r.Gain, GainColour, nil, r.Spread["gain"]},
		{"voltage", "voltage gain", r.Voltage, VoltageColour, []vg.Length{vg.Points(6), vg.Points(3)}, r.Spread["voltage"]},
		{"return", rl, r.Return, ReturnColour, dotted, r.Spread["return"]},
	}
}

func negate(ys []float64) []float64 {
	out := make([]float64, len(ys))
	for i, y := range ys {
		out[i] = -y
	}
	return out
}

func negateRanges(rg [][2]float64) [][2]float64 {
	if rg == nil {
		return nil
	}
	out := make([][2]float64, len(rg))
	for i, r := range rg {
		out[i] = [2]float64{-r[1], -r[0]}
	}
	return out
}

// WriteResponse draws the response panel (dB against log frequency) and,
// for a two-port, the μ panel below it.
func WriteResponse(w io.Writer, r *Response) error {
	if len(r.Freq) < 2 {
		return errNoSweep
	}
	top := plot.New()
	top.Title.Text = printable.String(r.Title)
	top.Y.Label.Text = "dB"
	if r.Filter {
		top.Y.Label.Text = "dB (transducer gain)"
	}
	logX(top, r.Freq)
	lo, hi := math.Inf(1), math.Inf(-1)
	widen := func(y float64) {
		if finite(y) {
			lo, hi = math.Min(lo, y), math.Max(hi, y)
		}
	}
	for _, s := range r.series() {
		for _, y := range s.ys {
			widen(y)
		}
		for _, rg := range s.spread {
			widen(rg[0])
			widen(rg[1])
		}
	}
	for _, rj := range r.Rejects {
		widen(-rj.MinDB)
	}
	if !finite(lo) {
		lo, hi = -1, 1
	}
	pad := math.Max(1, 0.06*(hi-lo))
	ymin, ymax := lo-pad, hi+pad
	if r.Filter { // 0 dB at the top: the losses hang down from it
		ymax = math.Max(hi, 0) + 0.02*(hi-lo)
	}
	top.Y.Min, top.Y.Max = ymin, ymax
	top.X.Label.Text = ""
	addBand(top, r.Band, top.Y.Min, top.Y.Max)
	top.Add(grid())
	for _, s := range r.series() {
		addSpread(top, r.SpreadFreq, s.spread, s.colour, top.Y.Min, top.Y.Max)
	}
	for _, s := range r.series() {
		addCurve(top, s.name, r.Freq, s.ys, s.colour, s.dashes)
	}
	addRejects(top, r.Rejects)
	top.Y.Min, top.Y.Max = ymin, ymax // Add widened them to the band's polygon
	top.Y.Tick.Marker = stepTicks{}
	top.X.Min, top.X.Max = r.Freq[0], r.Freq[len(r.Freq)-1]
	lt := top.Legend
	top.Legend = plot.NewLegend()
	if r.Mu == nil {
		top.X.Label.Text = "frequency"
		if r.Filter {
			top.X.Label.Text = "frequency (passive: no μ panel, it cannot oscillate)"
		}
		return render(w, 8.5*vg.Inch, 4.2*vg.Inch, func(dc draw.Canvas) { besideLegend(dc, top, lt) })
	}
	bot := plot.New()
	bot.X.Label.Text = "frequency"
	bot.Y.Label.Text = "μ"
	logX(bot, r.Freq)
	mlo := 0.0
	for _, m := range r.Mu {
		if finite(m) {
			mlo = math.Min(mlo, m)
		}
	}
	for _, rg := range r.Spread["mu"] {
		if finite(rg[0]) {
			mlo = math.Min(mlo, rg[0])
		}
	}
	bot.Y.Min, bot.Y.Max = math.Max(mlo, -2)-0.1, MuShown
	addBand(bot, r.Band, bot.Y.Min, bot.Y.Max)
	addUnstable(bot, r.Freq, r.Mu)
	bot.Add(grid())
	addSpread(bot, r.SpreadFreq, r.Spread["mu"], MuColour, bot.Y.Min, bot.Y.Max)
	one, _ := plotter.NewLine(plotter.XYs{{X: r.Freq[0], Y: 1}, {X: r.Freq[len(r.Freq)-1], Y: 1}})
	one.Color = color.Black
	one.Dashes = []vg.Length{vg.Points(8), vg.Points(3), vg.Points(2), vg.Points(3)}
	bot.Add(one)
	bot.Legend.Add("μ = 1", one)
	addCurve(bot, "μ", r.Freq, r.Mu, MuColour, nil)
	addLeast(bot, r.Freq, r.Mu)
	bot.Y.Min, bot.Y.Max = math.Max(mlo, -2)-0.1, MuShown // μ past MuShown is clipped
	bot.X.Min, bot.X.Max = r.Freq[0], r.Freq[len(r.Freq)-1]
	lb := bot.Legend
	bot.Legend = plot.NewLegend()
	return render(w, 8.5*vg.Inch, 6.2*vg.Inch, func(dc draw.Canvas) {
		split := dc.Min.Y + (dc.Max.Y-dc.Min.Y)*0.36
		ct := draw.Crop(dc, 0, 0, split-dc.Min.Y, 0)
		cb := draw.Crop(dc, 0, 0, 0, -(dc.Max.Y - split))
		pt, pb := alignX(top, bot, draw.Crop(ct, 0, -legendWidth, 0, 0), draw.Crop(cb, 0, -legendWidth, 0, 0))
		top.Draw(pt)
		bot.Draw(pb)
		legendAt(ct, lt)
		legendAt(cb, lb)
	})
}

// addRejects marks each rejection limit with a short bar at −MinDB, an
// eighth of an octave either side of its frequency, and a downward
// triangle at its centre: the curve must pass below it.
func addRejects(p *plot.Plot, rs []Reject) {
	for i, rj := range rs {
		bar, err := plotter.NewLine(plotter.XYs{{X: rj.Freq / rejectBar, Y: -rj.MinDB}, {X: rj.Freq * rejectBar, Y: -rj.MinDB}})
		if err != nil {
			continue
		}
		bar.Color, bar.Width = RejectColour, vg.Points(2.5)
		p.Add(bar)
		sc, err := plotter.NewScatter(plotter.XYs{{X: rj.Freq, Y: -rj.MinDB}})
		if err != nil {
			continue
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: RejectColour, Radius: vg.Points(3.5), Shape: downTriangle{}}
		p.Add(sc)
		if i == 0 {
			p.Legend.Add("rejection limit", bar, sc)
		}
	}
}

// rejectBar is the half-width of a rejection mark, as a frequency ratio.
var rejectBar = math.Pow(2, 1.0/8)

// downTriangle is a filled triangle pointing down: the direction the
// loss curve must keep to.
type downTriangle struct{}

func (downTriangle) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetColor(sty.Color)
	r := sty.Radius
	var p vg.Path
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X, Y: pt.Y - r})
	p.Close()
	c.Fill(p)
}

// logX sets a logarithmic frequency axis over freq with decade labels.
func logX(p *plot.Plot, freq []float64) {
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = logTicks{label: hz}
	p.X.Min, p.X.Max = freq[0], freq[len(freq)-1]
}

func grid() *plotter.Grid {
	g := plotter.NewGrid()
	g.Vertical.Color, g.Horizontal.Color = GridColour, GridColour
	g.Vertical.Width, g.Horizontal.Width = vg.Points(0.5), vg.Points(0.5)
	return g
}

// rect is the polygon lo ≤ x ≤ hi, ylo ≤ y ≤ yhi.
func rect(lo, hi, ylo, yhi float64) plotter.XYs {
	return plotter.XYs{{X: lo, Y: ylo}, {X: hi, Y: ylo}, {X: hi, Y: yhi}, {X: lo, Y: yhi}}
}

// addBand shades the band from edge to edge over the panel's height.
func addBand(p *plot.Plot, band [2]float64, ylo, yhi float64) {
	if !(band[0] > 0 && band[1] >= band[0]) {
		return
	}
	pg, err := plotter.NewPolygon(rect(band[0], band[1], ylo, yhi))
	if err != nil {
		return
	}
	pg.Color = BandColour
	pg.LineStyle.Color = color.RGBA{0xa0, 0x90, 0x40, 0xff}
	pg.LineStyle.Width = vg.Points(0.7) // the edges stay visible when the band is narrow
	p.Add(pg)
	p.Legend.Add("band", pg)
}

// addSpread fills the worst-case range of one curve.
func addSpread(p *plot.Plot, fs []float64, rg [][2]float64, c color.RGBA, ylo, yhi float64) {
	if len(rg) != len(fs) || len(fs) < 2 {
		return
	}
	var pts plotter.XYs
	clamp := func(y float64) float64 { return math.Max(ylo, math.Min(yhi, y)) }
	for i, f := range fs {
		if finite(rg[i][0]) {
			pts = append(pts, plotter.XY{X: f, Y: clamp(rg[i][0])})
		}
	}
	for i := len(fs) - 1; i >= 0; i-- {
		if finite(rg[i][1]) {
			pts = append(pts, plotter.XY{X: fs[i], Y: clamp(rg[i][1])})
		}
	}
	if len(pts) < 3 {
		return
	}
	pg, err := plotter.NewPolygon(pts)
	if err != nil {
		return
	}
	pg.Color = color.NRGBA{c.R, c.G, c.B, 0x38}
	pg.LineStyle.Width = 0
	p.Add(pg)
}

// addCurve draws ys against fs, broken where a value is missing; the
// legend names the first stretch.
func addCurve(p *plot.Plot, name string, fs, ys []float64, c color.RGBA, dashes []vg.Length) {
	var seg plotter.XYs
	named := false
	flush := func() {
		if len(seg) == 0 {
			return
		}
		l, err := plotter.NewLine(seg)
		seg = nil
		if err != nil {
			return
		}
		l.Color, l.Dashes, l.Width = c, dashes, vg.Points(1.6)
		p.Add(l)
		if !named {
			p.Legend.Add(name, l)
			named = true
		}
	}
	for i, y := range ys {
		if i >= len(fs) || !finite(y) {
			flush()
			continue
		}
		seg = append(seg, plotter.XY{X: fs[i], Y: y})
	}
	flush()
}

// addUnstable marks every stretch where μ < 1 with a hatched fill.
func addUnstable(p *plot.Plot, fs, mu []float64) {
	named := false
	for i := 0; i < len(mu); {
		if !(mu[i] < 1) {
			i++
			continue
		}
		j := i
		for j+1 < len(mu) && mu[j+1] < 1 {
			j++
		}
		lo, hi := fs[max(i-1, 0)], fs[min(j+1, len(fs)-1)]
		if i > 0 {
			lo = math.Sqrt(fs[i-1] * fs[i])
		}
		if j+1 < len(fs) {
			hi = math.Sqrt(fs[j] * fs[j+1])
		}
		pg, err := plotter.NewPolygon(rect(lo, hi, p.Y.Min, p.Y.Max))
		if err == nil {
			pg.Color = unstableFill
			pg.LineStyle.Color = color.RGBA{0x80, 0x10, 0x10, 0xff}
			pg.LineStyle.Width = vg.Points(1)
			pg.LineStyle.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
			p.Add(pg)
			if !named {
				p.Legend.Add("μ < 1: may oscillate", pg)
				named = true
			}
		}
		i = j + 1
	}
}

// stepTicks labels a linear axis every 1, 2 or 5 × 10ⁿ, at most eight
// labels, so each grid line is a round number of dB.
type stepTicks struct{}

func (stepTicks) Ticks(lo, hi float64) []plot.Tick {
	span := hi - lo
	if !(span > 0) {
		return nil
	}
	step := math.Pow(10, math.Floor(math.Log10(span/8)))
	for _, m := range []float64{1, 2, 5, 10} {
		if span/(step*m) <= 8 {
			step *= m
			break
		}
	}
	var ts []plot.Tick
	for v := math.Ceil(lo/step) * step; v <= hi; v += step {
		v = math.Round(v/step) * step
		ts = append(ts, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'g', -1, 64)})
	}
	return ts
}

// addLeast marks where μ is least with a diamond, its value and frequency
// in the legend.
func addLeast(p *plot.Plot, fs, mu []float64) {
	k := -1
	for i, m := range mu {
		if finite(m) && (k < 0 || m < mu[k]) {
			k = i
		}
	}
	if k < 0 || mu[k] > MuShown {
		return
	}
	sc, err := plotter.NewScatter(plotter.XYs{{X: fs[k], Y: mu[k]}})
	if err != nil {
		return
	}
	sc.GlyphStyle = draw.GlyphStyle{Color: MuColour, Radius: vg.Points(4), Shape: draw.PyramidGlyph{}}
	p.Add(sc)
	p.Legend.Add("least μ "+trim(mu[k])+" at "+hz(fs[k]), sc)
}
