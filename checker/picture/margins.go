package picture

import (
	"image/color"
	"io"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"headroom/checker/printable"
)

// Item is one judged item on the margin chart.
type Item struct {
	Rule, Part, Bound string
	Comparison        string // ">=" or "<=", as the rule judges it
	// Nominal and Worst are measured ÷ limit-ready pairs: the measured
	// value and its limit at nominal and at the worst case. HasNominal and
	// HasWorst say which exist; HasMetric false is an item that fails
	// outright (no figure to place).
	Nominal, Worst       [2]float64
	HasNominal, HasWorst bool
	HasMetric            bool
	Failing, Waived      bool
	Severity             string // error, warning or info
}

// Label is the item's row label: the part (or "circuit"), its bound, and
// "waived" when a waiver covers it.
func (it *Item) Label() string {
	s := printable.String(it.Part)
	if s == "" {
		s = "circuit"
	}
	if it.Bound != "" {
		s += " " + it.Bound
	}
	if it.Waived {
		s += " (waived)"
	}
	return s
}

// The margin chart's axis: measured ÷ limit on a log scale from MarginLo to
// MarginHi; anything beyond sits at the edge with an arrow.
const (
	MarginLo = 0.1
	MarginHi = 10.0
)

// Ratio is where a measured value sits against its limit on the margin
// axis, and which side of 1 fails: −1 the left (a ">=" rule), +1 the right.
// A negative limit turns the ratio's sense around; a ratio at or below zero,
// or without a finite value, sits at the edge its pass or failure belongs
// to. off is set when the value was moved to an edge.
func Ratio(measured, limit float64, cmp string, failing bool) (x float64, failSide int, off bool) {
	failSide = -1
	if cmp == "<=" {
		failSide = +1
	}
	if limit < 0 {
		failSide = -failSide
	}
	x = measured / limit
	if limit == 0 || !finite(x) {
		side := failSide
		if !failing {
			side = -side
		}
		if side < 0 {
			return MarginLo, failSide, true
		}
		return MarginHi, failSide, true
	}
	switch {
	case x <= MarginLo:
		return MarginLo, failSide, true
	case x >= MarginHi:
		return MarginHi, failSide, true
	}
	return x, failSide, false
}

// row is one line of the chart: a rule's heading (item nil) or an item.
type row struct {
	label string
	item  *Item
}

func marginRows(items []Item) []row {
	var rows []row
	seen := map[string]bool{}
	var order []string
	for _, it := range items {
		if !seen[it.Rule] {
			seen[it.Rule] = true
			order = append(order, it.Rule)
		}
	}
	for _, rule := range order {
		rows = append(rows, row{label: rule})
		for i := range items {
			if items[i].Rule == rule {
				rows = append(rows, row{label: items[i].Label(), item: &items[i]})
			}
		}
	}
	return rows
}

// marginPlot draws the rows; row 0 is at the top.
type marginPlot struct{ rows []row }

func (m marginPlot) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	n := len(m.rows)
	box := func(x0, x1, y, h float64) []vg.Point {
		X0, X1 := trX(x0), trX(x1)
		Y0, Y1 := trY(y-h/2), trY(y+h/2)
		return []vg.Point{{X: X0, Y: Y0}, {X: X1, Y: Y0}, {X: X1, Y: Y1}, {X: X0, Y: Y1}, {X: X0, Y: Y0}}
	}
	for i, r := range m.rows {
		y := float64(n - 1 - i)
		if r.item == nil { // a rule's heading: a grey band across
			c.FillPolygon(color.RGBA{0xec, 0xec, 0xec, 0xff}, box(MarginLo, MarginHi, y, 1))
			continue
		}
		it := r.item
		sev := SeverityColour(it.Severity)
		meas, has := it.Worst, it.HasWorst
		if !has {
			meas, has = it.Nominal, it.HasNominal
		}
		x, side, off := Ratio(meas[0], meas[1], it.Comparison, it.Failing)
		if !it.HasMetric {
			x, side, off = MarginLo, -1, true
			if it.Comparison == "<=" {
				x, side = MarginHi, +1
			}
		}
		edge := MarginLo
		if side > 0 {
			edge = MarginHi
		}
		c.FillPolygon(tint(sev, 0.16), box(1, edge, y, 0.9)) // the failing side, tinted by severity
		bar := box(1, x, y, 0.5)
		switch {
		case it.Failing && it.Waived:
			c.FillPolygon(tint(sev, 0.3), bar)
			c.StrokeLines(draw.LineStyle{Color: sev, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(2), vg.Points(1.5)}}, bar)
		case it.Failing:
			c.FillPolygon(sev, bar)
		default:
			c.StrokeLines(draw.LineStyle{Color: passColour, Width: vg.Points(1)}, bar)
		}
		g := draw.GlyphStyle{Color: color.Black, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}
		if off {
			g.Shape = draw.TriangleGlyph{}
		}
		c.DrawGlyph(g, vg.Point{X: trX(x), Y: trY(y)})
		if it.HasWorst && it.HasNominal && it.HasMetric {
			xn, _, _ := Ratio(it.Nominal[0], it.Nominal[1], it.Comparison, failingAt(it.Nominal, it.Comparison))
			c.DrawGlyph(draw.GlyphStyle{Color: color.Black, Radius: vg.Points(3.2), Shape: draw.RingGlyph{}}, vg.Point{X: trX(xn), Y: trY(y)})
		}
	}
	c.StrokeLine2(draw.LineStyle{Color: color.Black, Width: vg.Points(1.2)}, trX(1), trY(-0.5), trX(1), trY(float64(n)-0.5))
}

