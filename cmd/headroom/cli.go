package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"runtime/debug"

	"headroom/checker/printable"
)

// version is the program's version: the module version and VCS revision
// the Go toolchain recorded in the binary (see buildVersion).
var version = buildVersion()

// buildVersion reads the build information: the module version ("v1.2.0"
// when installed by version, "(devel)" from a clone) followed by the VCS
// revision and "+dirty" for uncommitted changes, when the build recorded them.
func buildVersion() string {
	info, ok := debug.ReadBuildInfo()
	if !ok {
		return "(devel)"
	}
	return versionOf(info)
}

func versionOf(info *debug.BuildInfo) string {
	v := info.Main.Version
	if v == "" {
		v = "(devel)"
	}
	var rev, modified string
	for _, s := range info.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			modified = s.Value
		}
	}
	if rev != "" && v == "(devel)" {
		if len(rev) > 12 {
			rev = rev[:12]
		}
		v += " " + rev
		if modified == "true" {
			v += "+dirty"
		}
	}
	return v
}

type env struct {
	stdin          io.Reader
	stdout, stderr io.Writer
	getenv         func(string) string
	today          string         // YYYY-MM-DD; "" = the real clock (tests set it)
	isTerminal     func(any) bool // nil: a character device
}

const usage = `usage:
  headroom check   [--rules FILE|NAME] [--format text|json|sarif|github] [--fail-on SEVERITY]
                   [--corners worst|nominal] [--color auto|always|never] [--staged]
                   [--fix] [--diff] [--baseline FILE] [--write-baseline FILE]
                   [--stdin-filename NAME] [PATH ...]
  headroom report  [--format text|markdown|html|json] [--corners worst|nominal] [--rules FILE|NAME]
                   [--pictures inline|none|FOLDER] [--force] FILE
  headroom plot    [-o FOLDER] [--force] [--corners worst|nominal] [--rules FILE|NAME] FILE
  headroom rules   [--rules FILE|NAME] [--format text|json]
  headroom explain RULE
  headroom parts   [--format text|json]
  headroom hook    install [--force] | uninstall
  headroom version

headroom COMMAND --help describes one command.
`

// commands holds each command's synopsis and purpose, for COMMAND --help.
var commands = map[string][2]string{
	"check":          {"[flags] [PATH ...]", "Checks circuit files (folders are searched for *.toml; - reads standard input) against their rule set."},
	"report":         {"[flags] FILE", "Prints a circuit's computed operating point, impedances and dissipations."},
	"plot":           {"[flags] FILE", "Draws a circuit's response and stability margin, every judged item against its limit, and its transistors' operating points, as SVG files."},
	"rules":          {"[flags]", "Lists the rules of the rule set in force, with severities and parameters."},
	"explain":        {"RULE", "Explains one rule: why it matters, what it measures, its parameters, its source and the fix."},
	"hook":           {"install [--force] | uninstall", "Installs or removes the git pre-commit hook that runs check --staged."},
	"hook install":   {"[--force]", "Installs the git pre-commit hook that runs check --staged; --force replaces another hook, keeping a backup."},
	"hook uninstall": {"", "Removes the pre-commit hook, only if headroom wrote it and it is unchanged."},
	"version":        {"", "Prints the version: module version and VCS revision of the build."},
}

// commandUsage prints one command's usage and flags on w.
func commandUsage(w io.Writer, name string, fs *flag.FlagSet) {
	c := commands[name]
	fmt.Fprintf(w, "usage: headroom %s %s\n\n%s\n", name, c[0], c[1])
	if fs == nil {
		return
	}
	has := false
	fs.VisitAll(func(*flag.Flag) { has = true })
	if has {
		fmt.Fprint(w, "\nflags:\n")
		out := fs.Output()
		fs.SetOutput(w)
		fs.PrintDefaults()
		fs.SetOutput(out)
	}
}

// isHelp reports whether args ask for help (-h, --help, -help).
func isHelp(args []string) bool {
	return len(args) == 1 && oneOf(args[0], "-h", "--help", "-help")
}

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
	case "plot":
		return e.plot(rest)
	case "rules":
		return e.rules(rest)
	case "explain":
		return e.explain(rest)
	case "parts":
		return e.parts(rest)
	case "hook":
		return e.hook(rest)
	case "version", "--version":
		if isHelp(rest) {
			commandUsage(e.stdout, "version", nil)
			return exitOK
		}
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
// When it returns false the command ends with the status returned: 0 after
// -h or --help (the command's usage on standard output), 2 after a bad flag.
func (e *env) parse(fs *flag.FlagSet, args []string) ([]string, int, bool) {
	fs.SetOutput(io.Discard) // the flag package would echo an unknown flag raw
	fs.Usage = func() {}     // -h prints the usage on standard output below; a bad flag gets a hint

	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				commandUsage(e.stdout, fs.Name(), fs)
				return nil, exitOK, false
			}
			fmt.Fprintln(e.stderr, printable.String(err.Error()))
			fmt.Fprintf(e.stderr, "run 'headroom %s --help' for the flags\n", fs.Name())
			return nil, exitInput, false
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, 0, true
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

func (e *env) usageError(format string, a ...any) int {
	fmt.Fprintf(e.stderr, "headroom: %s\n", printable.String(fmt.Sprintf(format, a...)))
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
