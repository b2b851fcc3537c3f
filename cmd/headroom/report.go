package main

import (
	"errors"
	"flag"
	"fmt"

	"headroom/checker/analysis"
	"headroom/checker/check"
	"headroom/checker/circuit"
	"headroom/checker/corners"
	"headroom/checker/inputfile"
	"headroom/checker/report"
	"headroom/checker/ruleset"
	"headroom/checker/topology"
	"headroom/rules"
)

func (e *env) report(args []string) int {
	fset := flag.NewFlagSet("report", flag.ContinueOnError)
	format := fset.String("format", "text", "text, markdown, html or json")
	cornersFlag := fset.String("corners", "", "worst or nominal (default: the rule set's)")
	rulesRef := fset.String("rules", "", "rule set for its library, corners and the margins picture (default: discovery)")
	pictures := fset.String("pictures", "inline", "markdown and html: inline (embedded), none, or a folder to write them in and link")
	force := fset.Bool("force", false, "with --pictures FOLDER: overwrite files headroom did not write")
	paths, status, ok := e.parse(fset, args)
	if !ok {
		return status
	}
	switch {
	case len(paths) != 1:
		return e.usageError("report takes one circuit file")
	case !oneOf(*format, "text", "markdown", "html", "json"):
		return e.usageError("--format must be text, markdown, html or json, not %q", *format)
	case *cornersFlag != "" && !oneOf(*cornersFlag, "worst", "nominal"):
		return e.usageError("--corners must be worst or nominal, not %q", *cornersFlag)
	case *pictures == "":
		return e.usageError("--pictures must be inline, none or a folder")
	case *format == "html" && !oneOf(*pictures, "inline", "none"):
		return e.usageError("--format html embeds its pictures: --pictures must be inline or none, not %q", *pictures)
	}
	path := paths[0]
	runner := check.NewRunner(check.Options{Rules: rules.All(), RulesRef: *rulesRef, Corners: *cornersFlag, Today: e.today, Worst: corners.Worst})
	c, set, status := e.loadCircuit(path, runner)
	if c == nil {
		return status
	}
	topo := topology.Analyze(c)
	r := &report.Report{Circuit: c, Case: analysis.Run(c, topo), MinVCE: report.DefaultMinVCE}
	if v, ok := set.Params["signal.swing"]["min_vce"]; ok {
		r.MinVCE = v
	}
	if set.Corners == "worst" && r.Case.OP != nil {
		r.Ranges = corners.Ranges(c, topo, r.Case, report.Quantities)
	}
	if oneOf(*format, "markdown", "html") && *pictures != "none" {
		ds := drawings(c, set, runner, r.Ranges)
		if *pictures != "inline" {
			if st := e.writeDrawings(*pictures, path, ds, *force); st != exitOK {
				return st
			}
		}
		for _, d := range ds {
			if d.err != nil {
				continue
			}
			p := report.Picture{Title: d.title, SVG: d.svg}
			if *pictures != "inline" {
				p.Link = d.file
			}
			r.Pictures = append(r.Pictures, p)
		}
	}
	switch *format {
	case "json":
		r.JSON(e.stdout)
	case "markdown":
		r.Markdown(e.stdout)
	case "html":
		r.HTML(e.stdout)
	default:
		r.Text(e.stdout)
	}
	if r.Case.OP == nil || r.Case.ACErr != nil { // nothing, or not everything, could be computed
		return exitFindings
	}
	return exitOK
}

// loadCircuit reads and loads the circuit at path ("-" for standard input)
// with the rule set that applies to it; on an input error it prints it and
// returns a nil circuit and the exit status.
func (e *env) loadCircuit(path string, runner *check.Runner) (*circuit.Circuit, *ruleset.Set, int) {
	var data []byte
	if path == "-" {
		b, err := inputfile.ReadAll(e.stdin)
		if err != nil {
			return nil, nil, e.usageError("%v", err)
		}
		data = b
	} else {
		b, err := readFile(path)
		if err != nil {
			fmt.Fprintln(e.stderr, errorLine(path, &circuit.InputError{Pos: circuit.Pos{File: path, Line: 1, Col: 1},
				Msg: "cannot read file: " + inputfile.Reason(err)}))
			return nil, nil, exitInput
		}
		data = b
	}
	set, err := runner.RuleSet(path)
	if err != nil {
		fmt.Fprintln(e.stderr, errorLine(path, err))
		return nil, nil, exitInput
	}
	c, err := circuit.LoadBytes(path, data, circuit.Options{Libraries: set.Libraries})
	if errors.Is(err, circuit.ErrNotCircuit) {
		fmt.Fprintln(e.stderr, errorLine(path, &circuit.InputError{Pos: circuit.Pos{File: path, Line: 1, Col: 1},
			Msg: "not a circuit file: it has no [circuit] table"}))
		return nil, nil, exitInput
	}
	if err != nil {
		fmt.Fprintln(e.stderr, errorLine(path, err))
		return nil, nil, exitInput
	}
	return c, set, exitOK
}
