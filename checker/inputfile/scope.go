package inputfile

import (
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// Scope is the folder that the libraries and extended rule sets named by a
// file in dir must lie inside: the top of the git work tree holding dir (the
// nearest folder with a .git), or dir itself outside a repository. A circuit
// file in a pull request must not make the checker read, and then quote,
// files the repository does not hold.
func Scope(dir string) (root string, repo bool) {
	d, err := filepath.Abs(dir)
	if err != nil {
		return dir, false
	}
	for p := d; ; {
		if _, err := os.Lstat(filepath.Join(p, ".git")); err == nil {
			return p, true
		}
		parent := filepath.Dir(p)
		if parent == p {
			return d, false
		}
		p = parent
	}
}

// Inside reports whether path lies inside root once both are made absolute
// and symlinks are resolved, so that neither ".." nor a link leads out. A
// path that does not exist is judged as written (reading it fails anyway).
func Inside(root, path string) bool {
	r, err := filepath.Abs(root)
	if err != nil {
		return false
	}
	p, err := filepath.Abs(path)
	if err != nil {
		return false
	}
	if rr, err := filepath.EvalSymlinks(r); err == nil {
		if pr, err := filepath.EvalSymlinks(p); err == nil {
			return within(rr, pr)
		}
	}
	return within(r, p)
}

func within(root, p string) bool {
	rel, err := filepath.Rel(root, p)
	return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator)) && !filepath.IsAbs(rel)
}

// OutsideMsg says why a path is refused. It names the path as written in
// the file and nothing of the target.
func OutsideMsg(what, written string, repo bool) string {
	scope := "the repository"
	if !repo {
		scope = "the folder of the file naming it (there is no repository)"
	}
	return fmt.Sprintf("%s %s lies outside %s; %s paths must stay inside it", what, strconv.Quote(written), scope, what)
}
