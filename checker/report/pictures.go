package report

import (
	"bytes"
	"encoding/base64"
	"fmt"
	"html"
	"io"
	"strings"

	"headroom/checker/printable"
)

// Picture is one drawing (SVG) of the circuit for the Markdown and HTML
// reports.
type Picture struct {
	Title string // the caption and alternative text
	SVG   []byte
	// Link, when set, is where the SVG was written: Markdown links it there
	// instead of embedding it.
	Link string
}

// dataURI is the SVG as a data: URI, so one file carries it.
func (p Picture) dataURI() string {
	return "data:image/svg+xml;base64," + base64.StdEncoding.EncodeToString(p.SVG)
}

// markdownPictures ends the Markdown report with its pictures.
func (r *Report) markdownPictures(w io.Writer) {
	if len(r.Pictures) == 0 {
		return
	}
	fmt.Fprint(w, "\n## Pictures\n")
	for _, p := range r.Pictures {
		alt := strings.NewReplacer("[", `\[`, "]", `\]`).Replace(printable.String(p.Title))
		src := p.dataURI()
		if p.Link != "" {
			src = "<" + p.Link + ">"
		}
		fmt.Fprintf(w, "\n### %s\n\n![%s](%s)\n", printable.String(p.Title), alt, src)
	}
}

const htmlStyle = `body{font-family:sans-serif;max-width:62em;margin:1em auto;padding:0 1em;color:#111}
table{border-collapse:collapse;margin:.5em 0 1.5em}th,td{border:1px solid #bbb;padding:.2em .6em;text-align:left}
th{background:#eee}figure{margin:1em 0 2em}img{max-width:100%;height:auto}figcaption{font-style:italic}`

// HTML writes the report as one self-contained HTML page: the tables, and
// the pictures inline as data: URIs, so it opens in any browser without a
// network.
func (r *Report) HTML(w io.Writer) error {
	var b bytes.Buffer
	name := html.EscapeString(printable.String(r.Circuit.Name))
	fmt.Fprintf(&b, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>%s</title>\n<style>\n%s\n</style>\n</head>\n<body>\n<h1>%s</h1>\n",
		name, htmlStyle, name)
	for _, t := range r.printableTables() {
		fmt.Fprintf(&b, "<h2>%s</h2>\n<table>\n<tr>", html.EscapeString(t.title))
		for _, h := range t.header {
			fmt.Fprintf(&b, "<th>%s</th>", html.EscapeString(h))
		}
		b.WriteString("</tr>\n")
		for _, row := range t.rows {
			b.WriteString("<tr>")
			for _, c := range row {
				fmt.Fprintf(&b, "<td>%s</td>", html.EscapeString(c))
			}
			b.WriteString("</tr>\n")
		}
		b.WriteString("</table>\n")
	}
	if len(r.Pictures) > 0 {
		b.WriteString("<h2>Pictures</h2>\n")
	}
	for _, p := range r.Pictures {
		t := html.EscapeString(printable.String(p.Title))
		fmt.Fprintf(&b, "<figure>\n<img alt=\"%s\" src=\"%s\">\n<figcaption>%s</figcaption>\n</figure>\n", t, p.dataURI(), t)
	}
	b.WriteString("</body>\n</html>\n")
	_, err := w.Write(b.Bytes())
	return err
}
