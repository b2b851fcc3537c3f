package main

import (
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// End-to-end tests of adopting headroom in a team's repository: the hook
// with the binary off PATH, SARIF from a subfolder, fingerprints that
// survive moved lines, --fix, a baseline, and a staged rule set.

func needGit(t *testing.T) {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git not installed")
	}
}

// pathWithout is a PATH holding git and the shell's tools but no headroom.
func pathWithout(t *testing.T) string {
	t.Helper()
	g, err := exec.LookPath("git")
	if err != nil {
		t.Skip("git not installed")
	}
	return "PATH=" + filepath.Dir(g) + ":/usr/bin:/bin"
}

// fixableBoard is a 20 m emitter follower of our own with five problems
// that have a fix (C1 and C2 too small for coupling at 14 MHz, a divider too
// weak for the base current, R3's rating too low, C3's rating below the
// supply) and one that has none (the follower is not unconditionally
// stable: only advice, a stopper is a new part). The numbers are judged by the rules' own golden archives; this
// test is about applying what the check offers.
const fixableBoard = `[circuit]
name = "20 m buffer, first draft"
band = ["14MHz", "14.35MHz"]
ambient = "30C"

[supplies.vcc]
volts = 9
range = ["8.5V", "9.5V"]

[ports.in]
net = "rf_in"
direction = "in"
matched = false

[ports.out]
net = "rf_out"
direction = "out"

[parts]
# the input coupling: sized for 14 MHz by eye
C1 = { kind = "capacitor", value = "220p", nets = ["rf_in", "base"] }
R1 = { kind = "resistor", value = "4k7", nets = ["vcc", "base"] }
R2 = { kind = "resistor", value = "4k7", nets = ["base", "gnd"] }
Q1 = { kind = "npn", device = "2N4401", nets = { collector = "vcc", base = "base", emitter = "emit" } }
R3 = { kind = "resistor", value = "390", nets = ["emit", "gnd"], rating = "0.05W" }
C2 = { kind = "capacitor", value = "1n", nets = ["emit", "rf_out"] }
C3 = { kind = "capacitor", value = "100n", nets = ["vcc", "gnd"], tolerance = "20%", rating = "6V" }
`

type jsonOut struct {
	Findings []struct {
		Rule, Part, Path, Fingerprint string
		Line                          int
		Changes                       []any
		Baselined                     bool
	}
}

func checkJSON(t *testing.T, dir string, args ...string) (jsonOut, int) {
	t.Helper()
	cmd := exec.Command(binary(t), append([]string{"check", "--format", "json"}, args...)...)
	cmd.Dir = dir
	out, err := cmd.Output()
	code := 0
	if ee, ok := err.(*exec.ExitError); ok {
		code = ee.ExitCode()
	} else if err != nil {
		t.Fatal(err)
	}
	var doc jsonOut
	if err := json.Unmarshal(out, &doc); err != nil {
		t.Fatalf("not JSON (exit %d): %v\n%s", code, err, out)
	}
	return doc, code
}

func rulesOf(doc jsonOut) string {
	var ids []string
	for _, f := range doc.Findings {
		id := f.Rule + ":" + f.Part
		if f.Baselined {
			id += "(baselined)"
		}
		ids = append(ids, id)
	}
	return strings.Join(ids, " ")
}

func TestHookWithBinaryOffPath(t *testing.T) {
	needGit(t)
	bin := binary(t)
	dir := gitRepo(t)
	env := []string{pathWithout(t)}
	out, code := runIn(t, dir, env, bin, "hook", "install")
	if code != 0 || !strings.Contains(out, "not on PATH") || !strings.Contains(out, bin) {
		t.Fatalf("install off PATH must warn and name the binary it falls back to (exit %d):\n%s", code, out)
	}
	write(t, dir, "boards/bias.toml", openCircuit)
	git(t, dir, env, "add", ".")
	out, code = git(t, dir, env, "commit", "-q", "-m", "bias board")
	if code == 0 || !strings.Contains(out, "net.connectivity") {
		t.Fatalf("the hook must run the recorded binary and refuse the commit: exit %d\n%s", code, out)
	}
	write(t, dir, "boards/bias.toml", closedCircuit)
	git(t, dir, env, "add", ".")
	if out, code = git(t, dir, env, "commit", "-q", "-m", "bias board"); code != 0 {
		t.Fatalf("clean commit refused: %s", out)
	}
}

