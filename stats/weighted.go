package stats

import (
	"math"
	"slices"
)

// WeightedChiSquareLogTails returns ln P(Q ≥ x) and ln P(Q ≤ x) for
//
//	Q = Σ_i λ_i Z_i²,  Z_i i.i.d. N(0, 1),  λ_i > 0,
//
// the law of a Pearson X² whose cells are not the multinomial ones (for
// instance with parameters estimated from data other than the cell counts:
// Chernoff & Lehmann 1954, where the λ_i lie in [0, 1]). It uses Ruben's
// mixture of central laws: with β = min λ and ρ_i = 1 − β/λ_i,
//
//	P(Q ≤ x) = Σ_{k≥0} c_k P(χ²_{n+2k} ≤ x/β),
//	c_0 = Π_i (β/λ_i)^½,  c_k = (1/2k) Σ_{r<k} g_{k−r} c_r,  g_m = Σ_i ρ_i^m,
//
// whose weights are positive and sum to 1, so both tails are sums of
// positive terms and stay accurate in log space far into the tails. The
// upper tails of successive terms follow P(χ²_{ν+2} > y) = P(χ²_ν > y) +
// (y/2)^(ν/2) e^(−y/2)/Γ(ν/2+1). Weights below 10^-2 of the largest are
// replaced by their mean (Q ≈ Q' + Σ λ_small: the dropped variance is below
// 2·10^-4 of the largest component's), so the series needs at most a few
// thousand terms; beyond 20 000 (x hundreds of times its mean) the upper
// tail returned is a lower bound, the larger of the partial sum and the
// largest weights' own tail. λ_i ≤ 0 contribute nothing. Reference: Ruben, Ann. Math.
// Statist. 33 (1962) 542–570; Johnson, Kotz & Balakrishnan, Continuous
// Univariate Distributions vol. 1, §18.8.
func WeightedChiSquareLogTails(x float64, lambda []float64) (up, lo float64) {
	top := 0.0
	for _, l := range lambda {
		top = math.Max(top, l)
	}
	var keep []float64
	shift := 0.0
	for _, l := range lambda {
		switch {
		case l <= 0:
		case l < 1e-2*top:
			shift += l
		default:
			keep = append(keep, l)
		}
	}
	x -= shift
	if len(keep) == 0 || x <= 0 {
		if x > 0 {
			return math.Inf(-1), 0
		}
		return 0, math.Inf(-1)
	}
	beta := slices.Min(keep)
	n := float64(len(keep))
	y := x / beta
	rho := make([]float64, len(keep))
	lnC0 := 0.0
	for i, l := range keep {
		rho[i] = 1 - beta/l
		lnC0 += 0.5 * math.Log(beta/l)
	}
	// c_k = c_0 ρ^k c'_k with ρ = max ρ_i: c'_k grows at most polynomially,
	// so neither underflows over thousands of terms.
	rmax := slices.Max(rho)
	if rmax == 0 { // every λ equal: c_0 = 1 is the whole law
		return ChiSquareLogSF(y, n), ChiSquareLogCDF(y, n)
	}
	lnR := math.Log(rmax)
	const maxTerms = 20000
	c := []float64{1}
	var g []float64 // g[m-1] = Σ_i (ρ_i/ρ)^m
	sumC := math.Exp(lnC0)
	lnY2 := math.Log(y / 2)
	// ln Q_k: the upper tail of χ²_{n+2k} at y.
	lnQ := ChiSquareLogSF(y, n)
	up = lnC0 + lnQ
	lo = lnC0 + ChiSquareLogCDF(y, n)
	loDone, quiet, k := false, 0, 1
	for ; k < maxTerms; k++ {
		gm := 0.0
		for _, r := range rho {
			gm += math.Pow(r/rmax, float64(k))
		}
		g = append(g, gm)
		ck := 0.0
		for r := 0; r < k; r++ {
			ck += g[k-r-1] * c[r]
		}
		ck /= 2 * float64(k)
		c = append(c, ck)
		lnCk := lnC0 + math.Log(ck) + float64(k)*lnR
		nu := n + 2*float64(k-1) // lnQ holds ν = nu; step to ν + 2
		lg, _ := math.Lgamma(nu/2 + 1)
		lnQ = logAddExp(lnQ, nu/2*lnY2-y/2-lg)
		termUp := lnCk + lnQ
		up = logAddExp(up, termUp)
		sumC += math.Exp(lnCk)
		if !loDone {
			lnP := ChiSquareLogCDF(y, n+2*float64(k))
			lo = logAddExp(lo, lnCk+lnP)
			if math.Max(0, 1-sumC)*math.Exp(lnP-lo) < 1e-15 {
				loDone = true
			}
		}
		// The upper terms grow while ν < y and shrink geometrically after.
		if termUp < up-45 && n+2*float64(k) > y {
			quiet++
		} else {
			quiet = 0
		}
		if loDone && quiet > 20 { // past the peak and e^-45 below the sum
			break
		}
	}
	if k == maxTerms { // x far in the upper tail: the sum so far is a lower bound, and so is the largest weight's share
		m := 0.0
		for _, l := range keep {
			if l == top {
				m++
			}
		}
		up = math.Max(up, ChiSquareLogSF(x/top, m))
	}
	return math.Min(0, up), math.Min(0, lo)
}
