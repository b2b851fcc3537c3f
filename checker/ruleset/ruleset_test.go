package ruleset

import (
	"errors"
	"io/fs"
	"strings"
	"testing"

	"headroom/checker/circuit/tomlfile"
	"headroom/checker/engine"
	"headroom/checker/quantity"
	"headroom/rulesets"
)

// testRules is a small catalogue for loading tests: the ids and parameters
// the shipped sets name must all exist, so it mirrors their names.
func testRules(t testing.TB) []*engine.Rule {
	t.Helper()
	// The shipped default set names every rule; take ids and parameters from it.
	doc, err := tomlfile.Parse("default", builtin(t, "default"))
	if err != nil {
		t.Fatal(err)
	}
	var rules []*engine.Rule
	for _, rt := range doc.Root.Table("rules", "rules").Tables(func(string) string { return "rule" }) {
		r := &engine.Rule{ID: rt.Name}
		for _, k := range rt.Keys() {
			if k == "severity" {
				continue
			}
			u := quantity.Ratio
			if s, ok := rt.Raw(k).(string); ok {
				switch {
				case strings.HasSuffix(s, "C"):
					u = quantity.Celsius
				case strings.HasSuffix(s, "ohm"):
					u = quantity.Ohm
				case strings.HasSuffix(s, "V"):
					u = quantity.Volt
				case strings.HasSuffix(s, "W"):
					u = quantity.Watt
				case strings.HasSuffix(s, "A"):
					u = quantity.Ampere
				}
			}
			r.Doc.Params = append(r.Doc.Params, engine.Param{Name: k, Unit: u})
		}
		rules = append(rules, r)
	}
	return rules
}

func builtin(t testing.TB, name string) []byte {
	b, ok := rulesets.Builtin(name)
	if !ok {
		t.Fatalf("no shipped set %q", name)
	}
	return b
}

func files(m map[string]string) func(string) ([]byte, error) {
	return func(p string) ([]byte, error) {
		if s, ok := m[p]; ok {
			return []byte(s), nil
		}
		return nil, &fs.PathError{Op: "open", Path: p, Err: fs.ErrNotExist}
	}
}

func TestExtendsChain(t *testing.T) {
	l := &Loader{Rules: testRules(t), ReadFile: files(map[string]string{
		"club/club.toml": "extends = \"../team.toml\"\nfail_on = \"info\"\n[rules.\"choke.reactance\"]\nmin_ratio = 12\n",
		"team.toml":      "extends = \"strict\"\ncorners = \"nominal\"\n",
	})}
	s, err := l.Load("club/club.toml")
	if err != nil {
		t.Fatal(err)
	}
	if s.Name != "club" || s.FailOn != engine.Info || s.Corners != "nominal" {
		t.Errorf("name %q fail_on %v corners %q", s.Name, s.FailOn, s.Corners)
	}
	// RULES.md: choke.reactance min_ratio 10 [20]; the club overrides strict's 20.
	if got := s.Params["choke.reactance"]["min_ratio"]; got != 12 {
		t.Errorf("choke min_ratio = %g, want the club's 12", got)
	}
	// strict's value survives where the club says nothing (RULES.md: winding 4 [10]).
	if got := s.Params["winding.reactance"]["min_ratio"]; got != 10 {
		t.Errorf("winding min_ratio = %g, want strict's 10", got)
	}
	// default's value where strict says nothing (RULES.md: knee 70 C in both).
	if got := s.Params["resistor.power"]["knee"]; got != 70 {
		t.Errorf("knee = %g, want default's 70", got)
	}
}

func TestNoExtendsStartsFromDefault(t *testing.T) {
	l := &Loader{Rules: testRules(t), ReadFile: files(map[string]string{"a.toml": "[rules.\"bjt.current\"]\nseverity = \"error\"\n"})}
	s, err := l.Load("a.toml")
	if err != nil {
		t.Fatal(err)
	}
	// RULES.md: bjt.current max_load 0.75 in the default set.
	if s.Params["bjt.current"]["max_load"] != 0.75 || s.Severity["bjt.current"] != engine.Error {
		t.Errorf("got %v %v", s.Params["bjt.current"], s.Severity["bjt.current"])
	}
}

