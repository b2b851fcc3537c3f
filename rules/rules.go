// Package rules holds headroom's rules, one file each. A rule measures one
// analysed case and reports what it judged; thresholds and severities come
// from the rule set, and the engine decides what fails.
package rules

import (
	"sort"

	"headroom/checker/engine"
)

// All returns every rule, sorted by id. The list is written out by hand so
// that adding a rule is one visible line here.
func All() []*engine.Rule {
	list := []*engine.Rule{
		BiasCollectorHeadroom,
		BiasDividerStiffness,
		BiasDrift,
		BiasEmitterFraction,
		BiasRegion,
		BJTCurrent,
		BJTDissipation,
		BJTFtHeadroom,
		BJTVoltage,
		BaselineUnused,
		BypassReactance,
		CapacitorVoltage,
		ChokeReactance,
		CoreFrequency,
		CouplingReactance,
		DecouplingReactance,
		FETBiasSpread,
		FETDissipation,
		FETFtHeadroom,
		FETRegion,
		FETVoltage,
		FilterPassband,
		FilterRejection,
		MatchInput,
		NetConnectivity,
		ResistorPower,
		SafetyVoltage,
		TankTuning,
		StabilityOscillation,
		StabilityUnconditional,
		ValuesPreferred,
		WaiverExpired,
		WaiverUnused,
		WindingReactance,
	}
	sort.Slice(list, func(i, j int) bool { return list[i].ID < list[j].ID })
	return list
}

// ByID returns the rule with the given id, or nil.
func ByID(id string) *engine.Rule {
	for _, r := range All() {
		if r.ID == id {
			return r
		}
	}
	return nil
}
