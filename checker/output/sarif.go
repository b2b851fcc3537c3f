package output

import (
	"encoding/json"
	"io"
	"net/url"
	"path/filepath"
	"strings"

	"headroom/checker/baseline"
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

type sarifMessage struct {
	Text     string `json:"text"`
	Markdown string `json:"markdown,omitempty"`
}

type sarifConfig struct {
	Enabled bool   `json:"enabled"`
	Level   string `json:"level"`
}

type sarifRule struct {
	ID                   string       `json:"id"`
	ShortDescription     sarifText    `json:"shortDescription"`
	FullDescription      sarifText    `json:"fullDescription"`
	Help                 sarifMessage `json:"help"`
	DefaultConfiguration *sarifConfig `json:"defaultConfiguration,omitempty"`
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
	RuleID              string             `json:"ruleId"`
	RuleIndex           int                `json:"ruleIndex"`
	Level               string             `json:"level"`
	Message             sarifText          `json:"message"`
	Locations           []sarifLocation    `json:"locations"`
	PartialFingerprints map[string]string  `json:"partialFingerprints,omitempty"`
	BaselineState       string             `json:"baselineState,omitempty"`
	Suppressions        []sarifSuppression `json:"suppressions,omitempty"`
	Properties          map[string]any     `json:"properties,omitempty"`
}

type sarifNotification struct {
	Level     string          `json:"level"`
	Message   sarifText       `json:"message"`
	Locations []sarifLocation `json:"locations,omitempty"`
}

type sarifInvocation struct {
	ExitCode                   int                 `json:"exitCode"`
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

// Invocation describes one run of `check` for the machine-readable formats.
type Invocation struct {
	Root     string                     // SRCROOT: the repository's top (or the working folder), absolute
	WD       string                     // the working folder, absolute: result paths are relative to it
	Version  string                     // the tool's version
	Rules    []*engine.Rule             // every known rule
	Severity map[string]engine.Severity // the effective rule set's severities, for defaultConfiguration
	// Help renders a rule's explain documentation as plain text and Markdown.
	Help     func(r *engine.Rule) (text, markdown string)
	ExitCode int
	Baseline bool // a baseline was in use: results carry baselineState
}

// SARIF writes the check results as a SARIF 2.1.0 log.
func SARIF(w io.Writer, results []check.Result, inv Invocation) error {
	index := map[string]int{}
	driver := sarifDriver{Name: "headroom", Version: inv.Version, Rules: []sarifRule{}}
	for i, r := range inv.Rules {
		index[r.ID] = i
		full := strings.TrimSpace(r.Doc.Why + " Metric: " + r.Doc.Formula)
		rule := sarifRule{ID: r.ID, ShortDescription: sarifText{r.Doc.Title}, FullDescription: sarifText{full},
			Help: sarifMessage{Text: r.Doc.Fix}}
		if inv.Help != nil {
			rule.Help.Text, rule.Help.Markdown = inv.Help(r)
		}
		if inv.Severity != nil {
			sev := inv.Severity[r.ID]
			cfg := &sarifConfig{Enabled: sev != engine.Off, Level: level(sev)}
			if sev == engine.Off {
				cfg.Level = "none"
			}
			rule.DefaultConfiguration = cfg
		}
		driver.Rules = append(driver.Rules, rule)
	}
	run := sarifRun{Tool: sarifTool{driver}, ColumnKind: "unicodeCodePoints", Results: []sarifResult{}}
	if inv.Root != "" {
		run.OriginalURIBaseIDs = map[string]sarifArtifactLoc{baseID: {URI: fileURI(inv.Root) + "/"}}
	}
	invocation := sarifInvocation{ExitCode: inv.ExitCode, ExecutionSuccessful: true}
	for _, r := range results {
		if r.Skipped {
			continue
		}
		if r.Err != nil {
			j := errorJSON(r.Path, r.Err)
			invocation.ExecutionSuccessful = false
			invocation.ToolExecutionNotifications = append(invocation.ToolExecutionNotifications, sarifNotification{
				Level: "error", Message: sarifText{j.Message},
				Locations: []sarifLocation{inv.location(j.Path, j.Line, j.Column)}})
			continue
		}
		for i, f := range r.Findings {
			res := sarifResult{RuleID: f.Rule, RuleIndex: index[f.Rule], Level: level(f.Severity),
				Message:   sarifText{f.Message + ". Fix: " + f.Fix},
				Locations: []sarifLocation{inv.location(r.Path, f.Pos.Line, f.Pos.Col)}}
			if i < len(r.Fingerprints) {
				res.PartialFingerprints = map[string]string{baseline.FingerprintKey: r.Fingerprints[i]}
			}
			if inv.Baseline {
				res.BaselineState = "new"
				if f.Baselined {
					res.BaselineState = "unchanged"
				}
			}
			if f.Waived {
				res.Suppressions = append(res.Suppressions, sarifSuppression{Kind: "inSource", Justification: f.Reason})
			}
			if f.Baselined {
				res.Suppressions = append(res.Suppressions, sarifSuppression{Kind: "external", Justification: "recorded in the baseline file"})
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
	run.Invocations = []sarifInvocation{invocation}
	log := sarifLog{Schema: "https://json.schemastore.org/sarif-2.1.0.json", Version: "2.1.0", Runs: []sarifRun{run}}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(log)
}

// FromRoot returns path (relative to the working folder, or absolute) as a
// slash-separated path from the root, and false when it lies outside it.
func (inv Invocation) FromRoot(path string) (string, bool) {
	abs := path
	if !filepath.IsAbs(abs) {
		abs = filepath.Join(inv.WD, path)
	}
	rel, err := filepath.Rel(inv.Root, filepath.Clean(abs))
	if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return filepath.ToSlash(abs), false
	}
	return filepath.ToSlash(rel), true
}

// location is a physical location: relative to SRCROOT with forward slashes
// when the file lies under it, an absolute file: URI otherwise.
func (inv Invocation) location(path string, line, col int) sarifLocation {
	var loc sarifArtifactLoc
	if path == "-" {
		loc = sarifArtifactLoc{URI: "stdin"}
	} else if rel, ok := inv.FromRoot(path); ok {
		loc = sarifArtifactLoc{URI: (&url.URL{Path: rel}).String(), URIBaseID: baseID}
	} else {
		loc = sarifArtifactLoc{URI: fileURI(rel)}
	}
	return sarifLocation{sarifPhysical{ArtifactLocation: loc, Region: sarifRegion{StartLine: max(line, 1), StartColumn: max(col, 1)}}}
}

// fileURI is an absolute path as a file: URI (RFC 8089), a drive letter
// getting its leading slash.
func fileURI(abs string) string {
	p := filepath.ToSlash(abs)
	if !strings.HasPrefix(p, "/") {
		p = "/" + p
	}
	return (&url.URL{Scheme: "file", Path: p}).String()
}
