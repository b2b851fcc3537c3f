package rules

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strings"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/eseries"
	"headroom/checker/quantity"
)

// MatchInput checks that the input presents the impedance its source
// expects across the band.
var MatchInput = &engine.Rule{
	ID: "match.input",
	Doc: engine.Doc{
		Title: "the input must match its source across the band",
		Why: "A preamp or buffer is driven from an antenna, a filter or a previous stage designed for one " +
			"impedance. A mismatch wastes signal and detunes the filter in front. A negative input resistance is " +
			"the worst match of all (more power comes back than goes in); whether the stage oscillates is judged " +
			"by stability.oscillation and stability.unconditional, not here.",
		Formula: "for an in port not marked matched = false: the smallest return loss −20·log10|Γ|, " +
			"Γ = (Zin − RS)/(Zin + RS), at the band's lowest, centre and highest frequencies, >= min_db; unit dB. " +
			"The finding's part is the port's name.",
		Source: "the definitions of reflection coefficient and return loss (T. S. Bird, \"Definition and Misuse of Return Loss\", IEEE " +
			"Antennas and Propagation Magazine 51(2), 2009, from memory; 10 dB is a VSWR of 1.92); the 10 dB threshold is common practice, no published source",
		Fix: "Advice: the input impedance found, at the worst frequency, and what sets it — the branches on the " +
			"input net that carry most of the input admittance, and at a transistor's base the bias network and " +
			"the transistor's own input. A negative input resistance is named as a poor match, with a pointer to " +
			"the stability rules.",
		Params: []engine.Param{
			{Name: "min_db", Unit: quantity.Decibel, Help: "smallest input return loss over the band, dB"},
		},
	},
	Run: runMatchInput,
}

func runMatchInput(p *engine.Pass) error {
	port := p.Circuit.InPort()
	res := p.A.AC
	if port == nil || !port.Matched || res == nil || !res.HasInput {
		return nil
	}
	minDB := p.Param("min_db")
	worst := 0
	for i, b := range res.Band {
		if b.ReturnLossDB < res.Band[worst].ReturnLossDB {
			worst = i
		}
	}
	b := res.Band[worst]
	f := engine.Finding{Part: port.Name,
		HasMetric: true, Measured: b.ReturnLossDB, Limit: minDB, Comparison: ">=", Unit: "dB",
		MessageLater: func() string {
			m, l := approx2(b.ReturnLossDB, minDB, quantity.Ratio)
			msg := fmt.Sprintf("input %s has %s dB of return loss at %s (Zin %s against %s), needs at least %s dB",
				port.Name, m, quantity.Approx(b.Frequency, quantity.Hertz),
				complexOhms(b.InputImpedance), quantity.Approx(port.Impedance, quantity.Ohm), l)
			if real(b.InputImpedance) < 0 {
				msg += fmt.Sprintf("; the input resistance is negative (%s), a poor match: whether the stage oscillates "+
					"is judged by stability.oscillation and stability.unconditional",
					quantity.Approx(real(b.InputImpedance), quantity.Ohm))
			}
			return msg
		}}
	if engine.Fails(b.ReturnLossDB, minDB, ">=") {
		f.FixLater = func() (string, []engine.Change) { return matchAdvice(p, port, b), nil }
	}
	p.Report(f)
	return nil
}

// complexOhms writes an impedance as "480 ohm − j1.62 kohm", three
// significant figures each; a part below a thousandth of the magnitude is
// left out.
func complexOhms(z complex128) string {
	re, im := real(z), imag(z)
	m := cmplx.Abs(z)
	if math.Abs(im) <= 1e-3*m {
		return quantity.Approx(re, quantity.Ohm)
	}
	if math.Abs(re) <= 1e-3*m {
		return "j" + quantity.Approx(im, quantity.Ohm)
	}
	sign := "+"
	if im < 0 {
		sign, im = "−", -im
	}
	return fmt.Sprintf("%s %s j%s", quantity.Approx(re, quantity.Ohm), sign, quantity.Approx(im, quantity.Ohm))
}

