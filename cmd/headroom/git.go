package main

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"sync"
)

// indexReader reads files from the git index (the staged versions), so that
// `check --staged` judges exactly what is about to be committed: circuit
// files, rule sets and libraries alike. The index is listed once (`git
// ls-files -s -z`, path to object id) and blobs come from one long-running
// `git cat-file --batch`, asked by object id: a path is never spelled as a
// revision, so no file name (`0:x.toml`, `..board.toml`) can be read as
// another's entry.
type indexReader struct {
	top     string            // the repository's top folder, absolute
	wd      string            // the working folder, absolute
	entries map[string]string // repository path (slash-separated) -> object id, stage 0
	diff    string            // `git diff --cached --raw -z`: the staged changes

	mu    sync.Mutex // guards the batch process and the cache
	batch *catFile
	blobs map[string][]byte // object id -> content
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
	x := &indexReader{top: top, wd: wd, entries: map[string]string{}, blobs: map[string][]byte{}}
	// The index listing, the staged changes and the batch process start
	// together: on a busy machine each git start costs more than its work.
	diff := make(chan gitResult, 1)
	go func() {
		out, err := gitOutput(top, "diff", "--cached", "--raw", "--no-renames", "--no-abbrev", "-z")
		diff <- gitResult{out, err}
	}()
	if x.batch, err = startCatFile(top); err != nil {
		return nil, err
	}
	ls, err := gitOutput(top, "ls-files", "-s", "-z")
	d := <-diff
	if err == nil {
		err = d.err
	}
	if err != nil {
		x.Close()
		return nil, err
	}
	x.entries, x.diff = parseLsFiles(ls), d.out
	return x, nil
}

type gitResult struct {
	out string
	err error
}

// parseLsFiles reads `git ls-files -s -z`: "MODE OID STAGE\tPATH\x00" per
// entry. Only stage 0 counts; an unmerged path cannot be committed anyway.
func parseLsFiles(out string) map[string]string {
	entries := map[string]string{}
	for _, rec := range strings.Split(out, "\x00") {
		meta, path, ok := strings.Cut(rec, "\t")
		if !ok {
			continue
		}
		f := strings.Fields(meta)
		if len(f) != 3 || f[2] != "0" || !strings.HasPrefix(f[0], "100") { // regular files only, not links or submodules
			continue
		}
		entries[path] = f[1]
	}
	return entries
}

