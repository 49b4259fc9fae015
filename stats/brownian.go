package stats

import "math"

// BrownianMaxLogSF returns ln P(sup_{0≤t≤1} |W_t| ≥ x) for a standard
// Brownian motion W (Erdős & Kac, Bull. AMS 52 (1946) 292–302), from
//
//	P(sup|W| ≥ x) = 4 Σ_{k≥0} (-1)^k Φc((2k+1)x),
//
// summed relative to its first term in logs, so it stays finite far beyond
// underflow; for x < 1.2 it returns ln(1 - P(sup|W| < x)) from the theta series
// of BrownianMaxLogCDF, which converges faster there.
func BrownianMaxLogSF(x float64) float64 {
	if x <= 0 {
		return 0
	}
	if x < 1.2 {
		return math.Log1p(-math.Exp(BrownianMaxLogCDF(x)))
	}
	first := NormalLogSF(x)
	sum := 1.0
	for k := 1; k < 50; k++ {
		term := math.Exp(NormalLogSF(float64(2*k+1)*x) - first)
		if k%2 == 1 {
			sum -= term
		} else {
			sum += term
		}
		if term < 1e-17 {
			break
		}
	}
	return math.Log(4) + first + math.Log(sum)
}

// BrownianMaxLogCDF returns ln P(sup_{0≤t≤1} |W_t| < x), from the theta
// series of Erdős & Kac, Bull. AMS 52 (1946) 292–302
//
//	P(sup|W| < x) = (4/π) Σ_{k≥0} (-1)^k/(2k+1) · exp(-(2k+1)²π²/(8x²)),
//
// for x < 1.2, and ln(1 - P(sup|W| ≥ x)) above.
func BrownianMaxLogCDF(x float64) float64 {
	if x <= 0 {
		return math.Inf(-1)
	}
	if x >= 1.2 {
		return math.Log1p(-math.Exp(BrownianMaxLogSF(x)))
	}
	c := math.Pi * math.Pi / (8 * x * x)
	first := -c
	sum := 1.0
	for k := 1; k < 50; k++ {
		j := float64(2*k + 1)
		term := math.Exp(-j*j*c-first) / j
		if k%2 == 1 {
			sum -= term
		} else {
			sum += term
		}
		if term < 1e-17 {
			break
		}
	}
	return math.Log(4/math.Pi) + first + math.Log(sum)
}

// KolmogorovLogSF returns ln P(sup_{0≤t≤1} |B_t| ≥ x) for a Brownian bridge
// B, the limit law of √n·D_n (Kolmogorov 1933):
//
//	P(sup|B| ≥ x) = 2 Σ_{k≥1} (-1)^(k-1) e^(-2k²x²),
//
// summed relative to its first term (ln 2 - 2x² + …); for x < 1 from the
// complementary series of KolmogorovLogCDF.
func KolmogorovLogSF(x float64) float64 {
	if x <= 0 {
		return 0
	}
	if x < 1 {
		return math.Log1p(-math.Exp(KolmogorovLogCDF(x)))
	}
	sum := 1.0
	for k := 2; k < 100; k++ {
		term := math.Exp(-2 * float64(k*k-1) * x * x)
		if k%2 == 0 {
			sum -= term
		} else {
			sum += term
		}
		if term < 1e-17 {
			break
		}
	}
	return math.Log(2) - 2*x*x + math.Log(sum)
}

// KolmogorovLogCDF returns ln K(x) = ln P(sup|B| < x), for x < 1 from
//
//	K(x) = (√(2π)/x) Σ_{k≥1} e^(-(2k-1)²π²/(8x²)),
//
// and ln(1 - P(sup|B| ≥ x)) above.
func KolmogorovLogCDF(x float64) float64 {
	if x <= 0 {
		return math.Inf(-1)
	}
	if x >= 1 {
		return math.Log1p(-math.Exp(KolmogorovLogSF(x)))
	}
	c := math.Pi * math.Pi / (8 * x * x)
	sum := 1.0
	for k := 2; k < 100; k++ {
		j := float64(2*k - 1)
		term := math.Exp(-(j*j - 1) * c)
		sum += term
		if term < 1e-17 {
			break
		}
	}
	return math.Log(math.Sqrt(2*math.Pi)/x) - c + math.Log(sum)
}