// matchAdvice explains the input impedance: which parts on the input net
// carry the input admittance, and what the signal meets at a transistor's
// base behind a series part.
func matchAdvice(p *engine.Pass, port *circuit.Port, b ac.BandPoint) string {
	res := p.A.AC
	f, zin, rs := b.Frequency, b.InputImpedance, port.Impedance
	var out strings.Builder
	fmt.Fprintf(&out, "Zin is %s at %s against the %s source", complexOhms(zin),
		quantity.Approx(f, quantity.Hertz), quantity.Approx(rs, quantity.Ohm))
	if real(zin) < 0 {
		out.WriteString(" — a negative input resistance, a poor match (see stability.oscillation and " +
			"stability.unconditional for whether the stage oscillates). The usual causes are a " +
			"capacitive load on an emitter (well above the beta cut-off, beta times a capacitive emitter " +
			"impedance is a negative resistance) and an inductive collector load fed back through the " +
			"collector–base capacitance; damp it (a small resistor in series with the base or the emitter " +
			"load, a resistor across the collector load) before matching")
	}
	if zin == 0 || cmplx.IsNaN(zin) || cmplx.IsInf(zin) {
		return out.String()
	}

	// Each part on the input net carries the admittance it removes when it
	// is taken out (Impedance includes the source resistance RS, taken off).
	yin := 1 / zin
	type branch struct {
		part *circuit.Part
		y    complex128
	}
	var bs []branch
	for _, part := range p.Circuit.Parts {
		on := false
		for _, n := range part.PartNets() {
			on = on || n == port.Net
		}
		if !on {
			continue
		}
		z, err := res.Impedance(f, port.Net, circuit.Gnd, part.Ref)
		if err != nil || z == 0 {
			continue
		}
		y := yin - (1/z - complex(1/rs, 0))
		if y == 0 || cmplx.IsNaN(y) || cmplx.IsInf(y) {
			continue
		}
		bs = append(bs, branch{part, y})
	}
	sort.SliceStable(bs, func(i, j int) bool { return cmplx.Abs(bs[i].y) > cmplx.Abs(bs[j].y) })
	total := 0.0
	for _, x := range bs {
		total += cmplx.Abs(x.y)
	}
	if len(bs) == 0 || total == 0 {
		return out.String()
	}
	out.WriteString(". It is set by ")
	for i, x := range bs {
		if i == 3 {
			break
		}
		if i > 0 {
			out.WriteString(", ")
		}
		fmt.Fprintf(&out, "%s (%s alone, %s of the input admittance)", x.part.Ref,
			complexOhms(1/x.y), quantity.Approx(cmplx.Abs(x.y)/total, quantity.Fraction))
	}
	// Behind a series part into a transistor's base: the bias network and
	// the transistor's own input (rb, then β·re with Cπ, at this frequency).
	described := false
	for _, x := range bs {
		far := otherNet(x.part, port.Net)
		for _, tp := range bjtsOn(p.Circuit, far) {
			if described {
				break
			}
			zall, err1 := res.Impedance(f, far, circuit.Gnd, x.part.Ref)
			zbias, err2 := res.Impedance(f, far, circuit.Gnd, x.part.Ref, tp.Ref)
			if err1 != nil || err2 != nil || zall == 0 || zbias == 0 {
				continue
			}
			described = true
			fmt.Fprintf(&out, "; behind %s, at %s's base, the bias network is %s", x.part.Ref, tp.Ref, complexOhms(zbias))
			if yq := 1/zall - 1/zbias; yq != 0 && !cmplx.IsNaN(yq) && !cmplx.IsInf(yq) {
				what := "β·re with Cπ, its emitter circuit reflected"
				if tp.BJT != nil && tp.BJT.RB > 0 {
					what = "rb, then " + what
				}
				fmt.Fprintf(&out, " and %s's own input (%s) %s", tp.Ref, what, complexOhms(1/yq))
				if real(1/yq) < 0 {
					out.WriteString(", a negative resistance")
				}
			}
		}
	}
	if r := real(zin); r > 0 && math.Abs(r/rs-1) > 0.1 {
		n := math.Sqrt(r / rs)
		ratio := "1:" + quantity.Approx(n, quantity.Ratio)
		if n < 1 {
			ratio = quantity.Approx(1/n, quantity.Ratio) + ":1"
		}
		fmt.Fprintf(&out, ". To match, bring the resistive part to %s: change the part that dominates, "+
			"or add a transformer of turns ratio about %s (source side first)", quantity.Approx(rs, quantity.Ohm), ratio)
	}
	// A reactive part comparable to the source impedance spoils the match
	// even when the resistive part is right: say how to cancel it.
	if x := imag(zin); real(zin) > 0 && math.Abs(x) > 0.2*rs {
		w := 2 * math.Pi * f
		if x < 0 {
			fmt.Fprintf(&out, ". The input is capacitive (%s): cancel it with about %s in series",
				quantity.Approx(x, quantity.Ohm), quantity.Approx(-x/w, quantity.Henry))
			out.WriteString(seriesCapacitorNote(p, port.Net, -x, w, rs))
		} else {
			fmt.Fprintf(&out, ". The input is inductive (+%s): cancel it with about %s in series",
				quantity.Approx(x, quantity.Ohm), quantity.Approx(1/(w*x), quantity.Farad))
		}
	}
	return out.String()
}

