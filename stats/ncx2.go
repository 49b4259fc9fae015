package stats

import "math"

// NoncentralChiSquareCDF returns P(X ≤ x) for X ~ χ'²(df, λ), the noncentral
// chi-square law, by its Poisson mixture of central laws:
//
//	P(X ≤ x) = Σ_{j≥0} e^(-λ/2) (λ/2)^j / j! · P(df/2 + j, x/2).
//
// The sum starts at the Poisson mode with one incomplete gamma evaluation and
// walks both ways with the exact recurrences
//
//	P(a+1, y) = P(a, y) - y^a e^(-y) / Γ(a+1),   w_{j+1} = w_j · (λ/2)/(j+1),
//
// until the weights are negligible: O(√λ) steps of constant cost. Accurate
// to about 1e-12 absolute, which is what interval inversion needs; it is not
// a far-tail routine. Reference: Johnson, Kotz & Balakrishnan, Continuous
// Univariate Distributions vol. 2, ch. 29 (Poisson-mixture form); DLMF 8.8.5
// (the recurrence).
func NoncentralChiSquareCDF(x, df, lambda float64) float64 {
	if x <= 0 {
		return 0
	}
	if lambda <= 0 {
		return math.Exp(ChiSquareLogCDF(x, df))
	}
	mu, y, a0 := lambda/2, x/2, df/2
	lny := math.Log(y)
	jm := math.Floor(mu)
	lgj, _ := math.Lgamma(jm + 1)
	wMode := math.Exp(-mu + jm*math.Log(mu) - lgj)
	pMode := math.Exp(LogGammaP(a0+jm, y))
	// lnTerm(a) = ln(y^a e^-y / Γ(a+1)), the step between P(a, y) and P(a+1, y).
	lga, _ := math.Lgamma(a0 + jm + 1)
	lnTermMode := (a0+jm)*lny - y - lga

	sum := wMode * pMode
	// Upward: j = jm+1, jm+2, …
	w, p, lnT := wMode, pMode, lnTermMode
	for j := jm; ; j++ {
		p = math.Max(0, p-math.Exp(lnT)) // P(a0+j+1)
		lnT += lny - math.Log(a0+j+1)
		w *= mu / (j + 1)
		sum += w * p
		if (w < 1e-17 && j > mu) || p == 0 {
			break
		}
	}
	// Downward: j = jm-1, …, 0.
	w, p, lnT = wMode, pMode, lnTermMode
	for j := jm; j > 0; j-- {
		lnT -= lny - math.Log(a0+j) // now ln y^(a0+j-1) e^-y / Γ(a0+j)
		p = math.Min(1, p+math.Exp(lnT))
		w *= j / mu
		sum += w * p
		if w < 1e-17 {
			break
		}
	}
	return math.Min(1, sum)
}

// NoncentralityInterval returns a two-sided confidence interval [lo, hi] at
// level conf for the noncentrality λ of a statistic observed as stat with
// stat ~ χ'²(df, λ): lo solves CDF(stat; df, lo) = (1+conf)/2 (lo = 0 when
// even λ = 0 gives a smaller CDF) and hi solves CDF(stat; df, hi) = (1-conf)/2.
// The inversion is exact because the noncentral chi-square law is
// stochastically increasing in λ. borel uses it to put an interval on the
// entropy deficit through G = 2n·(deficit in nats) (the G statistic is
// twice n times the Kullback–Leibler divergence of the observed frequencies
// from the null's: Kullback, Information Theory and Statistics, 1959, ch. 6).
func NoncentralityInterval(stat, df, conf float64) (lo, hi float64) {
	if !(conf > 0 && conf < 1) {
		panic("stats: NoncentralityInterval needs 0 < conf < 1")
	}
	upper := (1 + conf) / 2
	lower := (1 - conf) / 2
	solve := func(target float64) float64 {
		if NoncentralChiSquareCDF(stat, df, 0) <= target {
			return 0
		}
		a, b := 0.0, math.Max(1, stat)
		for NoncentralChiSquareCDF(stat, df, b) > target {
			a, b = b, 2*b
		}
		for i := 0; i < 100 && b-a > 1e-10*math.Max(1, b); i++ {
			m := (a + b) / 2
			if NoncentralChiSquareCDF(stat, df, m) > target {
				a = m
			} else {
				b = m
			}
		}
		return (a + b) / 2
	}
	return solve(upper), solve(lower)
}
