package ruleset

import (
	"fmt"
	"path/filepath"

	"headroom/checker/engine"
)

// Discover finds the rule set for circuit files in dir: the nearest
// .headroom.toml walking up, stopping at the repository root (the folder
// holding .git) or the filesystem root. It returns "default" when none.
func Discover(dir string, exists func(string) bool) string {
	d, err := filepath.Abs(dir)
	if err != nil {
		d = dir
	}
	for {
		p := filepath.Join(d, DiscoveryName)
		if exists(p) {
			return relIfPossible(p)
		}
		if exists(filepath.Join(d, ".git")) {
			return "default"
		}
		parent := filepath.Dir(d)
		if parent == d {
			return "default"
		}
		d = parent
	}
}

// relIfPossible shortens an absolute path against the working directory, so
// messages and the git-index reader see the paths a user types.
func relIfPossible(p string) string {
	if wd, err := filepath.Abs("."); err == nil {
		if r, err := filepath.Rel(wd, p); err == nil {
			return r
		}
	}
	return p
}

// Override applies the command line's --corners and --fail-on.
func Override(s *Set, corners, failOn string) error {
	if corners != "" {
		if corners != "worst" && corners != "nominal" {
			return fmt.Errorf("--corners must be worst or nominal, not %q", corners)
		}
		s.Corners = corners
	}
	if failOn != "" {
		sev, ok := engine.ParseSeverity(failOn)
		if !ok || sev == engine.Off {
			return fmt.Errorf("--fail-on must be error, warning or info, not %q", failOn)
		}
		s.FailOn = sev
	}
	return nil
}
