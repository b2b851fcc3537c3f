package inputfile

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// Read takes regular files only (POSIX file types: a FIFO, a character
// device and a directory are not regular files) and refuses more than
// MaxBytes; a FIFO with no writer is refused at once instead of blocking the
// open (O_NONBLOCK, POSIX open()).
func TestRead(t *testing.T) {
	dir := t.TempDir()
	ok := filepath.Join(dir, "ok.toml")
	os.WriteFile(ok, []byte("a = 1\n"), 0o644)
	if b, err := Read(ok); err != nil || string(b) != "a = 1\n" {
		t.Errorf("regular file: %q, %v", b, err)
	}
	fifo := filepath.Join(dir, "pipe.toml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("no FIFOs: %v", err)
	}
	big := filepath.Join(dir, "big.toml")
	f, _ := os.Create(big)
	f.Truncate(MaxBytes + 1)
	f.Close()
	exact := filepath.Join(dir, "exact.toml")
	f, _ = os.Create(exact)
	f.Truncate(MaxBytes)
	f.Close()
	if b, err := Read(exact); err != nil || len(b) != MaxBytes {
		t.Errorf("a file of exactly MaxBytes: %d bytes, %v", len(b), err)
	}
	for _, c := range []struct {
		path string
		want error
		text string
	}{
		{fifo, ErrNotRegular, "a named pipe"},
		{"/dev/zero", ErrNotRegular, "a character device"},
		{dir, ErrNotRegular, "a folder"},
		{big, ErrTooLarge, "larger than 16 MiB"},
	} {
		_, err := Read(c.path)
		if !errors.Is(err, c.want) || !strings.Contains(Reason(err), c.text) {
			t.Errorf("Read(%s) = %v, want %v (%s)", c.path, err, c.want, c.text)
		}
	}
	if _, err := ReadAll(strings.NewReader(strings.Repeat("x", MaxBytes+1))); !errors.Is(err, ErrTooLarge) {
		t.Errorf("ReadAll over the cap: %v", err)
	}
}

// The scope is the folder holding .git (a folder, or a file as in a git
// worktree), else the folder itself; Inside sees through ".." and symlinks.
func TestScopeInside(t *testing.T) {
	top := t.TempDir()
	repo := filepath.Join(top, "repo")
	os.MkdirAll(filepath.Join(repo, "boards", "deep"), 0o755)
	os.WriteFile(filepath.Join(repo, ".git"), []byte("gitdir: elsewhere\n"), 0o644)
	os.WriteFile(filepath.Join(top, "secret"), []byte("x"), 0o644)
	os.Symlink(filepath.Join(top, "secret"), filepath.Join(repo, "boards", "link"))
	os.Symlink(filepath.Join(repo, "boards"), filepath.Join(top, "alias"))
	if root, isRepo := Scope(filepath.Join(repo, "boards", "deep")); root != repo || !isRepo {
		t.Errorf("Scope = %s, %v; want %s, true", root, isRepo, repo)
	}
	plain := filepath.Join(top, "plain")
	os.Mkdir(plain, 0o755)
	if root, isRepo := Scope(plain); root != plain || isRepo {
		t.Errorf("Scope(no repository) = %s, %v", root, isRepo)
	}
	for _, c := range []struct {
		path string
		in   bool
	}{
		{filepath.Join(repo, "boards", "deep", "x.toml"), true},
		{filepath.Join(repo, "boards", "..", "lib.toml"), true},
		{filepath.Join(repo, "boards", "..", "..", "secret"), false},
		{filepath.Join(repo, "boards", "link"), false},        // a link leading out
		{filepath.Join(top, "alias", "deep"), true},           // a link leading in
		{filepath.Join(repo+"-other", "x.toml"), false},       // a sibling sharing the prefix
		{filepath.Join(repo, "boards", "missing.toml"), true}, // judged as written
		{filepath.Join(repo, "..", "missing.toml"), false},
	} {
		if got := Inside(repo, c.path); got != c.in {
			t.Errorf("Inside(repo, %s) = %v, want %v", c.path, got, c.in)
		}
	}
}
