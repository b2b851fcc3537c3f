package rules

import (
	"fmt"
	"math"
	"strings"

	"headroom/checker/engine"
	"headroom/checker/noise"
	"headroom/checker/quantity"
)

// NoiseFigure sets the stage's noise figure against the external noise its
// receiver hears: a stage much quieter than the band's external noise gains
// nothing from being quieter still.
var NoiseFigure = &engine.Rule{
	ID: "noise.figure",
	Doc: engine.Doc{
		Title: "the stage must not raise the external noise floor by more than max_rise_db",
		Why: "A receive stage is there to hear weak signals, and the weakest it can hear is set by the noise " +
			"the antenna brings in (man-made and galactic noise) plus the stage's own. On the lower HF bands " +
			"external noise is 40–60 dB above kT0 and the stage's noise figure hardly matters; from about " +
			"30 MHz up, and in quiet places, it decides what is heard. Feedback and bias resistors add noise " +
			"of their own.",
		Formula: "F from the small-signal noise analysis at the band's lowest, centre and highest frequencies " +
			"(docs/noise.md: thermal noise of every resistance, rb thermal, base and collector shot noise, FET " +
			"channel noise 4kT·γ·gm, γ = 2/3; the in port's source resistance at T0 = 290 K; output at the out " +
			"port); external noise fa = 10^(Fam/10), Fam = c − d·log10(f/MHz) dB above kT0·b, the larger of the " +
			"man-made median of [circuit] environment (city 76.8/27.7, residential 72.5/27.7, rural 67.2/27.7, " +
			"quiet-rural 53.6/28.6; default residential) and galactic noise (52.0/23.0); rise = 10·log10((fa + " +
			"F − 1)/fa) at the band point where it is largest <= max_rise_db; unit dB. Judged only at band " +
			"points within 0.3–250 MHz and with one in and one out port. The finding names the parts that " +
			"make most of the stage's own noise. The model has no package parasitics or excess noise: at VHF " +
			"it is optimistic by 1.5–2.5 dB against datasheet figures, so read its NF as a lower bound.",
		Source: "Recommendation ITU-R P.372 (radio noise), median man-made and galactic noise (parameters of " +
			"editions -8 and -11 as three independent public codes give them; the ITU table itself not seen); the system noise factor fa + (F − 1) is P.372's; noise sources of " +
			"the hybrid-π model after P. R. Gray, P. J. Hurst, S. H. Lewis, R. G. Meyer, Analysis and Design of " +
			"Analog Integrated Circuits, ch. 11; max_rise_db 1 dB is common practice, no published source",
		Fix: "Advice: the noise figure the stage needs at the worst band point (10·log10(1 + fa·(10^(max_rise_db/10) " +
			"− 1))), and the parts that make most of its own noise with their shares, largest first. A noisier " +
			"stage may still be the right choice where strong signals matter more (see signal.swing).",
		Params: []engine.Param{
			{Name: "max_rise_db", Unit: quantity.Decibel, Help: "how far the stage may raise the external noise floor, dB"},
		},
	},
	Run: runNoiseFigure,
}

func runNoiseFigure(p *engine.Pass) error {
	if p.A.AC == nil || !p.A.AC.HasGain || p.A.OP == nil {
		return nil
	}
	c := p.Circuit
	pts, err := noise.Band(c, p.A.OP, p.A.AC)
	if err != nil {
		return nil // a network the band analysis solved but the noise analysis cannot: not judged
	}
	maxRise := p.Param("max_rise_db")
	worst, rise, fa, gal := -1, 0.0, 0.0, false
	for i, pt := range pts {
		if !pt.Valid {
			continue
		}
		fam, g, err := noise.External(c.Environment, pt.Frequency)
		if err != nil {
			continue
		}
		a := math.Pow(10, fam/10)
		if r := noise.Rise(a, pt.F); worst < 0 || r > rise {
			worst, rise, fa, gal = i, r, a, g
		}
	}
	if worst < 0 {
		return nil
	}
	pt := pts[worst]
	env := c.Environment
	f := engine.Finding{HasMetric: true, Measured: rise, Limit: maxRise, Comparison: "<=", Unit: "dB", AtHz: pt.Frequency}
	f.MessageLater = func() string {
		floor := fmt.Sprintf("the %s man-made noise", env)
		if gal {
			floor = "galactic noise"
		}
		shares := pt.Shares()
		m, l := approx2(rise, maxRise, quantity.Ratio)
		msg := fmt.Sprintf("NF %s dB (noise temperature %s K) at %s raises the external noise floor (%s, %s dB above kT0, ITU-R P.372) by %s dB",
			quantity.Approx(pt.NFDB, quantity.Ratio), quantity.Approx(pt.TemperatureK, quantity.Ratio),
			quantity.Approx(pt.Frequency, quantity.Hertz), floor, quantity.Approx(10*math.Log10(fa), quantity.Ratio), m)
		if engine.Fails(rise, maxRise, "<=") {
			msg += fmt.Sprintf(", more than %s dB", l)
		}
		if s := shareText(shares); s != "" {
			msg += "; most of the stage's own noise: " + s
		}
		return msg
	}
	if engine.Fails(rise, maxRise, "<=") {
		f.Fix = fmt.Sprintf("a noise figure of at most %s dB at %s keeps the rise within %s dB in a %s environment",
			quantity.Approx(noise.AllowedNF(fa, maxRise), quantity.Ratio), quantity.Approx(pt.Frequency, quantity.Hertz),
			quantity.Approx(maxRise, quantity.Ratio), env)
		if s := shareText(pt.Shares()); s != "" {
			f.Fix += "; the stage's own noise comes mostly from " + s + ": quieten those first (a larger bias " +
				"resistor off the signal path, less resistance in series with the input, the transistor's " +
				"current nearer the optimum for the source resistance)"
		}
	}
	p.Report(f)
	return nil
}

// shareText names the parts that together make at least 80 % of the stage's
// own noise (at most three), with their shares: "R4 52 %, Q1 31 %".
func shareText(s []noise.Share) string {
	var out []string
	sum := 0.0
	for _, x := range s {
		if len(out) == 3 || (sum >= 0.8 && len(out) > 0) {
			break
		}
		out = append(out, fmt.Sprintf("%s %.0f %%", x.Ref, 100*x.Fraction))
		sum += x.Fraction
	}
	return strings.Join(out, ", ")
}
