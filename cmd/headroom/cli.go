package main

import (
	"flag"
	"fmt"
	"io"
)

// version is the program's version; set by the release build.
var version = "0.1.0-dev"

type env struct {
	stdin          io.Reader
	stdout, stderr io.Writer
	getenv         func(string) string
	today          string         // YYYY-MM-DD; "" = the real clock (tests set it)
	isTerminal     func(any) bool // nil: a character device
}

const usage = `usage:
  headroom check   [--rules FILE|NAME] [--format text|json|sarif] [--fail-on SEVERITY]
                   [--corners worst|nominal] [--color auto|always|never] [--staged] [PATH ...]
  headroom report  [--format text|markdown|json] [--corners worst|nominal] FILE
  headroom rules   [--rules FILE|NAME] [--format text|json]
  headroom explain RULE
  headroom parts   [--format text|json]
  headroom hook    install [--force] | uninstall
  headroom version
`

func (e *env) run(args []string) int {
	if len(args) == 0 {
		fmt.Fprint(e.stderr, usage)
		return exitInput
	}
	cmd, rest := args[0], args[1:]
	switch cmd {
	case "check":
		return e.check(rest)
	case "report":
		return e.report(rest)
	case "rules":
		return e.rules(rest)
	case "explain":
		return e.explain(rest)
	case "parts":
		return e.parts(rest)
	case "hook":
		return e.hook(rest)
	case "version", "--version":
		fmt.Fprintf(e.stdout, "headroom %s\n", version)
		return exitOK
	case "help", "-h", "--help":
		fmt.Fprint(e.stdout, usage)
		return exitOK
	}
	fmt.Fprintf(e.stderr, "headroom: unknown command %q\n%s", cmd, usage)
	return exitInput
}

// parse reads flags wherever they stand among the arguments, as users type
// them ("check board.toml --format json"). "-" is a positional argument.
func (e *env) parse(fs *flag.FlagSet, args []string) ([]string, bool) {
	fs.SetOutput(e.stderr)
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, false
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, true
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

func (e *env) usageError(format string, a ...any) int {
	fmt.Fprintf(e.stderr, "headroom: "+format+"\n", a...)
	return exitInput
}

func oneOf(v string, allowed ...string) bool {
	for _, a := range allowed {
		if v == a {
			return true
		}
	}
	return false
}
