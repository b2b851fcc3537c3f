package check

import (
	"fmt"

	"headroom/checker/circuit"
	"headroom/checker/engine"
)

// The waiver rules are judged here, after every other rule, since they are
// about the other findings.
const (
	ruleExpired = "waiver.expired"
	ruleUnused  = "waiver.unused"
)

// applyWaivers marks findings covered by a waiver in force, reports expired
// waivers (their findings stay unwaived) and waivers that matched nothing.
func applyWaivers(c *circuit.Circuit, cfg *engine.Config, fs []engine.Finding, today string, notJudged []string) []engine.Finding {
	unjudged := map[string]bool{}
	for _, id := range notJudged {
		unjudged[id] = true // a waiver of a rule not judged is not unused
	}
	used := make([]bool, len(c.Waivers))
	for i := range fs {
		f := &fs[i]
		for j, w := range c.Waivers {
			if w.Rule != f.Rule || w.Part != "" && w.Part != f.Part {
				continue
			}
			used[j] = true
			if expired(w, today) {
				continue
			}
			f.Waived, f.Reason = true, w.Reason
			break
		}
	}
	for j, w := range c.Waivers {
		target := "the whole file"
		if w.Part != "" {
			target = w.Part
		}
		switch {
		case expired(w, today):
			if sev := cfg.Severity[ruleExpired]; sev != engine.Off {
				fs = append(fs, engine.Finding{Rule: ruleExpired, Part: w.Part, Pos: w.Pos, Severity: sev,
					Message: fmt.Sprintf("waiver of %s for %s expired on %s", w.Rule, target, w.Expires),
					Fix:     "fix the design, or renew the waiver with a new expires date and a reason that still holds",
					Corner:  map[string]float64{}})
			}
		case !used[j] && !unjudged[w.Rule]:
			if sev := cfg.Severity[ruleUnused]; sev != engine.Off {
				fs = append(fs, engine.Finding{Rule: ruleUnused, Part: w.Part, Pos: w.Pos, Severity: sev,
					Message: fmt.Sprintf("waiver of %s for %s matches no finding", w.Rule, target),
					Fix:     "remove the waiver, or correct the rule or part it names",
					Corner:  map[string]float64{}})
			}
		}
	}
	return fs
}

// expired reports whether a waiver is past its date: it is in force through
// the day it names.
func expired(w *circuit.Waiver, today string) bool {
	return w.Expires != "" && today > w.Expires
}
