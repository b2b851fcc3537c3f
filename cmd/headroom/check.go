package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"

	"headroom/checker/check"
	"headroom/checker/circuit"
	"headroom/checker/circuit/tomlfile"
	"headroom/checker/corners"
	"headroom/checker/engine"
	"headroom/checker/inputfile"
	"headroom/checker/output"
	"headroom/checker/ruledoc"
	"headroom/rules"
)

func (e *env) check(args []string) int {
	fset := flag.NewFlagSet("check", flag.ContinueOnError)
	rulesRef := fset.String("rules", "", "rule set: a file or a shipped name (default, strict)")
	format := fset.String("format", "text", "output format: text, json, sarif or github")
	failOn := fset.String("fail-on", "", "lowest severity that fails the check: error, warning or info")
	cornersFlag := fset.String("corners", "", "worst (the default) or nominal")
	colorFlag := fset.String("color", "auto", "colour: auto, always or never")
	staged := fset.Bool("staged", false, "check the staged (git index) version of every staged circuit file")
	fix := fset.Bool("fix", false, "apply every offered fix to the circuit files, then check again")
	diff := fset.Bool("diff", false, "print the fixes as a unified diff instead of writing them")
	baselineRef := fset.String("baseline", "", "`FILE` of recorded findings: they are reported as baselined and do not fail")
	writeBaseline := fset.String("write-baseline", "", "record every unwaived finding in `FILE`, a new baseline")
	stdinName := fset.String("stdin-filename", "", "the `NAME` of the circuit read from standard input (-), for messages, discovery and fingerprints")
	paths, status, ok := e.parse(fset, args)
	if !ok {
		return status
	}
	stdinUsed := false
	for _, p := range paths {
		stdinUsed = stdinUsed || p == "-"
	}
	switch {
	case !oneOf(*format, "text", "json", "sarif", "github"):
		return e.usageError("--format must be text, json, sarif or github, not %q", *format)
	case *failOn != "" && !oneOf(*failOn, "error", "warning", "info"):
		return e.usageError("--fail-on must be error, warning or info, not %q", *failOn)
	case *cornersFlag != "" && !oneOf(*cornersFlag, "worst", "nominal"):
		return e.usageError("--corners must be worst or nominal, not %q", *cornersFlag)
	case !oneOf(*colorFlag, "auto", "always", "never"):
		return e.usageError("--color must be auto, always or never, not %q", *colorFlag)
	case (*fix || *diff) && *staged:
		return e.usageError("--fix and --diff change the working tree, so they do not go with --staged")
	case (*fix || *diff) && stdinUsed:
		return e.usageError("--fix and --diff change files, so they do not go with - (standard input)")
	case *stdinName != "" && !stdinUsed:
		return e.usageError("--stdin-filename names the circuit read from -, and no - was given")
	}
	opt := check.Options{Rules: rules.All(), RulesRef: *rulesRef, Corners: *cornersFlag, FailOn: *failOn,
		Today: e.today, Worst: corners.Worst}
	var inputs []input
	var idx *indexReader
	var stagedSet map[string]bool
	var skipped skips
	if *staged {
		var err error
		if idx, err = newIndexReader(); err != nil {
			return e.usageError("%v", err)
		}
		defer idx.Close()
		opt.ReadFile, opt.Exists = idx.ReadFile, idx.Exists
		if inputs, stagedSet, err = idx.stagedCircuits(paths); err != nil {
			return e.usageError("%v", err)
		}
	} else {
		if len(paths) == 0 {
			paths = []string{"."}
		}
		var err error
		if inputs, skipped, err = e.collect(paths, *stdinName); err != nil {
			return e.usageError("%v", err)
		}
	}
	read := opt.ReadFile
	if read == nil {
		read = inputfile.Read
	}
	runner := check.NewRunner(opt)
	results := checkAll(runner, inputs)
	results = skipBrokenConfigs(inputs, results, read)
	if idx != nil {
		results = keepTouched(idx, inputs, results, stagedSet)
	}
	inv := e.invocation(runner)
	var diffs []fileDiff
	if *fix || *diff {
		results, diffs = fixAll(runner, results, !*diff, e.stderr)
	}
	used, err := e.applyBaseline(runner, results, inv, *baselineRef, read)
	inv.Baseline = used
	if err != nil {
		fmt.Fprintln(e.stderr, output.ErrorLine("", err))
		return exitInput
	}
	if *writeBaseline != "" {
		return e.writeBaseline(*writeBaseline, results, inv)
	}
	status = exitOK
	for _, r := range results {
		if r.Err != nil {
			status = exitInput
		}
	}
	if status == exitOK && failing(results) {
		status = exitFindings
	}
	inv.ExitCode = status
	if *diff {
		e.writeErrors(results)
		for _, d := range diffs {
			io.WriteString(e.stdout, d.unified())
		}
		return status
	}
	switch *format {
	case "json":
		e.writeErrors(results)
		output.JSON(e.stdout, results, nil)
	case "sarif":
		e.writeErrors(results)
		inv.Help = ruleHelp()
		output.SARIF(e.stdout, results, inv)
	case "github":
		e.writeErrors(results)
		output.GitHub(e.stdout, results, inv)
	default:
		var notes []string
		if s := skipped.String(); s != "" {
			notes = append(notes, s)
		}
		output.Text(e.stdout, e.stderr, results, output.NewPalette(e.colour(*colorFlag)), notes...)
	}
	return status
}

