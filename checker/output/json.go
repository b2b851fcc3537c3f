// Package output writes the results of `headroom check` in the formats of
// FORMAT.md §5: GNU-style text, JSON and SARIF.
package output

import (
	"encoding/json"
	"errors"
	"io"

	"headroom/checker/check"
	"headroom/checker/circuit"
	"headroom/checker/circuit/tomlfile"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// Summary counts unwaived findings by severity, and the waived ones.
type Summary struct {
	Error   int `json:"error"`
	Warning int `json:"warning"`
	Info    int `json:"info"`
	Waived  int `json:"waived"`
	// Baselined counts findings recorded in the baseline (shown only when some are).
	Baselined int `json:"baselined,omitempty"`
}

// Summarize counts the findings of every file.
func Summarize(results []check.Result) Summary {
	var s Summary
	for _, r := range results {
		for _, f := range r.Findings {
			switch {
			case f.Waived:
				s.Waived++
			case f.Baselined:
				s.Baselined++
			case f.Severity == engine.Error:
				s.Error++
			case f.Severity == engine.Warning:
				s.Warning++
			case f.Severity == engine.Info:
				s.Info++
			}
		}
	}
	return s
}

type jsonFile struct {
	Path    string `json:"path"`
	Circuit string `json:"circuit"`
	RuleSet string `json:"ruleset"`
	Corners string `json:"corners"`
	FailOn  string `json:"fail_on"`
	// NotJudged: the rules not judged because the wiring is broken, and why.
	NotJudged *jsonNotJudged `json:"not_judged,omitempty"`
}

type jsonNotJudged struct {
	Rules  []string `json:"rules"`
	Reason string   `json:"reason"`
}

type jsonFinding struct {
	Rule       string             `json:"rule"`
	Severity   string             `json:"severity"`
	Path       string             `json:"path"`
	Line       int                `json:"line"`
	Column     int                `json:"column"`
	Part       string             `json:"part,omitempty"`
	Message    string             `json:"message"`
	Measured   *float64           `json:"measured,omitempty"`
	Limit      *float64           `json:"limit,omitempty"`
	Comparison string             `json:"comparison,omitempty"`
	Unit       string             `json:"unit,omitempty"`
	AtHz       *float64           `json:"at_hz,omitempty"`
	Corner     map[string]float64 `json:"corner"`
	Fix        string             `json:"fix"`
	Changes    []engine.Change    `json:"changes,omitempty"`
	Waived     bool               `json:"waived"`
	Baselined  bool               `json:"baselined,omitempty"`
	// Fingerprint names the finding apart from its line (package baseline).
	Fingerprint string `json:"fingerprint,omitempty"`
}

type jsonError struct {
	Path    string `json:"path"`
	Line    int    `json:"line"`
	Column  int    `json:"column"`
	Message string `json:"message"`
}

type jsonCheck struct {
	Version  int           `json:"version"`
	Files    []jsonFile    `json:"files"`
	Findings []jsonFinding `json:"findings"`
	Errors   []jsonError   `json:"errors"`
	Summary  Summary       `json:"summary"`
}

// JSON writes the check results as FORMAT.md §5's JSON document.
func JSON(w io.Writer, results []check.Result, extra []error) error {
	doc := jsonCheck{Version: 1, Files: []jsonFile{}, Findings: []jsonFinding{}, Errors: []jsonError{}}
	for _, r := range results {
		if r.Skipped {
			continue
		}
		if r.Err != nil {
			doc.Errors = append(doc.Errors, errorJSON(r.Path, r.Err))
			continue
		}
		jf := jsonFile{Path: r.Path, Circuit: r.Circuit, RuleSet: r.RuleSet, Corners: r.Corners, FailOn: r.FailOn.String()}
		if len(r.NotJudged) > 0 {
			jf.NotJudged = &jsonNotJudged{Rules: r.NotJudged, Reason: r.NotJudgedWhy}
		}
		doc.Files = append(doc.Files, jf)
		for i, f := range r.Findings {
			j := findingJSON(r.Path, f)
			if i < len(r.Fingerprints) {
				j.Fingerprint = r.Fingerprints[i]
			}
			doc.Findings = append(doc.Findings, j)
		}
	}
	for _, e := range extra {
		doc.Errors = append(doc.Errors, errorJSON("", e))
	}
	doc.Summary = Summarize(results)
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(doc)
}

func findingJSON(path string, f engine.Finding) jsonFinding {
	j := jsonFinding{Rule: f.Rule, Severity: f.Severity.String(), Path: path, Line: f.Pos.Line,
		Column: f.Pos.Col, Part: f.Part, Message: f.Message, Corner: f.Corner, Fix: f.Fix,
		Changes: f.Changes, Waived: f.Waived, Baselined: f.Baselined}
	if j.Corner == nil {
		j.Corner = map[string]float64{}
	}
	if f.HasMetric {
		m, l := quantity.Finite(f.Measured), quantity.Finite(f.Limit)
		j.Measured, j.Limit, j.Comparison, j.Unit = &m, &l, f.Comparison, f.Unit
	}
	if f.AtHz > 0 {
		hz := quantity.Finite(f.AtHz)
		j.AtHz = &hz
	}
	return j
}

// errorJSON places an input error (of a circuit, library or rule-set file);
// an error without a position points at 1:1 of the file being checked.
func errorJSON(path string, err error) jsonError {
	var ie *circuit.InputError
	var te *tomlfile.Error
	j := jsonError{Path: path, Line: 1, Column: 1, Message: err.Error()}
	switch {
	case errors.As(err, &ie):
		j = jsonError{Path: ie.Pos.File, Line: ie.Pos.Line, Column: ie.Pos.Col, Message: ie.Msg}
	case errors.As(err, &te):
		j = jsonError{Path: te.File, Line: te.Pos.Line, Column: te.Pos.Col, Message: te.Msg}
	}
	if j.Path == "" {
		j.Path = path
	}
	j.Line, j.Column = max(j.Line, 1), max(j.Column, 1)
	return j
}
