package check

import (
	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/ruleset"
	"headroom/checker/topology"
)

// Judged is one item a rule judged, passing or failing, as the margin
// picture shows it: at nominal and, with worst-case corners, at its worst
// case.
type Judged struct {
	Nominal *engine.Finding // nil when nominal did not judge it
	Worst   *engine.Finding // nil with nominal corners
	// Severity is the rule's, or error for a load past the absolute rating
	// (as File reports it); Failing says whether the item reported (the
	// worst case, else nominal) fails.
	Severity engine.Severity
	Failing  bool
	Waived   bool // failing, and a waiver in force covers it
}

// Items judges c under set as File does and returns every item every rule
// judged, one per rule, part and bound, in the engine's order, with the
// topology and nominal case it analysed. The whole-circuit check of fixes is
// not run: items are measured, not mended.
func (r *Runner) Items(c *circuit.Circuit, set *ruleset.Set) ([]Judged, *topology.Topology, *analysis.Case, error) {
	cfg := set.Config(r.opt.Rules)
	topo, j, cfg := r.prepare(c, cfg)
	nom, err := engine.Measure(j.nominal, nil, cfg)
	if err != nil {
		return nil, topo, j.nominal, err
	}
	var worst []engine.Finding
	if cfg.Corners == "worst" {
		if worst, err = r.measureCase(c, topo, j.nominal, cfg); err != nil {
			return nil, topo, j.nominal, err
		}
	}
	var out []Judged
	at := map[engine.Key]int{}
	for i := range nom {
		at[engine.KeyOf(&nom[i])] = len(out)
		out = append(out, Judged{Nominal: &nom[i]})
	}
	for i := range worst {
		k := engine.KeyOf(&worst[i])
		if n, ok := at[k]; ok {
			out[n].Worst = &worst[i]
			continue
		}
		at[k] = len(out)
		out = append(out, Judged{Worst: &worst[i]})
	}
	for i := range out {
		it := &out[i]
		f := it.Worst
		if f == nil {
			f = it.Nominal
		}
		it.Failing = f.Failing()
		it.Severity = cfg.Severity[f.Rule]
		if f.Absolute > 1 {
			it.Severity = engine.Error
		}
		for _, w := range c.Waivers {
			if it.Failing && w.Rule == f.Rule && (w.Part == "" || w.Part == f.Part) && !expired(w, r.opt.Today) {
				it.Waived = true
				break
			}
		}
	}
	return out, topo, j.nominal, nil
}
