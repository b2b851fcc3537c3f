// Package baseline lets a team adopt the check on designs that already have
// findings: a baseline file records today's findings by fingerprint, and a
// later check reports the recorded ones as such without failing on them.
//
// A fingerprint names what a finding is about, not where it is: the rule,
// the part, the bound of a two-bound rule, the file's path from the
// repository root, and its occurrence among findings alike in everything
// else. Moving lines, or a value that shifts without curing the problem,
// keeps the fingerprint; SARIF's partialFingerprints carry the same value.
package baseline

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"sort"
	"unicode/utf8"

	"headroom/checker/engine"
)

// Version is the baseline file's format version.
const Version = 1

// FingerprintKey names the fingerprint in SARIF's partialFingerprints
// (SARIF 2.1.0 §3.27.17: a name with a version suffix).
const FingerprintKey = "headroomFinding/v1"

// Fingerprints returns one fingerprint per finding of one file, in order.
// path is the file's path from the repository root, slash-separated.
func Fingerprints(path string, fs []engine.Finding) []string {
	out := make([]string, len(fs))
	seen := map[[3]string]int{}
	for i, f := range fs {
		k := [3]string{f.Rule, f.Part, f.Bound}
		n := seen[k]
		seen[k] = n + 1
		h := sha256.New()
		fmt.Fprintf(h, "%s\x00%s\x00%s\x00%s\x00%d", f.Rule, f.Part, f.Bound, path, n)
		out[i] = hex.EncodeToString(h.Sum(nil)[:16])
	}
	return out
}

// Entry is one recorded finding. Only the fingerprint matches; the rest is
// for the people who read the file and for reporting a stale entry.
type Entry struct {
	Fingerprint string `json:"fingerprint"`
	Rule        string `json:"rule"`
	Path        string `json:"path"`
	Part        string `json:"part,omitempty"`
	Message     string `json:"message"`
}

// File is a baseline file: JSON, so that review tools show its diff.
type File struct {
	Version  int     `json:"version"`
	Findings []Entry `json:"findings"`
}

// Error is a problem in a baseline file, at a line and column (code
// points, from 1).
type Error struct {
	Line, Col int
	Msg       string
}

func (e *Error) Error() string { return fmt.Sprintf("%d:%d: %s", e.Line, e.Col, e.Msg) }

// Read parses a baseline file; a problem is an *Error with its position.
func Read(data []byte) (*File, error) {
	var f File
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&f); err != nil {
		off := dec.InputOffset()
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			off = se.Offset
		case errors.As(err, &te):
			off = te.Offset
		}
		line, col := position(data, off)
		return nil, &Error{line, col, "not a baseline file: " + err.Error()}
	}
	if f.Version != Version {
		return nil, &Error{1, 1, fmt.Sprintf("baseline version %d, this headroom reads version %d", f.Version, Version)}
	}
	for i, e := range f.Findings {
		if e.Fingerprint == "" || e.Path == "" {
			return nil, &Error{1, 1, fmt.Sprintf("entry %d of findings has no fingerprint or no path", i+1)}
		}
	}
	return &f, nil
}

// position turns a byte offset into a line and a code-point column.
func position(data []byte, off int64) (line, col int) {
	off = max(0, min(off, int64(len(data))))
	before := data[:off]
	line = bytes.Count(before, []byte("\n")) + 1
	col = utf8.RuneCount(before[bytes.LastIndexByte(before, '\n')+1:]) + 1
	return line, col
}

// Write writes entries sorted by path, rule and part, so that a rewritten
// baseline differs from the old one only where findings did.
func Write(w io.Writer, entries []Entry) error {
	sort.SliceStable(entries, func(i, j int) bool {
		a, b := entries[i], entries[j]
		if a.Path != b.Path {
			return a.Path < b.Path
		}
		if a.Rule != b.Rule {
			return a.Rule < b.Rule
		}
		return a.Part < b.Part
	})
	if entries == nil {
		entries = []Entry{}
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(File{Version: Version, Findings: entries})
}

// Matcher marks findings that the baseline records, each entry matching at
// most one finding, and keeps what matched nothing.
type Matcher struct {
	left map[string][]Entry // fingerprint -> entries not yet matched
}

// NewMatcher prepares to match against f.
func NewMatcher(f *File) *Matcher {
	m := &Matcher{left: map[string][]Entry{}}
	for _, e := range f.Findings {
		m.left[e.Fingerprint] = append(m.left[e.Fingerprint], e)
	}
	return m
}

// Match reports whether a finding with this fingerprint is recorded, and
// uses up the entry.
func (m *Matcher) Match(fingerprint string) bool {
	es := m.left[fingerprint]
	if len(es) == 0 {
		return false
	}
	m.left[fingerprint] = es[1:]
	return true
}

// Unmatched returns the entries for path that matched no finding, sorted.
func (m *Matcher) Unmatched(path string) []Entry {
	var out []Entry
	for _, es := range m.left {
		for _, e := range es {
			if e.Path == path {
				out = append(out, e)
			}
		}
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].Rule != out[j].Rule {
			return out[i].Rule < out[j].Rule
		}
		return out[i].Part < out[j].Part
	})
	return out
}
