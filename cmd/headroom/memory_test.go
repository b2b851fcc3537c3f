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

// Memory grows linearly with the input: checking a 10 MB file, or a file
// with an unknown key of 100,000 characters or of 10 MB, allocates at most a
// fixed multiple of the file's size. (Before the spelling suggestions were
// bounded, the 10 MB key cost about 800 MB: a full distance table per
// candidate key.)
func TestMemoryLinear(t *testing.T) {
	// Measured: 7.5 bytes allocated per byte of input for the comments, 21–23
	// for the keys; the old full distance table cost 80 per byte per candidate key.
	const perByte = 32
	tenMB := 10 << 20
	for _, c := range []struct {
		name, text string
		code       int
	}{
		{"10 MB of comments", smallBoard + strings.Repeat("# "+strings.Repeat("x", 77)+"\n", tenMB/80), 0},
		{"100,000-character key", strings.Replace(smallBoard, "[supplies.vcc]", strings.Repeat("k", 100_000)+" = 1\n\n[supplies.vcc]", 1), 2},
		{"10 MB key", strings.Replace(smallBoard, "[supplies.vcc]", strings.Repeat("k", tenMB)+" = 1\n\n[supplies.vcc]", 1), 2},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			if err := os.WriteFile(filepath.Join(dir, "board.toml"), []byte(c.text), 0o644); err != nil {
				t.Fatal(err)
			}
			got, code, stderr := allocated(t, dir, "check", "--corners", "nominal", "board.toml")
			if code != c.code {
				t.Fatalf("exit %d, want %d; stderr %.200s", code, c.code, stderr)
			}
			limit := uint64(perByte*len(c.text)) + 64<<20 // plus a fixed allowance for the program itself
			t.Logf("%s: %d bytes of input, %d allocated (%.1f per byte)", c.name, len(c.text), got, float64(got)/float64(len(c.text)))
			if got > limit {
				t.Errorf("allocated %d bytes for %d bytes of input: more than %d per byte", got, len(c.text), perByte)
			}
		})
	}
}
