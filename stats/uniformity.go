package stats

import (
	"math"
	"sort"
)

// LogPPair is a probability p given by ln p and ln(1-p), each computed
// directly, so that neither ln p_(i) nor ln(1 - p_(m+1-i)) meets ln 0.
type LogPPair struct{ LogP, LogQ float64 }

// KSStatistic returns the Kolmogorov–Smirnov distance of m values from the
// uniform law on [0, 1]:
//
//	D = max(D+, D-),  D+ = max_i (i/m - p_(i)),  D- = max_i (p_(i) - (i-1)/m).
func KSStatistic(p []float64) float64 {
	s := append([]float64(nil), p...)
	sort.Float64s(s)
	m := float64(len(s))
	d := 0.0
	for i, v := range s {
		d = math.Max(d, math.Max(float64(i+1)/m-v, v-float64(i)/m))
	}
	return d
}

// KSExactCDF returns P(D_m < d) for the two-sided KS statistic of m
// independent uniforms, by the matrix-power method of Marsaglia, Tsang &
// Wang, "Evaluating Kolmogorov's distribution", J. Statist. Software 8(18)
// (2003), including their switch to the asymptotic form
// 1 - 2 exp(-(2.000071 + .331/√m + 1.409/m) m d²) when m d² > 7.24 (or > 3.76
// with m > 99), where it is accurate to about 7 digits.
func KSExactCDF(m int, d float64) float64 {
	if d <= 0 {
		return 0
	}
	if d >= 1 {
		return 1
	}
	s := d * d * float64(m)
	if s > 7.24 || (s > 3.76 && m > 99) {
		return 1 - 2*math.Exp(-(2.000071+0.331/math.Sqrt(float64(m))+1.409/float64(m))*s)
	}
	k := int(float64(m)*d) + 1
	sz := 2*k - 1
	h := float64(k) - float64(m)*d
	H := make([]float64, sz*sz)
	for i := 0; i < sz; i++ {
		for j := 0; j < sz; j++ {
			if i-j+1 >= 0 {
				H[i*sz+j] = 1
			}
		}
	}
	for i := 0; i < sz; i++ {
		H[i*sz] -= math.Pow(h, float64(i+1))
		H[(sz-1)*sz+i] -= math.Pow(h, float64(sz-i))
	}
	if 2*h-1 > 0 {
		H[(sz-1)*sz] += math.Pow(2*h-1, float64(sz))
	}
	for i := 0; i < sz; i++ {
		for j := 0; j < sz; j++ {
			if i-j+1 > 0 {
				for g := 1; g <= i-j+1; g++ {
					H[i*sz+j] /= float64(g)
				}
			}
		}
	}
	Q, eQ := ksMatPow(H, 0, sz, m)
	v := Q[(k-1)*sz+k-1]
	for i := 1; i <= m; i++ {
		v = v * float64(i) / float64(m)
		if v < 1e-140 {
			v *= 1e140
			eQ -= 140
		}
	}
	return v * math.Pow(10, float64(eQ))
}

func ksMatMul(a, b []float64, sz int) []float64 {
	c := make([]float64, sz*sz)
	for i := 0; i < sz; i++ {
		for k := 0; k < sz; k++ {
			aik := a[i*sz+k]
			if aik == 0 {
				continue
			}
			for j := 0; j < sz; j++ {
				c[i*sz+j] += aik * b[k*sz+j]
			}
		}
	}
	return c
}

// ksMatPow returns A^n with a decimal exponent kept apart to avoid overflow.
func ksMatPow(a []float64, ea, sz, n int) ([]float64, int) {
	if n == 1 {
		return a, ea
	}
	v, ev := ksMatPow(a, ea, sz, n/2)
	b := ksMatMul(v, v, sz)
	eb := 2 * ev
	if n%2 == 0 {
		v, ev = b, eb
	} else {
		v, ev = ksMatMul(a, b, sz), ea+eb
	}
	if v[(sz/2)*sz+sz/2] > 1e140 {
		for i := range v {
			v[i] *= 1e-140
		}
		ev += 140
	}
	return v, ev
}

// KSLogTails returns ln P(D_m ≥ d) and ln P(D_m ≤ d) for m uniforms:
// the exact law when it is evaluated (1 - CDF is then accurate to about
// 1e-15) and, in the asymptotic range, the upper tail in closed form.
func KSLogTails(m int, d float64) (upper, lower float64) {
	s := d * d * float64(m)
	if s > 7.24 || (s > 3.76 && m > 99) {
		upper = math.Log(2) - (2.000071+0.331/math.Sqrt(float64(m))+1.409/float64(m))*s
		return upper, math.Log1p(-math.Exp(upper))
	}
	cdf := KSExactCDF(m, d)
	return math.Log(math.Max(1-cdf, 1e-300)), math.Log(cdf)
}