// seriesCapacitorNote says whether a larger series capacitor on the input
// can cancel a capacitive input reactance need: it removes at most the
// reactance it causes itself. When it is the only part on the input net the
// input is that reactance plus what lies behind it, so a larger value takes
// exactly its share away: it is proposed when that cancels the reactance or
// leaves less than a fifth of the source impedance (the band this advice
// aims at), with the value that does it, and refused with the reason
// otherwise. Behind a shunt part the share is not exact, and only a
// capacitor too small to matter is named.
func seriesCapacitorNote(p *engine.Pass, net string, need, w, rs float64) string {
	var caps []*circuit.Part
	others := 0
	for _, part := range p.Circuit.Parts {
		far := otherNet(part, net)
		if part.Kind == circuit.Capacitor && far != "" && !p.A.Topo.ACGround(far) && part.Value > 0 {
			caps = append(caps, part)
			continue
		}
		for _, n := range part.PartNets() {
			if n == net {
				others++
				break
			}
		}
	}
	if len(caps) != 1 {
		return ""
	}
	c := caps[0]
	xc := 1 / (w * c.Value)
	cant := fmt.Sprintf(" (a larger %s would not do: it causes only %s of it)", c.Ref, quantity.Approx(xc, quantity.Ohm))
	if others > 0 {
		if xc < 0.1*need {
			return cant
		}
		return ""
	}
	residual := need - xc // what is left with C made infinite
	var want float64      // the reactance C should have
	switch {
	case residual <= 0:
		want = -residual
	case residual < 0.2*rs:
		want = (0.2*rs - residual) / 2
	default:
		return cant
	}
	nominal := eseries.Nearest(1/(w*want)/caseFactor(p, c.Ref), eseries.E12)
	if residual > 0 {
		nominal = eseries.RoundUp(1/(w*want)/caseFactor(p, c.Ref), eseries.E12)
	}
	return fmt.Sprintf(", or a larger %s: it causes %s of it, and %s (E12, now %s) leaves %s", c.Ref,
		quantity.Approx(xc, quantity.Ohm), quantity.Approx(nominal, quantity.Farad),
		quantity.Approx(p.NominalCircuit.Part(c.Ref).Value, quantity.Farad),
		quantity.Approx(math.Abs(residual+1/(w*nominal*caseFactor(p, c.Ref))), quantity.Ohm))
}

// bjtsOn lists the transistors whose base is on net, in file order.
func bjtsOn(c *circuit.Circuit, net string) []*circuit.Part {
	var out []*circuit.Part
	for _, part := range c.Parts {
		if part.Kind.IsBJT() && len(part.Nets) == 3 && part.Nets[1] == net {
			out = append(out, part)
		}
	}
	return out
}
