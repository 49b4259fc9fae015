package stats

import "math"

// ChiSquareLogSF returns ln P(X ≥ x) for X ~ χ²(df): the upper tail, the
// p-value of a chi-square statistic that is too large.
//
//	P(X ≥ x) = Q(df/2, x/2)
//
// It is computed directly from the small tail in log space (see LogGammaQ),
// so it stays finite for p-values far below 1e-308. df must be > 0.
// Reference: Abramowitz & Stegun 26.4.2; DLMF §8.2.
func ChiSquareLogSF(x, df float64) float64 {
	if x <= 0 {
		return 0
	}
	return LogGammaQ(df/2, x/2)
}

// ChiSquareLogCDF returns ln P(X ≤ x) for X ~ χ²(df): the lower tail, the
// p-value of a chi-square statistic that is too small (counts closer to their
// expectations than chance allows). P(X ≤ x) = P(df/2, x/2). A statistic of
// exactly 0 gives -Inf: the lower tail of a continuous law at its minimum.
func ChiSquareLogCDF(x, df float64) float64 {
	if x <= 0 {
		return math.Inf(-1)
	}
	return LogGammaP(df/2, x/2)
}

// ChiSquareQuantile returns the x with P(X ≤ x) = prob for X ~ χ²(df), by
// bisection on the log tails (whichever is smaller), to relative accuracy
// about 1e-12. It panics unless 0 < prob < 1 and df > 0.
func ChiSquareQuantile(prob, df float64) float64 {
	if !(prob > 0 && prob < 1) || !(df > 0) {
		panic("stats: ChiSquareQuantile needs 0 < prob < 1 and df > 0")
	}
	// f(x) > 0 once x is past the quantile.
	f := func(x float64) float64 {
		if prob < 0.5 {
			return ChiSquareLogCDF(x, df) - math.Log(prob)
		}
		return math.Log1p(-prob) - ChiSquareLogSF(x, df)
	}
	lo, hi := 0.0, df+10*math.Sqrt(2*df)+10
	for f(hi) < 0 {
		lo, hi = hi, 2*hi
	}
	for i := 0; i < 200 && hi-lo > 1e-13*hi; i++ {
		mid := (lo + hi) / 2
		if f(mid) < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// NormalLogSF returns ln P(Z ≥ z) for a standard normal Z, accurate in the far
// upper tail where the probability underflows: for z > 30 it uses the
// asymptotic Mills-ratio series
//
//	ln Φc(z) = -z²/2 - ln(z√(2π)) + ln(1 - 1/z² + 3/z⁴ - 15/z⁶ + 105/z⁸)
//
// (DLMF §7.12.1), elsewhere ln(erfc(z/√2)/2).
func NormalLogSF(z float64) float64 {
	if z > 30 {
		z2 := 1 / (z * z)
		series := 1 - z2*(1-3*z2*(1-5*z2*(1-7*z2)))
		return -z*z/2 - math.Log(z*math.Sqrt(2*math.Pi)) + math.Log(series)
	}
	return math.Log(math.Erfc(z/math.Sqrt2) / 2)
}