// repoPath turns a path (relative to the working folder, or absolute) into
// the repository-relative, slash-separated form the index uses.
func (x *indexReader) repoPath(p string) (string, bool) {
	if !filepath.IsAbs(p) {
		p = filepath.Join(x.wd, p)
	}
	r, err := filepath.Rel(x.top, filepath.Clean(p))
	if err != nil || r == ".." || strings.HasPrefix(r, ".."+string(filepath.Separator)) {
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
	oid, ok := x.entries[rp]
	if !ok {
		return nil, fmt.Errorf("%s is not in the git index", p)
	}
	return x.blob(oid)
}

// blob reads one object through the batch process, once per object id.
func (x *indexReader) blob(oid string) ([]byte, error) {
	x.mu.Lock()
	defer x.mu.Unlock()
	if b, ok := x.blobs[oid]; ok {
		return b, nil
	}
	if x.batch == nil {
		b, err := startCatFile(x.top)
		if err != nil {
			return nil, err
		}
		x.batch = b
	}
	data, err := x.batch.read(oid)
	if err != nil {
		return nil, err
	}
	x.blobs[oid] = data
	return data, nil
}

// Close ends the batch process.
func (x *indexReader) Close() {
	x.mu.Lock()
	defer x.mu.Unlock()
	if x.batch != nil {
		x.batch.close()
		x.batch = nil
	}
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
	_, ok = x.entries[rp]
	return ok
}

// catFile is one `git cat-file --batch` process: an object id in, "OID TYPE
// SIZE\n", the content and a newline out.
type catFile struct {
	cmd *exec.Cmd
	in  io.WriteCloser
	out *bufio.Reader
}

func startCatFile(dir string) (*catFile, error) {
	cmd := exec.Command("git", "cat-file", "--batch")
	cmd.Dir = dir
	in, err := cmd.StdinPipe()
	if err != nil {
		return nil, err
	}
	out, err := cmd.StdoutPipe()
	if err != nil {
		return nil, err
	}
	if err := cmd.Start(); err != nil {
		return nil, fmt.Errorf("git cat-file: %v", err)
	}
	return &catFile{cmd: cmd, in: in, out: bufio.NewReaderSize(out, 64<<10)}, nil
}

func (c *catFile) read(oid string) ([]byte, error) {
	if _, err := io.WriteString(c.in, oid+"\n"); err != nil {
		return nil, fmt.Errorf("git cat-file: %v", err)
	}
	head, err := c.out.ReadString('\n')
	if err != nil {
		return nil, fmt.Errorf("git cat-file: %v", err)
	}
	f := strings.Fields(head)
	if len(f) != 3 || f[1] != "blob" {
		return nil, fmt.Errorf("git cat-file: object %s: %s", oid, strings.TrimSpace(head))
	}
	size, err := strconv.ParseInt(f[2], 10, 64)
	if err != nil || size < 0 {
		return nil, fmt.Errorf("git cat-file: object %s: bad size %q", oid, f[2])
	}
	data := make([]byte, size+1) // the content and its closing newline
	if _, err := io.ReadFull(c.out, data); err != nil {
		return nil, fmt.Errorf("git cat-file: object %s: %v", oid, err)
	}
	return data[:size], nil
}

func (c *catFile) close() {
	c.in.Close()
	c.cmd.Wait()
}

// stagedChanges lists the staged *.toml files under the paths, sorted, in
// one `git diff --cached --raw -z`: those added, copied, modified or renamed
// (as they are in the index), and those deleted or renamed away that were
// not circuits (a rule set or library whose loss touches other circuits;
// a deleted circuit touches none).
func (x *indexReader) stagedChanges(paths []string) (present, deleted []string, err error) {
	out := x.diff
	limits, err := x.limits(paths)
	if err != nil {
		return nil, nil, err
	}
	// Records: ":MODE MODE OLD NEW STATUS" then the path, each ended by NUL.
	fields := strings.Split(out, "\x00")
	for i := 0; i+1 < len(fields); i += 2 {
		meta, name := strings.Fields(fields[i]), fields[i+1]
		if len(meta) != 5 || !strings.HasSuffix(name, ".toml") || !under(name, limits) {
			continue
		}
		switch status := meta[4]; {
		case strings.HasPrefix(status, "D"):
			if path.Base(name) != ".headroom.toml" {
				if old, err := x.blob(meta[2]); err == nil && circuitHeader.Match(old) {
					continue
				}
			}
			deleted = append(deleted, name)
		default:
			if _, ok := x.entries[name]; ok {
				present = append(present, name)
			}
		}
	}
	sort.Strings(present)
	sort.Strings(deleted)
	return present, deleted, nil
}

func (x *indexReader) limits(paths []string) ([]string, error) {
	var limits []string
	for _, p := range paths {
		rp, ok := x.repoPath(p)
		if !ok {
			return nil, fmt.Errorf("%s is outside the repository", p)
		}
		limits = append(limits, rp)
	}
	return limits, nil
}

// stagedCircuits is what `check --staged` checks: every staged TOML file
// (rule sets and other TOML are skipped later, as in a working-tree check)
// and, when a rule set or part library is staged or deleted, every TOML file
// in the index, marked extra: after checking, keepTouched keeps those whose
// rule sets or libraries include a staged file (staged, by repository path),
// and those below a deleted rule set.
func (x *indexReader) stagedCircuits(paths []string) (inputs []input, staged map[string]bool, err error) {
	names, deleted, err := x.stagedChanges(paths)
	if err != nil {
		return nil, nil, err
	}
	staged = map[string]bool{}
	touchesOthers := len(deleted) > 0
	for _, name := range names {
		staged[name] = true
		if touchesOthers {
			continue
		}
		data, err := x.blob(x.entries[name])
		if err != nil {
			return nil, nil, err
		}
		touchesOthers = path.Base(name) == ".headroom.toml" || !circuitHeader.Match(data)
	}
	var removedSets []string // folders whose rule set was deleted
	for _, name := range deleted {
		staged[name] = true // a circuit that named a deleted library records it in Uses
		if path.Base(name) == ".headroom.toml" {
			removedSets = append(removedSets, path.Dir(name))
		}
	}
	all := names
	if touchesOthers {
		all = x.indexTOML(paths)
	}
	for _, name := range all {
		if path.Base(name) == ".headroom.toml" {
			continue
		}
		data, err := x.blob(x.entries[name])
		if err != nil {
			return nil, nil, err
		}
		abs := filepath.Join(x.top, filepath.FromSlash(name))
		shown, err := filepath.Rel(x.wd, abs)
		if err != nil {
			shown = abs
		}
		belowRemoved := len(removedSets) > 0 && under(name, removedSets)
		inputs = append(inputs, input{path: shown, data: data, walked: true, extra: !staged[name] && !belowRemoved})
	}
	return inputs, staged, nil
}

// indexTOML lists every *.toml file in the index under the limits, sorted.
func (x *indexReader) indexTOML(paths []string) []string {
	limits, _ := x.limits(paths)
	var names []string
	for name := range x.entries {
		if strings.HasSuffix(name, ".toml") && under(name, limits) && !hiddenFolder(name) {
			names = append(names, name)
		}
	}
	sort.Strings(names)
	return names
}

// hiddenFolder reports whether a repository path lies in a folder whose name
// starts with a dot, which a folder walk skips too.
func hiddenFolder(name string) bool {
	dirs := strings.Split(name, "/")
	for _, d := range dirs[:len(dirs)-1] {
		if strings.HasPrefix(d, ".") {
			return true
		}
	}
	return false
}

// usesStaged reports whether any file a check read is one of the staged files.
func (x *indexReader) usesStaged(uses []string, staged map[string]bool) bool {
	for _, u := range uses {
		if rp, ok := x.repoPath(u); ok && staged[rp] {
			return true
		}
	}
	return false
}

// circuitHeader finds a [circuit] table header in a file's text, whether or
// not the file parses: a TOML file without one is not a circuit, so a broken
// tool configuration does not block a commit of circuits.
var circuitHeader = regexp.MustCompile(`(?m)^[ \t]*(\[[ \t]*("circuit"|'circuit'|circuit)[ \t]*\]|("circuit"|'circuit'|circuit)[ \t]*=)`)

func under(name string, limits []string) bool {
	if len(limits) == 0 {
		return true
	}
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
