package checks

import (
	"fmt"
	"math"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
)

// updownCheck counts runs up and down (Levene & Wolfowitz 1944). Digits
// tie too often for a runs test, so the values are u_j = the base-b integer
// of L consecutive digits (disjoint groups aligned at multiples of L). With
// m values and T turning points (strict peaks and troughs), the number of
// maximal monotone runs is R = T + 1 and, for continuous i.i.d. values,
//
//	E[R] = (2m - 1)/3,   Var[R] = (16m - 29)/90,   z = (R - E[R])/√Var[R] ~ N(0, 1).
//
// Both tails deviate: too few runs (long monotone stretches) and too many
// (alternation). R is an integer whose atoms are not small (P(R = r) ≈
// 0.13 at m = 500), so the p-values come from its exact law for m ≤
// stats.MaxExactRunsUpDown (André's recurrence, stats.RunsUpDownLaw) and from
// the continuity-corrected normal lattice law beyond; both give the second
// level its atoms. z is reported as the usual summary. The test is rank-based, so the same law holds under every
// null provided ties are negligible: the expected number of ties,
// (m-1)(Σ_j p_j²)^L, must be ≪ 1 (Knuth, TAOCP vol. 2 §3.3.2 G, on ties in
// runs tests); L is chosen as large as a
// 64-bit value allows, and any tie seen is reported.
// References: Levene & Wolfowitz, Ann. Math. Statist. 15 (1944) 58–69;
// Knuth, TAOCP vol. 2 §3.3.2 G.
type updownCheck struct{}

// minUpDownValues: the exact law is valid for any m ≥ 2, but below 5 values
// the run count takes at most 3 values and the test has no power to speak
// of (5 keeps it in the second level's shortest segments: 512 bits hold 8).
const minUpDownValues = 5

var _ Check = updownCheck{}

func (updownCheck) Name() string { return "updown" }

// SegmentStatistic: the run count's z.
func (updownCheck) SegmentStatistic(f Finding) bool { return f.Statistic == "z" }

// Needs: values of as many digits as a 63-bit integer holds, so that ties
// are negligible.
func (updownCheck) Needs(s Setting) Needs {
	return Needs{Records: []tally.RecordSpec{&tally.UpDownSpec{Digits: int(63 / math.Log2(float64(s.Base)))}}}
}

func (updownCheck) Run(in Input, out *Result) {
	t := in.Tally
	ud := t.UpDown()
	L := ud.Digits
	m := ud.Values
	params := map[string]int{"digits": L}
	if m < minUpDownValues {
		out.Skips = append(out.Skips, Skip{Check: "updown", Params: params,
			Reason: fmt.Sprintf("%d values of %d digits are too few for a runs test (needs %d values: %d digits)", m, L, minUpDownValues, minUpDownValues*L)})
		return
	}
	mf := float64(m)
	runs := float64(ud.Turns + 1)
	z := (runs - (2*mf-1)/3) / math.Sqrt((16*mf-29)/90)
	f := normalFinding("updown", "z", params, z)
	if law, ok := stats.RunsUpDownLaw(int(m)); ok {
		f.setDiscrete(law.LogTails(runs))
	} else {
		f.setDiscrete(stats.RunsUpDownLatticeLogTails(m, ud.Turns+1))
	}
	f.Detail = fmt.Sprintf("%d runs up and down in %d values of %d digits (expected %.1f)", ud.Turns+1, m, L, (2*mf-1)/3)
	sq := 0.0
	for _, p := range in.Null.P {
		sq += p * p
	}
	if expTies := (mf - 1) * math.Pow(sq, float64(L)); ud.Ties > 0 || expTies > 0.01 {
		f.Notes = append(f.Notes, Notef(NoteTies, "%d ties between consecutive values (%.3g expected under the null); the run law assumes none", ud.Ties, expTies))
	}
	out.Findings = append(out.Findings, f)
}
