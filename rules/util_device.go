package rules

import (
	"fmt"
	"math"
	"sort"

	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/engine"
	"headroom/checker/library"
)

// The transistor-limit rules (bjt.*) fix a finding by changing a part's
// device to another library transistor of the same polarity. A new device
// moves the operating point (its hFE and VBE set IC), so each candidate is
// judged on a fresh DC solution of the case, across its own hFE range in a
// worst-case run, and must also stay inside its absolute ratings, so that a
// fix for one limit does not break another. Nor may a candidate give away
// gain at the top of the band: its ft must reach the present device's, or
// ftGuard times the highest band frequency, whichever is lower.

// ftGuard is ft ÷ highest band frequency that a proposed device keeps at
// least (unless the present device has less): the "comfortable for HF gain
// stages" figure of bjt.ft-headroom (common practice).
const ftGuard = 10

// deviceChoice is a library transistor proposed in place of a part's device.
type deviceChoice struct {
	Name   string
	Params circuit.BJTParams // its figures, with the part's inline figures kept
	Metric float64           // the rule's metric with it, the worst over its hFE range
	Others []*deviceChoice   // the other devices that qualify, closest first (further fix forms)
}

// figure names of FORMAT.md §2, in the order they are compared.
var figureNames = []string{"ft", "hfe", "hfe_typ", "vbe", "ic_ref", "pd", "tj_max", "ic_max", "vceo", "cob", "rb"}

// figures maps a transistor's figures by name; hfe stands for its range.
func figures(b *circuit.BJTParams) map[string][2]float64 {
	return map[string][2]float64{
		"ft": {b.FT}, "hfe": {b.HFEMin, b.HFEMax}, "hfe_typ": {b.HFETyp}, "vbe": {b.VBE},
		"ic_ref": {b.ICRef}, "pd": {b.PD}, "tj_max": {b.TjMax}, "ic_max": {b.ICMax},
		"vceo": {b.VCEO}, "cob": {b.Cob}, "rb": {b.RB},
	}
}

func libFigures(t *library.Transistor) circuit.BJTParams {
	return circuit.BJTParams{FT: t.FT, HFEMin: t.HFEMin, HFEMax: t.HFEMax, HFETyp: t.HFETyp, VBE: t.VBE,
		ICRef: t.ICRef, PD: t.PD, TjMax: t.TjMax, ICMax: t.ICMax, VCEO: t.VCEO, Cob: t.Cob, RB: t.RB}
}

// partLibrary is the library the circuit's devices resolve against (the
// shipped one merged with the rule set's and the circuit's own), so that a
// proposed device name means in the file what it meant here.
func partLibrary(c *circuit.Circuit) *library.Library {
	if c.Library != nil {
		return c.Library
	}
	return library.Shipped()
}

// inlineFigures tells which figures of a transistor part were written in the
// circuit file rather than taken from its device: those the loaded figures
// do not share with the library entry (all of them without a device). The
// loader keeps no record of this; a figure written inline with exactly the
// library's value is taken as the library's.
func inlineFigures(c *circuit.Circuit, part *circuit.Part) map[string]bool {
	in := map[string]bool{}
	t := partLibrary(c).Transistors[part.Device]
	if t == nil || part.BJT == nil {
		for _, n := range figureNames {
			in[n] = true
		}
		return in
	}
	lib, got := figures(ptr(libFigures(t))), figures(part.BJT)
	for _, n := range figureNames {
		in[n] = lib[n] != got[n]
	}
	return in
}

func ptr(b circuit.BJTParams) *circuit.BJTParams { return &b }

// withInline returns t's figures with the part's inline ones written over
// them: what the part becomes when only its device changes.
func withInline(t *library.Transistor, part *circuit.BJTParams, inline map[string]bool) circuit.BJTParams {
	b := libFigures(t)
	set := func(name string, dst *float64, v float64) {
		if inline[name] {
			*dst = v
		}
	}
	set("ft", &b.FT, part.FT)
	set("hfe", &b.HFEMin, part.HFEMin)
	set("hfe", &b.HFEMax, part.HFEMax)
	set("hfe_typ", &b.HFETyp, part.HFETyp)
	set("vbe", &b.VBE, part.VBE)
	set("ic_ref", &b.ICRef, part.ICRef)
	set("pd", &b.PD, part.PD)
	set("tj_max", &b.TjMax, part.TjMax)
	set("ic_max", &b.ICMax, part.ICMax)
	set("vceo", &b.VCEO, part.VCEO)
	set("cob", &b.Cob, part.Cob)
	set("rb", &b.RB, part.RB)
	return b
}

