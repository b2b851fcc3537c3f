package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"

	"headroom/checker/baseline"
	"headroom/checker/check"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/output"
)

// applyBaseline fingerprints every finding and, when a baseline is in force
// (--baseline, or `baseline` in the file's rule set), marks the findings it
// records and reports its entries that match no finding of a checked file.
// It reports whether a baseline was in force.
func (e *env) applyBaseline(runner *check.Runner, results []check.Result, inv output.Invocation, flagRef string,
	read func(string) ([]byte, error)) (bool, error) {
	matchers := map[string]*baseline.Matcher{}
	for i := range results {
		r := &results[i]
		if r.Skipped || r.Err != nil {
			continue
		}
		rootPath := fingerprintPath(inv, r.Path)
		r.Fingerprints = baseline.Fingerprints(rootPath, r.Findings)
		ref := flagRef
		set, err := runner.RuleSet(r.Path)
		if ref == "" && err == nil {
			ref = set.Baseline
		}
		if ref == "" {
			continue
		}
		m, ok := matchers[ref]
		if !ok {
			data, err := read(ref)
			if err != nil {
				return false, &circuit.InputError{Pos: circuit.Pos{File: ref, Line: 1, Col: 1}, Msg: "cannot read the baseline: " + withoutPath(err)}
			}
			f, err := baseline.Read(data)
			if err != nil {
				be := err.(*baseline.Error)
				return false, &circuit.InputError{Pos: circuit.Pos{File: ref, Line: be.Line, Col: be.Col}, Msg: be.Msg}
			}
			m = baseline.NewMatcher(f)
			matchers[ref] = m
		}
		for j := range r.Findings {
			f := &r.Findings[j]
			if !f.Waived && m.Match(r.Fingerprints[j]) {
				f.Baselined = true
			}
		}
		sev := engine.Info
		if err == nil {
			sev = set.Severity["baseline.unused"]
		}
		stale := m.Unmatched(rootPath)
		if sev == engine.Off || len(stale) == 0 {
			continue
		}
		for _, s := range stale {
			target := "the whole file"
			if s.Part != "" {
				target = s.Part
			}
			r.Findings = append(r.Findings, engine.Finding{Rule: "baseline.unused", Part: s.Part,
				Pos: circuit.Pos{File: r.Path, Line: 1, Col: 1}, Severity: sev, Corner: map[string]float64{},
				Message: fmt.Sprintf("baseline entry for %s on %s matches no finding (%s)", s.Rule, target, ref),
				Fix:     "write the baseline again with --write-baseline, or delete the entry"})
		}
		engine.Sort(r.Findings)
		r.Fingerprints = baseline.Fingerprints(rootPath, r.Findings)
	}
	return len(matchers) > 0, nil
}

// fingerprintPath is the path a fingerprint names: from the repository root,
// or as given for standard input and files outside it.
func fingerprintPath(inv output.Invocation, path string) string {
	if path == "-" {
		return path
	}
	p, _ := inv.FromRoot(path)
	return p
}

// writeBaseline records every unwaived finding of the files checked. Input
// errors write nothing: a baseline missing a broken file's findings would
// let them through later.
func (e *env) writeBaseline(file string, results []check.Result, inv output.Invocation) int {
	var entries []baseline.Entry
	for _, r := range results {
		if r.Err != nil {
			e.writeErrors(results)
			return e.usageError("input errors: no baseline written")
		}
		for i, f := range r.Findings {
			if f.Waived || f.Rule == "baseline.unused" {
				continue
			}
			entries = append(entries, baseline.Entry{Fingerprint: r.Fingerprints[i], Rule: f.Rule,
				Path: fingerprintPath(inv, r.Path), Part: f.Part, Message: f.Message})
		}
	}
	var b bytes.Buffer
	baseline.Write(&b, entries)
	if err := os.WriteFile(file, b.Bytes(), 0o644); err != nil {
		return e.usageError("%v", err)
	}
	fmt.Fprintf(e.stderr, "headroom: recorded %s in %s\n", output.Plural(len(entries), "finding"), file)
	return exitOK
}

// withoutPath drops the path a file error repeats (the message names it).
func withoutPath(err error) string {
	if inner := errors.Unwrap(err); inner != nil {
		return inner.Error()
	}
	return err.Error()
}