// KSCritical returns the d with P(D_m < d) = level for the two-sided
// Kolmogorov–Smirnov statistic of m independent uniforms (the inverse of
// KSExactCDF, by bisection to 1e-12).
func KSCritical(m int, level float64) float64 {
	lo, hi := 0.0, 1.0
	for hi-lo > 1e-12 {
		mid := (lo + hi) / 2
		if KSExactCDF(m, mid) < level {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// KSBand returns, for the ordered values p_(1) ≤ … ≤ p_(m) of m
// independent uniforms, the simultaneous band that holds all of them with
// probability level: D_m < d, with d = KSCritical(m, level), is the event
//
//	i/m − d < p_(i) < (i−1)/m + d  for every i,
//
// since D = max_i max(i/m − p_(i), p_(i) − (i−1)/m) (KSStatistic). The
// bounds are clipped to [0, 1]. It is the band a uniform Q–Q plot draws
// so that a reader can tell chance from defect; for dependent p-values
// (findings of one sequence are correlated) it is a guide, not a test.
func KSBand(m int, level float64) (lo, hi []float64) {
	d := KSCritical(m, level)
	lo, hi = make([]float64, m), make([]float64, m)
	for i := 1; i <= m; i++ {
		lo[i-1] = math.Max(0, float64(i)/float64(m)-d)
		hi[i-1] = math.Min(1, float64(i-1)/float64(m)+d)
	}
	return lo, hi
}

// AndersonDarling returns A² = -m - (1/m) Σ (2i-1)[ln p_(i) + ln(1 - p_(m+1-i))]
// for m p-values given with both logs (Anderson & Darling, Ann. Math.
// Statist. 23 (1952) 193–212). A p-value of exactly 0 or 1 (a degenerate
// segment, e.g. a constant one) enters as the nearest positive double, ln =
// −744.4, so that A² stays finite: it is then huge and its p-value 0.
func AndersonDarling(ps []LogPPair) float64 {
	s := append([]LogPPair(nil), ps...)
	sort.Slice(s, func(i, j int) bool { return s[i].LogP < s[j].LogP })
	m := len(s)
	floor := math.Log(math.SmallestNonzeroFloat64)
	sum := 0.0
	for i := 0; i < m; i++ {
		sum += float64(2*i+1) * (math.Max(s[i].LogP, floor) + math.Max(s[m-1-i].LogQ, floor))
	}
	return -float64(m) - sum/float64(m)
}

// adinf is Marsaglia & Marsaglia's approximation of the limiting CDF of A²
// ("Evaluating the Anderson–Darling distribution", J. Statist. Software
// 9(2), 2004), coefficients as printed there.
func adinf(z float64) float64 {
	if z < 2 {
		return math.Exp(-1.2337141/z) / math.Sqrt(z) *
			(2.00012 + (0.247105-(0.0649821-(0.0347962-(0.011672-0.00168691*z)*z)*z)*z)*z)
	}
	return math.Exp(-math.Exp(1.0776 - (2.30695-(0.43424-(0.082433-(0.008056-0.0003146*z)*z)*z)*z)*z))
}

// aderrfix is their finite-m correction to adinf.
func aderrfix(m int, x float64) float64 {
	n := float64(m)
	c := 0.01265 + 0.1757/n
	switch {
	case x < c:
		t := x / c
		return math.Sqrt(t) * (1 - t) * (49*t - 102) * (0.0037/(n*n) + 0.00078/n + 0.00006) / n
	case x < 0.8:
		t := (x - c) / (0.8 - c)
		g := -0.00022633 + (6.54034-(14.6538-(14.458-(8.259-1.91864*t)*t)*t)*t)*t
		return g * (0.04213 + 0.01365/n) / n
	default:
		return (-130.2137 + (745.2337-(1705.091-(1950.646-(1116.360-255.7844*x)*x)*x)*x)*x) / n
	}
}

// ADLogTails returns ln P(A²_m ≥ z) and ln P(A²_m ≤ z) by Marsaglia &
// Marsaglia's approximation with the finite-m correction. In the far upper
// tail (below 1e-3) the correction, accurate to about 1e-5, is dropped and
// 1 - adinf is formed with expm1, so tiny p-values keep their magnitude.
// Beyond z = 8, where their polynomial is no longer meant to hold, it uses
// the leading asymptotics of A² = Σ_j Z_j²/(j(j+1)): the largest weight is
// 1/2 and Π_{j≥2} (1 - 2/(j(j+1)))^(-1/2) = √3, so
//
//	P(A² ≥ z) ≈ √3 · P(χ²_1 ≥ 2z) = √3 · erfc(√z)
//
// (within 1.4 % of Marsaglia's value at z = 8; checked with mpmath).
func ADLogTails(m int, z float64) (upper, lower float64) {
	if z <= 0 {
		return 0, math.Inf(-1)
	}
	if z > 8 {
		upper = 0.5*math.Log(3) + math.Log(2) + NormalLogSF(math.Sqrt(2*z))
		return upper, math.Log1p(-math.Exp(upper))
	}
	x := adinf(z)
	cdf := math.Min(1, math.Max(0, x+aderrfix(m, x)))
	if z >= 2 {
		g := 1.0776 - (2.30695-(0.43424-(0.082433-(0.008056-0.0003146*z)*z)*z)*z)*z
		tail := -math.Expm1(-math.Exp(g)) // 1 - adinf, without cancellation
		if tail < 1e-3 {
			return math.Log(tail), math.Log1p(-tail)
		}
	}
	return math.Log(math.Max(1-cdf, 1e-300)), math.Log(cdf)
}
