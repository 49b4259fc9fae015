package stats

import "math"

// PlugInEntropy returns the plug-in (maximum-likelihood) entropy in nats of
// the empirical distribution given by counts,
//
//	Ĥ = -Σ_i (n_i/M) ln(n_i/M),   M = Σ_i n_i,   0·ln 0 = 0,
//
// together with M and the number K̂ of non-empty cells. Ĥ is biased low by
// about (K-1)/(2M) (Miller 1955). All-zero counts give Ĥ = 0, M = 0.
func PlugInEntropy(counts []int64) (h float64, total int64, occupied int) {
	for _, c := range counts {
		if c > 0 {
			total += c
			occupied++
		}
	}
	if total == 0 {
		return 0, 0, 0
	}
	m := float64(total)
	var s float64
	for _, c := range counts {
		if c > 0 {
			if c < int64(len(cLogC)) {
				s += cLogC[c] // the same float64 as below, from a table
			} else {
				s += float64(c) * math.Log(float64(c))
			}
		}
	}
	return math.Log(m) - s/m, total, occupied
}

// cLogC[c] = c·ln c for small counts: the tables of long block lengths hold
// millions of cells with counts of a few dozen, and a table lookup is much
// cheaper than a logarithm.
var cLogC = func() []float64 {
	t := make([]float64, 1<<12)
	for c := 1; c < len(t); c++ {
		t[c] = float64(c) * math.Log(float64(c))
	}
	return t
}()

// MillerMadowFrom is MillerMadowEntropy from PlugInEntropy's results.
func MillerMadowFrom(h float64, total int64, occupied int) float64 {
	if total == 0 {
		return 0
	}
	return h + float64(occupied-1)/(2*float64(total))
}

// MillerMadowEntropy returns the Miller–Madow bias-corrected entropy in nats,
//
//	Ĥ_MM = Ĥ + (K̂ - 1)/(2M),
//
// where Ĥ is the plug-in estimate, K̂ the number of non-empty cells and M the
// sample size. Reference: Miller, G. A. (1955), in Quastler (ed.),
// Information Theory in Psychology, 95–100.
func MillerMadowEntropy(counts []int64) float64 {
	return MillerMadowFrom(PlugInEntropy(counts))
}

// VectorEntropy returns H(p) = -Σ p_j ln p_j in nats (0·ln 0 = 0).
func VectorEntropy(p []float64) float64 {
	var h float64
	for _, v := range p {
		if v > 0 {
			h -= v * math.Log(v)
		}
	}
	return h
}

// BesicovitchEgglestonDimension returns the Hausdorff dimension of the set of
// numbers whose base-b digit frequencies equal p,
//
//	dim F(p) = H(p) / ln b = -Σ p_j ln p_j / ln b.
//
// References: Besicovitch, Math. Ann. 110 (1934) 321–330 (b = 2);
// Eggleston, Quart. J. Math. Oxford 20 (1949) 31–36.
func BesicovitchEgglestonDimension(p []float64, base int) float64 {
	return VectorEntropy(p) / math.Log(float64(base))
}

// BinomialGMean returns the exact null mean of one cell's part of the
// G-statistic, 2·E[X ln(X/(N f))] for X ~ Binomial(N, f) (the term is 0 at
// X = 0). Summed over the cells of a multinomial it is E[G] for N trials,
// whose expansion (S−1) + (Σ_j 1/f_j − 1)/(6N) + O(N^-2) is the
// correction of Williams (Biometrika 63 (1976) 33–37); with a few trials
// per cell the O(N^-2) terms matter, and this sum has them all. The terms
// are summed over mean ± 12 standard deviations (the rest of the binomial
// mass is below 1e-30), from the log-factorial table lnFact (lnFact[x] =
// ln x!, at least N+1 entries).
func BinomialGMean(N int64, f float64, lnFact []float64) float64 {
	if N <= 0 || !(f > 0) {
		return 0
	}
	if f >= 1 {
		return 0 // X = N always: N ln(N/N) = 0
	}
	mean := float64(N) * f
	sd := math.Sqrt(mean * (1 - f))
	lo := max(int64(1), int64(math.Floor(mean-12*sd-1)))
	hi := min(N, int64(math.Ceil(mean+12*sd+1)))
	lf, lq := math.Log(f), math.Log1p(-f)
	lnNf := math.Log(mean)
	s := 0.0
	for x := lo; x <= hi; x++ {
		lp := lnFact[N] - lnFact[x] - lnFact[N-x] + float64(x)*lf + float64(N-x)*lq
		s += math.Exp(lp) * float64(x) * (math.Log(float64(x)) - lnNf)
	}
	return 2 * s
}

// LnFactorials returns ln x! for x = 0..n.
func LnFactorials(n int64) []float64 {
	t := make([]float64, n+1)
	for x := int64(2); x <= n; x++ {
		t[x] = t[x-1] + math.Log(float64(x))
	}
	return t
}
