package topology

import "headroom/checker/circuit"

// A field-effect transistor takes a bipolar transistor's place in the
// topology (docs/fet.md): its drain counts as a collector, its gates as
// bases and its source as an emitter, so capacitor and inductor roles,
// feed and return rails and the inductive feed mean for a FET stage what
// they mean for a bipolar one. Topology.BJTs holds FETs too, under their
// own Kind; rules that judge bipolar figures select parts by Kind.

// fetPins are the pin names of a FET's nets, in circuit.Part.Nets order.
var fetPins = [4]string{"drain", "gate", "source", "gate2"}

// pinName is the name of a transistor's j-th net.
func pinName(k circuit.Kind, j int) string {
	if k.IsFET() {
		return fetPins[j]
	}
	return [3]string{"collector", "base", "emitter"}[j]
}

// positiveFeed reports whether the kind's output terminal is fed from the
// more positive rail (NPN, n-channel).
func positiveFeed(k circuit.Kind) bool {
	return k == circuit.NPN || k == circuit.NJFET || k == circuit.DualGateMOSFET
}

// indexFET records a FET's terminals and the flags its pins set.
func (t *Topology) indexFET(i int, p *circuit.Part, touch func(string, Terminal)) {
	for j, n := range p.Nets {
		if j >= 4 {
			break
		}
		touch(n, Terminal{Ref: p.Ref, Kind: p.Kind, Pin: fetPins[j], Order: i})
		f := t.flags[n]
		switch j {
		case 0:
			f.collector = true
		case 1, 3:
			f.base = true
		case 2:
			f.emitter = true
		}
		if len(f.bjts) == 0 || f.bjts[len(f.bjts)-1] != p {
			f.bjts = append(f.bjts, p)
		}
		t.flags[n] = f
	}
}
