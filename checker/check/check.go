// Package check runs the whole of `headroom check` on one circuit file: it
// finds the rule set, loads the circuit, analyses it (nominal or worst case),
// turns the rules' measurements into findings with severities, and applies
// the file's waivers.
package check

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"time"

	"headroom/checker/analysis"
	"headroom/checker/circuit"
	"headroom/checker/engine"
	"headroom/checker/inputfile"
	"headroom/checker/ruleset"
	"headroom/checker/topology"
)

// WorstCase finds, for every judged item, the most adverse case in the corner
// box. It is supplied by the corners package; nil means worst case is not
// available and "worst" runs fall back to an error.
type WorstCase func(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, cfg *engine.Config) ([]engine.Finding, error)

// Options configure a run over many files.
type Options struct {
	Rules    []*engine.Rule
	RulesRef string       // --rules: a shipped name or a path; "" = discovery
	Set      *ruleset.Set // a rule set already resolved (tests); wins over RulesRef
	Corners  string       // --corners override, "" = the rule set's
	FailOn   string       // --fail-on override, "" = the rule set's
	ReadFile func(string) ([]byte, error)
	Exists   func(string) bool // for discovery; nil = the working tree
	Today    string            // YYYY-MM-DD for waiver expiry; "" = the real clock
	Worst    WorstCase
	// NoFixCheck offers fixes without the whole-circuit check (fixes.go);
	// only for measuring what the check costs or changes.
	NoFixCheck bool
}

// Result is the outcome for one file.
type Result struct {
	Path     string
	Circuit  string
	RuleSet  string
	Corners  string
	FailOn   engine.Severity
	Findings []engine.Finding
	Err      error // an input error: no findings are reported for the file
	Skipped  bool  // not a circuit file
	// Uses lists the files the check read besides the circuit: the rule-set
	// files and every part library, so that a change to one of them can be
	// traced to the circuits it touches.
	Uses []string
	// Fingerprints name each finding independently of its line (see package
	// baseline); filled by the command line, nil when not computed.
	Fingerprints []string
	// NotJudged lists the rules not judged because the circuit is broken
	// (net.connectivity found an error in the wiring, or a transistor
	// conducts in reverse), and NotJudgedWhy says which: their figures
	// would come from the broken circuit and mislead. Only the rules that
	// judge the file as written (engine.Rule.Static, FromFile) still run,
	// with net.connectivity and bias.region, which diagnose the fault.
	NotJudged    []string
	NotJudgedWhy string
}

// brokenWiring is NotJudgedWhy after a net.connectivity error.
const brokenWiring = "net.connectivity reports an error in the wiring, and their figures would come from the broken circuit"

// judged is what judging one circuit gives.
type judged struct {
	findings  []engine.Finding
	nominal   *analysis.Case
	notJudged []string
	why       string
}

// Runner checks files, caching rule sets between them. File may be called
// from several goroutines at once.
type Runner struct {
	mu     sync.Mutex // guards sets and found
	opt    Options
	loader *ruleset.Loader
	sets   map[string]*ruleset.Set
	found  map[string]string // folder -> discovered rule-set reference
	// reloadFixes checks every fix by loading the edited text and judging
	// every rule, without the shortcuts of fixes.go (edit.Model, the rating
	// rules alone); benchmarks and tests compare the two in one run.
	reloadFixes bool
}

// NewRunner prepares a run.
func NewRunner(opt Options) *Runner {
	if opt.ReadFile == nil {
		opt.ReadFile = inputfile.Read
	}
	if opt.Exists == nil {
		opt.Exists = func(p string) bool { _, err := os.Stat(p); return err == nil }
	}
	if opt.Today == "" {
		opt.Today = time.Now().Format("2006-01-02")
	}
	return &Runner{opt: opt, loader: &ruleset.Loader{Rules: opt.Rules, ReadFile: opt.ReadFile},
		sets: map[string]*ruleset.Set{}, found: map[string]string{}}
}

