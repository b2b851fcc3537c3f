package report

import (
	"fmt"
	"headroom/checker/printable"
	"io"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/quantity"
)

// table is one section of the text and Markdown reports.
type table struct {
	title  string
	header []string
	rows   [][]string
}

// tables lays the report out once for both people-facing formats.
func (r *Report) tables() []table {
	c, cs := r.Circuit, r.Case
	op, ac := cs.OP, cs.AC
	var ts []table
	ts = append(ts, table{title: "Circuit", header: []string{"item", "value"}, rows: [][]string{
		{"name", c.Name},
		{"band", quantity.Format(c.Band[0], quantity.Hertz) + " to " + quantity.Format(c.Band[1], quantity.Hertz)},
		{"ambient", ambientText(c.Ambient)},
		{"corners", map[bool]string{true: "worst (ranges over the corner box)", false: "nominal"}[r.Ranges != nil]},
	}})
	sup := table{title: "Supplies", header: []string{"net", "volts", "range", "impedance"}}
	for _, s := range c.Supplies {
		sup.rows = append(sup.rows, []string{s.Net, v(s.Volts, quantity.Volt),
			v(s.Range[0], quantity.Volt) + " to " + v(s.Range[1], quantity.Volt), v(s.Impedance, quantity.Ohm)})
	}
	if len(sup.rows) > 0 { // a passive filter has none: no empty table
		ts = append(ts, sup)
	}
	if len(c.Ports) > 0 {
		pt := table{title: "Ports", header: []string{"port", "net", "direction", "impedance"}}
		for _, p := range c.Ports {
			pt.rows = append(pt.rows, []string{p.Name, p.Net, p.Direction, v(p.Impedance, quantity.Ohm)})
		}
		ts = append(ts, pt)
	}
	if op == nil {
		ts = append(ts, table{title: "Operating point", header: []string{"problem"},
			rows: [][]string{{"no DC operating point: " + errText(cs.OPErr)}}})
		return ts
	}
	nt := table{title: "Nets (DC)", header: []string{"net", "voltage"}}
	for _, n := range c.Nets() {
		nt.rows = append(nt.rows, []string{n, v(op.V[n], quantity.Volt)})
	}
	ts = append(ts, nt)

	pt := table{title: "Parts", header: []string{"part", "kind", "value", "DC", "reactance", "works into", "role"}}
	for _, p := range c.Parts {
		if p.Kind.IsBJT() || p.Kind.IsFET() {
			continue
		}
		for _, row := range r.partRows(p) {
			pt.rows = append(pt.rows, row)
		}
	}
	ts = append(ts, pt)

	bt := table{title: "Transistors", header: []string{"part", "device", "configuration", "region", "IC", "VCE", "VBE", "IB", "dissipation", "hFE", "gm", "ft/f_high"}}
	for _, p := range c.Parts {
		b := op.BJTs[p.Ref]
		if b == nil {
			continue
		}
		config := ""
		if tb := r.Case.Topo.BJTs[p.Ref]; tb != nil {
			config = tb.Config
		}
		region := b.Region
		if b.Reversed() {
			region += ", conducts in reverse: collector and emitter may be swapped"
		}
		row := []string{p.Ref, p.Device, config, region, r.ranged(p.Ref+".ic", b.IC, quantity.Ampere),
			r.ranged(p.Ref+".vce", b.VCE, quantity.Volt), v(b.VBE, quantity.Volt), v(b.IB, quantity.Ampere),
			r.ranged(p.Ref+".power", b.Power, quantity.Watt), num(b.HFE), "", ""}
		if ac != nil && ac.BJTs[p.Ref] != nil {
			row[10], row[11] = v(ac.BJTs[p.Ref].GM, quantity.Ratio)+" S", num(ac.BJTs[p.Ref].BetaHigh)
		}
		bt.rows = append(bt.rows, row)
	}
	if len(bt.rows) > 0 {
		ts = append(ts, bt)
	}
	if ft := r.fetTable(op, ac); len(ft.rows) > 0 {
		ts = append(ts, ft)
	}
	if ac == nil {
		ts = append(ts, table{title: "Band", header: []string{"problem"}, rows: [][]string{{"no band analysis: " + errText(cs.ACErr)}}})
		return ts
	}
	band := table{title: "Band", header: []string{"frequency", "input impedance", "return loss", "gain", "voltage gain"}}
	if ac.HasGain {
		band.header = append(band.header, "NF", "noise temperature")
	}
	nz := r.noise()
	for i, bp := range ac.Band {
		row := []string{v(bp.Frequency, quantity.Hertz), "-", "-", "-", "-"}
		if ac.HasInput {
			z := bp.InputImpedance
			row[1] = fmt.Sprintf("%s ohm (|Z| %s)", complexText(z), num(cmplx.Abs(z)))
			row[2] = r.rangedDB(bandKey(i, "return_loss_db"), bp.ReturnLossDB)
		}
		if ac.HasGain {
			row[3], row[4] = "no path", "no path"
			if bp.GainDB != nil {
				row[3] = r.rangedDB(bandKey(i, "gain_db"), *bp.GainDB)
			}
			if bp.VoltageGainDB != nil {
				row[4] = fixed2(*bp.VoltageGainDB) + " dB"
			}
			row = append(row, "no path", "no path")
			if p := nz[i]; p.Valid {
				row[5] = r.rangedDB(bandKey(i, "nf_db"), p.NFDB)
				row[6] = num(p.TemperatureK) + " K"
			}
		}
		band.rows = append(band.rows, row)
	}
	ts = append(ts, band)
	ts = append(ts, r.noiseTable()...)
	ts = append(ts, r.linearityTable()...)
	ts = append(ts, r.filterTables()...)
	return append(ts, r.stabilityTables()...)
}