// loadable reports whether a part with figures b would load: every required
// figure present and hfe_typ inside the range (FORMAT.md §2).
func loadable(b *circuit.BJTParams) bool {
	for _, v := range []float64{b.FT, b.HFEMax, b.VBE, b.ICRef, b.PD, b.TjMax, b.ICMax, b.VCEO} {
		if !(v > 0) {
			return false
		}
	}
	return b.HFEMin > 0 && b.HFEMin <= b.HFEMax && (b.HFETyp == 0 || b.HFETyp >= b.HFEMin && b.HFETyp <= b.HFEMax)
}

// distance measures how far apart two transistors' figures are: the sum of
// |ln(a/b)| over ft, nominal hFE, VBE, pd, tj_max, ic_max, vceo and cob (when
// both give it). The least change is the candidate closest to the present
// device, so that a fix for one limit disturbs the rest of the design least.
func distance(a, b *circuit.BJTParams) float64 {
	d := 0.0
	add := func(x, y float64) {
		if x > 0 && y > 0 {
			d += math.Abs(math.Log(x / y))
		}
	}
	add(a.FT, b.FT)
	add(a.NominalHFE(), b.NominalHFE())
	add(a.VBE, b.VBE)
	add(a.PD, b.PD)
	add(a.TjMax, b.TjMax)
	add(a.ICMax, b.ICMax)
	add(a.VCEO, b.VCEO)
	add(a.Cob, b.Cob)
	return d
}

// swapDevice looks for the library transistor of part's polarity that meets
// the rule (metric compared with limit by cmp) at the pass's case with the
// least change. metric reads the rule's metric for figures b at operating
// point q (q is nil when the case has no operating point: the metric must then
// need none). A candidate counts only when, at every hFE of its range in a
// worst-case run (its nominal hFE otherwise), the stage stays in its active
// region, meets the rule, and stays inside the candidate's absolute ratings
// (IC, dissipation at the ambient, the DC span against vceo), and keeps
// its ft as the package comment says.
//
// needs lists the figures the metric depends on; when one of them is written
// inline in the circuit file, no device change can move it, and swapDevice
// returns that figure's name as blocked instead.
func swapDevice(p *engine.Pass, part *circuit.Part, needs []string, limit float64, cmp string,
	metric func(b *circuit.BJTParams, q *dc.BJT) float64) (choice *deviceChoice, blocked string) {
	nominal := p.NominalCircuit.Part(part.Ref)
	if nominal == nil || nominal.BJT == nil {
		return nil, ""
	}
	inline := inlineFigures(p.NominalCircuit, nominal)
	for _, n := range needs {
		if inline[n] {
			return nil, n
		}
	}
	lib := partLibrary(p.NominalCircuit)
	names := make([]string, 0, len(lib.Transistors))
	for n := range lib.Transistors {
		names = append(names, n)
	}
	sort.Strings(names)
	type scored struct {
		ch   *deviceChoice
		dist float64
	}
	var found []scored
	for _, name := range names {
		t := lib.Transistors[name]
		if name == nominal.Device || t.Polarity != string(part.Kind) {
			continue
		}
		b := withInline(t, nominal.BJT, inline)
		if !loadable(&b) || b.FT < math.Min(nominal.BJT.FT, ftGuard*p.Circuit.Band[1]) {
			continue
		}
		m, ok := judgeDevice(p, part, name, b, limit, cmp, metric)
		if !ok {
			continue
		}
		found = append(found, scored{&deviceChoice{Name: name, Params: b, Metric: m}, distance(nominal.BJT, &b)})
	}
	if len(found) == 0 {
		return nil, ""
	}
	sort.SliceStable(found, func(i, j int) bool { return found[i].dist < found[j].dist })
	best := found[0].ch
	for _, s := range found[1:] {
		best.Others = append(best.Others, s.ch)
	}
	return best, ""
}

