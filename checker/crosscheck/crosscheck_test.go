package crosscheck

import (
	"flag"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"sort"
	"strings"
	"testing"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// relTol is the acceptance criterion of the solver issues: two
// implementations of FORMAT.md §6 agree to 0.1 % ("two correct programs agree
// to 0.1 %", FORMAT.md §6 preamble).
const relTol = 1e-3

// Absolute floors: a difference at or below the floor passes whatever its
// relative size, because the quantity is then dominated by something the
// model leaves open (solver tolerance, the 1e-12 S net conductance) rather
// than by the circuit.
const (
	// 1 µV: Newton stops well below this; a net held only by the 1e-12 S aid
	// reads 0 in both, and 1 µV is a thousandth of the smallest voltage a
	// rule cares about (millivolts).
	floorV = 1e-6
	// 1 nA: the 1e-12 S aid on a 24 V net leaks 24 pA, a cut-off junction
	// leaks IS·(…) ≈ 1e-14 A; a nanoampere is far below any current a rule
	// judges and well above both.
	floorI = 1e-9
	// 1 nW: the power of floorI in the largest generated resistor (≈ 1 MΩ).
	floorP = 1e-9
	// 1 µΩ: impedances between two AC grounds read exactly 0 in both.
	floorZ = 1e-6
	// 1e-7 S: gm = IC/VT for IC at the current floor is 4e-8 S.
	floorG = 1e-7
	// 1 fF: Cπ = gm/(2π·ft) − Cμ at the gm floor and ft ≥ 100 MHz is 0.16 fF;
	// the subtraction can leave a small value with a large relative error.
	floorC = 1e-15
	// 1 GΩ: an impedance above this (in both) is set by the 1e-12 S numerical
	// aid of FORMAT.md §6 — an island of nets with no other path to gnd — and
	// is "open" for every purpose. Its digits are not a property of the
	// circuit, and double precision cannot resolve them beside milliohm
	// parts (1e-16 × 1000 S swamps 1e-12 S), so such pairs are tallied apart
	// and must only both be open.
	zOpen = 1e9
	// −200 dB: a gain below this (a voltage ratio under 1e-10) is no signal:
	// it comes from a gm computed from a DC current at rounding-noise level
	// (1e-30 A) in a stage that is off. It stands for "no path" (null).
	deadDB = -200
	// 0.01 dB: 0.1 % of a voltage ratio is 0.0087 dB, of a power ratio
	// 0.0043 dB; a dB figure near 0 has no meaningful relative error.
	floorDB = 0.01
)

// stat accumulates the comparison of one quantity over all the circuits.
type stat struct {
	floor          float64
	n, fails       int
	maxRel, maxAbs float64 // largest relative error above the floor's reach; largest absolute below it
	relAt, absAt   string
}

type tally struct {
	t      *testing.T
	stats  map[string]*stat
	errors int
	// quiet: collect failures in msgs instead of reporting them, so that a
	// caller can first decide whether the comparison applies (see merge).
	quiet bool
	msgs  []string
	// prefix is put before every quantity name, to tally a run apart.
	prefix string
}

const maxReported = 40

func newTally(t *testing.T) *tally { return &tally{t: t, stats: map[string]*stat{}} }

func (ty *tally) fail(format string, args ...any) {
	ty.t.Helper()
	ty.errors++
	if ty.quiet {
		ty.msgs = append(ty.msgs, fmt.Sprintf(format, args...))
		return
	}
	if ty.errors <= maxReported {
		ty.t.Errorf(format, args...)
	}
}

// cmp records ref (the reference) against got (the implementation under test).
func (ty *tally) cmp(q string, floor float64, where string, ref, got float64) {
	ty.t.Helper()
	q = ty.prefix + q
	s := ty.stats[q]
	if s == nil {
		s = &stat{floor: floor}
		ty.stats[q] = s
	}
	s.n++
	if math.IsNaN(got) || math.IsInf(got, 0) {
		s.fails++
		ty.fail("%s %s: got %v, reference %g", where, q, got, ref)
		return
	}
	d := math.Abs(ref - got)
	mag := math.Max(math.Abs(ref), math.Abs(got))
	if math.IsInf(floor, 1) { // tallied, never failed
		if mag > 0 && d/mag > s.maxRel {
			s.maxRel, s.relAt = d/mag, fmt.Sprintf("%s (ref %.6g, got %.6g)", where, ref, got)
		}
		return
	}
	if relTol*mag >= floor {
		if r := d / mag; r > s.maxRel {
			s.maxRel, s.relAt = r, fmt.Sprintf("%s (ref %.6g, got %.6g)", where, ref, got)
		}
	} else if d > s.maxAbs {
		s.maxAbs, s.absAt = d, fmt.Sprintf("%s (ref %.6g, got %.6g)", where, ref, got)
	}
	if d > math.Max(relTol*mag, floor) {
		s.fails++
		ty.fail("%s %s: reference %.9g, got %.9g (diff %.3g, %.3g %%)", where, q, ref, got, d, 100*d/mag)
	}
}

// cmpC compares complex values by their distance, relative to the larger magnitude.
func (ty *tally) cmpC(q string, floor float64, where string, ref, got complex128) {
	ty.t.Helper()
	q = ty.prefix + q
	s := ty.stats[q]
	if s == nil {
		s = &stat{floor: floor}
		ty.stats[q] = s
	}
	s.n++
	d := cmplx.Abs(ref - got)
	mag := math.Max(cmplx.Abs(ref), cmplx.Abs(got))
	if math.IsInf(floor, 1) { // tallied, never failed
		if mag > 0 && d/mag > s.maxRel {
			s.maxRel, s.relAt = d/mag, fmt.Sprintf("%s (ref %.6g, got %.6g)", where, ref, got)
		}
		return
	}
	if relTol*mag >= floor {
		if r := d / mag; r > s.maxRel {
			s.maxRel, s.relAt = r, fmt.Sprintf("%s (ref %.6g, got %.6g)", where, ref, got)
		}
	} else if d > s.maxAbs {
		s.maxAbs, s.absAt = d, fmt.Sprintf("%s (ref %.6g, got %.6g)", where, ref, got)
	}
	if cmplx.IsNaN(got) || cmplx.IsInf(got) || d > math.Max(relTol*mag, floor) {
		s.fails++
		ty.fail("%s %s: reference %.9g, got %.9g (|diff| %.3g)", where, q, ref, got, d)
	}
}

// merge adds a quiet tally's statistics and reports its failures.
func (ty *tally) merge(o *tally) {
	ty.t.Helper()
	for k, s := range o.stats {
		d := ty.stats[k]
		if d == nil {
			d = &stat{floor: s.floor}
			ty.stats[k] = d
		}
		d.n += s.n
		d.fails += s.fails
		if s.maxRel > d.maxRel {
			d.maxRel, d.relAt = s.maxRel, s.relAt
		}
		if s.maxAbs > d.maxAbs {
			d.maxAbs, d.absAt = s.maxAbs, s.absAt
		}
	}
	for _, m := range o.msgs {
		ty.fail("%s", m)
	}
}

// cmpZ compares impedance magnitudes, tallying gmin-limited pairs apart.
func (ty *tally) cmpZ(q, where string, ref, got float64) {
	ty.t.Helper()
	if ref >= zOpen && got >= zOpen {
		ty.cmp(q+" (open, >1e9)", math.Inf(1), where, ref, got)
		return
	}
	ty.cmp(q, floorZ, where, ref, got)
}

func (ty *tally) log() {
	names := make([]string, 0, len(ty.stats))
	for k := range ty.stats {
		names = append(names, k)
	}
	sort.Strings(names)
	var b strings.Builder
	fmt.Fprintf(&b, "%-28s %6s %5s %10s %10s  %s\n", "quantity", "n", "fails", "max rel", "max abs<fl", "worst relative case")
	for _, k := range names {
		s := ty.stats[k]
		fmt.Fprintf(&b, "%-28s %6d %5d %10.2e %10.2e  %s\n", k, s.n, s.fails, s.maxRel, s.maxAbs, s.relAt)
	}
	ty.t.Log("\n" + b.String())
}

// circuitsFlag overrides how many random circuits each comparison draws, for
// a long hunt: go test ./checker/crosscheck -circuits 50000.
var circuitsFlag = flag.Int("circuits", 0, "random circuits per comparison (0: the default)")

// circuitCount is how many random circuits a comparison draws.
func circuitCount(normal, short int) int {
	switch {
	case *circuitsFlag > 0:
		return *circuitsFlag
	case testing.Short():
		return short
	}
	return normal
}

// TestAgainstReference compares checker/dc and checker/ac with the reference
// on seeded random circuits: every figure of FORMAT.md §5's report that the
// model of §6 defines.
func TestAgainstReference(t *testing.T) {
	ty := newTally(t)
	n := circuitCount(3000, 400)
	skipped, compared, nonNewton := 0, 0, 0
	seen := map[string]int{} // features the comparison must have covered
	for seed := uint64(1); seed <= uint64(n); seed++ {
		c := genCircuit(seed, true)
		ref, refErr := refSolveDC(c)
		got, gotErr := dc.Solve(c)
		if (refErr == nil) != (gotErr == nil) {
			ty.fail("seed %d: reference DC error %v, dc.Solve error %v", seed, refErr, gotErr)
			continue
		}
		if refErr != nil {
			skipped++
			continue
		}
		if ref.Method != "newton" {
			nonNewton++
		}
		compared++
		countFeatures(seen, c, ref)
		before := ty.errors
		compareCircuit(ty, seen, seed, c, ref, got)
		if ty.errors > before && ty.errors <= maxReported {
			t.Logf("seed %d is\n%s", seed, describe(c))
		}
	}
	t.Logf("%d circuits: %d compared, %d without an operating point in both (skipped), %d needed the reference's continuation", n, compared, skipped, nonNewton)
	t.Logf("features covered: %v", seen)
	ty.log()
	for _, f := range []string{"npn", "pnp", "negative rail", "zero-impedance supply", "transformer",
		"zero-resistance winding", "zero-resistance inductor", "inductor by turns", "potentiometer",
		"pot at an end", "1 stage", "2 stages", "3 stages", "active", "saturated", "cutoff",
		"negative return loss", "ambient below 0 C", "ambient above 40 C", "base resistance"} {
		if seen[f] == 0 {
			t.Errorf("no compared circuit had: %s (the generator has drifted)", f)
		}
	}
	if skipped == 0 {
		t.Errorf("no circuit without an operating point: the failure agreement was not tested")
	}
	if compared < n*9/10 {
		t.Errorf("only %d of %d random circuits had an operating point: the generator has drifted", compared, n)
	}
}

// compareCircuit compares one circuit's DC and AC figures.
func compareCircuit(ty *tally, seen map[string]int, seed uint64, c *circuit.Circuit, ref *refOP, got *dc.Result) {
	ty.t.Helper()
	where := fmt.Sprintf("seed %d", seed)
	compareDC(ty, where, c, ref, got)
	rac, err := refAnalyze(c, ref)
	if err != nil {
		ty.fail("%s: reference AC: %v", where, err)
		return
	}
	gac, err := ac.Analyze(c, got)
	if err != nil {
		ty.fail("%s: ac.Analyze: %v", where, err)
		return
	}
	compareAC(ty, where, c, rac, gac)
	compareQueries(ty, where, seed, c, ref, gac)
	for _, rl := range rac.RL {
		if rl < 0 {
			seen["negative return loss"]++
		}
	}
}

func compareDC(ty *tally, where string, c *circuit.Circuit, ref *refOP, got *dc.Result) {
	ty.t.Helper()
	ty.cmp("dc temperature", 1e-9, where, ref.TempC, got.TempC)
	ty.cmp("dc VT", 0, where, ref.VT, got.VT)
	for _, net := range c.Nets() {
		v, ok := got.V[net]
		if !ok {
			ty.fail("%s: dc result has no voltage for net %s", where, net)
			continue
		}
		ty.cmp("net voltage", floorV, where+" net "+net, ref.V[net], v)
	}
	for _, s := range c.Supplies {
		ty.cmp("supply current", floorI, where+" supply "+s.Net, ref.Supply[s.Net], got.SupplyCurrent[s.Net])
	}
	for _, p := range c.Parts {
		at := where + " " + p.Ref
		if p.Kind.IsBJT() {
			rb, gb := ref.BJT[p.Ref], got.BJTs[p.Ref]
			if gb == nil {
				ty.fail("%s: dc result has no transistor", at)
				continue
			}
			ty.cmp("bjt ic", floorI, at, math.Abs(rb.ICf), gb.IC)
			ty.cmp("bjt ib", floorI, at, math.Abs(rb.IBf), gb.IB)
			ty.cmp("bjt vbe", floorV, at, math.Abs(rb.VBEf), gb.VBE)
			ty.cmp("bjt vce", floorV, at, math.Abs(rb.VCEf), gb.VCE)
			ty.cmp("bjt ic forward", floorI, at, rb.ICf, gb.ICf)
			ty.cmp("bjt ib forward", floorI, at, rb.IBf, gb.IBf)
			ty.cmp("bjt vbe forward", floorV, at, rb.VBEf, gb.VBEf)
			ty.cmp("bjt junction vbe", floorV, at, rb.VBJf, gb.VBJf)
			ty.cmp("bjt vce forward", floorV, at, rb.VCEf, gb.VCEf)
			ty.cmp("bjt power", floorP, at, rb.power(), gb.Power)
			ty.cmp("bjt hfe", 0, at, rb.BF, gb.HFE)
			ty.cmp("bjt is", 0, at, rb.IS, gb.IS)
			if rb.Region != gb.Region && !nearBoundary(rb) {
				ty.fail("%s: region reference %s, got %s (IC %.6g A, VCE %.6g V)", at, rb.Region, gb.Region, rb.ICf, rb.VCEf)
			}
			continue
		}
		gp := got.Parts[p.Ref]
		if gp == nil {
			ty.fail("%s: dc result has no part", at)
			continue
		}
		switch p.Kind {
		case circuit.Resistor:
			ty.cmp("resistor current", floorI, at, ref.Cur[p.Ref], gp.Current)
			ty.cmp("resistor power", floorP, at, ref.Power[p.Ref], gp.Power)
		case circuit.Potentiometer:
			ty.cmp("pot power", floorP, at, ref.Power[p.Ref], gp.Power)
			ra, rb := potSections(p)
			ty.cmp("pot section R", 0, at, ra, gp.Sections[0].R)
			ty.cmp("pot section R", 0, at, rb, gp.Sections[1].R)
			ty.cmp("pot section current", floorI, at+" a-wiper", ref.Sect[p.Ref][0], gp.Sections[0].Current)
			ty.cmp("pot section current", floorI, at+" wiper-b", ref.Sect[p.Ref][1], gp.Sections[1].Current)
		case circuit.Capacitor:
			ty.cmp("capacitor voltage", floorV, at, ref.CapV[p.Ref], gp.Voltage)
		case circuit.Inductor:
			ty.cmp("inductor current", floorI, at, ref.Cur[p.Ref], gp.Current)
		case circuit.Transformer:
			for _, w := range p.Windings {
				ty.cmp("winding current", floorI, at+"."+w.Name, ref.Wind[p.Ref][w.Name], gp.Windings[w.Name])
			}
		}
	}
}

// nearBoundary: the region tests (IC < 1 µA, VCE < 0.3 V) are within the
// floors of their thresholds, so either answer is right.
func nearBoundary(b *refBJT) bool {
	return math.Abs(b.ICf-1e-6) <= math.Max(relTol*1e-6, floorI) || math.Abs(b.VCEf-0.3) <= relTol*0.3
}

func compareAC(ty *tally, where string, c *circuit.Circuit, ref *refAC, got *ac.Result) {
	ty.t.Helper()
	if ref.HasInput != got.HasInput || ref.HasGain != got.HasGain {
		ty.fail("%s: HasInput/HasGain reference %v/%v, got %v/%v", where, ref.HasInput, ref.HasGain, got.HasInput, got.HasGain)
	}
	for _, p := range c.Parts {
		at := where + " " + p.Ref
		switch p.Kind {
		case circuit.Capacitor, circuit.Inductor:
			gp := got.Parts[p.Ref]
			if gp == nil {
				ty.fail("%s: ac result has no part", at)
				continue
			}
			name := strings.ToLower(string(p.Kind))
			ty.cmp(name+" reactance", floorZ, at, ref.React[p.Ref], gp.Reactance)
			ty.cmpZ(name+" circuit Z", at, ref.CircZ[p.Ref], gp.CircuitImpedance)
			if p.Kind == circuit.Inductor {
				ty.cmp("inductor inductance", 0, at, p.Inductance(), gp.Inductance)
			}
		case circuit.Transformer:
			for _, w := range p.Windings {
				gw := got.Windings[p.Ref][w.Name]
				if gw == nil {
					ty.fail("%s.%s: ac result has no winding", at, w.Name)
					continue
				}
				ty.cmp("winding inductance", 0, at+"."+w.Name, p.AL*w.Turns*w.Turns, gw.Inductance)
				ty.cmp("winding reactance", floorZ, at+"."+w.Name, ref.WReact[p.Ref][w.Name], gw.Reactance)
				ty.cmpZ("winding termination", at+"."+w.Name, ref.WTerm[p.Ref][w.Name], gw.Termination)
			}
		case circuit.NPN, circuit.PNP:
			gb := got.BJTs[p.Ref]
			if gb == nil {
				ty.fail("%s: ac result has no transistor", at)
				continue
			}
			ty.cmp("bjt gm", floorG, at, ref.GM[p.Ref], gb.GM)
			gpiRef, gpiGot := 0.0, 0.0
			if ref.Rpi[p.Ref] > 0 {
				gpiRef = 1 / ref.Rpi[p.Ref]
			}
			if gb.Rpi > 0 {
				gpiGot = 1 / gb.Rpi
			}
			ty.cmp("bjt 1/rpi", floorG/10, at, gpiRef, gpiGot)
			ty.cmp("bjt cpi", floorC, at, ref.Cpi[p.Ref], gb.Cpi)
			ty.cmp("bjt cmu", 0, at, ref.Cmu[p.Ref], gb.Cmu)
			ty.cmp("bjt beta_high", 0, at, ref.BetaHigh[p.Ref], gb.BetaHigh)
		}
	}
	for k := range ref.Freq {
		at := fmt.Sprintf("%s band[%d]", where, k)
		bp := got.Band[k]
		ty.cmp("band frequency", 0, at, ref.Freq[k], bp.Frequency)
		if !ref.HasInput {
			continue
		}
		if cmplx.Abs(ref.Zin[k]) >= zOpen && cmplx.Abs(bp.InputImpedance) >= zOpen {
			ty.cmpC("input impedance (open, >1e9)", math.Inf(1), at, ref.Zin[k], bp.InputImpedance)
		} else {
			ty.cmpC("input impedance", floorZ, at, ref.Zin[k], bp.InputImpedance)
		}
		ty.cmp("return loss dB", floorDB, at, ref.RL[k], bp.ReturnLossDB)
		if !ref.HasGain {
			continue
		}
		cmpDB := func(q string, r, g *float64) {
			dead := func(x *float64) bool { return x == nil || *x < deadDB }
			if dead(r) && dead(g) {
				return
			}
			if (r == nil) != (g == nil) {
				ty.fail("%s %s: reference %v, got %v (nil = no path)", at, q, fmtPtr(r), fmtPtr(g))
				return
			}
			if r != nil {
				ty.cmp(q, floorDB, at, *r, *g)
			}
		}
		cmpDB("gain dB", ref.GainDB[k], bp.GainDB)
		cmpDB("voltage gain dB", ref.VGainDB[k], bp.VoltageGainDB)
	}
}

func fmtPtr(p *float64) string {
	if p == nil {
		return "nil"
	}
	return fmt.Sprint(*p)
}

// countFeatures tallies what a compared circuit exercises, so that a change
// to the generator cannot quietly drop a case.
func countFeatures(seen map[string]int, c *circuit.Circuit, op *refOP) {
	stages := 0
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.NPN, circuit.PNP:
			stages++
			seen[string(p.Kind)]++
			if p.BJT.RB > 0 {
				seen["base resistance"]++
			}
			seen[op.BJT[p.Ref].Region]++
		case circuit.Transformer:
			seen["transformer"]++
			for _, w := range p.Windings {
				if w.Resistance == 0 {
					seen["zero-resistance winding"]++
				}
			}
		case circuit.Inductor:
			if p.Resistance == 0 {
				seen["zero-resistance inductor"]++
			}
			if p.Turns > 0 {
				seen["inductor by turns"]++
			}
		case circuit.Potentiometer:
			seen["potentiometer"]++
			if p.Setting == 0 || p.Setting == 1 {
				seen["pot at an end"]++
			}
		}
	}
	seen[fmt.Sprintf("%d stage%s", stages, map[bool]string{true: "s"}[stages > 1])]++
	for _, s := range c.Supplies {
		if s.Volts < 0 {
			seen["negative rail"]++
		}
		if s.Impedance == 0 {
			seen["zero-impedance supply"]++
		}
	}
	switch {
	case c.Ambient.Nominal < 0:
		seen["ambient below 0 C"]++
	case c.Ambient.Nominal > 40:
		seen["ambient above 40 C"]++
	}
}

