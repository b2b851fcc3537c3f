package main

import (
	"bytes"
	"fmt"
	"headroom/checker/inputfile"
	"io"
	"os"
	"path/filepath"
	"strings"

	"headroom/checker/check"
	"headroom/checker/edit"
	"headroom/checker/engine"
)

// maxFixRounds bounds the apply-and-check-again loop of one file. Each round
// applies every fix that touches a value no other fix of the round touches,
// so a round is needed only per conflict; a file needing more has fixes that
// undo each other.
const maxFixRounds = 20

// fileDiff is a file's text before and after its fixes.
type fileDiff struct {
	path      string
	old, new  []byte
	fixes     int
	unfixable int // fixes that could not be applied to the text
}

// fixAll applies the offered fixes of every file with findings that carry
// changes, checking the file again after each round, and returns the results
// of the final check. With write, changed files are written in place;
// otherwise nothing is written and the diffs show what would change.
func fixAll(runner *check.Runner, results []check.Result, write bool, stderr io.Writer) ([]check.Result, []fileDiff) {
	var diffs []fileDiff
	for i, r := range results {
		if r.Err != nil || r.Skipped || !hasChanges(r.Findings) {
			continue
		}
		old, err := inputfile.Read(r.Path)
		if err != nil {
			continue // checked from a file that is gone: nothing to fix
		}
		d := fileDiff{path: r.Path, old: old, new: old}
		res := r
		seen := map[string]bool{string(old): true}
		failed := map[engine.Key]bool{}
		for round := 0; round < maxFixRounds; round++ {
			next, applied := fixRound(d.new, res.Findings, failed)
			if applied == 0 || seen[string(next)] {
				break
			}
			again := runner.File(r.Path, next)
			if again.Err != nil { // a fix that breaks the file is not applied
				fmt.Fprintf(stderr, "headroom: %s: a fix made the file unreadable, so it was left out: %v\n", r.Path, again.Err)
				break
			}
			seen[string(next)] = true
			d.new, d.fixes, res = next, d.fixes+applied, again
		}
		d.unfixable = len(failed)
		results[i] = res
		if bytes.Equal(d.old, d.new) {
			continue
		}
		diffs = append(diffs, d)
		if write {
			mode := os.FileMode(0o644)
			if st, err := os.Stat(r.Path); err == nil {
				mode = st.Mode().Perm()
			}
			if err := os.WriteFile(r.Path, d.new, mode); err != nil {
				fmt.Fprintf(stderr, "headroom: %s: %v\n", r.Path, err)
				results[i] = r
				continue
			}
			fmt.Fprintf(stderr, "headroom: %s: applied %s\n", r.Path, fixCount(d.fixes))
		}
	}
	return results, diffs
}

func fixCount(n int) string {
	if n == 1 {
		return "1 fix"
	}
	return fmt.Sprintf("%d fixes", n)
}

func hasChanges(fs []engine.Finding) bool {
	for _, f := range fs {
		if len(f.Changes) > 0 && !f.Waived {
			return true
		}
	}
	return false
}

// fixRound applies the fixes of one round: every unwaived finding's changes,
// except those touching a value that an earlier finding of the round changes
// (they wait for the next round, when the check has seen the first fix).
// A fix whose changes cannot be made is remembered in failed and skipped.
func fixRound(text []byte, fs []engine.Finding, failed map[engine.Key]bool) ([]byte, int) {
	claimed := map[[2]string]bool{} // part, key changed this round
	applied := 0
	for _, f := range fs {
		k := engine.KeyOf(&f)
		if len(f.Changes) == 0 || f.Waived || failed[k] {
			continue
		}
		clash := false
		for _, c := range f.Changes {
			_, taken := claimed[[2]string{c.Part, c.Key}]
			clash = clash || taken
		}
		if clash {
			continue // the check sees the first fix before this one is made (or found unneeded)
		}
		next, err := edit.Apply(text, f.Changes)
		if err != nil {
			failed[k] = true
			continue
		}
		for _, c := range f.Changes {
			claimed[[2]string{c.Part, c.Key}] = true
		}
		text = next
		applied++
	}
	return text, applied
}

