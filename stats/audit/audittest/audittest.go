// Package audittest asserts, inside go test, that a generator's output is
// consistent with independent uniform digits, with the battery and the
// verdict of borel audit:
//
//	func TestMyGenerator(t *testing.T) {
//		audittest.Consistent(t, mygen.New(42), 1<<20, "seed 42", audit.Options{})
//	}
//
// A gate at level alpha fails by chance at rate alpha (1 run in 100 at the
// default 0.01), however good the generator. The usual answers: a fixed
// seed, so that a run that passes once passes every time (and a failure is
// a change in the generator, reproducible from the seed and length the
// message gives); or, for a seed drawn afresh, one retry of a failure at a
// stricter alpha (RetryStricter), which keeps the overall rate near alpha
// while a real defect still fails both.
package audittest

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/borel-audit/borel/stats/audit"
)

// Consistent audits n bytes of src (its Uint64 output, little-endian) and
// fails tb unless the verdict is consistent, with a message that names the
// seed (as the caller describes it), the length and the findings that
// decided. It returns the result.
func Consistent(tb testing.TB, src rand.Source, n int64, seed string, opts audit.Options) *audit.Result {
	tb.Helper()
	r, err := audit.Generator(src, n, opts)
	if err != nil {
		tb.Fatalf("audit of %d bytes (%s): %v", n, seed, err)
		return nil
	}
	if r.Verdict != audit.Consistent {
		tb.Errorf("%d bytes (%s) are not consistent with independent uniform bytes: %s%s", n, seed, r.Summary(), deviating(r))
	}
	return r
}

// RetryStricter is Consistent for a seed drawn afresh on each run: a
// failure is audited once more on n fresh bytes of next() at alpha/10
// before the test fails, so that chance fails a good generator at rate
// about alpha·(alpha/10) instead of alpha, while a defect fails both.
func RetryStricter(tb testing.TB, next func() (rand.Source, string), n int64, opts audit.Options) *audit.Result {
	tb.Helper()
	src, seed := next()
	r, err := audit.Generator(src, n, opts)
	if err != nil {
		tb.Fatalf("audit of %d bytes (%s): %v", n, seed, err)
		return nil
	}
	if r.Verdict == audit.Consistent {
		return r
	}
	first := r.Summary()
	strict := opts
	if strict.Alpha == 0 {
		strict.Alpha = audit.DefaultOptions().Alpha
	}
	strict.Alpha /= 10
	src, seed2 := next()
	return retried(tb, src, n, strict, first, seed, seed2)
}

func retried(tb testing.TB, src rand.Source, n int64, opts audit.Options, first, seed, seed2 string) *audit.Result {
	tb.Helper()
	r, err := audit.Generator(src, n, opts)
	if err != nil {
		tb.Fatalf("audit of %d bytes (%s): %v", n, seed2, err)
		return nil
	}
	if r.Verdict != audit.Consistent {
		tb.Errorf("%d bytes (%s) are not consistent: %s; and again at alpha %g (%s): %s%s", n, seed, first, opts.Alpha, seed2, r.Summary(), deviating(r))
	}
	return r
}

// deviating lists the marked findings, a line each (the first 8).
func deviating(r *audit.Result) string {
	s, n := "", 0
	for _, f := range r.Findings {
		if f.Mark == "" {
			continue
		}
		if n++; n > 8 {
			continue
		}
		s += "\n\t" + f.Label() + ": " + string(f.Mark)
		if f.Where != "" {
			s += " (" + f.Where + ")"
		}
	}
	if n > 8 {
		s += fmt.Sprintf("\n\tand %d more", n-8)
	}
	return s
}
