// Package ac is the small-signal analysis of FORMAT.md §6: complex nodal
// analysis of the circuit linearised at its DC operating point, at the band's
// lowest frequency, its geometric centre and its highest frequency. It gives
// the band figures the report prints and the impedances the reactance rules
// judge against. Plan analyses the worst-case search's cases of one circuit
// on the numbering and branches built once from the nominal circuit.
package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"sync"

	"headroom/checker/circuit"
	"headroom/checker/dc"
)

// MaxReturnLossDB caps the return loss of a (nearly) perfect match; the same
// figure, negated, floors it, which is reached only when the input impedance
// is within a part in 10⁴ of −RS (a network that is singular with the source
// connected) and keeps the figure finite.
const MaxReturnLossDB = 99

// Result is the small-signal analysis of one circuit at one operating point.
// Every figure is in SI base units and finite.
type Result struct {
	// Band holds the lowest band frequency, the geometric centre √(lo·hi) and
	// the highest, in that order.
	Band [3]BandPoint
	// HasInput: the circuit has an in port, so InputImpedance and
	// ReturnLossDB mean something (they are zero otherwise).
	HasInput bool
	// HasGain: the circuit has exactly one in and one out port, so the gains
	// are computed (each may still be nil where no signal reaches the output).
	HasGain bool
	// Parts holds every capacitor and inductor, by reference.
	Parts map[string]*Reactive
	// Windings holds every transformer's windings: reference → winding name.
	Windings map[string]map[string]*Winding
	// BJTs holds every transistor's small-signal model, by reference.
	BJTs map[string]*BJT
	// FETs holds every field-effect transistor's small-signal model (fet.go).
	FETs map[string]*FET

	net   *network
	mu    sync.Mutex
	freqs map[float64]*freq
	cache map[cacheKey]complex128
}

// BandPoint is the circuit seen from its ports at one frequency.
type BandPoint struct {
	Frequency float64 // Hz
	// InputImpedance looks from the in port's net into the circuit, the port
	// itself excluded, Ω.
	InputImpedance complex128
	// ReturnLossDB is −20·log10|Γ|, Γ = (Zin − RS)/(Zin + RS). Not clamped
	// from below (a negative input resistance gives |Γ| > 1 and a negative
	// figure) except at ±MaxReturnLossDB, so it stays finite.
	ReturnLossDB float64
	// GainDB is the transducer gain 10·log10((|Vout|²/RL)/(|E|²/(4·RS))); nil
	// without HasGain or when no signal reaches the out port's net.
	GainDB *float64
	// VoltageGainDB is 20·log10|Vout/Vin|, Vin the voltage at the in port's
	// net; nil as GainDB, and also when Vin is zero (in net AC ground).
	VoltageGainDB *float64
}

// Reactive is a capacitor or inductor at the lowest band frequency.
type Reactive struct {
	// Reactance is 1/(ωC) for a capacitor (nominal value) or ωL for an
	// inductor (resistance ignored), Ω.
	Reactance float64
	// Inductance is L for an inductor (AL·N² when given by turns), H; 0 for a
	// capacitor.
	Inductance float64
	// CircuitImpedance is |the impedance the rest of the circuit presents
	// between the part's two nets| with the part removed, Ω (see Impedance).
	CircuitImpedance float64
}

// Winding is one transformer winding at the lowest band frequency.
type Winding struct {
	Inductance float64 // AL·N², H
	Reactance  float64 // ω·AL·N², Ω (resistance and leakage ignored)
	// Termination is |the impedance between the winding's two nets| with the
	// whole transformer removed, Ω.
	Termination float64
}

// BJT is a transistor's hybrid-π model at the operating point.
type BJT struct {
	GM  float64 // IC/VT, S; 0 when IC ≤ 0
	Rpi float64 // βF/gm, Ω; 0 when GM is 0, meaning rπ is open
	Cpi float64 // max(gm/(2π·ft) − Cμ, 0), F
	Cmu float64 // cob, F
	// BetaHigh is ft ÷ the highest band frequency: β(f) ≈ ft/f there.
	BetaHigh float64
}

// Analyze linearises c at op and solves it at the band's three frequencies.
// op may be nil for a circuit without transistors. It fails when a value
// cannot be modelled (the loader should have refused it) or the network is
// singular at a band frequency.
func Analyze(c *circuit.Circuit, op *dc.Result) (*Result, error) {
	return analyze(c, op, nil)
}

// analyze is Analyze, with the network built as a copy of like when like is
// not nil (see build; errShape when c does not fit it).
func analyze(c *circuit.Circuit, op *dc.Result, like *network) (*Result, error) {
	lo, hi := c.Band[0], c.Band[1]
	if !positive(lo) || !positive(hi) || hi < lo {
		return nil, fmt.Errorf("band %g–%g Hz is not two positive frequencies, lowest first", lo, hi)
	}
	nw, err := build(c, op, like)
	if err != nil {
		return nil, err
	}
	var reactive, windings, bjts, fets int // the maps' sizes, so that they do not grow entry by entry
	queries := 0                           // partFigures' Impedance queries, each one cache entry
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Capacitor, circuit.Inductor:
			reactive++
			queries++
		case circuit.Transformer:
			windings++
			queries += len(p.Windings)
		case circuit.NPN, circuit.PNP:
			bjts++
		case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
			fets++
		}
	}
	r := &Result{
		HasInput: nw.hasIn,
		HasGain:  nw.gains,
		Parts:    make(map[string]*Reactive, reactive),
		Windings: make(map[string]map[string]*Winding, windings),
		BJTs:     make(map[string]*BJT, bjts),
		FETs:     make(map[string]*FET, fets),
		net:      nw,
		freqs:    map[float64]*freq{},
		cache:    make(map[cacheKey]complex128, queries),
	}
	for i, f := range [3]float64{lo, math.Sqrt(lo * hi), hi} {
		if r.Band[i], err = r.bandPoint(f); err != nil {
			return nil, err
		}
	}
	if err := r.partFigures(c, op, lo, hi); err != nil {
		return nil, err
	}
	return r, nil
}