// unified writes the change as a unified diff with three lines of context.
func (d fileDiff) unified() string {
	a, b := splitLines(string(d.old)), splitLines(string(d.new))
	ops := diffLines(a, b)
	var out strings.Builder
	p := filepath.ToSlash(d.path)
	fmt.Fprintf(&out, "--- a/%s\n+++ b/%s\n", p, p)
	const context = 3
	for i := 0; i < len(ops); {
		if ops[i].kind == ' ' {
			i++
			continue
		}
		// A hunk: from context lines before this change to context lines after
		// the last change closer than 2*context to the next.
		start := max(i-context, 0)
		end := i
		for j := i; j < len(ops); j++ {
			if ops[j].kind != ' ' {
				end = j
			} else if j-end > 2*context {
				break
			}
		}
		stop := min(end+context+1, len(ops))
		aStart, bStart, aLen, bLen := ops[start].a, ops[start].b, 0, 0
		for _, op := range ops[start:stop] {
			if op.kind != '+' {
				aLen++
			}
			if op.kind != '-' {
				bLen++
			}
		}
		fmt.Fprintf(&out, "@@ -%s +%s @@\n", hunkRange(aStart, aLen), hunkRange(bStart, bLen))
		for _, op := range ops[start:stop] {
			out.WriteByte(op.kind)
			out.WriteString(op.text)
			if !strings.HasSuffix(op.text, "\n") {
				out.WriteString("\n\\ No newline at end of file\n")
			}
		}
		i = stop
	}
	return out.String()
}

func hunkRange(start, n int) string {
	if n == 0 {
		return fmt.Sprintf("%d,0", start)
	}
	if n == 1 {
		return fmt.Sprintf("%d", start+1)
	}
	return fmt.Sprintf("%d,%d", start+1, n)
}

func splitLines(s string) []string {
	if s == "" {
		return nil
	}
	lines := strings.SplitAfter(s, "\n")
	if lines[len(lines)-1] == "" {
		lines = lines[:len(lines)-1]
	}
	return lines
}

type diffOp struct {
	kind byte // ' ', '-' or '+'
	text string
	a, b int // line indexes (from 0) in the old and new text where the op stands
}

// diffLines finds a shortest edit script by the longest common subsequence.
// Circuit files are small (and fixes change a few values), so the quadratic
// table is cheap; a file too large for it is shown as replaced whole.
func diffLines(a, b []string) []diffOp {
	var ops []diffOp
	if len(a)*len(b) > 4_000_000 {
		for i, l := range a {
			ops = append(ops, diffOp{'-', l, i, 0})
		}
		for j, l := range b {
			ops = append(ops, diffOp{'+', l, len(a), j})
		}
		return ops
	}
	n, m := len(a), len(b)
	lcs := make([][]int32, n+1)
	for i := range lcs {
		lcs[i] = make([]int32, m+1)
	}
	for i := n - 1; i >= 0; i-- {
		for j := m - 1; j >= 0; j-- {
			if a[i] == b[j] {
				lcs[i][j] = lcs[i+1][j+1] + 1
			} else {
				lcs[i][j] = max(lcs[i+1][j], lcs[i][j+1])
			}
		}
	}
	i, j := 0, 0
	for i < n || j < m {
		switch {
		case i < n && j < m && a[i] == b[j]:
			ops = append(ops, diffOp{' ', a[i], i, j})
			i, j = i+1, j+1
		case i < n && (j == m || lcs[i+1][j] >= lcs[i][j+1]):
			ops = append(ops, diffOp{'-', a[i], i, j})
			i++
		default:
			ops = append(ops, diffOp{'+', b[j], i, j})
			j++
		}
	}
	return ops
}
