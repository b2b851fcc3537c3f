package main

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
)

// indexReader reads files from the git index (the staged versions), so that
// `check --staged` judges exactly what is about to be committed: circuit
// files, rule sets and libraries alike.
type indexReader struct {
	top string // the repository's top folder, absolute
	wd  string // the working folder, absolute
}

func newIndexReader() (*indexReader, error) {
	out, err := gitOutput("", "rev-parse", "--show-toplevel")
	if err != nil {
		return nil, fmt.Errorf("--staged needs a git repository: %v", err)
	}
	wd, err := os.Getwd()
	if err != nil {
		return nil, err
	}
	top, _ := filepath.EvalSymlinks(strings.TrimSpace(out))
	wd, _ = filepath.EvalSymlinks(wd)
	return &indexReader{top: top, wd: wd}, nil
}

// repoPath turns a path (relative to the working folder, or absolute) into
// the repository-relative, slash-separated form the index uses.
func (x *indexReader) repoPath(p string) (string, bool) {
	if !filepath.IsAbs(p) {
		p = filepath.Join(x.wd, p)
	}
	r, err := filepath.Rel(x.top, filepath.Clean(p))
	if err != nil || strings.HasPrefix(r, "..") {
		return "", false
	}
	return filepath.ToSlash(r), true
}

// ReadFile returns the staged content of p.
func (x *indexReader) ReadFile(p string) ([]byte, error) {
	rp, ok := x.repoPath(p)
	if !ok {
		return nil, fmt.Errorf("%s is outside the repository", p)
	}
	cmd := exec.Command("git", "cat-file", "blob", ":"+rp)
	cmd.Dir = x.top
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		return nil, fmt.Errorf("%s is not in the git index", p)
	}
	return out, nil
}

// Exists reports whether p is staged; the .git folder itself is looked up on
// disk, since discovery stops at the repository root.
func (x *indexReader) Exists(p string) bool {
	if filepath.Base(p) == ".git" {
		_, err := os.Stat(p)
		return err == nil
	}
	rp, ok := x.repoPath(p)
	if !ok {
		return false
	}
	cmd := exec.Command("git", "cat-file", "-e", ":"+rp)
	cmd.Dir = x.top
	return cmd.Run() == nil
}

// stagedCircuits lists the staged *.toml files (added, copied, modified or
// renamed), limited to the given paths when there are any, with their staged
// content. Other TOML files are skipped later, as for a working-tree check.
func (x *indexReader) stagedCircuits(paths []string) ([]input, error) {
	out, err := gitOutput(x.top, "diff", "--cached", "--name-only", "--diff-filter=ACMR", "-z")
	if err != nil {
		return nil, err
	}
	var limits []string
	for _, p := range paths {
		if rp, ok := x.repoPath(p); ok {
			limits = append(limits, rp)
		}
	}
	var names []string
	for _, name := range strings.Split(out, "\x00") {
		if name == "" || !strings.HasSuffix(name, ".toml") || filepath.Base(name) == ".headroom.toml" {
			continue
		}
		if len(limits) > 0 && !under(name, limits) {
			continue
		}
		names = append(names, name)
	}
	sort.Strings(names)
	var inputs []input
	for _, name := range names {
		abs := filepath.Join(x.top, filepath.FromSlash(name))
		data, err := x.ReadFile(abs)
		if err != nil {
			return nil, err
		}
		shown, err := filepath.Rel(x.wd, abs)
		if err != nil {
			shown = abs
		}
		inputs = append(inputs, input{path: shown, data: data})
	}
	return inputs, nil
}

func under(name string, limits []string) bool {
	for _, l := range limits {
		if l == "." || name == l || strings.HasPrefix(name, l+"/") {
			return true
		}
	}
	return false
}

func gitOutput(dir string, args ...string) (string, error) {
	cmd := exec.Command("git", args...)
	cmd.Dir = dir
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		msg := strings.TrimSpace(stderr.String())
		if msg == "" {
			msg = err.Error()
		}
		return "", fmt.Errorf("git %s: %s", args[0], msg)
	}
	return string(out), nil
}
