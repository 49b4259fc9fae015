package audittest

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/borel-audit/borel/stats/audit"
)

// recorder is a testing.TB that keeps failures instead of failing.
type recorder struct {
	testing.TB
	msgs []string
}

func (r *recorder) Helper()                   {}
func (r *recorder) Errorf(f string, a ...any) { r.msgs = append(r.msgs, fmt.Sprintf(f, a...)) }
func (r *recorder) Fatalf(f string, a ...any) { r.msgs = append(r.msgs, fmt.Sprintf(f, a...)) }

// lcg is a weak generator: a 64-bit linear congruential generator whose
// low bits have short periods (Knuth's MMIX multiplier), each output the
// raw state.
type lcg struct{ x uint64 }

func (g *lcg) Uint64() uint64 { g.x = g.x*6364136223846793005 + 1442695040888963407; return g.x }

// Go's ChaCha8 passes; the raw LCG fails with a message that gives the seed,
// the length and the findings that decided.
func TestConsistentGate(t *testing.T) {
	Consistent(t, rand.NewChaCha8([32]byte{1}), 1<<20, "ChaCha8 key {1}", audit.Options{})
	rec := &recorder{TB: t}
	Consistent(rec, &lcg{x: 42}, 1<<20, "seed 42", audit.Options{})
	if len(rec.msgs) != 1 {
		t.Fatalf("the weak generator passed: %v", rec.msgs)
	}
	for _, want := range []string{"1048576 bytes (seed 42) are not consistent", "not consistent (smallest adjusted p", "deviates"} {
		if !strings.Contains(rec.msgs[0], want) {
			t.Errorf("the failure message lacks %q:\n%s", want, rec.msgs[0])
		}
	}
}

// RetryStricter passes a good generator and fails the weak one twice over.
func TestRetryStricter(t *testing.T) {
	n := 0
	RetryStricter(t, func() (rand.Source, string) {
		n++
		return rand.NewChaCha8([32]byte{byte(n)}), fmt.Sprintf("ChaCha8 key {%d}", n)
	}, 1<<18, audit.Options{})
	rec := &recorder{TB: t}
	RetryStricter(rec, func() (rand.Source, string) { return &lcg{x: 7}, "seed 7" }, 1<<20, audit.Options{})
	if len(rec.msgs) != 1 || !strings.Contains(rec.msgs[0], "and again at alpha 0.001") {
		t.Errorf("the weak generator: %v", rec.msgs)
	}
}