// compareQueries asks (*ac.Result).Impedance, the call the reactance rules
// use, for random net pairs at random frequencies with random sets of parts
// removed (transistors and transformers included, so that removals of
// several coupled branches at once are exercised), and compares each answer
// with the reference's fresh solve.
func compareQueries(ty *tally, where string, seed uint64, c *circuit.Circuit, op *refOP, got *ac.Result) {
	ty.t.Helper()
	r := rand.New(rand.NewPCG(seed, 77))
	m := newACModel(c, op)
	nets := append([]string{circuit.Gnd}, c.Nets()...)
	for q := 0; q < 4; q++ {
		a, b := nets[r.IntN(len(nets))], nets[r.IntN(len(nets))]
		f := c.Band[0] * math.Exp(r.Float64()*math.Log(10*c.Band[1]/c.Band[0])) / 3
		var removed []string
		for k := r.IntN(4); k > 0; k-- {
			removed = append(removed, c.Parts[r.IntN(len(c.Parts))].Ref)
		}
		at := fmt.Sprintf("%s Impedance(%.4g Hz, %s, %s, %v)", where, f, a, b, removed)
		want, err := m.impedance(f, a, b, removed...)
		if err != nil {
			ty.fail("%s: reference: %v", at, err)
			continue
		}
		z, err := got.Impedance(f, a, b, removed...)
		if err != nil {
			ty.fail("%s: %v", at, err)
			continue
		}
		if cmplx.Abs(want) >= zOpen && cmplx.Abs(z) >= zOpen {
			ty.cmpC("Impedance query (open, >1e9)", math.Inf(1), at, want, z)
			continue
		}
		ty.cmpC("Impedance query", floorZ, at, want, z)
	}
}
