package picture

import (
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"headroom/checker/printable"
)

// Transistor is one transistor's operating point against its ratings, all
// as magnitudes (a PNP's VCE and IC are negative). For a FET, VCE and IC
// are VDS and ID, VCEO is vds_max and ICMax idss_max (a JFET draws at most
// about IDSS).
type Transistor struct {
	Ref       string
	FET       bool
	VCE, IC   float64 // V, A at nominal
	ICMax     float64 // A
	VCEO      float64 // V
	PD        float64 // W, derated for Ambient
	Ambient   float64 // °C the pd is derated for
	HasSpread bool
	VCESpread [2]float64 // V, over the corner box
	ICSpread  [2]float64 // A
}

// WriteBias draws each transistor's output plane on log–log axes, one panel
// each: the ic_max (idss_max) line, the vceo (vds_max) line, the derated pd hyperbola (a straight
// line on these axes), the nominal point and the box its corners span.
func WriteBias(w io.Writer, title string, ts []Transistor) error {
	if len(ts) == 0 {
		return errorString("no transistor with an operating point to draw")
	}
	var plots []*plot.Plot
	var legends []plot.Legend
	for i, t := range ts {
		p := biasPlot(t)
		if i == 0 && title != "" {
			p.Title.Text = printable.String(title) + "\n" + p.Title.Text
		}
		legends = append(legends, p.Legend)
		p.Legend = plot.NewLegend()
		plots = append(plots, p)
	}
	panel := 3.4 * vg.Inch
	return render(w, 8*vg.Inch, vg.Length(len(ts))*panel, func(dc draw.Canvas) {
		for i, p := range plots {
			top := dc.Max.Y - vg.Length(i)*panel
			c := draw.Crop(dc, 0, 0, top-panel-dc.Min.Y, -(dc.Max.Y - top))
			besideLegend(c, p, legends[i])
		}
	})
}

func biasPlot(t Transistor) *plot.Plot {
	p := plot.New()
	p.Title.Text = fmt.Sprintf("%s: operating point against its ratings", printable.String(t.Ref))
	p.X.Label.Text, p.Y.Label.Text = "VCE", "IC"
	iName, vName := "ic_max ", "vceo "
	if t.FET {
		p.X.Label.Text, p.Y.Label.Text = "VDS", "ID"
		iName, vName = "idss_max ", "vds_max "
	}
	p.X.Scale, p.Y.Scale = plot.LogScale{}, plot.LogScale{}
	p.X.Tick.Marker = logTicks{label: func(v float64) string { return si(v, "V") }}
	p.Y.Tick.Marker = logTicks{label: func(v float64) string { return si(v, "A") }}
	vlo, vhi, ilo, ihi := t.VCE, t.VCE, t.IC, t.IC
	if t.HasSpread {
		vlo, vhi = math.Min(vlo, t.VCESpread[0]), math.Max(vhi, t.VCESpread[1])
		ilo, ihi = math.Min(ilo, t.ICSpread[0]), math.Max(ihi, t.ICSpread[1])
	}
	vhi = math.Max(vhi, t.VCEO)
	ihi = math.Max(ihi, t.ICMax)
	p.X.Min, p.X.Max = decadeBelow(math.Max(vlo/2, vhi*1e-4)), decadeAbove(vhi*1.2)
	p.Y.Min, p.Y.Max = decadeBelow(math.Max(ilo/2, ihi*1e-5)), decadeAbove(ihi*1.2)
	p.Add(grid())
	xlo, xhi, ylo, yhi := p.X.Min, p.X.Max, p.Y.Min, p.Y.Max
	defer func() { p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = xlo, xhi, ylo, yhi }()
	line := func(xy plotter.XYs, name string, dashes []vg.Length, width float64) {
		l, err := plotter.NewLine(xy)
		if err != nil {
			return
		}
		l.Color, l.Dashes, l.Width = color.Black, dashes, vg.Points(width)
		p.Add(l)
		p.Legend.Add(name, l)
	}
	if t.ICMax > 0 {
		line(plotter.XYs{{X: p.X.Min, Y: t.ICMax}, {X: p.X.Max, Y: t.ICMax}}, iName+si(t.ICMax, "A"), []vg.Length{vg.Points(6), vg.Points(3)}, 1.4)
	}
	if t.VCEO > 0 {
		line(plotter.XYs{{X: t.VCEO, Y: p.Y.Min}, {X: t.VCEO, Y: p.Y.Max}}, vName+si(t.VCEO, "V"),
			[]vg.Length{vg.Points(8), vg.Points(3), vg.Points(2), vg.Points(3)}, 1.4)
	}
	if t.PD > 0 {
		var xy plotter.XYs
		for k := 0; k <= 60; k++ {
			v := p.X.Min * math.Pow(p.X.Max/p.X.Min, float64(k)/60)
			if i := t.PD / v; i <= p.Y.Max*10 && i >= p.Y.Min/10 {
				xy = append(xy, plotter.XY{X: v, Y: i})
			}
		}
		if len(xy) > 1 {
			line(xy, fmt.Sprintf("pd %s (%g °C)", si(t.PD, "W"), t.Ambient), nil, 1.6)
		}
	}
	if t.HasSpread {
		// A corner that cuts the transistor off has no place on log axes:
		// its side of the box sits at the axis.
		pg, err := plotter.NewPolygon(rect(math.Max(t.VCESpread[0], p.X.Min), t.VCESpread[1], math.Max(t.ICSpread[0], p.Y.Min), t.ICSpread[1]))
		if err == nil {
			pg.Color = color.NRGBA{0x1b, 0x4f, 0x9c, 0x30}
			pg.LineStyle.Color = GainColour
			pg.LineStyle.Width = vg.Points(1)
			pg.LineStyle.Dashes = []vg.Length{vg.Points(1.5), vg.Points(2)}
			p.Add(pg)
			p.Legend.Add("corner spread", pg)
		}
	}
	sc, err := plotter.NewScatter(plotter.XYs{{X: t.VCE, Y: t.IC}})
	if err == nil {
		sc.GlyphStyle = draw.GlyphStyle{Color: GainColour, Radius: vg.Points(4), Shape: draw.CircleGlyph{}}
		p.Add(sc)
		p.Legend.Add("nominal "+si(t.VCE, "V")+", "+si(t.IC, "A"), sc)
	}
	return p
}

func decadeBelow(x float64) float64 { return math.Pow(10, math.Floor(math.Log10(x))) }
func decadeAbove(x float64) float64 { return math.Pow(10, math.Ceil(math.Log10(x))) }

// si writes v with an SI prefix: "10 mA", "1.5 V".
func si(v float64, unit string) string {
	for _, p := range []struct {
		s string
		m float64
	}{{"G", 1e9}, {"M", 1e6}, {"k", 1e3}, {"", 1}, {"m", 1e-3}, {"µ", 1e-6}, {"n", 1e-9}} {
		if math.Abs(v) >= p.m*0.9999 {
			return trim(v/p.m) + " " + p.s + unit
		}
	}
	return fmt.Sprintf("%.3g %s", v, unit)
}
