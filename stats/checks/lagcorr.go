package checks

import (
	"fmt"
	"math"

	"borel/internal/tally"
)

// lagcorrCheck is the serial correlation of digit values at lags h = 1..H,
// with the null's known moments μ = Σ j p_j and σ² = Σ j² p_j - μ²:
//
//	r_h = (1/(n-h)) Σ_{i=1}^{n-h} (x_i - μ)(x_{i+h} - μ)/σ²,   z_h = r_h √(n-h) ~ N(0, 1),
//
// exact mean 0 and variance 1/(n-h) under the null (the products are
// uncorrelated), and different lags uncorrelated, so the portmanteau
// Q = Σ_h z_h² is χ² with H df (Box–Pierce type). Under the uniform null the
// sum is formed exactly in integers. It sees only linear dependence of digit
// values (relabelling the digits changes it); the serial check is label-free.
// Under a fitted null μ and σ come from the data. Validity: n - h ≥ 100
// (common practice). References: Knuth, TAOCP vol. 2 §3.3.2 K (the
// unknown-moment form); Box & Pierce, JASA 65 (1970) 1509–1526 (the sum of
// squared lag statistics).
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
	mu, m2 := 0.0, 0.0
	for j, p := range in.Null.P {
		mu += float64(j) * p
		m2 += float64(j*j) * p
	}
	sigma2 := m2 - mu*mu
	var sum int64 // Σ x_i
	for j, c := range t.DigitCounts() {
		sum += int64(j) * c
	}
	uniform := in.Null.IsUniform()
	b1 := int64(t.Base - 1)
	Q := 0.0
	for h := 1; h <= H; h++ {
		var first, last int64
		for i := 0; i < h; i++ {
			first += int64(t.Head[i])
			last += int64(t.Tail[len(t.Tail)-h+i])
		}
		a, c := sum-last, sum-first // Σ_{i≤n-h} x_i and Σ_{i>h} x_i
		pairs := float64(n - int64(h))
		var num float64
		if uniform { // 4Σ(x_i-μ)(x_{i+h}-μ) with 2μ = b-1, exactly
			num = float64(4*lags.Products[h]-2*b1*(a+c)+(n-int64(h))*b1*b1) / 4
		} else {
			num = float64(lags.Products[h]) - mu*float64(a+c) + pairs*mu*mu
		}
		r := num / (pairs * sigma2)
		z := r * math.Sqrt(pairs)
		Q += z * z
		f := normalFinding("lagcorr", "z", map[string]int{"lag": h}, z)
		f.Detail = fmt.Sprintf("r = %.6g over %d pairs", r, n-int64(h))
		out.Findings = append(out.Findings, f)
	}
	out.Findings = append(out.Findings, chiSquareFinding("lagcorr", "Q", map[string]int{"lags": H}, Q, float64(H), 0))
}