func TestErrorsHavePositions(t *testing.T) {
	for name, text := range map[string]string{
		"cycle":         "extends = \"a.toml\"\n",
		"unknown rule":  "[rules.\"bias.nonsense\"]\nseverity = \"off\"\n",
		"unknown param": "[rules.\"bias.region\"]\nmin_icc = 1\n",
		"wrong type":    "[rules.\"bias.region\"]\nmin_ic = true\n",
		"bad severity":  "[rules.\"bias.region\"]\nseverity = \"loud\"\n",
		"bad fail_on":   "fail_on = \"off\"\n",
		"bad corners":   "corners = \"best\"\n",
		"unknown key":   "colour = \"red\"\n",
		"not toml":      "[rules\n",
		"missing file":  "extends = \"nowhere.toml\"\n",
		"negative":      "[rules.\"coupling.reactance\"]\nmax_ohms = -5\n",
		"min_mu text":   "[rules.\"stability.unconditional\"]\nmin_mu = \"abc\"\n",
		"min_mu < 0":    "[rules.\"stability.unconditional\"]\nmin_mu = -1\n",
		"min_mu nan":    "[rules.\"stability.unconditional\"]\nmin_mu = nan\n",
		"min_mu inf":    "[rules.\"stability.unconditional\"]\nmin_mu = inf\n",
		"osc param":     "[rules.\"stability.oscillation\"]\nmin_mu = 1\n",
	} {
		l := &Loader{Rules: testRules(t), ReadFile: files(map[string]string{"a.toml": text})}
		_, err := l.Load("a.toml")
		var te *tomlfile.Error
		if !errors.As(err, &te) || te.Pos.Line < 1 || te.Pos.Col < 1 || te.File == "" {
			t.Errorf("%s: want a positioned error, got %v", name, err)
		}
	}
}

// FuzzRuleSet: any bytes as a rule-set file load or fail with a positioned
// error; never a panic.
func FuzzRuleSet(f *testing.F) {
	for _, s := range []string{
		"extends = \"strict\"\n",
		"name = \"club\"\nfail_on = \"warning\"\n[rules.\"coupling.reactance\"]\nmax_ohms = \"30ohm\"\n",
		"[rules.\"resistor.power\"]\nknee = \"85C\"\nzero = \"155C\"\n",
		"[rules.\"bias.region\"]\nseverity = \"off\"\n",
		"library = [\"parts.toml\"]\ncorners = \"nominal\"\n",
		"[rules]\n\"bias.drift\" = { max_fraction = 0.2 }\n",
	} {
		f.Add(s)
	}
	rules := testRules(f)
	f.Fuzz(func(t *testing.T, text string) {
		l := &Loader{Rules: rules, ReadFile: files(map[string]string{"a.toml": text, "b.toml": "extends = \"a.toml\"\n"})}
		_, err := l.Load("a.toml")
		if err == nil {
			return
		}
		var te *tomlfile.Error
		if !errors.As(err, &te) {
			t.Fatalf("unpositioned error: %v", err)
		}
		if te.Pos.Line < 1 || te.Pos.Col < 1 {
			t.Fatalf("bad position %+v: %v", te.Pos, err)
		}
	})
}

// A baseline path is relative to the rule set that names it, is inherited
// through extends, and an empty value turns an inherited one off.
func TestBaselineKey(t *testing.T) {
	texts := map[string]string{
		"team/base.toml":        "baseline = \"adopt/baseline.json\"\n",
		"team/boards/kit.toml":  "extends = \"../base.toml\"\n",
		"team/boards/none.toml": "extends = \"../base.toml\"\nbaseline = \"\"\n",
	}
	l := &Loader{Rules: testRules(t), ReadFile: files(texts)}
	for path, want := range map[string]string{"team/base.toml": "team/adopt/baseline.json",
		"team/boards/kit.toml": "team/adopt/baseline.json", "team/boards/none.toml": ""} {
		s, err := l.Load(path)
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		if s.Baseline != want {
			t.Errorf("%s: baseline %q, want %q", path, s.Baseline, want)
		}
	}
}

// The [fixes] table: the shipped limits (25 %, 1 dB, the figures),
// units where the unit is known, inheritance through extends, and refusal
// of unknown keys (with a suggestion) and negative limits.
func TestFixLimits(t *testing.T) {
	l := &Loader{Rules: testRules(t), ReadFile: files(map[string]string{
		"a.toml":   "[fixes]\nmax_ic_change = \"10%\"\nmax_gain_change_db = \"0.5dB\"\n",
		"b.toml":   "extends = \"a.toml\"\n",
		"bad.toml": "[fixes]\nmax_ic_chnage = 0.1\n",
		"neg.toml": "[fixes]\nmax_gain_change_db = \"-1dB\"\n",
	})}
	def, err := l.Load("default")
	if err != nil || def.Fixes.MaxICChange != 0.25 || def.Fixes.MaxGainChangeDB != 1 {
		t.Fatalf("default: %+v %v", def, err)
	}
	for _, name := range []string{"a.toml", "b.toml"} {
		s, err := l.Load(name)
		if err != nil || s.Fixes.MaxICChange != 0.1 || s.Fixes.MaxGainChangeDB != 0.5 {
			t.Errorf("%s: %+v %v", name, s, err)
		}
	}
	if _, err := l.Load("bad.toml"); err == nil || !strings.Contains(err.Error(), "did you mean max_ic_change?") {
		t.Errorf("unknown key: %v", err)
	}
	if _, err := l.Load("neg.toml"); err == nil {
		t.Error("a negative limit was accepted")
	}
}
