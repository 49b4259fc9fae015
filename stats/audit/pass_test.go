package audit

import (
	"bytes"
	"context"
	"errors"
	"reflect"
	"testing"

	"github.com/borel-audit/borel/stats/seq"
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

// The trace (and so the running-deviation plot) ends at n: 30 000 digits
// had their last checkpoint at 27 547, so a digit ending inside the
// envelope was drawn outside it.
func TestTraceEndsAtN(t *testing.T) {
	d := make([]byte, 30000)
	for i := range d {
		d[i] = byte((i*7 + i/13) % 10)
	}
	r, err := Digits(d, 10, Source{Name: "t", Bytes: -1}, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	last := r.Trace[len(r.Trace)-1]
	if last.Pos != 30000 || len(r.Curves.Deviation) != len(r.Trace) || len(r.Curves.Envelope) != len(r.Trace) {
		t.Fatalf("trace ends at %d with %d points, curves %d", last.Pos, len(r.Trace), len(r.Curves.Deviation))
	}
	for j, c := range last.Counts {
		if c != r.DigitCounts[j] {
			t.Fatalf("last trace point counts %v, digit counts %v", last.Counts, r.DigitCounts)
		}
	}
}

// Bytes read as bits go to the plan packed (Reader.Packed, Plan.AddPacked):
// the audit is the one of the bits spread out, with one worker and with
// the pipelined reader, with and without the second level.
func TestBitsReadPackedSameAudit(t *testing.T) {
	raw := make([]byte, 700_001) // not a multiple of any chunk
	x := uint64(88172645463325252)
	for i := range raw {
		x ^= x << 13
		x ^= x >> 7
		x ^= x << 17
		raw[i] = byte(x >> 32)
	}
	bits := make([]byte, 0, 8*len(raw))
	for _, c := range raw {
		for j := 7; j >= 0; j-- {
			bits = append(bits, c>>j&1)
		}
	}
	for _, segments := range []int{0, 8} {
		for _, workers := range []int{1, 2} {
			opts := DefaultOptions()
			opts.Workers, opts.Segments = workers, segments
			want, err := Digits(bits, 2, Source{Name: "bits"}, opts)
			if err != nil {
				t.Fatal(err)
			}
			plan, err := NewPlan(2, int64(len(bits)), opts)
			if err != nil {
				t.Fatal(err)
			}
			r, _ := seq.NewReader(bytes.NewReader(raw), seq.Options{Format: seq.Bits, Base: 2})
			if !plan.readsPacked(r) {
				t.Fatal("a bit reader into a base-2 plan does not go packed")
			}
			tl, err := plan.TallyAt(context.Background(), r, 0)
			if err != nil {
				t.Fatal(err)
			}
			got, err := plan.Finish(tl, Source{Name: "bits"})
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(got.Findings, want.Findings) || got.Digits != want.Digits || got.Verdict != want.Verdict {
				t.Fatalf("segments %d, %d workers: bits read packed audit differently (%d findings, %d digits, %s; want %d, %d, %s)",
					segments, workers, len(got.Findings), got.Digits, got.Verdict, len(want.Findings), want.Digits, want.Verdict)
			}
		}
	}
}
