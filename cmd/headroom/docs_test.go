package main

import (
	"go/ast"
	"go/parser"
	"go/token"
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"headroom/checker/ruledoc"
	"headroom/rules"
)

// The reference in docs/ is kept in step with the code: every flag of every
// command is in docs/cli.md, every key the loaders accept is in the format
// pages, and nothing sends the reader to files outside the repository.

func readDoc(t *testing.T, name string) string {
	t.Helper()
	b, err := os.ReadFile("../../docs/" + name)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func TestDocsListEveryFlag(t *testing.T) {
	cli := readDoc(t, "cli.md")
	flagLine := regexp.MustCompile(`(?m)^  -([a-z-]+)`)
	for _, cmd := range [][]string{{"check"}, {"report"}, {"plot"}, {"rules"}, {"hook", "install"}} {
		var stdout, stderr strings.Builder
		e := &env{stdin: strings.NewReader(""), stdout: &stdout, stderr: &stderr, getenv: func(string) string { return "" }}
		if code := e.run(append(cmd, "--help")); code != 0 {
			t.Fatalf("%v --help: exit %d", cmd, code)
		}
		flags := flagLine.FindAllStringSubmatch(stdout.String(), -1)
		if len(flags) == 0 {
			t.Fatalf("%v --help lists no flags:\n%s", cmd, stdout.String())
		}
		for _, f := range flags {
			if !strings.Contains(cli, "`--"+f[1]) && !strings.Contains(cli, "[--"+f[1]) && !(len(f[1]) == 1 && strings.Contains(cli, "`-"+f[1]+" ")) {
				t.Errorf("docs/cli.md does not document %s --%s", strings.Join(cmd, " "), f[1])
			}
		}
	}
}

// acceptedKeys reads, from a loader's source, the string literals it passes
// to Allow and those in the named key lists.
func acceptedKeys(t *testing.T, file string, lists ...string) []string {
	t.Helper()
	f, err := parser.ParseFile(token.NewFileSet(), file, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	var keys []string
	collect := func(n ast.Node) {
		ast.Inspect(n, func(n ast.Node) bool {
			if lit, ok := n.(*ast.BasicLit); ok && lit.Kind == token.STRING {
				if s, err := strconv.Unquote(lit.Value); err == nil {
					keys = append(keys, s)
				}
			}
			return true
		})
	}
	ast.Inspect(f, func(n ast.Node) bool {
		switch n := n.(type) {
		case *ast.CallExpr:
			if sel, ok := n.Fun.(*ast.SelectorExpr); ok && sel.Sel.Name == "Allow" {
				for _, a := range n.Args {
					collect(a)
				}
			}
		case *ast.ValueSpec:
			for i, name := range n.Names {
				for _, l := range lists {
					if name.Name == l && i < len(n.Values) {
						collect(n.Values[i])
					}
				}
			}
		}
		return true
	})
	if len(keys) == 0 {
		t.Fatalf("no keys found in %s", file)
	}
	return keys
}

func TestDocsListEveryKey(t *testing.T) {
	circuitDoc := readDoc(t, "circuit-format.md")
	for _, src := range []struct {
		file  string
		lists []string
	}{
		{"../../checker/circuit/load.go", []string{"partKeys"}},
		{"../../checker/library/library.go", []string{"TransistorKeys", "coreKeys"}},
	} {
		for _, k := range acceptedKeys(t, src.file, src.lists...) {
			if !strings.Contains(circuitDoc, "`"+k+"`") && !strings.Contains(circuitDoc, "\n"+k+" = ") && !strings.Contains(circuitDoc, "["+k) {
				t.Errorf("docs/circuit-format.md does not document the key %q (%s)", k, src.file)
			}
		}
	}
	rulesetDoc := readDoc(t, "ruleset-format.md")
	for _, k := range acceptedKeys(t, "../../checker/ruleset/ruleset.go") {
		if !strings.Contains(rulesetDoc, "`"+k+"`") {
			t.Errorf("docs/ruleset-format.md does not document the key %q", k)
		}
	}
}

// The README, the docs and every rule's explain text point into docs/, not at
// the team's reference sheets, which users do not have.
func TestNoPointersOutsideTheRepository(t *testing.T) {
	outside := regexp.MustCompile(`\b(FORMAT|RULES|REFERENCES(-2)?)\.md`)
	texts := map[string]string{"README.md": readText(t, "../../README.md")}
	for _, name := range []string{"README.md", "circuit-format.md", "ruleset-format.md", "cli.md"} {
		texts["docs/"+name] = readDoc(t, name)
	}
	def, strict, err := ruledoc.Shipped(rules.All())
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rules.All() {
		texts["explain "+r.ID] = ruledoc.Explain(r, def, strict)
	}
	for name, text := range texts {
		if m := outside.FindString(text); m != "" {
			t.Errorf("%s points at %s, which is not in the repository", name, m)
		}
	}
	index := readDoc(t, "README.md")
	for _, page := range []string{"circuit-format.md", "ruleset-format.md", "cli.md", "model.md"} {
		if !strings.Contains(index, "("+page+")") {
			t.Errorf("docs/README.md does not link %s", page)
		}
	}
}

func readText(t *testing.T, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}