// invocation describes this run for the machine-readable formats: SRCROOT is
// the top of the git work tree around the working folder, else the working
// folder; the rules' default levels come from the rule set found here.
func (e *env) invocation(runner *check.Runner) output.Invocation {
	wd, _ := os.Getwd()
	if r, err := filepath.EvalSymlinks(wd); err == nil {
		wd = r
	}
	root := workTreeTop(wd)
	inv := output.Invocation{Root: root, WD: wd, Version: version, Rules: rules.All()}
	if set, err := runner.RuleSet(filepath.Join(wd, "circuit.toml")); err == nil {
		inv.Severity = set.Severity
	}
	return inv
}

// workTreeTop is the nearest folder at or above dir that holds .git (a
// folder, or the file of a linked work tree), else dir: found on disk, as
// rule-set discovery finds the repository root, without starting git.
func workTreeTop(dir string) string {
	for d := dir; ; {
		if _, err := os.Lstat(filepath.Join(d, ".git")); err == nil {
			return d
		}
		parent := filepath.Dir(d)
		if parent == d {
			return dir
		}
		d = parent
	}
}

// ruleHelp renders a rule's explain documentation for SARIF's help.
func ruleHelp() func(r *engine.Rule) (string, string) {
	def, strict, err := ruledoc.Shipped(rules.All())
	if err != nil {
		return nil
	}
	return func(r *engine.Rule) (string, string) {
		return ruledoc.Explain(r, def, strict), ruledoc.Markdown(r, def, strict)
	}
}

// skipBrokenConfigs skips a file found by a folder walk or in the index that
// does not parse as TOML and has no [circuit] header in its text: a broken
// tool configuration, not a circuit, so it does not block a check of circuits.
func skipBrokenConfigs(inputs []input, results []check.Result, read func(string) ([]byte, error)) []check.Result {
	for i, r := range results {
		if r.Err == nil || !inputs[i].walked {
			continue
		}
		data := inputs[i].data
		if data == nil {
			var err error
			if data, err = read(inputs[i].path); err != nil {
				continue
			}
		}
		if circuitHeader.Match(data) {
			continue
		}
		if _, err := tomlfile.Parse(r.Path, data); err != nil {
			results[i] = check.Result{Path: r.Path, Skipped: true}
		}
	}
	return results
}

// keepTouched drops the files that were checked only because a rule set or
// library was staged, unless they use one of the staged files.
func keepTouched(idx *indexReader, inputs []input, results []check.Result, staged map[string]bool) []check.Result {
	var out []check.Result
	for i, r := range results {
		if inputs[i].extra && !idx.usesStaged(r.Uses, staged) {
			continue
		}
		out = append(out, r)
	}
	return out
}

// failing reports whether any unwaived finding reaches its file's fail-on severity.
func failing(results []check.Result) bool {
	for _, r := range results {
		for _, f := range r.Findings {
			if !f.Waived && !f.Baselined && f.Severity >= r.FailOn && f.Severity != engine.Off {
				return true
			}
		}
	}
	return false
}

// writeErrors puts input errors on standard error in the GNU form, for the
// machine-readable formats that carry them in the document too.
func (e *env) writeErrors(results []check.Result) {
	for _, r := range results {
		if r.Err != nil {
			io.WriteString(e.stderr, output.ErrorLine(r.Path, r.Err)+"\n")
		}
	}
}

type input struct {
	path   string
	data   []byte // nil: read from path
	walked bool   // found by a folder walk or in the index, not named
	extra  bool   // --staged: not staged, checked for a staged rule set or library
	err    error  // a folder that could not be read: reported as an input error of its own
}

// skips counts what a folder walk passed over, for the summary.
type skips struct {
	hidden, symlinked, outside int
}