// Issue 21 item 7: file names that look like index revisions or parent
// folders, a symlinked hook, and a team hook that runs headroom too.
func TestHookHarmsNothing(t *testing.T) {
	needGit(t)
	bin := binary(t)
	dir := gitRepo(t)
	env := []string{"HEADROOM=" + bin}
	if out, code := runIn(t, dir, env, bin, "hook", "install"); code != 0 {
		t.Fatal(out)
	}
	// "0:x.toml" fails and x.toml is clean: "git cat-file blob :0:x.toml"
	// would read stage 0 of x.toml and let the failing file through.
	write(t, dir, "x.toml", closedCircuit)
	write(t, dir, "0:x.toml", openCircuit)
	git(t, dir, env, "add", ".")
	if out, code := git(t, dir, env, "commit", "-q", "-m", "x"); code == 0 || !strings.Contains(out, "0:x.toml") {
		t.Fatalf("a failing 0:x.toml must stop the commit and be named: exit %d\n%s", code, out)
	}
	git(t, dir, env, "rm", "-q", "--cached", "0:x.toml")
	os.Remove(filepath.Join(dir, "0:x.toml"))
	// "..board.toml" at the top is inside the repository.
	write(t, dir, "..board.toml", closedCircuit)
	git(t, dir, env, "add", ".")
	if out, code := git(t, dir, env, "commit", "-q", "-m", "dots"); code != 0 {
		t.Fatalf("..board.toml is a file at the top, not outside: %s", out)
	}
	write(t, dir, "..board.toml", openCircuit)
	git(t, dir, env, "add", ".")
	if out, code := git(t, dir, env, "commit", "-q", "-m", "dots"); code == 0 || !strings.Contains(out, "net.connectivity") {
		t.Fatalf("a failing ..board.toml must be checked: exit %d\n%s", code, out)
	}
	git(t, dir, env, "reset", "-q", "--hard")

	// A symlinked hook pointing at a tracked team script: --force replaces
	// the link, keeps it as the backup, and never writes the script.
	hooks := filepath.Join(dir, ".git", "hooks")
	hook := filepath.Join(hooks, "pre-commit")
	team := "#!/bin/sh\n# team checks\n" + hookMarker + "\nexec headroom check --staged --fail-on warning\n"
	write(t, dir, "tools/pre-commit", team)
	os.Remove(hook)
	if err := os.Symlink(filepath.Join(dir, "tools", "pre-commit"), hook); err != nil {
		t.Fatal(err)
	}
	if _, code := runIn(t, dir, env, bin, "hook", "install"); code == 0 {
		t.Fatal("install must not replace a linked team hook without --force")
	}
	if out, code := runIn(t, dir, env, bin, "hook", "uninstall"); code == 0 {
		t.Fatalf("uninstall must leave a team hook that merely carries the marker: %s", out)
	}
	if out, code := runIn(t, dir, env, bin, "hook", "install", "--force"); code != 0 {
		t.Fatal(out)
	}
	if b, _ := os.ReadFile(filepath.Join(dir, "tools", "pre-commit")); string(b) != team {
		t.Fatalf("install --force wrote through the link into the team script:\n%s", b)
	}
	if st, err := os.Lstat(hook + backupSuffix); err != nil || st.Mode()&os.ModeSymlink == 0 {
		t.Fatalf("the replaced link must be kept as the backup: %v", err)
	}
	if st, _ := os.Lstat(hook); st == nil || !st.Mode().IsRegular() {
		t.Fatal("the hook must now be a file of its own")
	}
	// Our own hook, changed by hand, is no longer ours to remove.
	b, _ := os.ReadFile(hook)
	os.WriteFile(hook, append(b, "echo also lint the firmware\n"...), 0o755)
	if _, code := runIn(t, dir, env, bin, "hook", "uninstall"); code == 0 {
		t.Fatal("uninstall removed a hook that was edited after install")
	}
	os.WriteFile(hook, b, 0o755)
	if out, code := runIn(t, dir, env, bin, "hook", "uninstall"); code != 0 || !strings.Contains(out, "restored") {
		t.Fatalf("uninstall of our unchanged hook must remove it and restore the backup: %s", out)
	}
	if target, err := os.Readlink(hook); err != nil || target != filepath.Join(dir, "tools", "pre-commit") {
		t.Fatalf("the team's link was not restored: %q %v", target, err)
	}
}

