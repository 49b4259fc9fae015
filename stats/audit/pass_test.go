package audit

import (
	"bytes"
	"context"
	"errors"
	"testing"

	"borel/stats/seq"
)

// A cancelled context stops the pass after the chunk in hand, with one
// worker and with the pipelined reader; an open one reads everything.
func TestPassStopsOnCancelledContext(t *testing.T) {
	digits := bytes.Repeat([]byte("0123456789"), 300_000)
	for _, workers := range []int{1, 2} {
		opts := DefaultOptions()
		opts.Workers = workers
		plan, err := NewPlan(10, int64(len(digits)), opts)
		if err != nil {
			t.Fatal(err)
		}
		r, _ := seq.NewReader(bytes.NewReader(digits), seq.Options{Base: 10})
		ctx, cancel := context.WithCancel(context.Background())
		chunks := 0
		plan.OnChunk = func(int64, int64) {
			if chunks++; chunks == 1 {
				cancel()
			}
		}
		if _, err := plan.TallyAt(ctx, r, 0); !errors.Is(err, ErrStopped) {
			t.Errorf("%d workers: a cancelled pass returned %v", workers, err)
		}
		r, _ = seq.NewReader(bytes.NewReader(digits), seq.Options{Base: 10})
		plan.OnChunk = nil
		tl, err := plan.TallyAt(context.Background(), r, 0)
		if err != nil || tl.N != int64(len(digits)) {
			t.Errorf("%d workers: an open pass read %v digits (%v)", workers, tl, err)
		}
	}
}
