package checks

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/borel-audit/borel/stats/expand"
)

// RandomizedP of a discrete finding is P(T > t) + u·P(T = t) with the
// finding's own atom. Check values: T ~ Binomial(4, 1/2) at t = 2 has
// P(T ≥ 2) = 11/16 and P(T = 2) = 6/16 (the binomial table, exact). The
// lower tail given here is a continuity-shifted approximation, P(T ≤ 2.5)
// = 0.8 say: the randomized p must not depend on it (the atom inferred from
// the two tails would be 11/16 + 0.8 − 1 = 0.4875 instead of 0.375).
func TestRandomizedPUsesTheAtom(t *testing.T) {
	f := Finding{Check: "x", Statistic: "T"}
	f.setDiscrete(math.Log(11.0/16), math.Log(0.8), math.Log(6.0/16))
	for _, c := range []struct{ u, want float64 }{{0, 5.0 / 16}, {0.5, 8.0 / 16}, {0.999999, 11.0/16 - 6.0/16*1e-6}} {
		got := RandomizedP(f, c.u)
		if !closeTo(math.Exp(got.LogP), c.want, 1e-12) || !closeTo(math.Exp(got.LogQ), 1-c.want, 1e-12) {
			t.Errorf("u = %g: p %.15g, 1−p %.15g; want %.15g", c.u, math.Exp(got.LogP), math.Exp(got.LogQ), c.want)
		}
	}
	// A far tail keeps its digits: P(T ≥ t) = 1e-300, atom half of it.
	f.setDiscrete(-300*math.Ln10, 0, -300*math.Ln10+math.Log(0.5))
	if got := RandomizedP(f, 0.5); !closeTo(got.LogP, -300*math.Ln10+math.Log(0.75), 1e-12) {
		t.Errorf("far tail: ln p %.15g, want %.15g", got.LogP, -300*math.Ln10+math.Log(0.75))
	}
	// A continuous statistic gives its upper tail whatever its lower one.
	g := Finding{LogPUpper: math.Log(0.3), LogPLower: math.Log(0.75)}
	if got := RandomizedP(g, 0.9); !closeTo(math.Exp(got.LogP), 0.3, 1e-12) || !closeTo(math.Exp(got.LogQ), 0.7, 1e-12) {
		t.Errorf("continuous: %v", got)
	}
}

// On 1000 i.i.d. bits every statistic the second level takes from a
// discrete law carries it: freq X² (multinomial), poker (pooled classes),
// serial k = 2 (cyclic bit pairs), maxrun, drift (lattice walk) and updown
// (André's recurrence for up to 3000 values). Their atoms are probabilities
// (−∞ < ln P(T = t) ≤ min of the two tails), and the two tails overlap by
// exactly the atom: P(T ≥ t) + P(T ≤ t) − 1 = P(T = t) to 1e-9 (relative).
func TestSegmentStatisticsAreExactlyDiscrete(t *testing.T) {
	d := expand.IID(1000, []float64{0.5, 0.5}, rand.New(rand.NewPCG(3, 5)))
	in := input(t, d, 2, 2, UniformNull(2))
	want := map[string]bool{"freq": false, "poker": false, "serial": false, "maxrun": false, "drift": false, "updown": false}
	for _, c := range All() {
		var r Result
		c.Run(in, &r)
		for _, f := range r.Findings {
			if sc, ok := c.(Segmented); !ok || !sc.SegmentStatistic(f) {
				continue
			}
			if _, ok := want[f.Check]; !ok {
				continue
			}
			if f.Check == "serial" && f.Params["k"] != 2 {
				continue
			}
			want[f.Check] = true
			if !f.Discrete {
				t.Errorf("%s: not marked discrete at n = 1000", f.Label())
				continue
			}
			atom := math.Exp(f.LogPUpper) + math.Exp(f.LogPLower) - 1
			if !(f.LogPAtom > math.Inf(-1)) || f.LogPAtom > math.Min(f.LogPUpper, f.LogPLower)+1e-12 ||
				!closeTo(math.Exp(f.LogPAtom), atom, 1e-9) {
				t.Errorf("%s: atom %.12g, tails say %.12g (up %.6g, lo %.6g)", f.Label(), math.Exp(f.LogPAtom), atom, math.Exp(f.LogPUpper), math.Exp(f.LogPLower))
			}
		}
	}
	for c, seen := range want {
		if !seen {
			t.Errorf("%s: no segment statistic found", c)
		}
	}
}
