package main

import (
	"flag"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
)

// hookMarker opens every pre-commit hook that headroom writes. It is not
// what identifies one: a team's own hook may run headroom and carry the
// line too. A hook is headroom's only when its whole text is what install
// writes (hookScript for some binary path, or the script of an earlier
// release), so install replaces and uninstall removes nothing else.
const hookMarker = "# headroom-managed pre-commit hook"

// backupSuffix names where install --force keeps the hook it replaces, and
// where uninstall restores it from.
const backupSuffix = ".before-headroom"

// hookScript runs `check --staged` with $HEADROOM when set, else headroom
// from PATH, else the binary that installed the hook (its absolute path).
func hookScript(binary string) string {
	return `#!/bin/sh
` + hookMarker + `: written by 'headroom hook install', removed by 'headroom hook uninstall'.
# Checks the staged circuit files; a failing check stops the commit.
# Runs $HEADROOM if set, else headroom from PATH, else the binary that installed this hook.
if [ -z "$HEADROOM" ]; then
	if command -v headroom >/dev/null 2>&1; then
		HEADROOM=headroom
	else
		HEADROOM=` + shellQuote(binary) + `
	fi
fi
exec "$HEADROOM" check --staged
`
}

// shellQuote quotes s for sh: single quotes, with each ' written '\”.
func shellQuote(s string) string {
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

// writtenByHeadroom reports whether text is, whole, a hook headroom writes
// or wrote in an earlier release.
func writtenByHeadroom(text string) bool {
	if m := recordedBinary.FindStringSubmatch(text); m != nil {
		if bin, ok := shellUnquote(m[1]); ok && text == hookScript(bin) {
			return true
		}
	}
	if m := legacyBinary.FindStringSubmatch(text); m != nil && text == legacyHookScript(m[1]) {
		return true
	}
	return false
}

var (
	recordedBinary = regexp.MustCompile(`(?m)^\t\tHEADROOM=('.*')$`)
	legacyBinary   = regexp.MustCompile(`(?m)^HEADROOM="\$\{HEADROOM:-(.*)\}"$`)
)

// legacyHookScript is the hook of the first release, recognised so that an
// upgrade replaces and removes it.
func legacyHookScript(binary string) string {
	return `#!/bin/sh
` + hookMarker + `: written by 'headroom hook install', removed by 'headroom hook uninstall'.
# Checks the staged circuit files; a failing check stops the commit.
HEADROOM="${HEADROOM:-` + binary + `}"
exec "$HEADROOM" check --staged
`
}

func shellUnquote(q string) (string, bool) {
	if len(q) < 2 || q[0] != '\'' || q[len(q)-1] != '\'' {
		return "", false
	}
	s := strings.ReplaceAll(q[1:len(q)-1], `'\''`, "\x00")
	if strings.Contains(s, "'") {
		return "", false
	}
	return strings.ReplaceAll(s, "\x00", "'"), true
}

func (e *env) hook(args []string) int {
	if len(args) == 0 {
		return e.usageError("hook takes install [--force] or uninstall")
	}
	if isHelp(args) {
		commandUsage(e.stdout, "hook", nil)
		return exitOK
	}
	sub := args[0]
	if sub != "install" && sub != "uninstall" {
		return e.usageError("hook takes install [--force] or uninstall, not %q", sub)
	}
	fset := flag.NewFlagSet("hook "+sub, flag.ContinueOnError)
	var force *bool
	if sub == "install" {
		force = fset.Bool("force", false, "replace a pre-commit hook that headroom did not write, keeping it as pre-commit"+backupSuffix)
	}
	rest, status, ok := e.parse(fset, args[1:])
	if !ok {
		return status
	}
	if len(rest) > 0 {
		return e.usageError("hook %s takes no arguments", sub)
	}
	dir, err := gitOutput("", "rev-parse", "--git-path", "hooks")
	if err != nil {
		return e.usageError("hook needs a git repository: %v", err)
	}
	path := filepath.Join(strings.TrimSpace(dir), "pre-commit")
	if sub == "install" {
		return e.installHook(path, *force)
	}
	return e.uninstallHook(path)
}

// hookState says what stands at the hook's path.
func hookState(path string) (exists, ours bool, err error) {
	st, err := os.Lstat(path)
	if os.IsNotExist(err) {
		return false, false, nil
	}
	if err != nil {
		return false, false, err
	}
	if !st.Mode().IsRegular() { // a link (perhaps to a tracked script) is never ours to change
		return true, false, nil
	}
	b, err := os.ReadFile(path)
	if err != nil {
		return true, false, err
	}
	return true, writtenByHeadroom(string(b)), nil
}

func (e *env) installHook(path string, force bool) int {
	exists, ours, err := hookState(path)
	if err != nil {
		return e.usageError("%v", err)
	}
	if exists && !ours && !force {
		fmt.Fprintf(e.stderr, "headroom: %s exists and was not written by headroom; use --force to replace it (it is kept as %s)\n", path, filepath.Base(path)+backupSuffix)
		return exitInput
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return e.usageError("%v", err)
	}
	if exists && !ours {
		backup, err := freeName(path + backupSuffix)
		if err != nil {
			return e.usageError("%v", err)
		}
		if err := os.Rename(path, backup); err != nil { // moves a link itself, never its target
			return e.usageError("keeping the old hook: %v", err)
		}
		fmt.Fprintf(e.stdout, "kept the previous pre-commit hook as %s\n", backup)
	}
	bin := installingBinary()
	// A new file renamed into place: whatever stood there is replaced, not written through.
	tmp, err := os.CreateTemp(filepath.Dir(path), ".pre-commit-*")
	if err != nil {
		return e.usageError("%v", err)
	}
	_, werr := tmp.WriteString(hookScript(bin))
	cerr := tmp.Close()
	if werr == nil {
		werr = cerr
	}
	if werr == nil {
		werr = os.Chmod(tmp.Name(), 0o755)
	}
	if werr == nil {
		werr = os.Rename(tmp.Name(), path)
	}
	if werr != nil {
		os.Remove(tmp.Name())
		return e.usageError("%v", werr)
	}
	fmt.Fprintf(e.stdout, "installed pre-commit hook at %s\n", path)
	if _, err := exec.LookPath("headroom"); err != nil {
		fmt.Fprintf(e.stderr, "headroom: warning: headroom is not on PATH; the hook will run %s, the binary that installed it (install with 'go install' and put its folder on PATH)\n", bin)
	}
	return exitOK
}

func (e *env) uninstallHook(path string) int {
	exists, ours, err := hookState(path)
	switch {
	case err != nil:
		return e.usageError("%v", err)
	case !exists:
		fmt.Fprintf(e.stdout, "no pre-commit hook at %s\n", path)
		return exitOK
	case !ours:
		fmt.Fprintf(e.stderr, "headroom: %s was not written by headroom, or was changed since; left in place\n", path)
		return exitInput
	}
	if err := os.Remove(path); err != nil {
		return e.usageError("%v", err)
	}
	fmt.Fprintf(e.stdout, "removed pre-commit hook at %s\n", path)
	backup := path + backupSuffix
	if _, err := os.Lstat(backup); err == nil {
		if err := os.Rename(backup, path); err != nil {
			return e.usageError("restoring %s: %v", backup, err)
		}
		fmt.Fprintf(e.stdout, "restored the previous pre-commit hook from %s\n", backup)
	}
	return exitOK
}

// freeName returns p, or p.1, p.2, ... : the first that does not exist.
func freeName(p string) (string, error) {
	for i := 0; i < 1000; i++ {
		name := p
		if i > 0 {
			name = fmt.Sprintf("%s.%d", p, i)
		}
		if _, err := os.Lstat(name); os.IsNotExist(err) {
			return name, nil
		}
	}
	return "", fmt.Errorf("too many backups of %s", p)
}

// installingBinary is this executable's absolute path, links resolved: the
// hook's fallback when headroom is not on PATH.
func installingBinary() string {
	exe, err := os.Executable()
	if err != nil {
		return "headroom"
	}
	if r, err := filepath.EvalSymlinks(exe); err == nil {
		exe = r
	}
	return exe
}
