// Package linearity estimates how much signal the stages take (docs/noise.md):
// the input third-order intercept and 1 dB compression point of each
// common-emitter and common-base stage from the exponential junction with
// its emitter degeneration, and the largest input level each transistor's
// operating point leaves room for, all referred to the in port through the
// band analysis.
package linearity

import (
	"fmt"
	"math"
	"math/cmplx"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/topology"
)

// nullFloor keeps the closed form away from its IM3 null at gm·RE = 1/2:
// |1 − 2R′| is taken as at least this. The null depends on the impedance at
// the difference frequency and is not to be relied on (REFERENCES: K. L.
// Fong, R. G. Meyer, IEEE JSSC 1998, from memory).
const nullFloor = 0.05

// ccCompression is the junction amplitude ÷ VT at which a stage biased at
// constant current (its emitter resistor bypassed) loses 1 dB of
// fundamental gain: Gm/gm = 2·I1(x)/(x·I0(x)) = 10^(−1/20) at x = 1.0083
// (K. K. Clarke, D. T. Hess, Communication Circuits, 1971, from memory;
// value computed, checked in the tests).
const ccCompression = 1.0083

// cubic1dB is A_1dB ÷ A_IIP3 for a compressive pure cubic: √(0.145 · 3/4),
// the 9.64 dB gap between IIP3 and P1dB.
var cubic1dB = math.Sqrt(0.145 * 3 / 4)

// Stage is one transistor's figures.
type Stage struct {
	Ref    string
	Config string // topology.CommonEmitter, CommonBase or CommonCollector
	// Degeneration R′ = gm·|ZE|, ZE the impedance from the emitter to gnd
	// with the transistor removed, at the band centre.
	Degeneration float64
	// HasIntercept: a common-emitter or common-base stage, active, whose
	// junction the in port reaches; the next four figures mean something.
	HasIntercept bool
	// JunctionIIP3 is the loop drive amplitude (peak, V) at the intercept:
	// 2√2·VT·(1 + R′)²/√|1 − 2R′|.
	JunctionIIP3 float64
	// IIP3DBm and IP1dBDBm are the intercept and the 1 dB compression point
	// referred to the in port: the power an amplitude at the in net carries
	// in the port's impedance, V²/(2·RS), dBm.
	IIP3DBm, IP1dBDBm float64
	// Compressive: R′ > 1/2, where the junction's cubic term compresses;
	// otherwise the 1 dB point is that of constant-current bias.
	Compressive bool

	// The room the operating point leaves, at the worst band point:
	// HasSwing says they were computed (an active transistor the in port
	// reaches).
	HasSwing bool
	// CollectorGain and JunctionGain are |V(c) − V(e)| and |V(b) − V(e)|
	// per volt at the in net, at AtHz (the band point where the collector
	// swing is largest).
	CollectorGain, JunctionGain float64
	AtHz                        float64
	// Room: the collector may swing down by VCE − min_vce and up to vceo,
	// and the emitter current by the quiescent IC (V, V, A).
	RoomDown, RoomUp, RoomCurrent float64
	// MaxInputDBm is the largest in-port level with the swing inside all
	// three, dBm, and Limit names the one that sets it: "vce", "vceo" or
	// "cut-off".
	MaxInputDBm float64
	Limit       string
}

// Result is every stage's figures and the in port's totals.
type Result struct {
	Stages []Stage // file order
	// HasIntercept: some stage has an intercept; IIP3DBm is the cascade
	// 1/IIP3 = Σ 1/IIP3ᵢ (mW, each referred to the in port) and IP1dBDBm
	// the lowest stage's 1 dB point.
	HasIntercept       bool
	IIP3DBm, IP1dBDBm  float64
	HasSwing           bool
	MaxInputDBm        float64 // the lowest stage's
	MaxInputRef        string  // that stage
	PortImpedance      float64 // RS, Ω
	CentreFrequencyHz  float64
	ThermalVoltageVolt float64
}

