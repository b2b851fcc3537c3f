package main

import (
	"flag"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"

	"headroom/checker/check"
	"headroom/checker/corners"
	"headroom/checker/engine"
	"headroom/checker/output"
	"headroom/rules"
)

func (e *env) check(args []string) int {
	fset := flag.NewFlagSet("check", flag.ContinueOnError)
	rulesRef := fset.String("rules", "", "rule set: a file or a shipped name (default, strict)")
	format := fset.String("format", "text", "output format: text, json or sarif")
	failOn := fset.String("fail-on", "", "lowest severity that fails the check: error, warning or info")
	cornersFlag := fset.String("corners", "", "worst (the default) or nominal")
	colorFlag := fset.String("color", "auto", "colour: auto, always or never")
	staged := fset.Bool("staged", false, "check the staged (git index) version of every staged circuit file")
	paths, ok := e.parse(fset, args)
	if !ok {
		return exitInput
	}
	switch {
	case !oneOf(*format, "text", "json", "sarif"):
		return e.usageError("--format must be text, json or sarif, not %q", *format)
	case *failOn != "" && !oneOf(*failOn, "error", "warning", "info"):
		return e.usageError("--fail-on must be error, warning or info, not %q", *failOn)
	case *cornersFlag != "" && !oneOf(*cornersFlag, "worst", "nominal"):
		return e.usageError("--corners must be worst or nominal, not %q", *cornersFlag)
	case !oneOf(*colorFlag, "auto", "always", "never"):
		return e.usageError("--color must be auto, always or never, not %q", *colorFlag)
	}
	opt := check.Options{Rules: rules.All(), RulesRef: *rulesRef, Corners: *cornersFlag, FailOn: *failOn,
		Today: e.today, Worst: corners.Worst}
	var inputs []input
	if *staged {
		idx, err := newIndexReader()
		if err != nil {
			return e.usageError("%v", err)
		}
		opt.ReadFile, opt.Exists = idx.ReadFile, idx.Exists
		inputs, err = idx.stagedCircuits(paths)
		if err != nil {
			return e.usageError("%v", err)
		}
	} else {
		if len(paths) == 0 {
			paths = []string{"."}
		}
		var err error
		inputs, err = e.collect(paths)
		if err != nil {
			return e.usageError("%v", err)
		}
	}
	results := checkAll(check.NewRunner(opt), inputs)
	status := exitOK
	for _, r := range results {
		if r.Err != nil {
			status = exitInput
		}
	}
	if status == exitOK && failing(results) {
		status = exitFindings
	}
	switch *format {
	case "json":
		e.writeErrors(results)
		output.JSON(e.stdout, results, nil)
	case "sarif":
		e.writeErrors(results)
		output.SARIF(e.stdout, results, rules.All(), version)
	default:
		output.Text(e.stdout, e.stderr, results, output.NewPalette(e.colour(*colorFlag)))
	}
	return status
}

// failing reports whether any unwaived finding reaches its file's fail-on severity.
func failing(results []check.Result) bool {
	for _, r := range results {
		for _, f := range r.Findings {
			if !f.Waived && f.Severity >= r.FailOn && f.Severity != engine.Off {
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
	path string
	data []byte // nil: read from path
}

// collect expands folders into their *.toml files (sorted, hidden folders
// skipped) and reads "-" from standard input.
func (e *env) collect(paths []string) ([]input, error) {
	var out []input
	for _, p := range paths {
		if p == "-" {
			b, err := io.ReadAll(e.stdin)
			if err != nil {
				return nil, err
			}
			out = append(out, input{path: "-", data: b})
			continue
		}
		st, err := os.Stat(p)
		if err != nil || !st.IsDir() {
			out = append(out, input{path: p}) // an unreadable path is an input error of its own
			continue
		}
		var found []string
		err = filepath.WalkDir(p, func(path string, d fs.DirEntry, err error) error {
			if err != nil {
				return nil
			}
			if d.IsDir() && path != p && strings.HasPrefix(d.Name(), ".") {
				return filepath.SkipDir
			}
			if !d.IsDir() && strings.HasSuffix(d.Name(), ".toml") && d.Name() != ".headroom.toml" {
				found = append(found, path)
			}
			return nil
		})
		if err != nil {
			return nil, err
		}
		sort.Strings(found)
		for _, f := range found {
			out = append(out, input{path: f})
		}
	}
	return out, nil
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