// RuleSet resolves the rule set that applies to a circuit file at path,
// overrides included.
func (r *Runner) RuleSet(path string) (*ruleset.Set, error) {
	if r.opt.Set != nil {
		return r.opt.Set, nil
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	ref := r.opt.RulesRef
	if ref == "" {
		dir := filepath.Dir(path)
		var ok bool
		if ref, ok = r.found[dir]; !ok {
			ref = ruleset.Discover(dir, r.opt.Exists)
			r.found[dir] = ref
		}
	}
	set, ok := r.sets[ref]
	if !ok {
		var err error
		set, err = r.loader.Load(ref)
		if err != nil {
			return nil, err
		}
		if err := ruleset.Override(set, r.opt.Corners, r.opt.FailOn); err != nil {
			return nil, err
		}
		r.sets[ref] = set
	}
	return set, nil
}

// File checks one circuit file. data is its text when already read (standard
// input, the git index); nil reads path.
func (r *Runner) File(path string, data []byte) Result {
	res := Result{Path: path}
	if data == nil {
		b, err := r.opt.ReadFile(path)
		if err != nil {
			res.Err = &circuit.InputError{Pos: circuit.Pos{File: path, Line: 1, Col: 1}, Msg: "cannot read file: " + inputfile.Reason(err)}
			return res
		}
		data = b
	}
	set, err := r.RuleSet(path)
	if err != nil {
		res.Err = err
		return res
	}
	res.Uses = append(res.Uses, set.Files...)
	read := func(p string) ([]byte, error) { // the loader reads libraries one at a time
		res.Uses = append(res.Uses, p)
		return r.opt.ReadFile(p)
	}
	c, err := circuit.LoadBytes(path, data, circuit.Options{ReadFile: read, Libraries: set.Libraries})
	if errors.Is(err, circuit.ErrNotCircuit) {
		res.Skipped = true
		return res
	}
	if err != nil {
		res.Err = err
		return res
	}
	res.Circuit, res.RuleSet, res.Corners, res.FailOn = c.Name, set.Name, set.Corners, set.FailOn
	if err := r.checkWaiverRules(c); err != nil {
		res.Err = err
		return res
	}
	cfg := set.Config(r.opt.Rules)
	j, err := r.judge(c, cfg, true)
	if err != nil {
		res.Err = err
		return res
	}
	fs, nominal := j.findings, j.nominal
	res.NotJudged, res.NotJudgedWhy = j.notJudged, j.why
	if !r.opt.NoFixCheck {
		src := &source{data: data, c: c, reload: r.reloadFixes}
		verifyFixes(r.opt.Rules, fs, src, nominal, cfg.Fixes, r.recheck(path, set, cfg))
	}
	res.Findings = applyWaivers(c, cfg, fs, r.opt.Today, res.NotJudged)
	engine.Sort(res.Findings)
	return res
}

// recheck checks a fixed file as File checks the file at path, without
// working out its findings' fixes.
func (r *Runner) recheck(path string, set *ruleset.Set, cfg *engine.Config) recheck {
	return func(b []byte, c *circuit.Circuit, only []string) ([]engine.Finding, *analysis.Case, error) {
		if c == nil {
			var err error
			if c, err = circuit.LoadBytes(path, b, circuit.Options{ReadFile: r.opt.ReadFile, Libraries: set.Libraries}); err != nil {
				return nil, nil, err
			}
		}
		j, err := r.judgeOnly(c, cfg, false, only) // a fix's check reads no fix of the fixed file
		if err != nil {
			return nil, nil, err
		}
		return j.findings, j.nominal, nil
	}
}

// judge analyses the circuit and returns its failing findings with
// severities, the nominal case, and the rules left unjudged in a broken
// circuit. fixes asks for the findings' fixes to be worked out too.
func (r *Runner) judge(c *circuit.Circuit, cfg *engine.Config, fixes bool) (judged, error) {
	return r.judgeOnly(c, cfg, fixes, nil)
}

// judgeOnly is judge with, when only is not nil, every rule but those named
// switched off once the circuit is prepared: the rules left unjudged are
// those the whole check leaves unjudged.
func (r *Runner) judgeOnly(c *circuit.Circuit, cfg *engine.Config, fixes bool, only []string) (judged, error) {
	topo, j, cfg := r.prepare(c, cfg)
	if only != nil {
		var off []string
		for _, rule := range cfg.Rules {
			if !slices.Contains(only, rule.ID) {
				off = append(off, rule.ID)
			}
		}
		cfg = withoutRules(cfg, off)
	}
	fs, err := r.judgeCase(c, topo, j.nominal, cfg, fixes)
	j.findings = fs
	return j, err
}

// prepare analyses the circuit at nominal and narrows cfg to the rules a
// broken circuit still lets judge (j.notJudged says which are left out).
func (r *Runner) prepare(c *circuit.Circuit, cfg *engine.Config) (*topology.Topology, judged, *engine.Config) {
	topo := topology.Analyze(c)
	var j judged
	// Rules with nothing to judge in this kind of circuit are left out
	// silently, before anything else counts them.
	cfg = withoutRules(cfg, inapplicable(c, cfg))
	if len(topo.Problems) > 0 && cfg.Severity["net.connectivity"] == engine.Error {
		j.notJudged, j.why = analysedRules(cfg), brokenWiring
	}
	nominal := analysis.Run(c, topo)
	if j.why == "" && nominal.OP != nil {
		var rev []string
		for _, p := range c.Parts {
			if q := nominal.OP.BJTs[p.Ref]; q != nil && q.Reversed() {
				rev = append(rev, p.Ref)
			}
		}
		if len(rev) > 0 && cfg.Severity["bias.region"] != engine.Off {
			j.notJudged = analysedRules(cfg)
			j.why = fmt.Sprintf("%s conducts in reverse (its collector and emitter may be swapped; see bias.region), and their "+
				"figures would come from that", strings.Join(rev, ", "))
		}
	}
	if len(j.notJudged) > 0 {
		cfg = withoutRules(cfg, j.notJudged)
	}
	j.nominal = nominal
	return topo, j, cfg
}

// analysedRules lists the enabled rules whose figures come from the
// analysed circuit: all but those that judge the file as written and the
// two that diagnose a broken circuit (net.connectivity, bias.region).
func analysedRules(cfg *engine.Config) []string {
	var out []string
	for _, rule := range cfg.Rules {
		if rule.Run != nil && !rule.Static && !rule.FromFile && rule.ID != "net.connectivity" &&
			rule.ID != "bias.region" && cfg.Enabled(rule) && !(rule.NeedsCorners && cfg.Corners != "worst") {
			out = append(out, rule.ID)
		}
	}
	return out
}

// inapplicable lists the rules that judge nothing in c: those that need a
// transistor when it has none (engine.Rule.NeedsTransistor), the passive
// circuits' rules when it has one (engine.Rule.PassiveOnly).
func inapplicable(c *circuit.Circuit, cfg *engine.Config) []string {
	has := c.HasTransistor()
	var out []string
	for _, rule := range cfg.Rules {
		if rule.NeedsTransistor && !has || rule.PassiveOnly && has {
			out = append(out, rule.ID)
		}
	}
	return out
}

// withoutRules is cfg with the rules ids switched off.
func withoutRules(cfg *engine.Config, ids []string) *engine.Config {
	d := *cfg
	d.Severity = make(map[string]engine.Severity, len(cfg.Severity))
	for k, v := range cfg.Severity {
		d.Severity[k] = v
	}
	for _, id := range ids {
		d.Severity[id] = engine.Off
	}
	return &d
}

// judgeCase measures the analysed circuit under cfg; fixes asks for the
// failing findings' fixes (a rule's fix can cost as much as the check: the
// stability fixes analyse the case again for every candidate value).
func (r *Runner) judgeCase(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, cfg *engine.Config, fixes bool) ([]engine.Finding, error) {
	fs, err := r.measureCase(c, topo, nominal, cfg)
	if err != nil {
		return nil, err
	}
	var out []engine.Finding
	seen := map[[2]string]int{} // two-bound rules: one finding per part, the worse bound
	for _, f := range fs {
		if !f.Failing() {
			continue
		}
		f.ResolveMessage()
		if fixes {
			f.ResolveFix()
		}
		f.Severity = cfg.Severity[f.Rule]
		if f.Absolute > 1 {
			f.Severity = engine.Error
		}
		if f.Corner == nil {
			f.Corner = map[string]float64{}
		}
		if f.Bound != "" {
			k := [2]string{f.Rule, f.Part}
			if i, ok := seen[k]; ok {
				if engine.Worse(&f, &out[i]) {
					out[i] = f
				}
				continue
			}
			seen[k] = len(out)
		}
		out = append(out, f)
	}
	return out, nil
}

// measureCase judges every item, passing or failing: at its worst case with
// worst-case corners, else at nominal. Messages are left for later.
func (r *Runner) measureCase(c *circuit.Circuit, topo *topology.Topology, nominal *analysis.Case, cfg *engine.Config) ([]engine.Finding, error) {
	if cfg.Corners == "worst" {
		if r.opt.Worst == nil {
			return nil, errors.New("worst-case corners are not available in this build")
		}
		return r.opt.Worst(c, topo, nominal, cfg)
	}
	return engine.Measure(nominal, nil, cfg)
}

// checkWaiverRules rejects a waiver that names a rule nobody knows.
func (r *Runner) checkWaiverRules(c *circuit.Circuit) error {
	for _, w := range c.Waivers {
		known := false
		for _, rule := range r.opt.Rules {
			known = known || rule.ID == w.Rule
		}
		if !known {
			return &circuit.InputError{Pos: w.RulePos,
				Msg: fmt.Sprintf("waiver names unknown rule %q; %s", w.Rule, ruleset.Closest(w.Rule, r.opt.Rules))}
		}
	}
	return nil
}