func TestWrittenByHeadroom(t *testing.T) {
	for _, bin := range []string{"/usr/local/bin/headroom", "/home/o'neil/go/bin/headroom", "headroom"} {
		if !writtenByHeadroom(hookScript(bin)) {
			t.Errorf("our hook for %q not recognised", bin)
		}
		if !writtenByHeadroom(legacyHookScript(bin)) {
			t.Errorf("the first release's hook for %q not recognised", bin)
		}
		if writtenByHeadroom(hookScript(bin) + "make lint\n") {
			t.Errorf("a hook with a line added must not count as ours")
		}
	}
	if writtenByHeadroom("#!/bin/sh\n" + hookMarker + "\nexec headroom check --staged\n") {
		t.Error("the marker alone must not make a hook ours")
	}
}

// The SARIF of a check run from a subfolder names files from the top of the
// repository, as run from the top; a file outside is an absolute file: URI.
func TestSARIFFromSubfolder(t *testing.T) {
	needGit(t)
	bin := binary(t)
	dir := gitRepo(t)
	write(t, dir, "boards/rx/bias.toml", openCircuit)
	outside := t.TempDir()
	write(t, outside, "loose.toml", openCircuit)
	uris := func(sub string, args ...string) ([]string, string) {
		out, _ := runIn(t, filepath.Join(dir, sub), nil, bin, append([]string{"check", "--format", "sarif"}, args...)...)
		var log struct {
			Runs []struct {
				OriginalURIBaseIDs map[string]struct{ URI string } `json:"originalUriBaseIds"`
				Results            []struct {
					Locations []struct {
						PhysicalLocation struct {
							ArtifactLocation struct{ URI, URIBaseID string }
						}
					}
				}
			}
		}
		if err := json.Unmarshal([]byte(out), &log); err != nil {
			t.Fatalf("%v\n%s", err, out)
		}
		var got []string
		for _, r := range log.Runs[0].Results {
			a := r.Locations[0].PhysicalLocation.ArtifactLocation
			got = append(got, a.URIBaseID+"|"+a.URI)
		}
		return got, log.Runs[0].OriginalURIBaseIDs["SRCROOT"].URI
	}
	top, base := uris(".", "boards/rx/bias.toml")
	sub, subBase := uris("boards/rx", "bias.toml")
	if strings.Join(top, ",") != "SRCROOT|boards/rx/bias.toml" || strings.Join(sub, ",") != strings.Join(top, ",") {
		t.Errorf("URIs from the top %v and from a subfolder %v must both be boards/rx/bias.toml under SRCROOT", top, sub)
	}
	real, _ := filepath.EvalSymlinks(dir)
	if base != "file://"+filepath.ToSlash(real)+"/" || subBase != base {
		t.Errorf("SRCROOT must be the repository's top from anywhere in it: %q, %q", base, subBase)
	}
	loose, _ := uris("boards", filepath.Join(outside, "loose.toml"))
	realOut, _ := filepath.EvalSymlinks(outside)
	if len(loose) != 1 || loose[0] != "|file://"+filepath.ToSlash(realOut)+"/loose.toml" &&
		loose[0] != "|file://"+filepath.ToSlash(outside)+"/loose.toml" {
		t.Errorf("a file outside the repository must be an absolute file: URI, got %v", loose)
	}
}

