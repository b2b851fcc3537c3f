package crosscheck

// The signal-handling figures of checker/linearity recomputed from their
// documented definitions (docs/noise.md) on the reference model: the
// transfers from fresh solves with the in port driven, the degeneration
// from a fresh impedance solve, the largest input level from the reference
// operating point.

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"headroom/checker/ac"
	"headroom/checker/circuit"
	"headroom/checker/dc"
	"headroom/checker/linearity"
	"headroom/checker/topology"
)

func TestLinearityAgainstReference(t *testing.T) {
	ty := newTally(t)
	n := circuitCount(300, 60)
	stages := 0
	for seed := uint64(1); seed <= uint64(n); seed++ {
		c := genCircuit(seed, false)
		in := c.InPort()
		if in == nil {
			continue
		}
		ref, refErr := refSolveDC(c)
		got, gotErr := dc.Solve(c)
		if refErr != nil || gotErr != nil {
			continue
		}
		gac, err := ac.Analyze(c, got)
		if err != nil {
			continue
		}
		topo := topology.Analyze(c)
		res, err := linearity.Analyze(c, topo, got, gac, 0.3)
		if err != nil {
			ty.fail("seed %d: linearity: %v", seed, err)
			continue
		}
		m := newACModel(c, ref)
		for _, st := range res.Stages {
			tb, p, rb := topo.BJTs[st.Ref], c.Part(st.Ref), ref.BJT[st.Ref]
			if rb == nil || nearBoundary(rb) {
				continue
			}
			where := fmt.Sprintf("seed %d %s", seed, st.Ref)
			gm := rb.ICf / ref.VT
			fc := gac.Band[1].Frequency
			ze, err := m.impedance(fc, tb.Emitter, circuit.Gnd, st.Ref)
			if err != nil {
				ty.fail("%s: reference impedance: %v", where, err)
				continue
			}
			ty.cmp("gm·|ZE|", 1e-6, where, gm*cmplx.Abs(ze), st.Degeneration)
			if !st.HasSwing {
				continue
			}
			stages++
			a := m.stamp(st.AtHz, nil, true)
			a.source(in.Net, 1)
			v, err := a.solve()
			if err != nil || v[in.Net] == 0 {
				ty.fail("%s: reference solve: %v", where, err)
				continue
			}
			hc := cmplx.Abs((v[tb.Collector] - v[tb.Emitter]) / v[in.Net])
			hj := cmplx.Abs((v[tb.Base] - v[tb.Emitter]) / v[in.Net])
			ty.cmp("collector gain", 1e-9, where, hc, st.CollectorGain)
			ty.cmp("junction gain", 1e-9, where, hj, st.JunctionGain)
			// The largest level, from the definition.
			vmax := math.Inf(1)
			if hc > 0 {
				vmax = math.Min(math.Max(rb.VCEf-0.3, 0)/hc, vmax)
				if p.BJT.VCEO > 0 {
					vmax = math.Min(math.Max(p.BJT.VCEO-rb.VCEf, 0)/hc, vmax)
				}
			}
			if hj > 0 {
				vmax = math.Min(ref.VT/hj, vmax)
			}
			want := math.Max(10*math.Log10(vmax*vmax/(2*in.Impedance)/1e-3), linearity.NoRoomDBm)
			ty.cmp("largest input dBm", 1e-3, where, want, st.MaxInputDBm)
		}
	}
	t.Logf("%d stages compared", stages)
	ty.log()
	if stages < n/4 {
		t.Errorf("only %d stages in %d circuits: the generator has drifted", stages, n)
	}
}
