package stats

import (
	"fmt"
	"math"
	"slices"
)

// The multifractal spectrum of the product measure μ_p on [0, 1) that
// draws base-b digits independently with probabilities p (the Bernoulli,
// or multinomial, measure). Its moment function
//
//	τ(q) = −log_b Σ_j p_j^q      (the sum over the digits with p_j > 0)
//
// is concave and smooth; the local dimension of μ_p at a number whose
// digit frequencies are w is α = −Σ_j w_j log_b p_j, and the set of
// numbers with local dimension α has Hausdorff dimension f(α), the
// Legendre transform
//
//	f(α(q)) = q·α(q) − τ(q),   α(q) = τ'(q) = Σ_j w_j(q) (−log_b p_j),
//	w_j(q) = p_j^q / Σ_i p_i^q,
//
// which is the entropy −Σ w_j log_b w_j of the tilted vector w(q): the
// Besicovitch–Eggleston dimension of F(w(q)). So f peaks at q = 0 with
// log_b m (m digits in the support; 1 when every digit is used), meets the
// diagonal f(α) = α at q = 1 where α = H(p)/log b = dim F(p) (μ_p lives on
// F(p)), and ends at α_min = −log_b max p (q → +∞) and α_max = −log_b min p
// (q → −∞) with f = log_b of the number of digits at the extreme. (Falconer,
// Fractal Geometry, 2nd ed. 2003, ch. 17, for the binomial case; Cawley &
// Mauldin, Adv. Math. 92 (1992) 196–236, for the general self-similar
// measure.)

// Spectrum describes the multifractal spectrum of μ_p in base Base.
type Spectrum struct {
	Base     int
	P        []float64 // the vector, every digit
	logP     []float64 // −log_b p_j over the support
	AlphaMin float64   // −log_b max p: where f ends as q → +∞
	AlphaMax float64   // −log_b min p (over the support): q → −∞
	FMin     float64   // f at α_min: log_b of how many digits have max p
	FMax     float64   // f at α_max: log_b of how many digits have min p
	Peak     float64   // max f = log_b m, at q = 0
	AlphaPk  float64   // α(0), where f peaks: the mean of −log_b p_j over the support
	AlphaH   float64   // H(p)/log b: the point where f(α) = α (q = 1)
}

// NewSpectrum returns the spectrum of the vector p (entries ≥ 0 summing to
// 1, at most base of them) in base b.
func NewSpectrum(p []float64, base int) (*Spectrum, error) {
	if base < 2 || len(p) > base {
		return nil, fmt.Errorf("a vector of %d entries in base %d", len(p), base)
	}
	s := &Spectrum{Base: base, P: slices.Clone(p)}
	lb := math.Log(float64(base))
	maxP, minP, sum := 0.0, 1.0, 0.0
	for _, v := range p {
		if !(v >= 0 && v <= 1) {
			return nil, fmt.Errorf("entry %v is not a probability", v)
		}
		sum += v
		if v > 0 {
			s.logP = append(s.logP, -math.Log(v)/lb)
			maxP, minP = max(maxP, v), min(minP, v)
		}
	}
	if math.Abs(sum-1) > 1e-9 {
		return nil, fmt.Errorf("the vector sums to %.12g, not 1", sum)
	}
	nMax, nMin := 0, 0
	for _, v := range p {
		if v > 0 && v >= maxP*(1-1e-12) {
			nMax++
		}
		if v > 0 && v <= minP*(1+1e-12) {
			nMin++
		}
	}
	s.AlphaMin, s.AlphaMax = -math.Log(maxP)/lb, -math.Log(minP)/lb
	s.FMin, s.FMax = math.Log(float64(nMax))/lb, math.Log(float64(nMin))/lb
	m := float64(len(s.logP))
	s.Peak = math.Log(m) / lb
	for _, a := range s.logP {
		s.AlphaPk += a / m
	}
	s.AlphaH = BesicovitchEgglestonDimension(p, base)
	return s, nil
}

// Tau returns τ(q) = −log_b Σ p_j^q (over the support), by a log-sum-exp
// that holds for large |q|.
func (s *Spectrum) Tau(q float64) float64 {
	lb := math.Log(float64(s.Base))
	// ln Σ exp(−q·a_j·ln b), a_j = −log_b p_j
	top := math.Inf(-1)
	for _, a := range s.logP {
		top = max(top, -q*a*lb)
	}
	var z float64
	for _, a := range s.logP {
		z += math.Exp(-q*a*lb - top)
	}
	return -(top + math.Log(z)) / lb
}

// At returns the Legendre pair at q: α(q) = τ'(q) and f(α(q)) = q·α(q) −
// τ(q), both from the tilted vector w(q) (α its mean of −log_b p_j, f its
// entropy in base b), which keeps f ≥ 0 without cancellation. q = ±Inf
// gives the end points.
func (s *Spectrum) At(q float64) (alpha, f float64) {
	switch {
	case math.IsInf(q, 1):
		return s.AlphaMin, s.FMin
	case math.IsInf(q, -1):
		return s.AlphaMax, s.FMax
	}
	lb := math.Log(float64(s.Base))
	top := math.Inf(-1)
	for _, a := range s.logP {
		top = max(top, -q*a*lb)
	}
	w := make([]float64, len(s.logP))
	var z float64
	for j, a := range s.logP {
		w[j] = math.Exp(-q*a*lb - top)
		z += w[j]
	}
	for j, a := range s.logP {
		wj := w[j] / z
		alpha += wj * a
		if wj > 0 {
			f -= wj * math.Log(wj) / lb
		}
	}
	return alpha, f
}

// F returns f(α) and the q where α(q) = α, for α in [α_min, α_max] (α(q)
// falls as q grows: bisection on q, then on q's reciprocal when |q| is
// large). Outside the interval, f is −∞ (no number has that local
// dimension) and ok is false.
func (s *Spectrum) F(alpha float64) (f, q float64, ok bool) {
	const tol = 1e-12
	switch {
	case alpha < s.AlphaMin-tol || alpha > s.AlphaMax+tol:
		return math.Inf(-1), math.NaN(), false
	case s.AlphaMax-s.AlphaMin < tol: // a single point: p uniform on its support
		return s.Peak, 0, true
	case alpha <= s.AlphaMin+tol:
		return s.FMin, math.Inf(1), true
	case alpha >= s.AlphaMax-tol:
		return s.FMax, math.Inf(-1), true
	}
	lo, hi := -1.0, 1.0 // α(lo) ≥ α ≥ α(hi)
	for a, _ := s.At(lo); a < alpha; a, _ = s.At(lo) {
		lo *= 2
	}
	for a, _ := s.At(hi); a > alpha; a, _ = s.At(hi) {
		hi *= 2
	}
	for range 200 {
		mid := (lo + hi) / 2
		if a, _ := s.At(mid); a > alpha {
			lo = mid
		} else {
			hi = mid
		}
		if hi-lo < 1e-13*max(1, math.Abs(mid)) {
			break
		}
	}
	q = (lo + hi) / 2
	_, f = s.At(q)
	return f, q, true
}

// RestrictedDimension returns the Hausdorff dimension of the set of
// numbers in [0, 1] whose base-b digits all lie in a set of m allowed
// digits: log m / log b (the middle-third Cantor set: base 3, digits {0, 2},
// log 2/log 3; Hausdorff 1919, Falconer ch. 2 and 9). It is the peak of
// the spectrum of μ_p for p uniform on the allowed digits, and the largest
// Besicovitch–Eggleston dimension on the face of the simplex they span.
func RestrictedDimension(m, base int) float64 {
	return math.Log(float64(m)) / math.Log(float64(base))
}