// Analyze computes the figures of c at its operating point op. minVCE is
// the least VCE the collector may swing down to, V. It needs an in port;
// without one, or without a band analysis, it fails.
func Analyze(c *circuit.Circuit, topo *topology.Topology, op *dc.Result, res *ac.Result, minVCE float64) (*Result, error) {
	in := c.InPort()
	if in == nil || res == nil || op == nil || !res.HasInput {
		return nil, fmt.Errorf("no in port or no band analysis")
	}
	out := &Result{PortImpedance: in.Impedance, CentreFrequencyHz: res.Band[1].Frequency, ThermalVoltageVolt: op.VT}
	rs := in.Impedance
	dbm := func(v float64) float64 { return 10 * math.Log10(v*v/(2*rs)/1e-3) }
	iip3mW := 0.0
	for _, p := range c.Parts {
		tb := topo.BJTs[p.Ref]
		q := op.BJTs[p.Ref]
		if !p.Kind.IsBJT() || tb == nil || q == nil || q.Region != "active" || !(q.ICf > 0) || p.BJT == nil {
			continue
		}
		st := Stage{Ref: p.Ref, Config: tb.Config}
		gm := q.ICf / op.VT
		fc := res.Band[1].Frequency
		ze, err := res.Impedance(fc, tb.Emitter, circuit.Gnd, p.Ref)
		if err != nil {
			continue
		}
		st.Degeneration = gm * cmplx.Abs(ze)
		// The worst band point for the swing; the centre for the intercept.
		for i, bp := range res.Band {
			h, err := res.VoltageRatios(bp.Frequency, tb.Collector, tb.Base, tb.Emitter)
			if err != nil {
				continue
			}
			hc, hj := cmplx.Abs(h[0]-h[2]), cmplx.Abs(h[1]-h[2])
			if i == 1 && hj > 0 && (tb.Config == topology.CommonEmitter || tb.Config == topology.CommonBase) {
				r := st.Degeneration
				st.JunctionIIP3 = LoopIIP3(op.VT, r)
				// The junction swings 1/(1 + R′) of the loop drive.
				vin := st.JunctionIIP3 / (1 + r) / hj
				st.IIP3DBm = dbm(vin)
				st.Compressive = r > 0.5
				v1 := ccCompression * op.VT / hj
				if st.Compressive {
					v1 = cubic1dB * vin
				}
				st.IP1dBDBm = dbm(v1)
				st.HasIntercept = finite(st.IIP3DBm) && finite(st.IP1dBDBm)
			}
			if hc >= st.CollectorGain && (hc > 0 || hj > 0) {
				st.HasSwing, st.CollectorGain, st.JunctionGain, st.AtHz = true, hc, hj, bp.Frequency
			}
		}
		if st.HasSwing {
			st.RoomDown = math.Max(q.VCEf-minVCE, 0)
			st.RoomUp = math.Inf(1)
			if p.BJT.VCEO > 0 {
				st.RoomUp = math.Max(p.BJT.VCEO-q.VCEf, 0)
			}
			st.RoomCurrent = q.ICf
			v, lim := math.Inf(1), ""
			if st.CollectorGain > 0 {
				if x := st.RoomDown / st.CollectorGain; x < v {
					v, lim = x, "vce"
				}
				if x := st.RoomUp / st.CollectorGain; x < v {
					v, lim = x, "vceo"
				}
			}
			// Emitter current swing gm·|vbe| reaches IC at |vbe| = VT.
			if st.JunctionGain > 0 {
				if x := op.VT / st.JunctionGain; x < v {
					v, lim = x, "cut-off"
				}
			}
			st.MaxInputDBm, st.Limit = math.Max(dbm(v), NoRoomDBm), lim
			st.HasSwing = finite(st.MaxInputDBm)
		}
		if st.HasIntercept {
			iip3mW += 1 / math.Pow(10, st.IIP3DBm/10)
			if !out.HasIntercept || st.IP1dBDBm < out.IP1dBDBm {
				out.IP1dBDBm = st.IP1dBDBm
			}
			out.HasIntercept = true
		}
		if st.HasSwing && (!out.HasSwing || st.MaxInputDBm < out.MaxInputDBm) {
			out.HasSwing, out.MaxInputDBm, out.MaxInputRef = true, st.MaxInputDBm, st.Ref
		}
		out.Stages = append(out.Stages, st)
	}
	if out.HasIntercept {
		out.IIP3DBm = -10 * math.Log10(iip3mW)
		if !finite(out.IIP3DBm) {
			out.HasIntercept = false
		}
	}
	return out, nil
}

// NoRoomDBm floors MaxInputDBm: a stage with no room at all (VCE already at
// min_vce) takes nothing, written as this level rather than −∞.
const NoRoomDBm = -200

// LoopIIP3 is the loop drive amplitude (peak, V) at the third-order
// intercept of an exponential junction with emitter degeneration R′ = gm·RE,
// base current ignored: the series inversion of v/VT = (1 + R′)·x − x²/2 +
// x³/3 (x = i/IC) gives b1 = 1/(1 + R′), b3 = (1 − 2R′)/(6(1 + R′)⁵), and
// A = √((4/3)·|b1/b3|)·VT = 2√2·VT·(1 + R′)²/√|1 − 2R′|, with |1 − 2R′| at
// least nullFloor.
func LoopIIP3(vt, r float64) float64 {
	return 2 * math.Sqrt2 * vt * (1 + r) * (1 + r) / math.Sqrt(math.Max(math.Abs(1-2*r), nullFloor))
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
