package output

import (
	"encoding/json"
	"io"
	"net/url"
	"os"
	"path/filepath"
	"strings"

	"headroom/checker/check"
	"headroom/checker/engine"
	"headroom/checker/quantity"
)

// SARIF 2.1.0 (OASIS Static Analysis Results Interchange Format), the subset
// a code-scanning service reads: one run, the rules as reportingDescriptors
// (§3.49), results (§3.27) with physical locations (§3.29) relative to a base
// id (§3.4.4), waived findings as in-source suppressions (§3.35).
type sarifLog struct {
	Schema  string     `json:"$schema"`
	Version string     `json:"version"`
	Runs    []sarifRun `json:"runs"`
}

type sarifRun struct {
	Tool               sarifTool                   `json:"tool"`
	OriginalURIBaseIDs map[string]sarifArtifactLoc `json:"originalUriBaseIds,omitempty"`
	ColumnKind         string                      `json:"columnKind"`
	Results            []sarifResult               `json:"results"`
	Invocations        []sarifInvocation           `json:"invocations"`
}

type sarifTool struct {
	Driver sarifDriver `json:"driver"`
}

type sarifDriver struct {
	Name           string      `json:"name"`
	Version        string      `json:"version"`
	InformationURI string      `json:"informationUri,omitempty"`
	Rules          []sarifRule `json:"rules"`
}

type sarifText struct {
	Text string `json:"text"`
}

type sarifRule struct {
	ID                   string            `json:"id"`
	ShortDescription     sarifText         `json:"shortDescription"`
	FullDescription      sarifText         `json:"fullDescription"`
	Help                 sarifText         `json:"help"`
	DefaultConfiguration map[string]string `json:"defaultConfiguration,omitempty"`
}

type sarifArtifactLoc struct {
	URI       string `json:"uri"`
	URIBaseID string `json:"uriBaseId,omitempty"`
}

type sarifRegion struct {
	StartLine   int `json:"startLine"`
	StartColumn int `json:"startColumn"`
}

type sarifPhysical struct {
	ArtifactLocation sarifArtifactLoc `json:"artifactLocation"`
	Region           sarifRegion      `json:"region"`
}

type sarifLocation struct {
	PhysicalLocation sarifPhysical `json:"physicalLocation"`
}

type sarifSuppression struct {
	Kind          string `json:"kind"`
	Justification string `json:"justification,omitempty"`
}

type sarifResult struct {
	RuleID       string             `json:"ruleId"`
	RuleIndex    int                `json:"ruleIndex"`
	Level        string             `json:"level"`
	Message      sarifText          `json:"message"`
	Locations    []sarifLocation    `json:"locations"`
	Suppressions []sarifSuppression `json:"suppressions,omitempty"`
	Properties   map[string]any     `json:"properties,omitempty"`
}

type sarifNotification struct {
	Level     string          `json:"level"`
	Message   sarifText       `json:"message"`
	Locations []sarifLocation `json:"locations,omitempty"`
}

type sarifInvocation struct {
	ExecutionSuccessful        bool                `json:"executionSuccessful"`
	ToolExecutionNotifications []sarifNotification `json:"toolExecutionNotifications,omitempty"`
}

// baseID names the folder the relative URIs are resolved against.
const baseID = "SRCROOT"

func level(s engine.Severity) string {
	switch s {
	case engine.Error:
		return "error"
	case engine.Warning:
		return "warning"
	}
	return "note"
}

// SARIF writes the check results as a SARIF 2.1.0 log.
func SARIF(w io.Writer, results []check.Result, rules []*engine.Rule, version string) error {
	index := map[string]int{}
	driver := sarifDriver{Name: "headroom", Version: version, Rules: []sarifRule{}}
	for i, r := range rules {
		index[r.ID] = i
		full := strings.TrimSpace(r.Doc.Why + " Metric: " + r.Doc.Formula)
		driver.Rules = append(driver.Rules, sarifRule{ID: r.ID,
			ShortDescription: sarifText{r.Doc.Title}, FullDescription: sarifText{full},
			Help: sarifText{r.Doc.Fix}})
	}
	run := sarifRun{Tool: sarifTool{driver}, ColumnKind: "unicodeCodePoints", Results: []sarifResult{}}
	if wd, err := os.Getwd(); err == nil {
		u := url.URL{Scheme: "file", Path: filepath.ToSlash(wd) + "/"}
		run.OriginalURIBaseIDs = map[string]sarifArtifactLoc{baseID: {URI: u.String()}}
	}
	inv := sarifInvocation{ExecutionSuccessful: true}
	for _, r := range results {
		if r.Skipped {
			continue
		}
		if r.Err != nil {
			j := errorJSON(r.Path, r.Err)
			inv.ExecutionSuccessful = false
			inv.ToolExecutionNotifications = append(inv.ToolExecutionNotifications, sarifNotification{
				Level: "error", Message: sarifText{j.Message},
				Locations: []sarifLocation{location(j.Path, j.Line, j.Column)}})
			continue
		}
		for _, f := range r.Findings {
			res := sarifResult{RuleID: f.Rule, RuleIndex: index[f.Rule], Level: level(f.Severity),
				Message:   sarifText{f.Message + ". Fix: " + f.Fix},
				Locations: []sarifLocation{location(r.Path, f.Pos.Line, f.Pos.Col)}}
			if f.Waived {
				res.Suppressions = []sarifSuppression{{Kind: "inSource", Justification: f.Reason}}
			}
			props := map[string]any{}
			if f.Part != "" {
				props["part"] = f.Part
			}
			if f.HasMetric {
				props["measured"], props["limit"] = quantity.Finite(f.Measured), quantity.Finite(f.Limit)
				props["comparison"], props["unit"] = f.Comparison, f.Unit
			}
			if len(f.Corner) > 0 {
				props["corner"] = f.Corner
			}
			if len(props) > 0 {
				res.Properties = props
			}
			run.Results = append(run.Results, res)
		}
	}
	run.Invocations = []sarifInvocation{inv}
	log := sarifLog{Schema: "https://json.schemastore.org/sarif-2.1.0.json", Version: "2.1.0", Runs: []sarifRun{run}}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(log)
}

// location is a physical location relative to the base id: a relative path
// with forward slashes, escaped as a URI reference.
func location(path string, line, col int) sarifLocation {
	p := filepath.ToSlash(filepath.Clean(path))
	if path == "-" {
		p = "stdin"
	}
	u := (&url.URL{Path: p}).String()
	loc := sarifArtifactLoc{URI: u}
	if !filepath.IsAbs(path) {
		loc.URIBaseID = baseID
	}
	return sarifLocation{sarifPhysical{ArtifactLocation: loc, Region: sarifRegion{StartLine: max(line, 1), StartColumn: max(col, 1)}}}
}
