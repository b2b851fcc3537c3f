package rules

import (
	"fmt"
	"math"

	"headroom/checker/engine"
	"headroom/checker/linearity"
	"headroom/checker/quantity"
)

// SignalSwing checks that the largest signal the circuit is to take at its
// in port fits the room each transistor's operating point leaves.
var SignalSwing = &engine.Rule{
	ID: "signal.swing",
	Doc: engine.Doc{
		Title: "the largest input signal must fit the room the operating point leaves",
		Why: "A receive stage meets strong signals as well as weak ones: a nearby station, a transmitter in the " +
			"same house. When the collector swings down into saturation, up past VCEO, or the emitter current " +
			"swings to zero, the stage clips: it distorts, makes mixing products of every strong signal and " +
			"may shift its own bias. The operating point sets how much signal it takes before that.",
		Formula: "judged only when [circuit] max_level is given; for every active bipolar transistor (FETs are not " +
			"judged), at the band point " +
			"where its collector swing is largest, with V the peak voltage at the in net and the " +
			"small-signal transfers of the band analysis: the peak collector–emitter swing " +
			"V·|V(c) − V(e)|/|V(in)| within VCE − min_vce (down) and vceo − VCE (up: an inductively fed " +
			"collector rests near its supply and swings above it), and the peak emitter current swing " +
			"gm·V·|V(b) − V(e)|/|V(in)| within IC (no cut-off). The largest input level the transistor " +
			"takes, V²/(2·RS) in dBm for the in port's impedance RS, >= max_level; unit dB (levels in dBm). " +
			"At max_level of +20 dBm (100 mW) or more the message adds the RF-power caution. See docs/noise.md.",
		Source: "the class-A load line: the swing a collector takes is bounded by saturation and by cut-off of " +
			"the quiescent current (standard analysis, as in C. Bowick, RF Circuit Design, ch. 7; from memory); " +
			"the small-signal transfer is an estimate up to the point where the stage compresses",
		Fix: "Advice: the level the stage takes as it stands, and which limit sets it; for cut-off, the " +
			"quiescent collector current that carries the swing at max_level; for the collector, the VCE room " +
			"it needs (a smaller emitter or collector resistor's drop, or a higher supply).",
		Params: []engine.Param{
			{Name: "min_vce", Unit: quantity.Volt, Help: "lowest collector–emitter voltage the signal may swing down to"},
		},
	},
	Run: runSignalSwing,
}

func runSignalSwing(p *engine.Pass) error {
	c := p.Circuit
	if !c.HasMaxLevel || p.A.AC == nil || p.A.OP == nil || c.InPort() == nil {
		return nil
	}
	minVCE := p.Param("min_vce")
	res, err := linearity.Analyze(c, p.A.Topo, p.A.OP, p.A.AC, minVCE)
	if err != nil {
		return nil
	}
	rs := c.InPort().Impedance
	vAt := func(dbm float64) float64 { return math.Sqrt(2 * rs * 1e-3 * math.Pow(10, dbm/10)) }
	for _, st := range res.Stages {
		if !st.HasSwing {
			continue
		}
		st := st
		f := engine.Finding{Part: st.Ref, HasMetric: true, Measured: st.MaxInputDBm, Limit: c.MaxLevel,
			Comparison: ">=", Unit: "dB", AtHz: st.AtHz}
		why := map[string]string{
			"vce":     fmt.Sprintf("the collector swings down to %s", quantity.Approx(minVCE, quantity.Volt)),
			"vceo":    "the collector swings up to its VCEO",
			"cut-off": "the emitter current swings to zero (cut-off)",
		}[st.Limit]
		vin, vt := vAt(c.MaxLevel), p.A.OP.VT
		f.MessageLater = func() string {
			m, l := approx2(st.MaxInputDBm, c.MaxLevel, quantity.Ratio)
			caution := ""
			if c.MaxLevel >= 20 {
				caution = "; a level of 100 mW or more is RF power: mind RF exposure, hot parts and the local rules for transmitting, and defer to licensed practice"
			}
			return fmt.Sprintf("%s takes at most %s dBm at the in port (at %s: %s), max_level is %s dBm: there the collector swings %s peak against %s of room down, and the emitter current %s peak against %s",
				st.Ref, m, quantity.Approx(st.AtHz, quantity.Hertz), why, l,
				quantity.Approx(vin*st.CollectorGain, quantity.Volt), quantity.Approx(st.RoomDown, quantity.Volt),
				quantity.Approx(vin*st.JunctionGain*st.RoomCurrent/vt, quantity.Ampere), quantity.Approx(st.RoomCurrent, quantity.Ampere)) + caution
		}
		if engine.Fails(st.MaxInputDBm, c.MaxLevel, ">=") {
			f.Fix = swingAdvice(st, vin, minVCE, vt)
		}
		p.Report(f)
	}
	return nil
}

// swingAdvice says what the stage takes as it stands and what it would need.
func swingAdvice(st linearity.Stage, vin, minVCE, vt float64) string {
	fix := fmt.Sprintf("as it stands %s takes %s dBm at the in port", st.Ref, quantity.Approx(st.MaxInputDBm, quantity.Ratio))
	swing := vin * st.CollectorGain
	switch st.Limit {
	case "cut-off":
		// The emitter current swing gm·vbe = IC·vbe/VT must stay below IC,
		// but more current also raises gm and the gain, so the needed IC is
		// advice, not a promise.
		fix += fmt.Sprintf("; at max_level the junction swings %s peak, more than VT (%s): the emitter current would swing past its quiescent %s",
			quantity.Approx(vin*st.JunctionGain, quantity.Volt), quantity.Approx(vt, quantity.Volt), quantity.Approx(st.RoomCurrent, quantity.Ampere))
		// The loop drive (1 + R′)·|vbe| is set by what is in front; the
		// junction takes VT of it when gm·|ZE| = loop/VT − 1, that is at
		// IC = (loop − VT)/|ZE| with |ZE| = R′·VT/IC.
		loop := vin * st.JunctionGain * (1 + st.Degeneration)
		if st.Degeneration > 0.05 {
			ze := st.Degeneration * vt / st.RoomCurrent
			fix += fmt.Sprintf(". With the emitter's %s to AC ground, a quiescent current of about %s carries it (an estimate at the present drive; more current also raises the gain), or less gain in front of this stage",
				quantity.Approx(ze, quantity.Ohm), quantity.Approx((loop-vt)/ze, quantity.Ampere))
		} else {
			fix += ". The emitter is at AC ground, so more current alone does not help: leave some emitter resistance unbypassed, or put less gain in front of this stage"
		}
	case "vce":
		fix += fmt.Sprintf("; at max_level the collector swings %s peak and needs VCE of at least %s: lower the drop across the emitter or collector resistor, or raise the supply",
			quantity.Approx(swing, quantity.Volt), quantity.Approx(swing+minVCE, quantity.Volt))
	case "vceo":
		fix += fmt.Sprintf("; at max_level the collector swings %s peak, past VCEO: a transistor of higher VCEO or a lower supply", quantity.Approx(swing, quantity.Volt))
	}
	return fix
}
