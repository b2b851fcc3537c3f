package main

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"golang.org/x/tools/txtar"
)

var update = flag.Bool("update", false, "rewrite the stdout/stderr sections of the CLI archives")

// CLI archives live in testdata/cli/*.txtar (from the repository root). The
// comment holds directives:
//
//	args: check --format json board.toml   the command line (split on spaces)
//	exit: 1                                the expected exit status
//	env: NO_COLOR=1 TERM=dumb              the environment the command sees
//	stdin: board.toml                      a file of the archive fed to standard input
//	today: 2026-12-02                      the date waivers are judged on (default 2026-12-02)
//
// Every other section is a file written to a fresh folder the command runs
// in, except "stdout" and "stderr", the expected output.
func TestCLI(t *testing.T) {
	files, _ := filepath.Glob("../../testdata/cli/*.txtar")
	if len(files) == 0 {
		t.Fatal("no CLI archives")
	}
	for _, file := range files {
		file, _ = filepath.Abs(file) // the command runs in a folder of its own
		t.Run(strings.TrimSuffix(filepath.Base(file), ".txtar"), func(t *testing.T) { runCLI(t, file) })
	}
}

func runCLI(t *testing.T, path string) {
	ar, err := txtar.ParseFile(path)
	if err != nil {
		t.Fatal(err)
	}
	dirs := map[string]string{}
	for _, line := range strings.Split(string(ar.Comment), "\n") {
		if k, v, ok := strings.Cut(line, ":"); ok && !strings.Contains(k, " ") {
			dirs[k] = strings.TrimSpace(v)
		}
	}
	dir := t.TempDir()
	want := map[string][]byte{}
	for _, f := range ar.Files {
		if f.Name == "stdout" || f.Name == "stderr" {
			want[f.Name] = f.Data
			continue
		}
		p := filepath.Join(dir, filepath.FromSlash(f.Name))
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, f.Data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	vars := map[string]string{}
	for _, kv := range strings.Fields(dirs["env"]) {
		k, v, _ := strings.Cut(kv, "=")
		vars[k] = v
	}
	var stdin []byte
	if s := dirs["stdin"]; s != "" {
		stdin, _ = os.ReadFile(filepath.Join(dir, s))
	}
	today := dirs["today"]
	if today == "" {
		today = "2026-12-02"
	}
	t.Chdir(dir)
	var stdout, stderr bytes.Buffer
	e := &env{stdin: bytes.NewReader(stdin), stdout: &stdout, stderr: &stderr,
		getenv: func(k string) string { return vars[k] }, today: today,
		isTerminal: func(any) bool { return vars["TERMINAL"] == "1" }}
	args := strings.Fields(dirs["args"])
	code := e.run(args)
	got := map[string][]byte{"stdout": stdout.Bytes(), "stderr": stderr.Bytes()}
	if strings.Contains(" "+strings.Join(args, " ")+" ", " --format sarif ") {
		validate(t, compileSchema(t, sarifSchema), stdout.Bytes()) // every SARIF golden is valid SARIF 2.1.0
	}
	if *update {
		var keep []txtar.File
		for _, f := range ar.Files {
			if f.Name != "stdout" && f.Name != "stderr" {
				keep = append(keep, f)
			}
		}
		for _, name := range []string{"stdout", "stderr"} {
			if len(got[name]) > 0 {
				keep = append(keep, txtar.File{Name: name, Data: got[name]})
			}
		}
		ar.Files = keep
		if err := os.WriteFile(path, txtar.Format(ar), 0o644); err != nil {
			t.Fatal(err)
		}
	} else {
		for _, name := range []string{"stdout", "stderr"} {
			if !bytes.Equal(got[name], want[name]) {
				t.Errorf("%s differs:\n--- got\n%s\n--- want\n%s", name, got[name], want[name])
			}
		}
	}
	wantCode, err := strconv.Atoi(dirs["exit"])
	if err != nil {
		t.Fatalf("archive needs an exit: directive")
	}
	if code != wantCode {
		t.Errorf("exit status %d, want %d\nstderr: %s", code, wantCode, stderr.Bytes())
	}
}
