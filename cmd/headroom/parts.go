package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"slices"
	"strings"

	"headroom/checker/library"
	"headroom/checker/quantity"
)

// parts lists the shipped library: every transistor and core with its
// figures and, beside each, the source its line in parts.toml names ([S] a
// registered datasheet, [C] computed, [M] from memory).
func (e *env) parts(args []string) int {
	fset := flag.NewFlagSet("parts", flag.ContinueOnError)
	format := fset.String("format", "text", "text or json")
	rest, status, ok := e.parse(fset, args)
	if !ok {
		return status
	}
	if len(rest) > 0 {
		return e.usageError("parts takes no arguments")
	}
	if !oneOf(*format, "text", "json") {
		return e.usageError("--format must be text or json, not %q", *format)
	}
	lib, src := library.Shipped(), library.ShippedSources()
	type figure struct {
		Name   string  `json:"name"`
		Value  float64 `json:"value"`
		Max    float64 `json:"max,omitempty"` // the top of a range (hfe)
		Unit   string  `json:"unit"`
		Text   string  `json:"text"`
		Source string  `json:"source,omitempty"`
	}
	type entry struct {
		Name     string   `json:"name"`
		Polarity string   `json:"polarity,omitempty"`
		Note     string   `json:"note,omitempty"`
		Figures  []figure `json:"figures"`
	}
	fig := func(s library.Sources, name, key string, v float64, u quantity.Unit) figure {
		return figure{Name: name, Value: v, Unit: u.String(), Text: quantity.Format(v, u), Source: s[key]}
	}
	var ts, cs []entry
	for _, name := range sortedNames(lib.Transistors) {
		t, s := lib.Transistors[name], src["transistors"][name]
		en := entry{Name: name, Polarity: t.Polarity, Note: s[""]}
		hfe := figure{Name: "hfe", Value: t.HFEMin, Max: t.HFEMax, Unit: "ratio",
			Text: quantity.Format(t.HFEMin, quantity.Ratio) + " to " + quantity.Format(t.HFEMax, quantity.Ratio), Source: s["hfe"]}
		en.Figures = []figure{fig(s, "ft", "ft", t.FT, quantity.Hertz), hfe}
		if t.HFETyp > 0 {
			en.Figures = append(en.Figures, fig(s, "hfe_typ", "hfe_typ", t.HFETyp, quantity.Ratio))
		}
		en.Figures = append(en.Figures, fig(s, "vbe", "vbe", t.VBE, quantity.Volt), fig(s, "ic_ref", "ic_ref", t.ICRef, quantity.Ampere),
			fig(s, "pd", "pd", t.PD, quantity.Watt), fig(s, "tj_max", "tj_max", t.TjMax, quantity.Celsius),
			fig(s, "ic_max", "ic_max", t.ICMax, quantity.Ampere), fig(s, "vceo", "vceo", t.VCEO, quantity.Volt))
		if t.Cob > 0 {
			en.Figures = append(en.Figures, fig(s, "cob", "cob", t.Cob, quantity.Farad))
		}
		if t.RB > 0 {
			en.Figures = append(en.Figures, fig(s, "rb", "rb", t.RB, quantity.Ohm))
		}
		ts = append(ts, en)
	}
	for _, name := range sortedNames(lib.Cores) {
		c, s := lib.Cores[name], src["cores"][name]
		en := entry{Name: name, Note: s[""]}
		if c.Mu > 0 {
			en.Figures = append(en.Figures, fig(s, "mu", "mu", c.Mu, quantity.Ratio), fig(s, "od", "od", c.OD, quantity.Metre),
				fig(s, "id", "id", c.ID, quantity.Metre), fig(s, "height", "height", c.Height, quantity.Metre))
		}
		al := fig(s, "al", "al", c.AL(), quantity.Henry)
		al.Text = quantity.Format(quantity.Round(c.AL(), 4), quantity.Henry)
		if c.ALGiven == 0 {
			al.Source = "computed from the geometry (IEC 60205)"
			if s["height"] != "" {
				al.Source += "; " + s["height"]
			}
		}
		en.Figures = append(en.Figures, al, fig(s, "al_tolerance", "al_tolerance", c.ALTolerance, quantity.Fraction))
		if c.FRange[1] > 0 {
			en.Figures = append(en.Figures, figure{Name: "f_range", Value: c.FRange[0], Max: c.FRange[1], Unit: "Hz",
				Text: quantity.Format(c.FRange[0], quantity.Hertz) + " to " + quantity.Format(c.FRange[1], quantity.Hertz), Source: s["f_range"]})
		}
		if c.Q[1] > 0 {
			at := "at the band centre"
			if c.QFreq > 0 {
				at = "at " + quantity.Format(c.QFreq, quantity.Hertz)
			}
			en.Figures = append(en.Figures, figure{Name: "q", Value: c.Q[0], Max: c.Q[1], Unit: "",
				Text: fmt.Sprintf("%g to %g (%s)", c.Q[0], c.Q[1], at), Source: s["q"]})
		}
		cs = append(cs, en)
	}
	if *format == "json" {
		enc := json.NewEncoder(e.stdout)
		enc.SetIndent("", "  ")
		enc.Encode(struct {
			Version     int     `json:"version"`
			Transistors []entry `json:"transistors"`
			Cores       []entry `json:"cores"`
		}{1, ts, cs})
		return exitOK
	}
	fmt.Fprintln(e.stdout, "Sources: [S] a registered datasheet, [C] computed from other figures, [M] from memory (confirm before relying on it).")
	for _, group := range []struct {
		title string
		es    []entry
	}{{"Transistors", ts}, {"Cores", cs}} {
		fmt.Fprintf(e.stdout, "\n%s\n", group.title)
		for _, en := range group.es {
			head := en.Name
			if en.Polarity != "" {
				head += " (" + en.Polarity + ")"
			}
			fmt.Fprintf(e.stdout, "  %s\n", head)
			if en.Note != "" {
				fmt.Fprintf(e.stdout, "    %s\n", en.Note)
			}
			for _, f := range en.Figures {
				line := fmt.Sprintf("    %-12s %s", f.Name, f.Text)
				if f.Source != "" {
					line = fmt.Sprintf("%-40s %s", line, f.Source)
				}
				fmt.Fprintln(e.stdout, strings.TrimRight(line, " "))
			}
		}
	}
	return exitOK
}

func sortedNames[V any](m map[string]V) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	slices.Sort(out)
	return out
}
