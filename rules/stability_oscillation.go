package rules

import (
	"fmt"
	"math"
	"strings"
	"sync"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/poles"
	"headroom/checker/quantity"
)

// StabilityOscillation checks that the circuit, as terminated, has no
// natural frequency that grows: that it does not oscillate by itself.
var StabilityOscillation = &engine.Rule{
	ID:              "stability.oscillation",
	NeedsTransistor: true,
	Doc: engine.Doc{
		Title: "the circuit as terminated must not oscillate",
		Why: "A small RF stage that oscillates — usually well outside its band, at VHF through the transistor's " +
			"capacitances or at a tank's frequency through a stray path — is useless and can disturb other " +
			"equipment. The band figures do not show it; the circuit's natural frequencies do.",
		Formula: "the poles s of the circuit linearised at its operating point with its real terminations (the " +
			"in port's source impedance, the out port's load, supplies behind their impedance): the roots of " +
			"det(G + s·C) = 0 of the nodal pencil with inductors and windings as branch currents, below ten times " +
			"the top of the wide sweep. Measured: −ζ = Re s/|s| of the least-damped pole, <= 0 (a pole with " +
			"Re s > 0 grows; |ζ| < 1e−7 counts as 0); unit ratio. The message names the growing pole's frequency " +
			"|Im s|/2π, its growth 20·log10(e)·Re s in dB/µs and the parts that take part most (each part's share " +
			"of |∂s/∂α| when its admittance is scaled by 1 + α). The finding's at_hz is that frequency. See docs/stability.md.",
		Source: "natural frequencies and stability of a linear network (any circuit-theory text: a right-half-plane " +
			"root of the network determinant is a growing response)",
		Fix: "The smallest E12 base stopper (1 ohm–1 kohm, in series with the base of the transistor that takes part " +
			"most) or the largest E12 swamping resistor (10 kohm–10 ohm, across its collector load) with which the case " +
			"has no growing pole, and none either with half the stopper or twice the swamping resistor (the margin); " +
			"each re-checked by analysing the case again, with its cost in gain at the band's centre. Advice only: " +
			"both need a new part.",
	},
	Run:  runStabilityOscillation,
	Wide: true,
}

func runStabilityOscillation(p *engine.Pass) error {
	if p.A.AC == nil || !hasBJT(p) {
		return nil // a passive network cannot oscillate
	}
	r, err := poles.Find(p.Circuit, p.A.AC)
	if err != nil {
		return nil // the band analysis worked; a failing eigen-solve is not a finding
	}
	least, ok := r.Least()
	if !ok {
		return nil
	}
	f := engine.Finding{HasMetric: true, Measured: -least.Damping, Limit: 0, Comparison: "<=", Unit: "ratio",
		AtHz: least.Freq()}
	c := p.Circuit
	if !least.Growing() {
		f.MessageLater = func() string {
			return fmt.Sprintf("no natural frequency grows; the least damped pole is %s (ζ %s)",
				poleText(least), quantity.Approx(least.Damping, quantity.Ratio))
		}
		p.Report(f)
		return nil
	}
	// The parts' shares cost two dense eigen-solves: only the message and
	// the fix of a reported case need them, not every case of the search.
	shares := sync.OnceValue(func() []poles.Share {
		sh, _ := r.Participation(least)
		return sh
	})
	growing := len(r.Growing())
	f.MessageLater = func() string {
		shares := shares()
		var b strings.Builder
		fmt.Fprintf(&b, "the circuit oscillates as terminated: a pole at %s grows %s dB/µs (s = %s)",
			quantity.Approx(least.Freq(), quantity.Hertz),
			quantity.Approx(least.GrowthDBPerMicrosecond(), quantity.Ratio), sText(least.S))
		if growing > 1 {
			fmt.Fprintf(&b, ", and %d more grow", growing-1)
		}
		if len(shares) > 0 {
			b.WriteString("; the parts that take part most: ")
			for i, s := range shares[:min(4, len(shares))] {
				if i > 0 {
					b.WriteString(", ")
				}
				fmt.Fprintf(&b, "%s %s", s.Part, quantity.Approx(s.Share, quantity.Fraction))
			}
		}
		b.WriteString(noRBNote(c))
		return b.String()
	}
	f.FixLater = func() (string, []engine.Change) {
		judge := func(cs *analysis.Case) bool {
			pr, ok := polesOf(cs)
			return ok && len(pr.Growing()) == 0
		}
		margin := func(r float64, stopper bool) float64 {
			if stopper {
				return r / 2
			}
			return 2 * r
		}
		return stabilityFix(p, transistorsBy(c, shares()), judge, margin) + rfCaution, nil
	}
	p.Report(f)
	return nil
}

// rfCaution is said wherever a finding is about a circuit that generates RF.
const rfCaution = " Caution: an oscillating stage radiates; keep it screened and do not connect it to an antenna " +
	"until it is stable (transmitting without a licence is unlawful in most places)."

// transistorsBy orders the circuit's transistors by their share in a pole,
// largest first, then the rest in file order.
func transistorsBy(c *circuit.Circuit, shares []poles.Share) []*circuit.Part {
	var out []*circuit.Part
	seen := map[string]bool{}
	for _, s := range shares {
		if part := c.Part(s.Part); part != nil && part.Kind.IsBJT() && !seen[s.Part] {
			seen[s.Part] = true
			out = append(out, part)
		}
	}
	for _, part := range c.Parts {
		if part.Kind.IsBJT() && !seen[part.Ref] {
			out = append(out, part)
		}
	}
	return out
}

// poleText writes a pole for people: "a real pole at −3.1 krad/s" or
// "at 18.7 MHz".
func poleText(p poles.Pole) string {
	if p.Freq() == 0 {
		return "real, at " + sText(p.S)
	}
	return "at " + quantity.Approx(p.Freq(), quantity.Hertz)
}

// sText writes s in 1/s, three significant figures each part.
func sText(s complex128) string {
	re, im := real(s), imag(s)
	if im == 0 {
		return fmt.Sprintf("%.3g /s", re)
	}
	sign := "+"
	if im < 0 {
		sign, im = "−", -im
	}
	return fmt.Sprintf("%.3g %s j%.3g /s", re, sign, math.Abs(im))
}