// Ten lines added above every finding move them and keep their fingerprints.
func TestFingerprintsSurviveMovedLines(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, "board.toml", fixableBoard)
	before, _ := checkJSON(t, dir, "board.toml")
	moved := strings.Replace(fixableBoard, "[parts]\n", "[parts]\n"+strings.Repeat("# layout note\n", 10), 1)
	write(t, dir, "board.toml", moved)
	after, _ := checkJSON(t, dir, "board.toml")
	if len(before.Findings) < 6 || len(before.Findings) != len(after.Findings) {
		t.Fatalf("want the same six or more findings: %d then %d", len(before.Findings), len(after.Findings))
	}
	for i := range before.Findings {
		b, a := before.Findings[i], after.Findings[i]
		if b.Part == "" { // about the whole circuit: it stays at [circuit], above the added lines
			if a.Line != b.Line {
				t.Errorf("%s: line %d then %d, want it to stay at [circuit]", b.Rule, b.Line, a.Line)
			}
		} else if a.Line != b.Line+10 {
			t.Errorf("%s %s: line %d then %d, want moved by 10", b.Rule, b.Part, b.Line, a.Line)
		}
		if a.Fingerprint == "" || a.Fingerprint != b.Fingerprint {
			t.Errorf("%s %s: fingerprint %q then %q", b.Rule, b.Part, b.Fingerprint, a.Fingerprint)
		}
	}
}

func TestFixLeavesOnlyWhatHasNoFix(t *testing.T) {
	bin := binary(t)
	dir := t.TempDir()
	write(t, dir, "board.toml", fixableBoard)
	// The follower is not unconditionally stable, which only advice fixes;
	// as an error it is what --fix must leave.
	write(t, dir, ".headroom.toml", "[rules.\"stability.unconditional\"]\nseverity = \"error\"\n")
	doc, _ := checkJSON(t, dir, "board.toml")
	fixable := 0
	for _, f := range doc.Findings {
		if len(f.Changes) > 0 {
			fixable++
		}
	}
	if fixable < 5 {
		t.Fatalf("the board should offer at least five fixes, got %d: %s", fixable, rulesOf(doc))
	}
	// --diff shows the change and writes nothing.
	out, code := runIn(t, dir, nil, bin, "check", "--diff", "board.toml")
	if code != 1 || !strings.Contains(out, "+++ b/board.toml") || !strings.Contains(out, `-C1 = { kind = "capacitor", value = "220p"`) {
		t.Fatalf("--diff: exit %d\n%s", code, out)
	}
	if b, _ := os.ReadFile(filepath.Join(dir, "board.toml")); string(b) != fixableBoard {
		t.Fatal("--diff wrote the file")
	}
	out, code = runIn(t, dir, nil, bin, "check", "--fix", "board.toml")
	if code != 1 || !strings.Contains(out, "stability.unconditional") || strings.Count(out, ": error: ")+strings.Count(out, ": warning: ") != 1 {
		t.Fatalf("--fix must leave only the finding without a fix: exit %d\n%s", code, out)
	}
	after, _ := checkJSON(t, dir, "board.toml")
	if rulesOf(after) != "stability.unconditional:" {
		t.Fatalf("after --fix: %s", rulesOf(after))
	}
	b, _ := os.ReadFile(filepath.Join(dir, "board.toml"))
	for _, kept := range []string{"# the input coupling: sized for 14 MHz by eye", "# the input coupling: sized for 14 MHz by eye", `ambient = "30C"`} {
		if !strings.Contains(string(b), kept) {
			t.Errorf("--fix lost %q", kept)
		}
	}
	// Never with standard input or the index.
	if _, code := runIn(t, dir, nil, bin, "check", "--fix", "-"); code != 2 {
		t.Error("--fix with - must be a usage error")
	}
	if _, code := runIn(t, dir, nil, bin, "check", "--fix", "--staged"); code != 2 {
		t.Error("--fix with --staged must be a usage error")
	}
}

