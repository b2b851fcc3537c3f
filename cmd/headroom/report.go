package main

import (
	"errors"
	"flag"
	"fmt"
	"headroom/checker/inputfile"

	"headroom/checker/analysis"
	"headroom/checker/check"
	"headroom/checker/circuit"
	"headroom/checker/corners"
	"headroom/checker/report"
	"headroom/checker/topology"
	"headroom/rules"
)

func (e *env) report(args []string) int {
	fset := flag.NewFlagSet("report", flag.ContinueOnError)
	format := fset.String("format", "text", "text, markdown or json")
	cornersFlag := fset.String("corners", "", "worst or nominal (default: the rule set's)")
	rulesRef := fset.String("rules", "", "rule set for its library and corners (default: discovery)")
	paths, status, ok := e.parse(fset, args)
	if !ok {
		return status
	}
	switch {
	case len(paths) != 1:
		return e.usageError("report takes one circuit file")
	case !oneOf(*format, "text", "markdown", "json"):
		return e.usageError("--format must be text, markdown or json, not %q", *format)
	case *cornersFlag != "" && !oneOf(*cornersFlag, "worst", "nominal"):
		return e.usageError("--corners must be worst or nominal, not %q", *cornersFlag)
	}
	path := paths[0]
	var data []byte
	if path == "-" {
		b, err := inputfile.ReadAll(e.stdin)
		if err != nil {
			return e.usageError("%v", err)
		}
		data = b
	} else {
		b, err := readFile(path)
		if err != nil {
			fmt.Fprintln(e.stderr, errorLine(path, &circuit.InputError{Pos: circuit.Pos{File: path, Line: 1, Col: 1},
				Msg: "cannot read file: " + inputfile.Reason(err)}))
			return exitInput
		}
		data = b
	}
	runner := check.NewRunner(check.Options{Rules: rules.All(), RulesRef: *rulesRef, Corners: *cornersFlag})
	set, err := runner.RuleSet(path)
	if err != nil {
		fmt.Fprintln(e.stderr, errorLine(path, err))
		return exitInput
	}
	c, err := circuit.LoadBytes(path, data, circuit.Options{Libraries: set.Libraries})
	if errors.Is(err, circuit.ErrNotCircuit) {
		fmt.Fprintln(e.stderr, errorLine(path, &circuit.InputError{Pos: circuit.Pos{File: path, Line: 1, Col: 1},
			Msg: "not a circuit file: it has no [circuit] table"}))
		return exitInput
	}
	if err != nil {
		fmt.Fprintln(e.stderr, errorLine(path, err))
		return exitInput
	}
	topo := topology.Analyze(c)
	r := &report.Report{Circuit: c, Case: analysis.Run(c, topo), MinVCE: report.DefaultMinVCE}
	if v, ok := set.Params["signal.swing"]["min_vce"]; ok {
		r.MinVCE = v
	}
	if set.Corners == "worst" && r.Case.OP != nil {
		r.Ranges = corners.Ranges(c, topo, r.Case, report.Quantities)
	}
	switch *format {
	case "json":
		r.JSON(e.stdout)
	case "markdown":
		r.Markdown(e.stdout)
	default:
		r.Text(e.stdout)
	}
	if r.Case.OP == nil || r.Case.ACErr != nil { // nothing, or not everything, could be computed
		return exitFindings
	}
	return exitOK
}
