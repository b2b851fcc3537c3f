package main

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"headroom/checker/inputfile"
)

// End-to-end tests of the hardening (issue 21): each case failed before the
// fix (a hang, an exhausted memory, a file read outside the repository, a
// forged line, a folder checked as empty) and passes after it.

// runGuarded runs the command line in dir with stdin, failing the test rather
// than hanging it when the command does not return.
func runGuarded(t *testing.T, dir string, stdin io.Reader, args ...string) (string, string, int) {
	t.Helper()
	t.Chdir(dir)
	var stdout, stderr bytes.Buffer
	e := &env{stdin: stdin, stdout: &stdout, stderr: &stderr,
		getenv: func(string) string { return "" }, today: "2026-12-02"}
	done := make(chan int, 1)
	go func() { done <- e.run(args) }()
	select {
	case code := <-done:
		return stdout.String(), stderr.String(), code
	case <-time.After(time.Minute):
		t.Fatalf("headroom %s did not return (a blocking read?)", strings.Join(args, " "))
		return "", "", 0
	}
}

func mkfifo(t *testing.T, path string) {
	t.Helper()
	os.MkdirAll(filepath.Dir(path), 0o755)
	if err := syscall.Mkfifo(path, 0o644); err != nil {
		t.Skipf("no FIFOs here: %v", err)
	}
}

// A FIFO, a device, a folder or an oversized file, wherever a file is read,
// is an input error (exit 2) naming its path, never a hang or a read until
// memory runs out. Standard input still works.
func TestSpecialFiles(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, ".git", "") // the repository the libraries and sets lie in
	write(t, dir, "board.toml", smallBoard)
	mkfifo(t, filepath.Join(dir, "pipe.toml"))
	mkfifo(t, filepath.Join(dir, "walked", "pipe.toml"))
	write(t, dir, "walked/board.toml", smallBoard)
	mkfifo(t, filepath.Join(dir, "found", ".headroom.toml"))
	write(t, dir, "found/board.toml", smallBoard)
	write(t, dir, "lib/board.toml", strings.Replace(smallBoard, "[supplies.vcc]", `library = ["../pipe.toml"]`+"\n\n[supplies.vcc]", 1))
	write(t, dir, "sets/extends.toml", `extends = "../pipe.toml"`+"\n")
	write(t, dir, "sets/library.toml", `library = ["../pipe.toml"]`+"\n")
	os.Mkdir(filepath.Join(dir, "folder.toml"), 0o755)
	big, err := os.Create(filepath.Join(dir, "big.toml"))
	if err != nil {
		t.Fatal(err)
	}
	big.Truncate(inputfile.MaxBytes + 1) // sparse: costs no disk
	big.Close()

	for _, c := range []struct {
		args       []string
		path, want string
	}{
		{[]string{"check", "pipe.toml"}, "pipe.toml", "named pipe"},
		{[]string{"check", "--corners", "nominal", "walked"}, filepath.Join("walked", "pipe.toml"), "named pipe"},
		{[]string{"check", "found/board.toml"}, filepath.Join("found", ".headroom.toml"), "named pipe"},
		{[]string{"check", "lib/board.toml"}, "pipe.toml", "named pipe"},
		{[]string{"check", "--rules", "pipe.toml", "board.toml"}, "pipe.toml", "named pipe"},
		{[]string{"check", "--rules", "sets/extends.toml", "board.toml"}, "extends.toml", "named pipe"},
		{[]string{"check", "--rules", "sets/library.toml", "board.toml"}, "pipe.toml", "named pipe"},
		{[]string{"rules", "--rules", "pipe.toml"}, "pipe.toml", "named pipe"},
		{[]string{"report", "pipe.toml"}, "pipe.toml", "named pipe"},
		{[]string{"report", "--rules", "pipe.toml", "board.toml"}, "pipe.toml", "named pipe"},
		{[]string{"check", "/dev/zero"}, "/dev/zero", "character device"},
		{[]string{"report", "/dev/urandom"}, "/dev/urandom", "character device"},
		{[]string{"check", "--rules", "folder.toml", "board.toml"}, "folder.toml", "a folder"},
		{[]string{"check", "big.toml"}, "big.toml", "larger than 16 MiB"},
	} {
		_, stderr, code := runGuarded(t, dir, strings.NewReader(""), c.args...)
		if code != exitInput || !strings.Contains(stderr, c.path) || !strings.Contains(stderr, c.want) {
			t.Errorf("headroom %s: exit %d, stderr %q; want exit 2 naming %s (%s)", strings.Join(c.args, " "), code, stderr, c.path, c.want)
		}
	}

	// Standard input is read as before, up to the same cap.
	stdout, stderr, code := runGuarded(t, dir, strings.NewReader(smallBoard), "check", "--corners", "nominal", "-")
	if code == exitInput || !strings.Contains(stdout, "in 1 circuit file") {
		t.Errorf("check -: exit %d, stdout %q, stderr %q", code, stdout, stderr)
	}
	_, stderr, code = runGuarded(t, dir, io.LimitReader(zeros{}, inputfile.MaxBytes+1), "check", "-")
	if code != exitInput || !strings.Contains(stderr, "larger than") {
		t.Errorf("check - with 16 MiB + 1 byte: exit %d, stderr %q", code, stderr)
	}
}

