package stats

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// Where a digit sequence sits among the sets F(q): its frequency vector q̂
// with a confidence region, and its local dimension under a stated p.

// FrequencyRegion is the confidence region for a multinomial frequency
// vector from counts n_j (n in all, S cells): the inversion of Pearson's
// chi-square test,
//
//	R = { q : n Σ_j (q̂_j − q_j)² / q_j ≤ A },  A = χ²_{S−1}(c),
//
// with coverage c asymptotically (Pearson's X² is χ²_{S−1} at the true q).
// Its projections on the coordinates are the simultaneous intervals of
// Quesenberry & Hurst (Technometrics 6 (1964) 191–195): q_j in
//
//	[A + 2n_j ∓ √(A·(A + 4 n_j (n − n_j)/n))] / (2(n + A)),
//
// the roots of n(q̂_j − q_j)² = A·q_j(1 − q_j); all S hold at once with
// probability at least c. A cell never seen keeps an upper end A/(n + A).
type FrequencyRegion struct {
	N          int64
	QHat       []float64
	A          float64 // χ²_{S−1} quantile at the level
	Low, High  []float64
	Confidence float64
}

// NewFrequencyRegion returns the region at confidence c for the counts.
func NewFrequencyRegion(counts []int64, c float64) FrequencyRegion {
	var n int64
	for _, v := range counts {
		n += v
	}
	S := len(counts)
	r := FrequencyRegion{N: n, Confidence: c, QHat: make([]float64, S), Low: make([]float64, S), High: make([]float64, S)}
	if n == 0 || S < 2 {
		return r
	}
	r.A = ChiSquareQuantile(c, float64(S-1))
	nf := float64(n)
	for j, v := range counts {
		nj := float64(v)
		r.QHat[j] = nj / nf
		root := math.Sqrt(r.A * (r.A + 4*nj*(nf-nj)/nf))
		r.Low[j] = math.Max(0, (r.A+2*nj-root)/(2*(nf+r.A)))
		r.High[j] = math.Min(1, (r.A+2*nj+root)/(2*(nf+r.A)))
	}
	return r
}

// Contains reports whether the vector q lies in the region.
func (r FrequencyRegion) Contains(q []float64) bool {
	var x float64
	for j := range q {
		if q[j] <= 0 {
			if r.QHat[j] > 0 {
				return false
			}
			continue
		}
		d := r.QHat[j] - q[j]
		x += d * d / q[j]
	}
	return float64(r.N)*x <= r.A
}

// Boundary returns the point of the region's boundary in direction u from
// q̂ (u a vector with Σ u_j = 0, not all 0): q̂ + t·u with the largest t for
// which it lies in the region and in the simplex (bisection; the Pearson
// distance grows along the ray).
func (r FrequencyRegion) Boundary(u []float64) []float64 {
	at := func(t float64) []float64 {
		q := make([]float64, len(u))
		for j := range u {
			q[j] = r.QHat[j] + t*u[j]
		}
		return q
	}
	// The largest t that keeps every q_j ≥ 0.
	tMax := math.Inf(1)
	for j := range u {
		if u[j] < 0 {
			tMax = math.Min(tMax, r.QHat[j]/-u[j])
		}
	}
	if math.IsInf(tMax, 1) {
		tMax = 1
	}
	if r.Contains(at(tMax)) {
		return at(tMax)
	}
	lo, hi := 0.0, tMax
	for range 100 {
		mid := (lo + hi) / 2
		if r.Contains(at(mid)) {
			lo = mid
		} else {
			hi = mid
		}
	}
	return at(lo)
}

// LocalDimension is the local dimension of μ_p along a sequence with digit
// frequencies q̂ (n digits): α̂ = −Σ q̂_j log_b p_j, the exponent with which
// μ_p gives the sequence's n-digit cylinder measure b^(−n·α̂). With
// a_j = −log_b p_j it is the mean of a over the digits, so for independent
// digits its standard error is √((Σ q̂_j a_j² − α̂²)/n) (the central limit
// theorem; a normal interval at level c). A digit the sequence uses that p
// excludes makes α̂ infinite (the sequence is outside μ_p's support).
func LocalDimension(counts []int64, p []float64, base int, c float64) (alpha, lo, hi float64) {
	var n int64
	for _, v := range counts {
		n += v
	}
	if n == 0 {
		return math.NaN(), math.NaN(), math.NaN()
	}
	lb := math.Log(float64(base))
	var m1, m2 float64
	for j, v := range counts {
		if v == 0 {
			continue
		}
		if j >= len(p) || p[j] <= 0 {
			return math.Inf(1), math.Inf(1), math.Inf(1)
		}
		a := -math.Log(p[j]) / lb
		q := float64(v) / float64(n)
		m1 += q * a
		m2 += q * a * a
	}
	se := math.Sqrt(math.Max(0, m2-m1*m1) / float64(n))
	z := distuv.UnitNormal.Quantile(1 - (1-c)/2)
	return m1, m1 - z*se, m1 + z*se
}

// MarkovOrderG is the statistic of the likelihood-ratio test of a Markov
// chain of order k−1 against order k from the plug-in conditional entropies
// of the k−1 and k preceding digits (nats), n transitions and S digits seen:
//
//	G = 2n(ĥ_{k−1} − ĥ_k),  df = S^(k−1)·(S − 1)²
//
// (Anderson & Goodman, Ann. Math. Statist. 28 (1957) 89–110; Billingsley,
// Statistical Inference for Markov Processes, 1961). At k = 1 it is the G
// test of independence of consecutive digits. It returns G and df: G is
// χ²(df) asymptotically under order k−1 (ChiSquareLogSF gives the tail;
// the entropy check scales G by its exact null mean first).
func MarkovOrderG(hPrev, h float64, n int64, S, k int) (g, df float64) {
	g = math.Max(0, 2*float64(n)*(hPrev-h))
	df = math.Pow(float64(S), float64(k-1)) * float64(S-1) * float64(S-1)
	return g, df
}