// A team adopts the check on a folder of old designs that fail, records a
// baseline, and from then on only a new problem fails.
func TestBaselineAdoption(t *testing.T) {
	bin := binary(t)
	dir := t.TempDir()
	for i := 1; i <= 3; i++ {
		write(t, dir, fmt.Sprintf("designs/old%d.toml", i), strings.Replace(openCircuit, "15 m bias board", fmt.Sprintf("old board %d", i), 1))
	}
	if _, code := runIn(t, dir, nil, bin, "check", "designs"); code != 1 {
		t.Fatal("the old designs should fail before the baseline")
	}
	if out, code := runIn(t, dir, nil, bin, "check", "--write-baseline", "headroom-baseline.json", "designs"); code != 0 {
		t.Fatalf("--write-baseline: %s", out)
	}
	out, code := runIn(t, dir, nil, bin, "check", "--baseline", "headroom-baseline.json", "designs")
	if code != 0 || !strings.Contains(out, "3 baselined") {
		t.Fatalf("with the baseline the old designs pass: exit %d\n%s", code, out)
	}
	// The rule set can name the baseline instead of the flag.
	write(t, dir, ".headroom.toml", "baseline = \"headroom-baseline.json\"\n")
	// One new problem: a second open net in old2, and lines moved in old1.
	write(t, dir, "designs/old2.toml", strings.Replace(openCircuit, "15 m bias board", "old board 2", 1)+
		"\n[parts.R7]\nkind = \"resistor\"\nvalue = \"1k\"\nnets = [\"vcc\", \"probe\"]\n")
	write(t, dir, "designs/old1.toml", "# moved down\n\n\n\n\n\n\n\n\n\n"+strings.Replace(openCircuit, "15 m bias board", "old board 1", 1))
	doc, code := checkJSON(t, dir, "designs")
	want := "net.connectivity:R1(baselined) net.connectivity:R1(baselined) net.connectivity:R7 net.connectivity:R1(baselined)"
	if code != 1 || rulesOf(doc) != want {
		t.Fatalf("only the new problem may fail: exit %d\n got %s\nwant %s", code, rulesOf(doc), want)
	}
	// In SARIF the recorded findings are unchanged and suppressed, the new one new.
	sarif, _ := runIn(t, dir, nil, bin, "check", "--format", "sarif", "designs")
	sarif = sarif[strings.Index(sarif, "{"):] // runIn mixes in standard error, which is empty here
	validate(t, compileSchema(t, sarifSchema), []byte(sarif))
	var log struct {
		Runs []struct {
			Results []struct {
				BaselineState string
				Suppressions  []struct{ Kind string }
				Properties    struct{ Part string }
			}
		}
	}
	json.Unmarshal([]byte(sarif), &log)
	var states []string
	for _, r := range log.Runs[0].Results {
		states = append(states, fmt.Sprintf("%s:%s:%d", r.Properties.Part, r.BaselineState, len(r.Suppressions)))
	}
	if got := strings.Join(states, " "); got != "R1:unchanged:1 R1:unchanged:1 R7:new:0 R1:unchanged:1" {
		t.Errorf("SARIF baseline states: %s", got)
	}
	// Fixing an old design leaves its entry stale, reported like an unused waiver.
	write(t, dir, "designs/old3.toml", closedCircuit)
	write(t, dir, "designs/old2.toml", strings.Replace(openCircuit, "15 m bias board", "old board 2", 1))
	out, code = runIn(t, dir, nil, bin, "check", "designs")
	if code != 0 || !strings.Contains(out, "designs/old3.toml:1:1: info: baseline entry for net.connectivity on R1 matches no finding") {
		t.Fatalf("a stale baseline entry must be reported, not fail: exit %d\n%s", code, out)
	}
}

