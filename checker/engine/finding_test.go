package engine

import "testing"

func metric(measured, limit float64, cmp string) *Finding {
	return &Finding{HasMetric: true, Measured: measured, Limit: limit, Comparison: cmp}
}

// TestWorseOrdersCases checks the ordering of FORMAT.md §6: the largest
// measured ÷ limit for "<=", the largest limit ÷ measured for ">=", any
// measured value at or below zero worse than every positive one for ">=",
// more negative worse, and an item without a metric worst of all.
func TestWorseOrdersCases(t *testing.T) {
	cases := []struct {
		name       string
		worse, not *Finding
	}{
		{"<= larger load", metric(0.6, 0.5, "<="), metric(0.4, 0.5, "<=")},
		{"<= limit moves too", metric(0.5, 0.4, "<="), metric(0.5, 0.5, "<=")},
		{">= smaller ratio", metric(4, 10, ">="), metric(12, 10, ">=")},
		{">= limit moves too", metric(10, 12, ">="), metric(10, 10, ">=")},
		{">= zero beats positive", metric(0, 10, ">="), metric(0.001, 10, ">=")},
		{">= negative beats zero", metric(-1, 10, ">="), metric(0, 10, ">=")},
		{">= more negative", metric(-3, 10, ">="), metric(-1, 10, ">=")},
		{"no metric", &Finding{}, metric(100, 1, "<=")},
	}
	for _, c := range cases {
		if !Worse(c.worse, c.not) {
			t.Errorf("%s: want first worse", c.name)
		}
		if Worse(c.not, c.worse) {
			t.Errorf("%s: order is not strict", c.name)
		}
	}
}

func TestFailing(t *testing.T) {
	for _, c := range []struct {
		f    *Finding
		fail bool
	}{
		{metric(10, 10, ">="), false}, // exactly at the threshold passes
		{metric(9.999, 10, ">="), true},
		{metric(0.5, 0.5, "<="), false},
		{metric(0.5001, 0.5, "<="), true},
		{&Finding{}, true},
	} {
		if got := c.f.Failing(); got != c.fail {
			t.Errorf("%+v: Failing() = %v", c.f, got)
		}
	}
}

func TestResolveFixOnce(t *testing.T) {
	calls := 0
	f := &Finding{FixLater: func() (string, []Change) {
		calls++
		return "R1 = 4.7 kohm", []Change{{Part: "R1", Key: "value", To: "4k7"}}
	}}
	f.ResolveFix()
	f.ResolveFix()
	if calls != 1 || f.Fix != "R1 = 4.7 kohm" || len(f.Changes) != 1 {
		t.Fatalf("ResolveFix: calls %d, fix %q, changes %v", calls, f.Fix, f.Changes)
	}
}

func TestResolveMessageOnce(t *testing.T) {
	calls := 0
	f := &Finding{MessageLater: func() string {
		calls++
		return "R1 dissipates 120 mW"
	}}
	f.ResolveMessage()
	f.ResolveMessage()
	if calls != 1 || f.Message != "R1 dissipates 120 mW" || f.MessageLater != nil {
		t.Fatalf("ResolveMessage: calls %d, message %q", calls, f.Message)
	}
}
