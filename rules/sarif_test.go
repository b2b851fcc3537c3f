package rules_test

import (
	"bytes"
	"os"
	"path/filepath"
	"sync"
	"testing"

	"github.com/santhosh-tekuri/jsonschema/v6"

	"headroom/checker/baseline"
	"headroom/checker/check"
	"headroom/checker/output"
	"headroom/rules"
)

var (
	sarifOnce   sync.Once
	sarifSchema *jsonschema.Schema
	sarifErr    error
)

// validateSARIF writes a golden archive's results as SARIF, fingerprints
// included, and validates the log against the official OASIS SARIF 2.1.0
// schema (testdata/schema/sarif-schema-2.1.0.json; its source is in the
// README beside it), so every golden's findings are valid SARIF.
func validateSARIF(t *testing.T, results []check.Result) {
	t.Helper()
	sarifOnce.Do(func() {
		path, _ := filepath.Abs("../testdata/schema/sarif-schema-2.1.0.json")
		f, err := os.Open(path)
		if err != nil {
			sarifErr = err
			return
		}
		defer f.Close()
		doc, err := jsonschema.UnmarshalJSON(f)
		if err != nil {
			sarifErr = err
			return
		}
		c := jsonschema.NewCompiler()
		if sarifErr = c.AddResource(path, doc); sarifErr == nil {
			sarifSchema, sarifErr = c.Compile(path)
		}
	})
	if sarifErr != nil {
		t.Fatalf("SARIF schema: %v", sarifErr)
	}
	rs := append([]check.Result(nil), results...)
	for i := range rs {
		rs[i].Fingerprints = baseline.Fingerprints("circuit.toml", rs[i].Findings)
	}
	var b bytes.Buffer
	inv := output.Invocation{Root: "/work", WD: "/work", Version: "test", Rules: rules.All(), ExitCode: 1}
	if err := output.SARIF(&b, rs, inv); err != nil {
		t.Fatal(err)
	}
	inst, err := jsonschema.UnmarshalJSON(&b)
	if err != nil {
		t.Fatalf("SARIF output is not JSON: %v", err)
	}
	if err := sarifSchema.Validate(inst); err != nil {
		t.Errorf("SARIF output does not validate against the official schema: %v", err)
	}
}