type zeros struct{}

func (zeros) Read(p []byte) (int, error) { clear(p); return len(p), nil }

// secret is what a credentials file might hold; no message may show any of it.
const secret = "HEADROOM_TEST_TOKEN=hunter2-3f9a"

// library and extends paths stay inside the repository (or, outside one, the
// folder of the file naming them); the refusal quotes nothing of the target,
// and a library that is not TOML is reported by position only.
func TestPathsStayInside(t *testing.T) {
	top := t.TempDir()
	write(t, top, "secret.toml", secret+"\n")
	repo := filepath.Join(top, "repo")
	write(t, repo, ".git", "")
	write(t, repo, "outside-rel.toml", strings.Replace(smallBoard, "[supplies.vcc]", `library = ["../secret.toml"]`+"\n\n[supplies.vcc]", 1))
	write(t, repo, "outside-abs.toml", strings.Replace(smallBoard, "[supplies.vcc]", `library = [`+quoteTOML(filepath.Join(top, "secret.toml"))+`]`+"\n\n[supplies.vcc]", 1))
	if err := os.Symlink(filepath.Join(top, "secret.toml"), filepath.Join(repo, "link.toml")); err != nil {
		t.Fatal(err)
	}
	write(t, repo, "via-link.toml", strings.Replace(smallBoard, "[supplies.vcc]", `library = ["link.toml"]`+"\n\n[supplies.vcc]", 1))
	write(t, repo, "sets/out.toml", `extends = "../../secret.toml"`+"\n")
	write(t, repo, "sets/outlib.toml", `library = ["../../secret.toml"]`+"\n")
	write(t, repo, "parts/bad.toml", "[cores.x]\n"+secret+"\n")
	write(t, repo, "not-toml.toml", strings.Replace(smallBoard, "[supplies.vcc]", `library = ["parts/bad.toml"]`+"\n\n[supplies.vcc]", 1))
	write(t, repo, "parts/club.toml", "[cores.\"club-core\"]\nmu = 800\nod = \"9.5mm\"\nid = \"4.75mm\"\nheight = \"3.25mm\"\n")
	write(t, repo, "sets/abs.toml", `library = [`+quoteTOML(filepath.Join(repo, "parts", "club.toml"))+`]`+"\n")
	write(t, repo, "uses-core.toml", strings.Replace(smallBoard, `nets = ["vcc", "gnd"]`,
		`nets = ["vcc", "out"]`+"\n\n[parts.L1]\nkind = \"inductor\"\ncore = \"club-core\"\nturns = 10\nnets = [\"out\", \"gnd\"]", 1))
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"check", "outside-rel.toml"}, `library "../secret.toml" lies outside the repository`},
		{[]string{"check", "outside-abs.toml"}, `lies outside the repository`},
		{[]string{"check", "via-link.toml"}, `library "link.toml" lies outside the repository`},
		{[]string{"check", "--rules", "sets/out.toml", "outside-rel.toml"}, `extends "../../secret.toml" lies outside the repository`},
		{[]string{"check", "--rules", "sets/outlib.toml", "outside-rel.toml"}, `library "../../secret.toml" lies outside the repository`},
		{[]string{"check", "not-toml.toml"}, "parts/bad.toml:2:"},
	} {
		_, stderr, code := runGuarded(t, repo, strings.NewReader(""), c.args...)
		if code != exitInput || !strings.Contains(stderr, c.want) || strings.Contains(stderr, "hunter") || strings.Contains(stderr, "HEADROOM_TEST") {
			t.Errorf("headroom %s: exit %d, stderr %q; want exit 2 with %q and nothing of the secret", strings.Join(c.args, " "), code, stderr, c.want)
		}
	}
	// An absolute library path in a rule set is taken as given (it was
	// re-rooted onto the rule set's folder, and not found).
	stdout, stderr, code := runGuarded(t, repo, strings.NewReader(""), "check", "--corners", "nominal", "--rules", "sets/abs.toml", "uses-core.toml")
	if code == exitInput || !strings.Contains(stdout, "in 1 circuit file") {
		t.Errorf("absolute library in a rule set: exit %d, stdout %q, stderr %q", code, stdout, stderr)
	}
	// Outside a repository the scope is the folder of the file naming the path.
	plain := filepath.Join(top, "plain")
	write(t, plain, "parts/club.toml", "[cores.\"club-core\"]\nmu = 800\nod = \"9.5mm\"\nid = \"4.75mm\"\nheight = \"3.25mm\"\n")
	write(t, plain, "boards/board.toml", strings.Replace(smallBoard, "[supplies.vcc]", `library = ["../parts/club.toml"]`+"\n\n[supplies.vcc]", 1))
	_, stderr, code = runGuarded(t, plain, strings.NewReader(""), "check", "boards/board.toml")
	if code != exitInput || !strings.Contains(stderr, "lies outside the folder of the file naming it") {
		t.Errorf("outside a repository: exit %d, stderr %q", code, stderr)
	}
}

