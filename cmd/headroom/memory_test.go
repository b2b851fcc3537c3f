package main

import (
	"bytes"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// smallBoard is a demo circuit of our own: a 9 V rail with a 1 kohm load.
const smallBoard = `[circuit]
name = "30 m test load"
band = ["10.1MHz", "10.15MHz"]

[supplies.vcc]
volts = "9V"

[parts.R1]
kind = "resistor"
value = "1k"
nets = ["vcc", "gnd"]
`

// allocated runs the command line in dir and returns the bytes allocated
// meanwhile (runtime.MemStats.TotalAlloc). Everything the run holds at its
// peak was allocated during it, so this bounds the peak from above.
func allocated(t *testing.T, dir string, args ...string) (uint64, int, string) {
	t.Helper()
	t.Chdir(dir)
	var stdout, stderr bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &stdout, stderr: &stderr,
		getenv: func(string) string { return "" }, today: "2026-12-02"}
	runtime.GC()
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	code := e.run(args)
	runtime.ReadMemStats(&after)
	return after.TotalAlloc - before.TotalAlloc, code, stderr.String()
}

// Memory grows linearly with the input: checking a 10 MB file, a net name
// of 10 MB (its one connection asks for the closest net), an unknown rule id
// of 100,000 characters in a rule set and a file missing a key beside a
// 100,000-character one (both ask for the closest name) allocates at most a
// fixed multiple of the input's size. Before the spelling suggestions were
// bounded, each candidate cost a full distance table: 8 bytes × the length
// of the name × the length of the candidate.
func TestMemoryLinear(t *testing.T) {
	// Measured after the fix: 7.5 bytes allocated per byte of input for the
	// commented file, about 22 for the long names. The unknown rule id cost
	// about 3,800 per byte before (twenty-odd rule ids of about 20 characters).
	const perByte = 32
	tenMB := 10 << 20
	long := strings.Repeat("k", 100_000)
	for _, c := range []struct {
		name, text, set string
		code            int
	}{
		{"10 MB of comments", smallBoard + strings.Repeat("# "+strings.Repeat("x", 77)+"\n", tenMB/80), "", 0},
		{"10 MB net name", strings.Replace(smallBoard, `nets = ["vcc", "gnd"]`, `nets = ["vcc", "`+strings.Repeat("n", tenMB)+`"]`, 1), "", 1},
		{"100,000-character rule id", smallBoard, "[rules." + long + "]\nseverity = \"off\"\n", 2},
		{"100,000-character key, band missing", strings.Replace(smallBoard, `band = ["10.1MHz", "10.15MHz"]`, long+" = 1", 1), "", 2},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			if err := os.WriteFile(filepath.Join(dir, "board.toml"), []byte(c.text), 0o644); err != nil {
				t.Fatal(err)
			}
			args := []string{"check", "--corners", "nominal", "board.toml"}
			if c.set != "" {
				os.WriteFile(filepath.Join(dir, "set.toml"), []byte(c.set), 0o644)
				args = append(args, "--rules", "set.toml")
			}
			got, code, stderr := allocated(t, dir, args...)
			if code != c.code {
				t.Fatalf("exit %d, want %d; stderr %.200s", code, c.code, stderr)
			}
			size := len(c.text) + len(c.set)
			limit := uint64(perByte*size) + 8<<20 // plus a fixed allowance for the program itself
			t.Logf("%s: %d bytes of input, %d allocated (%.1f per byte)", c.name, size, got, float64(got)/float64(size))
			if got > limit {
				t.Errorf("allocated %d bytes for %d bytes of input: more than %d per byte", got, size, perByte)
			}
		})
	}
}