// A commit that stages only the house rule set is checked against every
// circuit that uses it; a broken tool configuration without [circuit] does
// not block a commit.
func TestHookChecksStagedRuleSet(t *testing.T) {
	needGit(t)
	bin := binary(t)
	dir := gitRepo(t)
	env := []string{"HEADROOM=" + bin}
	if out, code := runIn(t, dir, env, bin, "hook", "install"); code != 0 {
		t.Fatal(out)
	}
	// Past its absolute rating C3 is an error under any rule set: give it none.
	write(t, dir, "boards/buffer.toml", strings.Replace(fixableBoard, `, rating = "6V"`, "", 1))
	write(t, dir, ".headroom.toml", "[rules.\"net.connectivity\"]\nseverity = \"info\"\n")
	git(t, dir, env, "add", ".")
	if out, code := git(t, dir, env, "commit", "-q", "-m", "buffer with house rules"); code != 0 {
		t.Fatalf("warnings and infos pass under the house rules: %s", out)
	}
	write(t, dir, ".headroom.toml", "fail_on = \"warning\"\n[rules.\"net.connectivity\"]\nseverity = \"info\"\n")
	git(t, dir, env, "add", ".headroom.toml")
	out, code := git(t, dir, env, "commit", "-q", "-m", "stricter house rules")
	if code == 0 || !strings.Contains(out, "boards/buffer.toml") {
		t.Fatalf("a staged rule set that breaks a circuit must stop the commit: exit %d\n%s", code, out)
	}
	git(t, dir, env, "reset", "-q", "--hard")

	// A tool's broken TOML beside a clean circuit: the commit goes through.
	write(t, dir, "tools/lint.toml", "[settings\nline-length = 100\n")
	write(t, dir, "boards/bias.toml", closedCircuit)
	git(t, dir, env, "add", ".")
	if out, code := git(t, dir, env, "commit", "-q", "-m", "bias board and a tool config"); code != 0 {
		t.Fatalf("a broken non-circuit TOML must not block the commit: %s", out)
	}
	// A broken file that says it is a circuit still does.
	write(t, dir, "boards/half.toml", "[circuit]\nname = \"half written\n")
	git(t, dir, env, "add", ".")
	if _, code := git(t, dir, env, "commit", "-q", "-m", "half"); code == 0 {
		t.Fatal("a circuit file that does not parse must stop the commit")
	}
}

func TestVersionFromBuildInfo(t *testing.T) {
	out, code := runIn(t, ".", nil, binary(t), "version")
	// A build from a clone is "(devel)", with the revision when git is at hand.
	if code != 0 || !regexp.MustCompile(`^headroom (\(devel\)( [0-9a-f]{12}(\+dirty)?)?|v\S+)\n$`).MatchString(out) {
		t.Fatalf("version: %q", out)
	}
}

func TestCommandHelp(t *testing.T) {
	for _, cmd := range [][]string{{"check"}, {"report"}, {"rules"}, {"explain"}, {"hook"}, {"hook", "install"}, {"version"}} {
		for _, h := range []string{"--help", "-h"} {
			var stdout, stderr strings.Builder
			e := &env{stdin: strings.NewReader(""), stdout: &stdout, stderr: &stderr, getenv: func(string) string { return "" }}
			code := e.run(append(append([]string(nil), cmd...), h))
			name := strings.Join(cmd, " ")
			if code != 0 || !strings.HasPrefix(stdout.String(), "usage: headroom "+name) || stderr.Len() > 0 {
				t.Errorf("headroom %s %s: exit %d\nstdout %q\nstderr %q", name, h, code, stdout.String(), stderr.String())
			}
		}
	}
}

