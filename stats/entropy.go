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
