package checks

import (
	"fmt"
	"math"
	"slices"

	"github.com/borel-audit/borel/stats"
)

// NullKind names the hypothesis the checks measure against.
type NullKind int

const (
	// Uniform: i.i.d. digits, each with probability 1/b (normality's
	// finite-sample model).
	Uniform NullKind = iota
	// Vector: i.i.d. digits with P(digit = j) = p_j, the Bernoulli product
	// measure μ_p of a stated frequency vector.
	Vector
	// Fitted: i.i.d. digits with p estimated from the data; df drop by the
	// number of fitted parameters.
	Fitted
)

// String names the null as reports do: uniform, vector or fitted.
func (k NullKind) String() string {
	switch k {
	case Vector:
		return "vector"
	case Fitted:
		return "fitted"
	default:
		return "uniform"
	}
}

// Null is a resolved null hypothesis: the digit probabilities are known.
type Null struct {
	Kind NullKind
	P    []float64 // digit probabilities, len = base
	// Digits, for a fitted null, is the number of digits P was estimated
	// from: a check of a tally of exactly these digits sees the estimate's
	// own fluctuations (Chernoff–Lehmann); one of a segment does not.
	Digits int64
}

// UniformNull returns the uniform null of a base.
func UniformNull(base int) Null {
	p := make([]float64, base)
	for i := range p {
		p[i] = 1 / float64(base)
	}
	return Null{Kind: Uniform, P: p}
}

// VectorNull validates p as a frequency vector of the base: base entries,
// each in (0, 1), summing to 1 within 1e-9.
func VectorNull(p []float64, base int) (Null, error) {
	if len(p) != base {
		return Null{}, fmt.Errorf("the null vector has %d entries but base %d needs %d", len(p), base, base)
	}
	sum := 0.0
	for i, v := range p {
		if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 || v >= 1 {
			return Null{}, fmt.Errorf("null vector entry %d is %v; every entry must lie strictly between 0 and 1", i, v)
		}
		sum += v
	}
	if math.Abs(sum-1) > 1e-9 {
		return Null{}, fmt.Errorf("the null vector sums to %.12g, not 1 (tolerance 1e-9)", sum)
	}
	return Null{Kind: Vector, P: slices.Clone(p)}, nil
}

// FittedNull returns the null with p̂_j = N_j/n from the digit counts.
func FittedNull(counts []int64) Null {
	var n int64
	for _, c := range counts {
		n += c
	}
	p := make([]float64, len(counts))
	for i, c := range counts {
		p[i] = float64(c) / float64(n)
	}
	return Null{Kind: Fitted, P: p, Digits: n}
}

// Symbols returns the number of digits with positive null probability.
func (n Null) Symbols() int {
	s := 0
	for _, v := range n.P {
		if v > 0 {
			s++
		}
	}
	return s
}

// MinProb returns the smallest positive digit probability.
func (n Null) MinProb() float64 {
	m := 1.0
	for _, v := range n.P {
		if v > 0 {
			m = math.Min(m, v)
		}
	}
	return m
}

// IsUniform reports whether every digit has probability 1/b exactly
// (the uniform null, as opposed to a vector that happens to be close).
func (n Null) IsUniform() bool { return n.Kind == Uniform }

// BlockProbs returns p(w) = p_{w_1}···p_{w_k} for every k-block w, indexed by
// block value (most significant digit first).
func (n Null) BlockProbs(k int) []float64 {
	probs := []float64{1}
	for range k {
		next := make([]float64, len(probs)*len(n.P))
		for w, pw := range probs {
			for a, pa := range n.P {
				next[w*len(n.P)+a] = pw * pa
			}
		}
		probs = next
	}
	return probs
}

// CrossEntropy returns -Σ_j f_j ln p_j for digit counts with frequencies f.
func (n Null) CrossEntropy(counts []int64) float64 {
	var total int64
	for _, c := range counts {
		total += c
	}
	ce := 0.0
	for j, c := range counts {
		if c > 0 {
			ce -= float64(c) / float64(total) * math.Log(n.P[j])
		}
	}
	return ce
}

var (
	chiSquareLogSF  = stats.ChiSquareLogSF
	chiSquareLogCDF = stats.ChiSquareLogCDF
)
