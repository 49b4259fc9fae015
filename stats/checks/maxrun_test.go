package checks

import (
	"math"
	"testing"

	"github.com/borel-audit/borel/internal/tally"
)

// π's first 10^6 decimals: the longest run of identical digits is 7
// ("3333333" at decimal 710 100; M. E. Lines, A Number for Your Thoughts,
// ch. 18) and of 9s is 6 (decimals 762–767, well known). The tally is the
// one the check declares (Needs).
func TestMaxrunOnPi(t *testing.T) {
	spec := tally.Spec{Base: 10, MaxBlock: 1, Records: maxrunCheck{}.Needs(Setting{Base: 10}).Records}
	tl, err := tally.New(spec, 0)
	if err != nil {
		t.Fatal(err)
	}
	tl.Add(readPi(t))
	cyc, _ := tl.Cyclic()
	var r Result
	maxrunCheck{}.Run(Input{Tally: tl, Cyclic: cyc, Null: UniformNull(10), Opts: DefaultOptions()}, &r)
	if f := find(t, r, "maxrun", "run_any", "k", 0); f.Value != 7 {
		t.Errorf("longest run %g, want 7", f.Value)
	} else if p := math.Exp(f.LogPUpper); math.Abs(p-0.593) > 2e-3 {
		// Poisson approximation (Erdős & Rényi 1970): P(L ≥ 7) ≈ 1 - e^-0.9 = 0.593.
		t.Errorf("P(L ≥ 7) = %.4f, want about 0.593", p)
	}
	if f := find(t, r, "maxrun", "run_digit", "digit", 9); f.Value != 6 {
		t.Errorf("longest run of 9s %g, want 6", f.Value)
	}
}
