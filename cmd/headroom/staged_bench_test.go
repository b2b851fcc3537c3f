package main

import (
	"fmt"
	"os/exec"
	"strings"
	"testing"
)

// benchRepo is a repository with 50 staged circuit files (the buffer board
// with its coupling capacitor stepped), the shape of a large commit.
func benchRepo(b *testing.B) (dir, bin string) {
	b.Helper()
	bin = binary(b)
	dir = b.TempDir()
	for _, args := range [][]string{{"init", "-q"}, {"config", "user.name", "Bench"}, {"config", "user.email", "bench@example.invalid"}} {
		if out, err := exec.Command("git", append([]string{"-C", dir}, args...)...).CombinedOutput(); err != nil {
			b.Fatalf("git %v: %s", args, out)
		}
	}
	for i := range 50 {
		board := strings.Replace(fixableBoard, `value = "220p"`, fmt.Sprintf(`value = "%dp"`, 220+10*i), 1)
		write(b, dir, fmt.Sprintf("boards/b%02d.toml", i), board)
	}
	if out, err := exec.Command("git", "-C", dir, "add", ".").CombinedOutput(); err != nil {
		b.Fatalf("git add: %s", out)
	}
	return dir, bin
}

func benchCheck(b *testing.B, args ...string) {
	if _, err := exec.LookPath("git"); err != nil {
		b.Skip("git not installed")
	}
	dir, bin := benchRepo(b)
	b.ResetTimer()
	for b.Loop() {
		cmd := exec.Command(bin, append([]string{"check", "--corners", "nominal", "--format", "json"}, args...)...)
		cmd.Dir = dir
		if out, err := cmd.Output(); err != nil && !strings.Contains(string(out), `"findings"`) {
			b.Fatalf("%v: %s", err, out)
		}
	}
}

// go test -run '^$' -bench 'Check(Staged|Folder)50' ./cmd/headroom
func BenchmarkCheckStaged50(b *testing.B) { benchCheck(b, "--staged") }
func BenchmarkCheckFolder50(b *testing.B) { benchCheck(b, ".") }
