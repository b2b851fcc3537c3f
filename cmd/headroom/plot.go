package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"headroom/checker/check"
	"headroom/checker/circuit"
	"headroom/checker/corners"
	"headroom/checker/filter"
	"headroom/checker/picture"
	"headroom/checker/printable"
	"headroom/checker/report"
	"headroom/checker/ruleset"
	"headroom/checker/sweep"
	"headroom/rules"
)

// drawing is one picture of a circuit, or why it could not be drawn.
type drawing struct {
	kind  string // response, margins, bias: the file name's middle part
	title string
	svg   []byte
	file  string // where it was written, once it is
	err   error
}

// drawings judges c under set and draws its response, its margins and its
// transistors' operating points. ranges are report's worst-case ranges (nil
// in nominal mode; computed here when needed and nil).
func drawings(c *circuit.Circuit, set *ruleset.Set, runner *check.Runner, ranges map[string][2]float64) []drawing {
	worst := set.Corners == "worst"
	ds := []drawing{
		{kind: "response", title: "Response over the sweep and the stability margin μ"},
		{kind: "margins", title: "Every judged item against its limit"},
		{kind: "bias", title: "Transistor operating points against their ratings"},
	}
	passive := filter.Is(c)
	if passive {
		ds[0].title = "Filter response: insertion and return loss"
	}
	items, topo, nominal, err := runner.Items(c, set)
	if err != nil {
		for i := range ds {
			ds[i].err = err
		}
		return ds
	}
	if worst && ranges == nil && nominal.OP != nil {
		ranges = corners.Ranges(c, topo, nominal, report.Quantities)
	}
	var b bytes.Buffer
	draw := func(d *drawing, f func() error) {
		b.Reset()
		defer func() { // a drawing the library refuses is a missing picture, never a crash
			if p := recover(); p != nil {
				d.err, d.svg = fmt.Errorf("the plotting library failed: %v", p), nil
			}
		}()
		if d.err = f(); d.err == nil {
			d.svg = bytes.Clone(b.Bytes())
		}
	}
	draw(&ds[0], func() error {
		if nominal.AC == nil {
			return errors.New("no band analysis")
		}
		if passive {
			r, err := picture.FilterResponseOf(c, topo, nominal, worst)
			if err != nil {
				return err
			}
			return picture.WriteResponse(&b, r)
		}
		sw, err := sweep.Run(c, nominal.AC)
		if err != nil {
			return err
		}
		if !sw.TwoPort && sw.OnePort == "" {
			return errors.New("no port to sweep")
		}
		return picture.WriteResponse(&b, picture.ResponseOf(c, topo, nominal, sw, worst))
	})
	draw(&ds[1], func() error {
		title := c.Name + ": measured ÷ limit, nominal"
		if worst {
			title = c.Name + ": measured ÷ limit, nominal and worst case"
		}
		if len(items) == 0 {
			return errors.New("no rule judged anything")
		}
		return picture.WriteMargins(&b, title, picture.ItemsOf(items), worst)
	})
	draw(&ds[2], func() error {
		return picture.WriteBias(&b, c.Name, picture.TransistorsOf(c, nominal, ranges))
	})
	return ds
}

// pictureFile is where a drawing of the circuit at path goes in dir: the
// circuit file's name without .toml, then the kind ("amp.response.svg").
func pictureFile(dir, path, kind string) string {
	base := strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))
	return filepath.Join(dir, base+"."+kind+".svg")
}

// writeDrawings writes every drawing that was drawn into dir (created when
// missing), after making sure none would overwrite a file headroom did not
// write (one without picture.Marker), unless force. It fills each file.
func (e *env) writeDrawings(dir, path string, ds []drawing, force bool) int {
	for i := range ds {
		if ds[i].err != nil {
			continue
		}
		ds[i].file = pictureFile(dir, path, ds[i].kind)
		if force {
			continue
		}
		old, err := os.ReadFile(ds[i].file)
		if err == nil && !bytes.Contains(old[:min(len(old), 512)], []byte(picture.Marker)) {
			return e.usageError("%s exists and headroom did not write it; --force replaces it", ds[i].file)
		}
		if err != nil && !errors.Is(err, fs.ErrNotExist) {
			return e.usageError("cannot read %s: %v", ds[i].file, err)
		}
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return e.usageError("cannot create %s: %v", dir, err)
	}
	for _, d := range ds {
		if d.err != nil {
			continue
		}
		if err := os.WriteFile(d.file, d.svg, 0o644); err != nil {
			return e.usageError("cannot write %s: %v", d.file, err)
		}
	}
	return exitOK
}

func (e *env) plot(args []string) int {
	fset := flag.NewFlagSet("plot", flag.ContinueOnError)
	out := fset.String("o", "", "folder to write the pictures in (default: the circuit file's folder)")
	force := fset.Bool("force", false, "overwrite files headroom did not write")
	cornersFlag := fset.String("corners", "", "worst or nominal (default: the rule set's)")
	rulesRef := fset.String("rules", "", "rule set to judge with (default: discovery)")
	paths, status, ok := e.parse(fset, args)
	if !ok {
		return status
	}
	switch {
	case len(paths) != 1:
		return e.usageError("plot takes one circuit file")
	case paths[0] == "-" && *out == "":
		return e.usageError("plot reading standard input needs -o FOLDER")
	case *cornersFlag != "" && !oneOf(*cornersFlag, "worst", "nominal"):
		return e.usageError("--corners must be worst or nominal, not %q", *cornersFlag)
	}
	path := paths[0]
	runner := check.NewRunner(check.Options{Rules: rules.All(), RulesRef: *rulesRef, Corners: *cornersFlag, Today: e.today, Worst: corners.Worst})
	c, set, status := e.loadCircuit(path, runner)
	if c == nil {
		return status
	}
	dir := *out
	if dir == "" {
		dir = filepath.Dir(path)
	}
	ds := drawings(c, set, runner, nil)
	if st := e.writeDrawings(dir, path, ds, *force); st != exitOK {
		return st
	}
	code := exitOK
	for _, d := range ds {
		if d.err != nil {
			fmt.Fprintf(e.stderr, "headroom: no %s picture: %s\n", d.kind, printable.String(d.err.Error()))
			if d.kind != "bias" {
				code = exitFindings
			}
			continue
		}
		fmt.Fprintln(e.stdout, printable.String(d.file))
	}
	return code
}