func failingAt(v [2]float64, cmp string) bool {
	if cmp == ">=" {
		return v[0] < v[1]
	}
	return v[0] > v[1]
}

func (m marginPlot) DataRange() (xmin, xmax, ymin, ymax float64) {
	return MarginLo, MarginHi, -0.5, float64(len(m.rows)) - 0.5
}

// legendBox is a legend thumbnail: a filled or outlined bar.
type legendBox struct {
	fill, line color.Color
	dashes     []vg.Length
}

func (l legendBox) Thumbnail(c *draw.Canvas) {
	pts := []vg.Point{{X: c.Min.X, Y: c.Min.Y}, {X: c.Max.X, Y: c.Min.Y}, {X: c.Max.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Max.Y}, {X: c.Min.X, Y: c.Min.Y}}
	if l.fill != nil {
		c.FillPolygon(l.fill, pts)
	}
	if l.line != nil {
		c.StrokeLines(draw.LineStyle{Color: l.line, Width: vg.Points(1), Dashes: l.dashes}, pts)
	}
}

type legendGlyph draw.GlyphStyle

func (g legendGlyph) Thumbnail(c *draw.Canvas) { c.DrawGlyph(draw.GlyphStyle(g), c.Center()) }

// WriteMargins draws every item as a bar of measured ÷ limit from 1,
// grouped under its rule: a filled bar fails (its colour the severity), an
// outlined one passes, a dashed one fails but is waived; the failing side
// of each row is tinted. worst says the items carry worst-case values
// (the ring is then the nominal value, the bar the worst case).
func WriteMargins(w io.Writer, title string, items []Item, worst bool) error {
	rows := marginRows(items)
	p := plot.New()
	p.Title.Text = printable.String(title)
	p.X.Scale = plot.LogScale{}
	p.X.Min, p.X.Max = MarginLo, MarginHi
	p.X.Tick.Marker = plot.ConstantTicks{{Value: 0.1, Label: "0.1"}, {Value: 0.2}, {Value: 0.5, Label: "0.5"}, {Value: 1, Label: "1"},
		{Value: 2, Label: "2"}, {Value: 5}, {Value: 10, Label: "10"}}
	p.X.Label.Text = "measured ÷ limit (1: at the limit)"
	if worst {
		p.X.Label.Text += " (bar: worst case, ring: nominal)"
	}
	p.Y.Min, p.Y.Max = -0.5, float64(len(rows))-0.5
	var ticks []plot.Tick
	for i, r := range rows {
		ticks = append(ticks, plot.Tick{Value: float64(len(rows) - 1 - i), Label: r.label})
	}
	p.Y.Tick.Marker = plot.ConstantTicks(ticks)
	p.Y.Tick.Length = 0
	g := grid()
	g.Horizontal.Width = 0
	p.Add(marginPlot{rows}, g)
	lg := plot.NewLegend()
	for _, s := range []string{"error", "warning", "info"} {
		lg.Add("fails: "+s, legendBox{fill: SeverityColour(s)})
	}
	lg.Add("fails, waived", legendBox{fill: tint(SeverityColour("warning"), 0.3), line: SeverityColour("warning"), dashes: []vg.Length{vg.Points(2), vg.Points(1.5)}})
	lg.Add("passes", legendBox{line: passColour})
	lg.Add("off the scale", legendGlyph{Color: color.Black, Radius: vg.Points(3), Shape: draw.TriangleGlyph{}})
	if worst {
		lg.Add("nominal", legendGlyph{Color: color.Black, Radius: vg.Points(3.2), Shape: draw.RingGlyph{}})
	}
	h := vg.Length(len(rows))*vg.Points(15) + 1.6*vg.Inch
	return render(w, 9*vg.Inch, h, func(dc draw.Canvas) { besideLegend(dc, p, lg) })
}