// bandPoint solves the circuit at f. With x0 = Y0⁻¹·e_in (the base matrix
// leaves the source impedance out), Zin = x0[in], and with the source
// connected every node voltage is x0·E/(RS + Zin).
func (r *Result) bandPoint(f float64) (BandPoint, error) {
	p := BandPoint{Frequency: f}
	r.mu.Lock()
	defer r.mu.Unlock()
	fr, err := r.at(f)
	if err != nil {
		return p, err
	}
	nw := r.net
	if !nw.hasIn {
		return p, nil
	}
	x0 := fr.solveBranch(branch{nw.inNode, ground})
	zin := across(x0, branch{nw.inNode, ground})
	if !finite(zin) {
		return p, fmt.Errorf("input impedance at %g Hz: %w", f, errSingular)
	}
	p.InputImpedance = zin
	rs := complex(nw.rs, 0)
	p.ReturnLossDB = returnLoss(zin, nw.rs)
	if !nw.gains {
		return p, nil
	}
	vout := across(x0, branch{nw.outNd, ground}) // Vout·(RS + Zin)/E
	if vout == 0 || zin+rs == 0 {
		return p, nil
	}
	gt := 4 * nw.rs / nw.rl * sq(cmplx.Abs(vout)/cmplx.Abs(rs+zin))
	if g := 10 * math.Log10(gt); !math.IsInf(g, 0) && !math.IsNaN(g) {
		p.GainDB = &g
	}
	if zin != 0 {
		if g := 20 * math.Log10(cmplx.Abs(vout)/cmplx.Abs(zin)); !math.IsInf(g, 0) && !math.IsNaN(g) {
			p.VoltageGainDB = &g
		}
	}
	return p, nil
}

// At is the circuit seen from its ports at any frequency f (Hz), computed as
// the band points are.
func (r *Result) At(f float64) (BandPoint, error) { return r.bandPoint(f) }

// returnLoss is −20·log10|(z − rs)/(z + rs)| within ±MaxReturnLossDB.
func returnLoss(z complex128, rs float64) float64 {
	num := cmplx.Abs(z - complex(rs, 0))
	den := cmplx.Abs(z + complex(rs, 0))
	if num == 0 {
		return MaxReturnLossDB
	}
	if den == 0 {
		return -MaxReturnLossDB
	}
	return math.Max(-MaxReturnLossDB, math.Min(MaxReturnLossDB, -20*math.Log10(num/den)))
}

func sq(x float64) float64 { return x * x }

// partFigures fills Parts, Windings and BJTs.
func (r *Result) partFigures(c *circuit.Circuit, op *dc.Result, lo, hi float64) error {
	w := 2 * math.Pi * lo
	// The figures are cut from one block per kind: an allocation per part
	// was a good share of a case's.
	reactive := make([]Reactive, 0, len(c.Parts))
	var bjts []BJT
	if op != nil {
		bjts = make([]BJT, 0, len(op.BJTs))
	}
	for _, p := range c.Parts {
		switch p.Kind {
		case circuit.Capacitor, circuit.Inductor:
			z, err := r.Impedance(lo, p.Nets[0], p.Nets[1], p.Ref)
			if err != nil {
				return fmt.Errorf("part %s: %w", p.Ref, err)
			}
			reactive = append(reactive, Reactive{CircuitImpedance: cmplx.Abs(z)})
			x := &reactive[len(reactive)-1]
			if p.Kind == circuit.Capacitor {
				x.Reactance = 1 / (w * p.Value)
			} else {
				x.Inductance = p.Inductance()
				x.Reactance = w * x.Inductance
			}
			r.Parts[p.Ref] = x
		case circuit.Transformer:
			ws := make(map[string]*Winding, len(p.Windings))
			wds := make([]Winding, len(p.Windings)) // one block for the transformer's windings
			for k, wd := range p.Windings {
				z, err := r.Impedance(lo, wd.Nets[0], wd.Nets[1], p.Ref)
				if err != nil {
					return fmt.Errorf("part %s winding %s: %w", p.Ref, wd.Name, err)
				}
				l := p.AL * wd.Turns * wd.Turns
				wds[k] = Winding{Inductance: l, Reactance: w * l, Termination: cmplx.Abs(z)}
				ws[wd.Name] = &wds[k]
			}
			r.Windings[p.Ref] = ws
		case circuit.NPN, circuit.PNP:
			h, err := hybridPi(p, op)
			if err != nil {
				return fmt.Errorf("part %s: %w", p.Ref, err)
			}
			if len(bjts) == cap(bjts) {
				bjts = make([]BJT, 0, 4) // more transistors than the operating point lists
			}
			bjts = append(bjts, BJT{GM: h.GM, Rpi: h.Rpi, Cpi: h.Cpi, Cmu: h.Cmu, BetaHigh: h.FT / hi})
			r.BJTs[p.Ref] = &bjts[len(bjts)-1]
		case circuit.NJFET, circuit.PJFET, circuit.DualGateMOSFET:
			f, err := fetModel(p, op)
			if err != nil {
				return fmt.Errorf("part %s: %w", p.Ref, err)
			}
			r.FETs[p.Ref] = f
		}
	}
	return nil
}
