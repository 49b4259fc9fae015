package stats

import "math"

// NoncentralChiSquareCDF returns P(X ≤ x) for X ~ χ'²(df, λ), the noncentral
// chi-square law, by its Poisson mixture of central laws:
//
//	P(X ≤ x) = Σ_{j≥0} e^(-λ/2) (λ/2)^j / j! · P(df/2 + j, x/2).
//
// The sum starts at the Poisson mode and walks both ways until the weights
// are negligible, so it costs O(√λ) terms. Accurate to about 1e-12 absolute,
// which is what interval inversion needs; it is not a far-tail routine.
// Reference: Johnson, Kotz & Balakrishnan, Continuous Univariate
// Distributions vol. 2, ch. 29 (Poisson-mixture form).
func NoncentralChiSquareCDF(x, df, lambda float64) float64 {
	if x <= 0 {
		return 0
	}
	if lambda <= 0 {
		return math.Exp(ChiSquareLogCDF(x, df))
	}
	mu := lambda / 2
	mode := math.Floor(mu)
	term := func(j float64) float64 {
		lgj, _ := math.Lgamma(j + 1)
		logw := -mu + j*math.Log(mu) - lgj
		return math.Exp(logw + LogGammaP(df/2+j, x/2))
	}
	weight := func(j float64) float64 {
		lgj, _ := math.Lgamma(j + 1)
		return math.Exp(-mu + j*math.Log(mu) - lgj)
	}
	sum := term(mode)
	for j := mode + 1; ; j++ {
		sum += term(j)
		if weight(j) < 1e-17 && j > mu {
			break
		}
	}
	for j := mode - 1; j >= 0; j-- {
		sum += term(j)
		if weight(j) < 1e-17 {
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
// entropy deficit through G = 2n·(deficit in nats) (methods.md §12).
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