// String is what the text summary line ends with; "" when nothing was skipped.
func (s skips) String() string {
	var parts []string
	if s.hidden > 0 {
		parts = append(parts, output.Plural(s.hidden, "hidden folder")+" (name starts with a dot)")
	}
	if s.symlinked > 0 {
		parts = append(parts, output.Plural(s.symlinked, "symlinked folder")+" (links inside a folder are not followed)")
	}
	if s.outside > 0 {
		parts = append(parts, output.Plural(s.outside, "symlinked file")+" (leads outside the repository)")
	}
	if len(parts) == 0 {
		return ""
	}
	return "skipped " + strings.Join(parts, ", ")
}

// readDir lists a folder; tests replace it to make a folder unreadable
// (the tests may run as root, whom permissions do not stop).
var readDir = os.ReadDir

// collect expands folders into their *.toml files (sorted) and reads "-" from
// standard input, named stdinName when given. A folder named on the command line is walked even when it
// is a symlink; inside it, hidden folders, symlinked folders and symlinked
// files leading out of the repository are skipped (counted for the summary:
// a link may lead out of the tree or round in a loop) and .git is passed
// over without a word. A folder that cannot be read is an input error.
func (e *env) collect(paths []string, stdinName string) ([]input, skips, error) {
	var out []input
	var sk skips
	for _, p := range paths {
		if p == "-" {
			b, err := inputfile.ReadAll(e.stdin)
			if err != nil {
				return nil, sk, fmt.Errorf("standard input: %w", err)
			}
			name := "-"
			if stdinName != "" {
				name = stdinName
			}
			out = append(out, input{path: name, data: b})
			continue
		}
		st, err := os.Stat(p) // follows a symlink named on the command line
		if err != nil || !st.IsDir() {
			out = append(out, input{path: p}) // an unreadable path is an input error of its own
			continue
		}
		var found []input
		scope, _ := inputfile.Scope(p)
		walk(p, scope, &found, &sk)
		sort.Slice(found, func(i, j int) bool { return found[i].path < found[j].path })
		out = append(out, found...)
	}
	return out, sk, nil
}

// walk appends dir's circuit-file candidates and unreadable sub-folders to
// found. A symlinked file that leads outside scope (the repository) is
// skipped: a checkout must not make the checker read what it does not hold.
func walk(dir, scope string, found *[]input, sk *skips) {
	entries, err := readDir(dir)
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		*found = append(*found, input{path: dir, err: fmt.Errorf("cannot read folder: %v", err)})
		return
	}
	for _, d := range entries {
		path := filepath.Join(dir, d.Name())
		switch {
		case d.IsDir() && d.Name() == ".git":
		case d.IsDir() && strings.HasPrefix(d.Name(), "."):
			sk.hidden++
		case d.IsDir():
			walk(path, scope, found, sk)
		case d.Type()&fs.ModeSymlink != 0 && isDir(path):
			sk.symlinked++
		case d.Type()&fs.ModeSymlink != 0 && strings.HasSuffix(d.Name(), ".toml") && !inputfile.Inside(scope, path):
			sk.outside++
		case strings.HasSuffix(d.Name(), ".toml") && d.Name() != ".headroom.toml":
			*found = append(*found, input{path: path, walked: true}) // not a regular file: refused when read
		}
	}
}

func isDir(p string) bool {
	st, err := os.Stat(p)
	return err == nil && st.IsDir()
}

// colour decides whether to colour: --color wins; with auto, only on a
// terminal, never with NO_COLOR set or TERM=dumb.
func (e *env) colour(flag string) bool {
	switch flag {
	case "always":
		return true
	case "never":
		return false
	}
	if e.getenv("NO_COLOR") != "" || e.getenv("TERM") == "dumb" {
		return false
	}
	if e.isTerminal != nil {
		return e.isTerminal(e.stdout)
	}
	f, ok := e.stdout.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

// checkAll checks the files on every core, keeping their order in the output.
func checkAll(runner *check.Runner, inputs []input) []check.Result {
	results := make([]check.Result, len(inputs))
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), max(len(inputs), 1)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				if err := inputs[i].err; err != nil {
					results[i] = check.Result{Path: inputs[i].path, Err: &circuit.InputError{
						Pos: circuit.Pos{File: inputs[i].path, Line: 1, Col: 1}, Msg: err.Error()}}
					continue
				}
				results[i] = runner.File(inputs[i].path, inputs[i].data)
			}
		}()
	}
	for i := range inputs {
		next <- i
	}
	close(next)
	wg.Wait()
	return results
}
