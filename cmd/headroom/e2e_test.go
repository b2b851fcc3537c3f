package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

// These tests run the built binary, as a user, a hook and CI do.

var (
	buildOnce sync.Once
	binPath   string
	buildErr  error
)

func binary(t testing.TB) string {
	t.Helper()
	buildOnce.Do(func() {
		dir, err := os.MkdirTemp("", "headroom-bin")
		if err != nil {
			buildErr = err
			return
		}
		binPath = filepath.Join(dir, "headroom")
		out, err := exec.Command("go", "build", "-o", binPath, ".").CombinedOutput()
		if err != nil {
			buildErr = err
			t.Logf("%s", out)
		}
	})
	if buildErr != nil {
		t.Fatalf("building the binary: %v", buildErr)
	}
	return binPath
}

// runIn runs the binary (or git) in dir and returns its combined output and exit status.
func runIn(t *testing.T, dir string, env []string, name string, args ...string) (string, int) {
	t.Helper()
	cmd := exec.Command(name, args...)
	cmd.Dir = dir
	cmd.Env = append(os.Environ(), env...)
	out, err := cmd.CombinedOutput()
	if ee, ok := err.(*exec.ExitError); ok {
		return string(out), ee.ExitCode()
	}
	if err != nil {
		t.Fatalf("%s %v: %v", name, args, err)
	}
	return string(out), 0
}

