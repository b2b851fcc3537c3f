package report

import (
	"encoding/json"
	"io"

	"headroom/checker/circuit"
	"headroom/checker/quantity"
)

type jsonZ struct {
	Re float64 `json:"re"`
	Im float64 `json:"im"`
}

type jsonBand struct {
	Frequency      float64               `json:"frequency"`
	InputImpedance *jsonZ                `json:"input_impedance,omitempty"`
	ReturnLossDB   *float64              `json:"return_loss_db,omitempty"`
	GainDB         *float64              `json:"gain_db"`
	VoltageGainDB  *float64              `json:"voltage_gain_db"`
	Ranges         map[string][2]float64 `json:"ranges,omitempty"`
	hasGain        bool
}

// MarshalJSON leaves the gains out when the circuit has no in/out pair, and
// writes null where a pair exists but no signal reaches the output.
func (b jsonBand) MarshalJSON() ([]byte, error) {
	type plain jsonBand
	if b.hasGain {
		return json.Marshal(plain(b))
	}
	type noGain struct {
		Frequency      float64               `json:"frequency"`
		InputImpedance *jsonZ                `json:"input_impedance,omitempty"`
		ReturnLossDB   *float64              `json:"return_loss_db,omitempty"`
		Ranges         map[string][2]float64 `json:"ranges,omitempty"`
	}
	return json.Marshal(noGain{b.Frequency, b.InputImpedance, b.ReturnLossDB, b.Ranges})
}

type jsonDoc struct {
	Version     int                       `json:"version"`
	Circuit     string                    `json:"circuit"`
	Temperature float64                   `json:"temperature"`
	Error       string                    `json:"error,omitempty"`
	Nets        map[string]float64        `json:"nets"`
	Parts       map[string]map[string]any `json:"parts"`
	Band        []jsonBand                `json:"band"`
	Stability   *jsonStability            `json:"stability,omitempty"`
	Sweep       []jsonSweep               `json:"sweep,omitempty"`
	Filter      *jsonFilter               `json:"filter,omitempty"`
}

// JSON writes the report as FORMAT.md §5's document.
func (r *Report) JSON(w io.Writer) error {
	c, cs := r.Circuit, r.Case
	doc := jsonDoc{Version: 1, Circuit: c.Name, Temperature: c.Ambient.Nominal,
		Nets: map[string]float64{}, Parts: map[string]map[string]any{}, Band: []jsonBand{}}
	if cs.OPErr != nil {
		doc.Error = "no DC operating point: " + cs.OPErr.Error()
	} else if cs.ACErr != nil {
		doc.Error = "no band analysis: " + cs.ACErr.Error()
	}
	op, ac := cs.OP, cs.AC
	if op != nil {
		for _, n := range c.Nets() {
			doc.Nets[n] = quantity.Finite(op.V[n])
		}
	}
	for _, p := range c.Parts {
		e := map[string]any{}
		if op != nil {
			if d := op.Parts[p.Ref]; d != nil {
				switch p.Kind {
				case circuit.Resistor:
					e["current"], e["power"] = quantity.Finite(floored(d.Current, quantity.Ampere)), quantity.Finite(floored(d.Power, quantity.Watt))
				case circuit.Potentiometer:
					e["power"] = quantity.Finite(floored(d.Power, quantity.Watt))
				case circuit.Capacitor:
					e["voltage"] = quantity.Finite(d.Voltage)
				case circuit.Inductor:
					e["current"] = quantity.Finite(floored(d.Current, quantity.Ampere))
				}
			}
			if f := op.FETs[p.Ref]; f != nil {
				r.fetJSON(e, p.Ref, f, ac)
			}
			if b := op.BJTs[p.Ref]; b != nil {
				e["ic"], e["ib"] = quantity.Finite(floored(b.IC, quantity.Ampere)), quantity.Finite(floored(b.IB, quantity.Ampere))
				e["vbe"], e["vce"] = quantity.Finite(b.VBE), quantity.Finite(b.VCE)
				e["power"], e["hfe"], e["region"] = quantity.Finite(floored(b.Power, quantity.Watt)), quantity.Finite(b.HFE), b.Region
				if b.Reversed() {
					e["reversed"] = true // conducts backwards: collector and emitter may be swapped
				}
				if tb := cs.Topo.BJTs[p.Ref]; tb != nil {
					e["configuration"] = tb.Config
				}
				if ac != nil && ac.BJTs[p.Ref] != nil {
					e["gm"], e["beta_high"] = quantity.Finite(ac.BJTs[p.Ref].GM), quantity.Finite(ac.BJTs[p.Ref].BetaHigh)
				}
				if r.Ranges != nil {
					e["ranges"] = r.rangesOf(p.Ref, "ic", "vce", "power")
				}
			}
		}
		if ac != nil {
			if x := ac.Parts[p.Ref]; x != nil {
				if p.Kind == circuit.Inductor {
					e["inductance"] = quantity.Finite(x.Inductance)
				}
				e["reactance"], e["circuit_impedance"] = quantity.Finite(x.Reactance), quantity.Finite(x.CircuitImpedance)
			}
		}
		if role := cs.Topo.Roles[p.Ref]; role != "" {
			e["role"] = role
		}
		if p.Kind == circuit.Transformer {
			ws := map[string]any{}
			for _, wd := range p.Windings {
				we := map[string]any{}
				if op != nil && op.Parts[p.Ref] != nil {
					we["current"] = quantity.Finite(op.Parts[p.Ref].Windings[wd.Name])
				}
				if ac != nil && ac.Windings[p.Ref] != nil {
					if x := ac.Windings[p.Ref][wd.Name]; x != nil {
						we["inductance"], we["reactance"], we["termination"] = quantity.Finite(x.Inductance), quantity.Finite(x.Reactance), quantity.Finite(x.Termination)
					}
				}
				if ac != nil {
					if rl, ok := reflectedLoad(p, wd, ac.Windings[p.Ref]); ok {
						we["reflected_load"] = quantity.Finite(rl)
					}
				}
				ws[wd.Name] = we
			}
			e["windings"] = ws
			e["coupling"], e["coupling_default"] = p.Coupling, !p.CouplingSet
		}
		doc.Parts[p.Ref] = e
	}
	if ac != nil {
		for i, bp := range ac.Band {
			jb := jsonBand{Frequency: bp.Frequency, hasGain: ac.HasGain, GainDB: finp(bp.GainDB), VoltageGainDB: finp(bp.VoltageGainDB)}
			if ac.HasInput {
				jb.InputImpedance = &jsonZ{quantity.Finite(real(bp.InputImpedance)), quantity.Finite(imag(bp.InputImpedance))}
				rl := quantity.Finite(bp.ReturnLossDB)
				jb.ReturnLossDB = &rl
			}
			if r.Ranges != nil {
				jb.Ranges = map[string][2]float64{}
				for _, k := range []string{"gain_db", "return_loss_db"} {
					if v, ok := r.Ranges[bandKey(i, k)]; ok {
						jb.Ranges[k] = [2]float64{quantity.Finite(v[0]), quantity.Finite(v[1])}
					}
				}
			}
			doc.Band = append(doc.Band, jb)
		}
	}
	doc.Filter = r.filterJSON(doc.Parts)
	doc.Stability, doc.Sweep = r.stabilityJSON()
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(doc)
}

func finp(p *float64) *float64 {
	if p == nil {
		return nil
	}
	v := quantity.Finite(*p)
	return &v
}
