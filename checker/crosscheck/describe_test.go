package crosscheck

import (
	"fmt"
	"strings"

	"headroom/checker/circuit"
)

// describe lists a circuit's supplies, ports and parts, one a line, so that a
// failing seed can be rebuilt by hand.
func describe(c *circuit.Circuit) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: band %g–%g Hz, ambient %g °C\n", c.Name, c.Band[0], c.Band[1], c.Ambient.Nominal)
	for _, s := range c.Supplies {
		fmt.Fprintf(&b, "  supply %s %.6g V behind %.6g Ω\n", s.Net, s.Volts, s.Impedance)
	}
	for _, p := range c.Ports {
		fmt.Fprintf(&b, "  port %s (%s) on %s, %.6g Ω\n", p.Name, p.Direction, p.Net, p.Impedance)
	}
	for _, p := range c.Parts {
		fmt.Fprintf(&b, "  %s %s %v", p.Ref, p.Kind, p.Nets)
		switch p.Kind {
		case circuit.Resistor, circuit.Capacitor:
			fmt.Fprintf(&b, " %.6g", p.Value)
		case circuit.Inductor:
			fmt.Fprintf(&b, " %.6g H, %.6g Ω", p.Inductance(), p.Resistance)
		case circuit.Potentiometer:
			fmt.Fprintf(&b, " %.6g Ω at %.4g", p.Value, p.Setting)
		case circuit.Transformer:
			fmt.Fprintf(&b, " AL %.6g H, k %.4g:", p.AL, p.Coupling)
			for _, w := range p.Windings {
				fmt.Fprintf(&b, " %s %v %g turns %.6g Ω;", w.Name, w.Nets, w.Turns, w.Resistance)
			}
		case circuit.NPN, circuit.PNP:
			q := p.BJT
			fmt.Fprintf(&b, " ft %.4g, hfe %.4g–%.4g (typ %.4g), vbe %.4g at %.4g A, cob %.4g, rb %.6g Ω",
				q.FT, q.HFEMin, q.HFEMax, q.HFETyp, q.VBE, q.ICRef, q.Cob, q.RB)
		}
		b.WriteString("\n")
	}
	return b.String()
}