func write(t testing.TB, dir, name, text string) {
	t.Helper()
	p := filepath.Join(dir, name)
	os.MkdirAll(filepath.Dir(p), 0o755)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// A 15 m (21 MHz) bias check board: a divider feeding a base that is only a
// resistor load for now. With the bias net's second connection missing, the
// circuit has a one-connection net, which net.connectivity reports as an error.
const openCircuit = `[circuit]
name = "15 m bias board"
band = ["21MHz", "21.45MHz"]

[supplies.vcc]
volts = "12V"

[parts.R1]
kind = "resistor"
value = "10k"
nets = ["vcc", "bias"]
`

// The same board with the divider's lower leg in place: nothing to report.
const closedCircuit = openCircuit + `
[parts.R2]
kind = "resistor"
value = "10k"
nets = ["bias", "gnd"]
`

func TestExitStatuses(t *testing.T) {
	bin := binary(t)
	dir := t.TempDir()
	write(t, dir, "clean.toml", closedCircuit)
	write(t, dir, "open.toml", openCircuit)
	write(t, dir, "bad.toml", "[circuit]\nname = \"x\"\nband = [\"7MHz\"]\n")
	for _, c := range []struct {
		args []string
		want int
	}{
		{[]string{"check", "clean.toml"}, 0},
		{[]string{"check", "open.toml"}, 1},
		{[]string{"check", "bad.toml"}, 2},
		{[]string{"check", "open.toml", "bad.toml"}, 2}, // input errors win over findings
		{[]string{"check", "--format", "json", "open.toml"}, 1},
		{[]string{"check", "--format", "sarif", "bad.toml"}, 2},
		{[]string{"check", "--bogus"}, 2},
		{[]string{"check", "missing.toml"}, 2},
		{[]string{"report", "clean.toml"}, 0},
		{[]string{"explain", "bias.region"}, 0},
		{[]string{"explain", "bias.regoin"}, 2},
		{[]string{"version"}, 0},
	} {
		out, code := runIn(t, dir, nil, bin, c.args...)
		if code != c.want {
			t.Errorf("headroom %s: exit %d, want %d\n%s", strings.Join(c.args, " "), code, c.want, out)
		}
	}
}

// gitRepo makes a repository with an identity, for commits in tests.
func gitRepo(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	for _, args := range [][]string{
		{"init", "-q", "-b", "main"},
		{"config", "user.name", "Test Builder"},
		{"config", "user.email", "builder@example.invalid"},
		{"config", "commit.gpgsign", "false"},
	} {
		if out, code := runIn(t, dir, nil, "git", args...); code != 0 {
			t.Fatalf("git %v: %s", args, out)
		}
	}
	return dir
}

func git(t *testing.T, dir string, env []string, args ...string) (string, int) {
	t.Helper()
	return runIn(t, dir, env, "git", args...)
}

func TestHookEndToEnd(t *testing.T) {
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git not installed")
	}
	bin := binary(t)
	dir := gitRepo(t)
	env := []string{"HEADROOM=" + bin}

	out, code := runIn(t, dir, env, bin, "hook", "install")
	if code != 0 {
		t.Fatalf("hook install: %s", out)
	}
	hook := filepath.Join(dir, ".git", "hooks", "pre-commit")
	if _, err := os.Stat(hook); err != nil {
		t.Fatalf("no hook written: %v", err)
	}

	// A failing circuit is refused, and the findings are shown.
	write(t, dir, "boards/bias.toml", openCircuit)
	git(t, dir, env, "add", ".")
	out, code = git(t, dir, env, "commit", "-q", "-m", "bias board")
	if code == 0 || !strings.Contains(out, "net.connectivity") {
		t.Fatalf("commit of a failing circuit: exit %d, output:\n%s", code, out)
	}

	// Fixed on disk but not staged: still refused, since the index is checked.
	write(t, dir, "boards/bias.toml", closedCircuit)
	out, code = git(t, dir, env, "commit", "-q", "-m", "bias board")
	if code == 0 {
		t.Fatalf("a fix that is not staged must not pass:\n%s", out)
	}

	// Staged: the commit goes through.
	git(t, dir, env, "add", "boards/bias.toml")
	if out, code = git(t, dir, env, "commit", "-q", "-m", "bias board"); code != 0 {
		t.Fatalf("commit of a clean circuit: %s", out)
	}

	// A waived finding passes.
	write(t, dir, "boards/probe.toml", openCircuit+`
[[waivers]]
rule = "net.connectivity"
part = "R1"
reason = "the bias net goes to a test pin on the next board"
`)
	git(t, dir, env, "add", ".")
	if out, code = git(t, dir, env, "commit", "-q", "-m", "probe board"); code != 0 {
		t.Fatalf("commit with a waived finding: %s", out)
	}

	// A house rule set in the index is used: fail on warnings turns the
	// waiver-free info... here, turning the rule off lets an open board through.
	write(t, dir, ".headroom.toml", "[rules.\"net.connectivity\"]\nseverity = \"off\"\n")
	write(t, dir, "boards/open2.toml", openCircuit)
	git(t, dir, env, "add", "boards/open2.toml") // the rule set is NOT staged yet
	if _, code = git(t, dir, env, "commit", "-q", "-m", "open2"); code == 0 {
		t.Fatal("a rule set on disk but not staged must not be used")
	}
	git(t, dir, env, "add", ".headroom.toml")
	if out, code = git(t, dir, env, "commit", "-q", "-m", "open2 with house rules"); code != 0 {
		t.Fatalf("staged house rules should let it through: %s", out)
	}

	// Uninstall removes our hook; a foreign hook is left alone and not overwritten.
	if out, code = runIn(t, dir, env, bin, "hook", "uninstall"); code != 0 {
		t.Fatalf("uninstall: %s", out)
	}
	if _, err := os.Stat(hook); !os.IsNotExist(err) {
		t.Fatal("uninstall left the hook")
	}
	write(t, dir, ".git/hooks/pre-commit", "#!/bin/sh\necho someone else's hook\n")
	if _, code = runIn(t, dir, env, bin, "hook", "install"); code == 0 {
		t.Fatal("install must refuse to overwrite a foreign hook")
	}
	if _, code = runIn(t, dir, env, bin, "hook", "uninstall"); code == 0 {
		t.Fatal("uninstall must refuse to remove a foreign hook")
	}
	if b, _ := os.ReadFile(hook); !strings.Contains(string(b), "someone else") {
		t.Fatal("the foreign hook was changed")
	}
	if _, code = runIn(t, dir, env, bin, "hook", "install", "--force"); code != 0 {
		t.Fatal("install --force must replace a foreign hook")
	}
}

func TestHookRespectsHooksPath(t *testing.T) {
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git not installed")
	}
	bin := binary(t)
	dir := gitRepo(t)
	git(t, dir, nil, "config", "core.hooksPath", "githooks")
	if out, code := runIn(t, dir, nil, bin, "hook", "install"); code != 0 {
		t.Fatalf("install: %s", out)
	}
	if _, err := os.Stat(filepath.Join(dir, "githooks", "pre-commit")); err != nil {
		t.Fatalf("hook not at core.hooksPath: %v", err)
	}
}