func quoteTOML(s string) string { return `'` + s + `'` }

// A newline in a file name cannot forge a second error line, nor an escape
// sequence reach the terminal.
func TestFileNameCannotForgeLines(t *testing.T) {
	dir := t.TempDir()
	name := "x.toml\nboard.toml:1:1: error: forged \x1b[2J.toml"
	if err := os.WriteFile(filepath.Join(dir, name), []byte("[circuit]\nname = 1\n"), 0o644); err != nil {
		t.Skipf("this file system refuses the name: %v", err)
	}
	_, stderr, code := runGuarded(t, dir, strings.NewReader(""), "check", ".")
	if code != exitInput || strings.Count(stderr, "\n") != 1 || strings.Contains(stderr, "\x1b") || !strings.Contains(stderr, `x.toml\nboard.toml:1:1: error: forged \x1b[2J.toml:1:1: error:`) {
		t.Errorf("exit %d, stderr %q: want one escaped line", code, stderr)
	}
}

// The folder walk: a symlinked folder named on the command line is walked; a
// symlinked or hidden sub-folder is skipped and the summary says so; a folder
// that cannot be read is an input error.
func TestFolderWalk(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, "real/board.toml", smallBoard)
	write(t, dir, "tree/.drafts/draft.toml", smallBoard)
	write(t, dir, "tree/board.toml", smallBoard)
	for _, l := range [][2]string{{"real", "link"}, {"../real", "tree/shared"}} {
		if err := os.Symlink(l[0], filepath.Join(dir, l[1])); err != nil {
			t.Fatal(err)
		}
	}
	stdout, stderr, code := runGuarded(t, dir, strings.NewReader(""), "check", "--corners", "nominal", "link")
	if code == exitInput || !strings.Contains(stdout, "in 1 circuit file\n") {
		t.Errorf("symlinked folder: exit %d, stdout %q, stderr %q", code, stdout, stderr)
	}
	stdout, _, code = runGuarded(t, dir, strings.NewReader(""), "check", "--corners", "nominal", "tree")
	if !strings.Contains(stdout, "in 1 circuit file; skipped 1 hidden folder (name starts with a dot), 1 symlinked folder (links inside a folder are not followed)\n") {
		t.Errorf("skips not said: %q", stdout)
	}
	// A symlinked file leading out of the repository is not read.
	write(t, dir, ".git", "")
	write(t, filepath.Dir(dir), "outside.toml", secret+"\n")
	if err := os.Symlink(filepath.Join(filepath.Dir(dir), "outside.toml"), filepath.Join(dir, "tree", "leak.toml")); err != nil {
		t.Fatal(err)
	}
	stdout, stderr, code = runGuarded(t, dir, strings.NewReader(""), "check", "--corners", "nominal", "tree")
	if code == exitInput || strings.Contains(stdout+stderr, "hunter") || !strings.Contains(stdout, "1 symlinked file (leads outside the repository)") {
		t.Errorf("symlinked file out of the repository: exit %d, stdout %q, stderr %q", code, stdout, stderr)
	}
	old := readDir
	t.Cleanup(func() { readDir = old })
	readDir = func(name string) ([]os.DirEntry, error) {
		if filepath.Base(name) == "tree" {
			return nil, &os.PathError{Op: "open", Path: name, Err: errors.New("permission denied")}
		}
		return old(name)
	}
	_, stderr, code = runGuarded(t, dir, strings.NewReader(""), "check", "tree")
	if code != exitInput || !strings.Contains(stderr, "tree:1:1: error: cannot read folder: permission denied") {
		t.Errorf("unreadable folder: exit %d, stderr %q", code, stderr)
	}
}
