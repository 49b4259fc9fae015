package stats

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// FrequencyBand returns, for each digit j of probability p[j], the
// two-sided band of the relative frequency N_j/n at the given level under
// i.i.d. digits, by the normal approximation to the binomial:
//
//	p_j ± z_{(1+level)/2} · √(p_j(1 − p_j)/n)
//
// A descriptive guide for plots (each digit on its own, no adjustment for
// the b digits), not a test (Feller, An Introduction to Probability Theory
// and Its Applications, vol. 1, 3rd ed., §VII.3, the de Moivre–Laplace
// theorem).
func FrequencyBand(p []float64, n int64, level float64) (lo, hi []float64) {
	z := distuv.UnitNormal.Quantile((1 + level) / 2)
	lo, hi = make([]float64, len(p)), make([]float64, len(p))
	for j, pj := range p {
		half := z * math.Sqrt(pj*(1-pj)/float64(n))
		lo[j], hi[j] = pj-half, pj+half
	}
	return lo, hi
}

// StandardizedDeviation returns (N − n·p)/√(n·p(1−p)): the count N of a
// digit of probability p among n i.i.d. digits in standard deviations of
// its binomial law; 0 when p is 0 or 1 (no variance).
func StandardizedDeviation(count, n int64, p float64) float64 {
	if p <= 0 || p >= 1 {
		return 0
	}
	nf := float64(n)
	return (float64(count) - nf*p) / math.Sqrt(nf*p*(1-p))
}

// IteratedLogEnvelope returns √(2 ln ln n), the scale of the law of the
// iterated logarithm (Khinchin 1924): for i.i.d. digits the standardized
// deviation of a frequency exceeds (1 + ε) times it only finitely often,
// and comes within (1 − ε) of it infinitely often. Descriptive at any
// finite n; defined for n > e (NaN below).
func IteratedLogEnvelope(n float64) float64 {
	if n <= math.E {
		return math.NaN()
	}
	return math.Sqrt(2 * math.Log(math.Log(n)))
}
