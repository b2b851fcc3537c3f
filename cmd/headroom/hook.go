package main

import (
	"bytes"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// hookMarker identifies a pre-commit hook that headroom wrote; install
// overwrites and uninstall removes only hooks carrying it.
const hookMarker = "# headroom-managed pre-commit hook"

func hookScript(binary string) string {
	return `#!/bin/sh
` + hookMarker + `: written by 'headroom hook install', removed by 'headroom hook uninstall'.
# Checks the staged circuit files; a failing check stops the commit.
HEADROOM="${HEADROOM:-` + binary + `}"
exec "$HEADROOM" check --staged
`
}

func (e *env) hook(args []string) int {
	if len(args) == 0 {
		return e.usageError("hook takes install [--force] or uninstall")
	}
	sub := args[0]
	fset := flag.NewFlagSet("hook "+sub, flag.ContinueOnError)
	force := fset.Bool("force", false, "overwrite a pre-commit hook that headroom did not write")
	rest, ok := e.parse(fset, args[1:])
	if !ok {
		return exitInput
	}
	if len(rest) > 0 {
		return e.usageError("hook %s takes no arguments", sub)
	}
	dir, err := gitOutput("", "rev-parse", "--git-path", "hooks")
	if err != nil {
		return e.usageError("hook needs a git repository: %v", err)
	}
	dir = strings.TrimSpace(dir)
	path := filepath.Join(dir, "pre-commit")
	existing, readErr := os.ReadFile(path)
	ours := readErr == nil && bytes.Contains(existing, []byte(hookMarker))
	switch sub {
	case "install":
		if readErr == nil && !ours && !*force {
			fmt.Fprintf(e.stderr, "headroom: %s exists and was not written by headroom; use --force to replace it\n", path)
			return exitInput
		}
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return e.usageError("%v", err)
		}
		if err := os.WriteFile(path, []byte(hookScript(hookBinary())), 0o755); err != nil {
			return e.usageError("%v", err)
		}
		os.Chmod(path, 0o755)
		fmt.Fprintf(e.stdout, "installed pre-commit hook at %s\n", path)
	case "uninstall":
		switch {
		case readErr != nil:
			fmt.Fprintf(e.stdout, "no pre-commit hook at %s\n", path)
		case !ours:
			fmt.Fprintf(e.stderr, "headroom: %s was not written by headroom; left in place\n", path)
			return exitInput
		default:
			if err := os.Remove(path); err != nil {
				return e.usageError("%v", err)
			}
			fmt.Fprintf(e.stdout, "removed pre-commit hook at %s\n", path)
		}
	default:
		return e.usageError("hook takes install [--force] or uninstall, not %q", sub)
	}
	return exitOK
}

// hookBinary is the program the hook runs: this executable when it is
// installed somewhere lasting, else "headroom" from PATH (a `go run` binary
// lives in a temporary folder that will be gone).
func hookBinary() string {
	exe, err := os.Executable()
	if err != nil || strings.HasPrefix(exe, os.TempDir()) || strings.Contains(exe, "go-build") {
		return "headroom"
	}
	return exe
}
