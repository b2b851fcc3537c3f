// Command headroom checks hand-designed small-signal RF circuits against a
// rule set before the soldering iron is hot. See README.md.
package main

import (
	"io"
	"os"
)

func main() {
	os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}

// Exit statuses (FORMAT.md §5).
const (
	exitOK       = 0
	exitFindings = 1
	exitInput    = 2
)

// run is the whole command line, so that tests can drive it.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	e := &env{stdin: stdin, stdout: stdout, stderr: stderr, getenv: os.Getenv}
	return e.run(args)
}
