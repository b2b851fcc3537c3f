package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"golang.org/x/tools/txtar"
)

// FuzzCommandLine drives the whole command line over a txtar archive: the
// comment's "args:" line is the command (check, report, rules or explain;
// never hook or --staged, which touch a git repository), an optional
// "stdin:" line names the file fed to standard input, and every file of the
// archive is written to a fresh folder the command runs in, so circuits,
// rule sets, libraries and discovered .headroom.toml files meet together.
//
// Whatever the input, the command returns with 0, 1 or 2, says why on
// standard error when it exits 2, prints no NaN or Inf that the input did
// not spell out, and writes no control character but newline and tab (no
// forged lines, no escape sequences) where people read it; a standard output
// that is valid JSON escapes by JSON's rules and is exempt (DEL may stay raw). The seeds are the CLI golden archives
// and, in testdata/fuzz/FuzzCommandLine, their numbers moved to the limits
// of a float64 (1e308, 5e-324, -0, exponents past the range).
func FuzzCommandLine(f *testing.F) {
	files, _ := filepath.Glob("../../testdata/cli/*.txtar")
	for _, file := range files {
		ar, err := txtar.ParseFile(file)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(txtar.Format(withoutOutput(ar)))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		ar := txtar.Parse(data)
		if len(ar.Files) > 16 || len(data) > 256<<10 {
			return // the cost of an input, not of headroom
		}
		args, stdinName := fuzzArgs(ar.Comment)
		dir := t.TempDir()
		var stdin []byte
		for _, fl := range ar.Files {
			if !filepath.IsLocal(fl.Name) || strings.ContainsRune(fl.Name, 0) {
				continue
			}
			p := filepath.Join(dir, filepath.FromSlash(fl.Name))
			os.MkdirAll(filepath.Dir(p), 0o755)
			os.WriteFile(p, fl.Data, 0o644)
			if fl.Name == stdinName {
				stdin = fl.Data
			}
		}
		t.Chdir(dir)
		var stdout, stderr bytes.Buffer
		e := &env{stdin: bytes.NewReader(stdin), stdout: &stdout, stderr: &stderr,
			getenv: func(string) string { return "" }, today: "2026-12-02"}
		code := e.run(args)
		out := stdout.String() + stderr.String()
		switch {
		case code < 0 || code > 2:
			t.Fatalf("exit %d", code)
		case code == exitInput && stderr.Len() == 0:
			t.Fatalf("exit 2 with nothing on standard error; stdout %q", stdout.String())
		}
		if nonFinite.MatchString(dataURI.ReplaceAllString(out, "")) && !spelled.Match(data) { // base64 may spell NaN by chance
			t.Fatalf("a non-finite number in the output:\n%s", out)
		}
		people := out // what a person reads; a JSON document escapes by its own rules (DEL may stay raw)
		if json.Valid(stdout.Bytes()) {
			people = stderr.String()
		}
		if i := strings.IndexFunc(people, func(r rune) bool { return r < 0x20 && r != '\n' && r != '\t' || r == 0x7f }); i >= 0 {
			t.Fatalf("control character %q in the output at %d:\n%q", people[i], i, people)
		}
	})
}

var (
	nonFinite = regexp.MustCompile(`\bNaN\b|\bInf\b|\bnan\b|\binf\b`)
	spelled   = regexp.MustCompile(`(?i)nan|inf`) // the input may name them itself
	dataURI   = regexp.MustCompile(`data:image/svg\+xml;base64,[A-Za-z0-9+/=]*`)
)

// fuzzArgs reads the command line from an archive's comment; a command that
// would touch a git repository is replaced by check, paths that leave the
// archive's folder are dropped, and colour is off.
func fuzzArgs(comment []byte) (args []string, stdin string) {
	for _, line := range strings.Split(string(comment), "\n") {
		if v, ok := strings.CutPrefix(line, "args:"); ok {
			args = strings.Fields(v)
		}
		if v, ok := strings.CutPrefix(line, "stdin:"); ok {
			stdin = strings.TrimSpace(v)
		}
	}
	if len(args) == 0 || !oneOf(args[0], "check", "report", "rules", "explain", "version") {
		args = append([]string{"check"}, args...)
	}
	kept := args[:0]
	for _, a := range args {
		v := a
		if strings.HasPrefix(a, "-") {
			_, v, _ = strings.Cut(a, "=")
		}
		switch {
		case strings.HasPrefix(strings.TrimLeft(a, "-"), "staged"):
		case v != "" && v != "-" && !filepath.IsLocal(v): // "/" would walk the whole machine
		default:
			kept = append(kept, a)
		}
	}
	if kept[0] == "check" {
		kept = append(kept, "--color=never") // the last wins: colour is the one escape allowed
	}
	return kept, stdin
}

// withoutOutput drops the expected stdout and stderr of a CLI golden archive.
func withoutOutput(ar *txtar.Archive) *txtar.Archive {
	out := &txtar.Archive{Comment: ar.Comment}
	for _, f := range ar.Files {
		if f.Name != "stdout" && f.Name != "stderr" {
			out.Files = append(out.Files, f)
		}
	}
	return out
}