// partRows gives one row per passive part, and one per transformer winding.
func (r *Report) partRows(p *circuit.Part) [][]string {
	op, ac, role := r.Case.OP, r.Case.AC, r.Case.Topo.Roles[p.Ref]
	d := op.Parts[p.Ref]
	row := []string{p.Ref, string(p.Kind), "", "", "", "", role}
	switch p.Kind {
	case circuit.Resistor:
		row[2] = v(p.Value, quantity.Ohm)
		if d != nil {
			row[3] = v(d.Current, quantity.Ampere) + ", " + v(d.Power, quantity.Watt)
		}
	case circuit.Potentiometer:
		row[2] = v(p.Value, quantity.Ohm) + fmt.Sprintf(" at %.2f", p.Setting)
		if d != nil {
			row[3] = v(d.Power, quantity.Watt)
		}
	case circuit.Capacitor:
		row[2] = v(p.Value, quantity.Farad)
		if d != nil {
			row[3] = v(d.Voltage, quantity.Volt)
		}
	case circuit.Inductor:
		row[2] = v(p.Inductance(), quantity.Henry)
		if d != nil {
			row[3] = v(d.Current, quantity.Ampere)
		}
	case circuit.Transformer:
		var rows [][]string
		coupling := "coupling " + num(p.Coupling)
		if !p.CouplingSet {
			coupling += " (default)"
		}
		for _, w := range p.Windings {
			wr := []string{p.Ref + "." + w.Name, "winding", fmt.Sprintf("%g turns, %s", w.Turns, v(p.AL*w.Turns*w.Turns, quantity.Henry)), "", "", "", ""}
			if d != nil {
				wr[3] = v(d.Windings[w.Name], quantity.Ampere)
			}
			if ac != nil && ac.Windings[p.Ref] != nil && ac.Windings[p.Ref][w.Name] != nil {
				x := ac.Windings[p.Ref][w.Name]
				wr[4], wr[5] = v(x.Reactance, quantity.Ohm), v(x.Termination, quantity.Ohm)
				if rl, ok := reflectedLoad(p, w, ac.Windings[p.Ref]); ok {
					wr[5] = v(rl, quantity.Ohm) + " reflected (" + v(x.Termination, quantity.Ohm) + " across its own nets)"
				}
			}
			wr[6] = coupling
			rows = append(rows, wr)
		}
		return rows
	}
	if ac != nil && ac.Parts[p.Ref] != nil {
		row[4], row[5] = v(ac.Parts[p.Ref].Reactance, quantity.Ohm), v(ac.Parts[p.Ref].CircuitImpedance, quantity.Ohm)
	}
	return [][]string{row}
}

// reflectedLoad is what a winding works into through the transformer: the
// other windings' terminations, each times (this winding's turns ÷ its
// turns)², in parallel (magnitudes; leakage and magnetising inductance
// left out). What sits across the winding's own nets (a transistor's output
// on a collector winding) is its termination, shown apart. false when no
// other winding has a termination.
func reflectedLoad(p *circuit.Part, w *circuit.Winding, ws map[string]*ac.Winding) (float64, bool) {
	g := 0.0
	for _, o := range p.Windings {
		x := ws[o.Name]
		if o == w || x == nil || !(x.Termination > 0) || !(o.Turns > 0) {
			continue
		}
		r := w.Turns / o.Turns
		g += 1 / (x.Termination * r * r)
	}
	if !(g > 0) {
		return 0, false
	}
	return 1 / g, true
}

