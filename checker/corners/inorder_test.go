package corners

import (
	"fmt"
	"runtime"
	"testing"
	"time"

	"headroom/checker/engine"
)

// inOrder hands every case to use in case order whatever order the workers
// finish in, and stops at the first error in case order.
func TestInOrder(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(4))
	measure := func(i int, buf []engine.Finding) ([]engine.Finding, error) {
		time.Sleep(time.Duration((7*i)%5) * time.Millisecond) // finish out of order
		if i == 23 || i == 31 {
			return nil, fmt.Errorf("case %d", i)
		}
		return append(buf, engine.Finding{Part: fmt.Sprint(i)}), nil
	}
	var seen []int
	err := inOrder(40, measure, func(i int, fs []engine.Finding) {
		if len(fs) != 1 || fs[0].Part != fmt.Sprint(i) {
			t.Errorf("case %d got findings %v", i, fs)
		}
		seen = append(seen, i)
	})
	if err == nil || err.Error() != "case 23" {
		t.Fatalf("error %v, want the first in case order (case 23)", err)
	}
	for i, s := range seen {
		if s != i {
			t.Fatalf("cases used in order %v", seen)
		}
	}
	if len(seen) != 23 {
		t.Errorf("%d cases used before the error, want 23", len(seen))
	}
	seen = seen[:0]
	if err := inOrder(17, func(i int, buf []engine.Finding) ([]engine.Finding, error) {
		return measure(i, buf)
	}, func(i int, _ []engine.Finding) { seen = append(seen, i) }); err != nil || len(seen) != 17 {
		t.Errorf("17 cases: used %d, error %v", len(seen), err)
	}
}