// judgeDevice solves the case with part's figures replaced by b and returns
// the rule's metric (worst over b's hFE range in a worst-case run) and
// whether the candidate meets the rule and its absolute ratings throughout.
func judgeDevice(p *engine.Pass, part *circuit.Part, name string, b circuit.BJTParams, limit float64, cmp string,
	metric func(b *circuit.BJTParams, q *dc.BJT) float64) (float64, bool) {
	if p.A.OP == nil {
		m := metric(&b, nil)
		return m, !engine.Fails(m, limit, cmp)
	}
	hfes := []float64{b.NominalHFE()}
	if p.Corners && b.HFEMax > b.HFEMin {
		hfes = []float64{b.HFEMin, b.NominalHFE(), b.HFEMax}
	}
	ambient := p.Circuit.Ambient.Nominal
	span, hasSpan := dcSpan(p, p.A.Topo.BJTs[part.Ref])
	worst, have := 0.0, false
	for _, h := range hfes {
		c := p.Circuit.Clone()
		cp := c.Part(part.Ref)
		bb := b
		bb.HFETyp = h
		cp.BJT, cp.Device = &bb, name
		op, err := dc.Solve(c)
		if err != nil {
			return 0, false
		}
		q := op.BJTs[part.Ref]
		if q == nil || q.Region != "active" {
			return 0, false
		}
		if q.IC > bb.ICMax || q.Power > bb.PD*bjtDerating(&bb, ambient) || hasSpan && span > bb.VCEO {
			return 0, false
		}
		m := metric(&bb, q)
		if engine.Fails(m, limit, cmp) {
			return 0, false
		}
		if !have || cmp == "<=" && m > worst || cmp == ">=" && m < worst {
			worst, have = m, true
		}
	}
	return worst, have
}

// deviceFix writes the fix for a device change: the new device, what it
// brings the metric to (result), and why this one.
// The other qualifying devices, next closest first, become the finding's
// further fix forms (through forms), for the whole-circuit check to try
// when the closest one moves the current or the gain too far.
func deviceFix(p *engine.Pass, part *circuit.Part, ch *deviceChoice, result func(*deviceChoice) string,
	forms *[]engine.FixForm) (string, []engine.Change) {
	from := "the present figures"
	if np := p.NominalCircuit.Part(part.Ref); np != nil && np.Device != "" {
		from = "the " + np.Device + "'s"
	}
	for _, o := range ch.Others {
		*forms = append(*forms, engine.FixForm{
			Text: fmt.Sprintf("%s device = %s %s: another of the library's %s transistors that meet the rule and stay "+
				"inside their absolute ratings here", part.Ref, o.Name, result(o), part.Kind),
			Changes: []engine.Change{{Part: part.Ref, Key: "device", To: o.Name}}})
	}
	return fmt.Sprintf("%s device = %s %s: of the library's %s transistors that meet the rule and stay inside "+
			"their absolute ratings here, it is the closest in its other figures to %s", part.Ref, ch.Name, result(ch), part.Kind, from),
		[]engine.Change{{Part: part.Ref, Key: "device", To: ch.Name}}
}

// laterWithForms sets a finding's FixLater to fix, and its FixForms to the
// further forms fix leaves behind.
func laterWithForms(f *engine.Finding, fix func(forms *[]engine.FixForm) (string, []engine.Change)) {
	var forms []engine.FixForm
	f.FixLater = func() (string, []engine.Change) { return fix(&forms) }
	f.FixForms = func() []engine.FixForm { return forms }
}

// noDevice opens the advice given when no device change fixes a finding.
func noDevice(part *circuit.Part, blocked string) string {
	if blocked != "" {
		return fmt.Sprintf("%s's %s is written inline, so another device would not change it: ", part.Ref, blocked)
	}
	return fmt.Sprintf("no library %s transistor meets the rule here: ", part.Kind)
}