// A staged part library has the circuits that name it checked from the
// index, and only those; a deleted rule set has the circuits below it checked.
func TestHookChecksStagedLibraryAndDeletedRuleSet(t *testing.T) {
	needGit(t)
	bin := binary(t)
	dir := gitRepo(t)
	env := []string{"HEADROOM=" + bin}
	if out, code := runIn(t, dir, env, bin, "hook", "install"); code != 0 {
		t.Fatal(out)
	}
	// An invented club transistor (demo figures, not a real part).
	lib := func(hfe string) string {
		return `[transistors."CLUB-1"]
polarity = "npn"
ft = "250MHz"
hfe = ` + hfe + `
vbe = "0.66V"
ic_ref = "10mA"
pd = "500mW"
tj_max = "150C"
ic_max = "100mA"
vceo = "30V"
`
	}
	user := strings.Replace(closedCircuit, "band = [\"21MHz\", \"21.45MHz\"]\n", "band = [\"21MHz\", \"21.45MHz\"]\nlibrary = [\"../parts/club.toml\"]\n", 1)
	write(t, dir, "parts/club.toml", lib("[80, 240]"))
	write(t, dir, "boards/user.toml", user)
	write(t, dir, "boards/stray.toml", openCircuit) // fails, and uses no library
	git(t, dir, env, "add", ".")
	if out, code := git(t, dir, env, "commit", "-q", "--no-verify", "-m", "start"); code != 0 {
		t.Fatal(out)
	}
	write(t, dir, "parts/club.toml", lib("[100, 240]"))
	git(t, dir, env, "add", "parts/club.toml")
	if out, code := git(t, dir, env, "commit", "-q", "-m", "club library: hFE from the new batch"); code != 0 {
		t.Fatalf("a sound library change must pass, and stray.toml (no library) must not be checked: %s", out)
	}
	write(t, dir, "parts/club.toml", lib("[240, 100]"))
	git(t, dir, env, "add", "parts/club.toml")
	out, code := git(t, dir, env, "commit", "-q", "-m", "club library typo")
	if code == 0 || !strings.Contains(out, "parts/club.toml") || strings.Contains(out, "stray.toml") {
		t.Fatalf("a broken staged library must stop the commit, naming it, and only its users are checked: exit %d\n%s", code, out)
	}
	git(t, dir, env, "reset", "-q", "--hard")

	write(t, dir, "boards/.headroom.toml", "[rules.\"net.connectivity\"]\nseverity = \"off\"\n")
	git(t, dir, env, "add", ".")
	if out, code := git(t, dir, env, "commit", "-q", "-m", "house rules"); code != 0 {
		t.Fatal(out)
	}
	git(t, dir, env, "rm", "-q", "boards/.headroom.toml")
	if out, code := git(t, dir, env, "commit", "-q", "-m", "drop house rules"); code == 0 || !strings.Contains(out, "stray.toml") {
		t.Fatalf("deleting the rule set that let stray.toml pass must stop the commit: exit %d\n%s", code, out)
	}
	git(t, dir, env, "reset", "-q", "--hard")
	// Deleting a circuit touches no other circuit: stray.toml is not checked.
	git(t, dir, env, "rm", "-q", "boards/user.toml")
	if out, code := git(t, dir, env, "commit", "-q", "-m", "drop the user board"); code != 0 {
		t.Fatalf("deleting a circuit must not check the others: %s", out)
	}
}

// --staged in process, so that the race detector sees the index reader
// shared by the parallel checks (go test -race).
func TestStagedInProcess(t *testing.T) {
	needGit(t)
	dir := gitRepo(t)
	for i := range 6 {
		write(t, dir, fmt.Sprintf("boards/b%d.toml", i), openCircuit)
	}
	write(t, dir, "parts/lib.toml", "[cores.\"demo-core\"]\nmu = 100\nal = \"20nH\"\n")
	write(t, dir, ".headroom.toml", "library = [\"parts/lib.toml\"]\n")
	git(t, dir, nil, "add", ".")
	t.Chdir(filepath.Join(dir, "boards"))
	var stdout, stderr strings.Builder
	e := &env{stdin: strings.NewReader(""), stdout: &stdout, stderr: &stderr, getenv: func(string) string { return "" }}
	if code := e.run([]string{"check", "--staged", "--corners", "nominal", "--format", "json"}); code != 1 {
		t.Fatalf("exit %d\n%s", code, stderr.String())
	}
	var doc jsonOut
	if err := json.Unmarshal([]byte(stdout.String()), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Findings) != 6 || doc.Findings[0].Path != "b0.toml" {
		t.Fatalf("want the six staged boards, named from the working folder: %s", stdout.String())
	}
}
