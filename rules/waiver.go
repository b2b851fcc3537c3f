package rules

import "headroom/checker/engine"

// WaiverExpired and WaiverUnused are judged by the check driver after every
// other rule, since they are about the other findings; they have no Run.
var WaiverExpired = &engine.Rule{
	ID: "waiver.expired",
	Doc: engine.Doc{
		Title:   "a waiver is past its expires date",
		Why:     "A waiver records a decision that held for a while: a prototype run, a part on order. Past its date the decision must be made again, so the finding it waived is reported again, unwaived.",
		Formula: "today > expires (the waiver is in force through the day it names)",
		Source:  "project policy",
		Fix:     "Fix the design, or renew the waiver with a new date and a reason that still holds.",
	},
}

var WaiverUnused = &engine.Rule{
	ID: "waiver.unused",
	Doc: engine.Doc{
		Title:   "a waiver matches no finding",
		Why:     "A waiver left behind after the design was fixed, or one that names the wrong part, silently hides the next real problem with that rule.",
		Formula: "the waiver's rule and part match no finding of the file",
		Source:  "project policy",
		Fix:     "Remove the waiver, or correct the rule or part it names.",
	},
}

// BaselineUnused is judged by the command line after the check, against the
// baseline file, like an unused waiver; it has no Run.
var BaselineUnused = &engine.Rule{
	ID: "baseline.unused",
	Doc: engine.Doc{
		Title:   "a baseline entry matches no finding",
		Why:     "A baseline records the findings a design had when the team adopted the check. An entry whose finding is gone (fixed, or its part renamed) should leave the baseline, or it would hide the same problem when it comes back.",
		Formula: "the entry's fingerprint (rule, part, bound, path from the repository root) matches no finding of a file that was checked",
		Source:  "project policy",
		Fix:     "Write the baseline again with --write-baseline, or delete the entry.",
	},
}
