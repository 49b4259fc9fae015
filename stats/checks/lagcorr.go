package checks

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/borel-audit/borel/internal/tally"
)

// lagcorrCheck is the serial correlation of digit values at lags h = 1..H,
// centred on the sample mean x̄ (Knuth's serial correlation coefficient,
// TAOCP vol. 2 §3.3.2 K, at lag h; the sample autocorrelation of time
// series), so that a biased frequency is left to freq and does not read as
// correlation:
//
//	r_h = Σ_{i=1}^{n-h} (x_i - x̄)(x_{i+h} - x̄) / Σ_{i=1}^{n} (x_i - x̄)²
//	z_h = (r_h - E r_h) / √V_h,   E r_h = -(n-h)/(n(n-1)),   V_h = (n-h)/(n(n+2))
//	Q   = Σ_h z_h²  ~ χ² with H df
//
// For i.i.d. digits (any frequency vector) the sequence is exchangeable,
// so every ordered pair i ≠ j has the same E[(x_i - x̄)(x_j - x̄)/D], and
// as the n(n-1) pairs sum to -D it is -1/(n(n-1)): E r_h is exact. V_h is
// the variance of Ljung & Box, Biometrika 65 (1978) 297–303, whose Q this
// is up to the centring of each r_h; lags are asymptotically independent.
// It sees only linear dependence of digit values (relabelling the digits
// changes it); the serial check is label-free. The null's vector plays no
// part. Validity: n - h ≥ 100 and digits that vary (common practice).
type lagcorrCheck struct{}

var _ Check = lagcorrCheck{}

func (lagcorrCheck) Name() string { return "lagcorr" }

// SegmentStatistic: the portmanteau Q.
func (lagcorrCheck) SegmentStatistic(f Finding) bool { return f.Statistic == "Q" }

// Needs: the lag products at lags 1..5 (the digit sum comes from the
// digit counts).
func (lagcorrCheck) Needs(Setting) Needs {
	return Needs{Records: []tally.RecordSpec{&tally.LagSpec{Max: 5}}}
}

func (lagcorrCheck) Run(in Input, out *Result) {
	t := in.Tally
	lags := t.Lags()
	H := lags.Max
	n := t.N
	if n-int64(H) < 100 {
		out.Skips = append(out.Skips, Skip{Check: "lagcorr", Params: map[string]int{"lags": H},
			Reason: fmt.Sprintf("%d digits are too few for lags up to %d (needs %d)", n, H, 100+H)})
		return
	}
	var sum, sumSq float64 // Σ x_i, Σ x_i² (exact in float64 below 2^53)
	for j, c := range t.DigitCounts() {
		sum += float64(j) * float64(c)
		sumSq += float64(j*j) * float64(c)
	}
	nf := float64(n)
	mean := sum / nf
	den := sumSq - sum*mean // Σ (x_i - x̄)²
	if !(den > 0) {
		out.Skips = append(out.Skips, Skip{Check: "lagcorr", Params: map[string]int{"lags": H},
			Reason: "every digit is the same, so there is no variation to correlate"})
		return
	}
	Q := 0.0
	zs := make([]float64, H+1)
	for h := 1; h <= H; h++ {
		var first, last int64
		for i := 0; i < h; i++ {
			first += int64(t.Head[i])
			last += int64(t.Tail[len(t.Tail)-h+i])
		}
		a, c := sum-float64(last), sum-float64(first) // Σ_{i≤n-h} x_i and Σ_{i>h} x_i
		pairs := nf - float64(h)
		num := float64(lags.Products[h]) - mean*(a+c) + pairs*mean*mean
		r := num / den
		z := (r + pairs/(nf*(nf-1))) / math.Sqrt(pairs/(nf*(nf+2)))
		Q += z * z
		zs[h] = z
		f := normalFinding("lagcorr", "z", map[string]int{"lag": h}, z)
		f.Detail = fmt.Sprintf("r = %.6g over %d pairs (centred on the sample mean %.6g)", r, n-int64(h), mean)
		out.Findings = append(out.Findings, f)
	}
	q := chiSquareFinding("lagcorr", "Q", map[string]int{"lags": H}, Q, float64(H), 0)
	q.Where, q.WhereHow = topZ(zs[1:], 3, func(i int) string { return fmt.Sprintf("lag %d", i+1) }), "(z of each lag's correlation)"
	out.Findings = append(out.Findings, q)
}

// topZ writes the k entries of largest |z|, largest first: "name: +9.8σ; …".
func topZ(z []float64, k int, name func(i int) string) string {
	idx := make([]int, len(z))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return math.Abs(z[idx[a]]) > math.Abs(z[idx[b]]) })
	var parts []string
	for _, i := range idx[:min(k, len(idx))] {
		parts = append(parts, fmt.Sprintf("%s: %+.1fσ", name(i), z[i]))
	}
	return strings.Join(parts, "; ")
}