func (r *Report) ranged(key string, x float64, u quantity.Unit) string {
	s := v(x, u)
	if rg, ok := r.Ranges[key]; ok {
		s += " (" + v(rg[0], u) + " to " + v(rg[1], u) + ")"
	}
	return s
}

func (r *Report) rangedDB(key string, x float64) string {
	s := fixed2(x) + " dB"
	if rg, ok := r.Ranges[key]; ok {
		s += " (" + fixed2(rg[0]) + " to " + fixed2(rg[1]) + ")"
	}
	return s
}

// The numerical floor: the DC solution keeps a 1e-12 S conductance (the
// gmin aid) from every net to ground, so a part that carries nothing can
// show up to about 1e-12 S × 100 V. A current or power below these is that
// aid, not the circuit, and is shown as 0.
const (
	currentFloor = 1e-10 // A: 1e-12 S × 100 V
	powerFloor   = 1e-8  // W: currentFloor × 100 V
)

// floored is x with what lies below the numerical floor of its unit
// (currents and powers) written as 0.
func floored(x float64, u quantity.Unit) float64 {
	if u == quantity.Ampere && math.Abs(x) < currentFloor || u == quantity.Watt && math.Abs(x) < powerFloor {
		return 0
	}
	return x
}

// v writes a value with four significant figures and its unit.
func v(x float64, u quantity.Unit) string {
	if u == quantity.Ratio {
		return num(x)
	}
	return quantity.Format(round4(floored(x, u)), u)
}

func num(x float64) string {
	if x == 0 {
		x = 0 // never -0
	}
	return fmt.Sprintf("%.4g", x)
}

// fixed2 writes x with two decimals, never as -0.00.
func fixed2(x float64) string {
	s := fmt.Sprintf("%.2f", x)
	if s == "-0.00" {
		s = "0.00"
	}
	return s
}

func round4(x float64) float64 {
	y, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 4, 64), 64)
	return y
}

func complexText(z complex128) string {
	sign := "+"
	if imag(z) < 0 {
		sign = "-"
	}
	return fmt.Sprintf("%s %s j%s", num(real(z)), sign, num(abs(imag(z))))
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

func ambientText(a circuit.Ambient) string {
	s := quantity.Format(a.Nominal, quantity.Celsius)
	if a.Hi > a.Lo {
		s += " (range " + quantity.Format(a.Lo, quantity.Celsius) + " to " + quantity.Format(a.Hi, quantity.Celsius) + ")"
	}
	return s
}

func errText(err error) string {
	if err == nil {
		return "unknown"
	}
	return err.Error()
}

// printableTables is tables with every cell's control characters escaped:
// names and keys come from the file and go to a terminal or a review page.
func (r *Report) printableTables() []table {
	ts := r.tables()
	for _, t := range ts {
		for _, row := range append([][]string{t.header}, t.rows...) {
			for j := range row {
				row[j] = printable.String(row[j])
			}
		}
	}
	return ts
}

// Text writes the report as aligned plain-text tables.
func (r *Report) Text(w io.Writer) {
	for i, t := range r.printableTables() {
		if i > 0 {
			fmt.Fprintln(w)
		}
		fmt.Fprintln(w, t.title)
		widths := make([]int, len(t.header))
		for _, row := range append([][]string{t.header}, t.rows...) {
			for j, cell := range row {
				widths[j] = max(widths[j], len([]rune(cell)))
			}
		}
		line := func(row []string) {
			var b strings.Builder
			for j, cell := range row {
				b.WriteString("  " + cell + strings.Repeat(" ", widths[j]-len([]rune(cell))))
			}
			fmt.Fprintln(w, strings.TrimRight(b.String(), " "))
		}
		line(t.header)
		for _, row := range t.rows {
			line(row)
		}
	}
}

// Markdown writes the report as Markdown tables, to paste into a design review.
func (r *Report) Markdown(w io.Writer) {
	fmt.Fprintf(w, "# %s\n", printable.String(r.Circuit.Name))
	for _, t := range r.printableTables() {
		fmt.Fprintf(w, "\n## %s\n\n", t.title)
		fmt.Fprintln(w, "| "+strings.Join(escape(t.header), " | ")+" |")
		fmt.Fprintln(w, strings.Repeat("|---", len(t.header))+"|")
		for _, row := range t.rows {
			fmt.Fprintln(w, "| "+strings.Join(escape(row), " | ")+" |")
		}
	}
	r.markdownPictures(w)
}

func escape(cells []string) []string {
	out := make([]string, len(cells))
	for i, c := range cells {
		out[i] = strings.ReplaceAll(c, "|", `\|`)
	}
	return out
}
