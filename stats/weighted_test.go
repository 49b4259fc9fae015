package stats

import (
	"math"
	"testing"
)

// Tails of Σ λ_i χ²_1 against mpmath 1.2 (25 digits): the upper tail by
// direct convolution, P(Q > x) = ∫_0^x f_{λ3 χ²_1}(u) P(Q' > x − u) du +
// P(λ3 χ²_1 > x), nested once more for three weights, with the regularized
// incomplete gamma for the χ² tails (Imhof's oscillating integral was not
// accurate enough for a reference: 0.01100 instead of 0.010145 at λ = (0.9,
// 0.05), x = 6, where a 10^8-draw Monte Carlo gives 0.01015). One weight:
// Q/λ is χ²_1 (scipy.stats.chi2.sf(5/0.7, 1) = 0.00751622…).
func TestWeightedChiSquareTails(t *testing.T) {
	for _, c := range []struct {
		lam     []float64
		x, want float64 // want: P(Q > x)
	}{
		{[]float64{1, 0.6, 0.2}, 0.3, 0.8987102637789951},
		{[]float64{1, 0.6, 0.2}, 3, 0.1759572208347839},
		{[]float64{1, 0.6, 0.2}, 10, 0.003077477194514871},
		{[]float64{1, 0.6, 0.2}, 25, 1.052250158228105e-6},
		{[]float64{1, 0.6, 0.2}, 60, 1.701968601785139e-14},
		{[]float64{1, 1, 0.35}, 0.05, 0.9950939188650563},
		{[]float64{1, 1, 0.35}, 2, 0.4485089971931513},
		{[]float64{1, 1, 0.35}, 8, 0.02271686454616492},
		{[]float64{1, 1, 0.35}, 30, 3.794251313366563e-7},
		{[]float64{1, 1, 0.35}, 80, 5.269434924960219e-18},
		{[]float64{0.9, 0.05}, 1, 0.3050202402808769},
		{[]float64{0.9, 0.05}, 6, 0.0101450287571597},
		{[]float64{0.9, 0.05}, 40, 2.694363895129435e-11},
	} {
		up, lo := WeightedChiSquareLogTails(c.x, c.lam)
		if math.Abs(math.Exp(up)-c.want) > 1e-7*c.want {
			t.Errorf("λ %v, x %g: upper %.16g, want %.16g", c.lam, c.x, math.Exp(up), c.want)
		}
		if wantLo := 1 - c.want; math.Abs(math.Exp(lo)-wantLo) > 1e-7*math.Max(wantLo, 1e-9) {
			t.Errorf("λ %v, x %g: lower %.16g, want %.16g", c.lam, c.x, math.Exp(lo), wantLo)
		}
	}
	// Lower tails near 0: λ = (1, 1, 0.35) at x = 0.05 and (0.9, 0.05) at
	// x = 0.01 (the same mpmath convolution, for P(Q ≤ x)).
	for _, c := range []struct {
		lam     []float64
		x, want float64
	}{
		{[]float64{1, 1, 0.35}, 0.05, 0.004906081134943691},
		{[]float64{0.9, 0.05}, 0.01, 0.02296324414236753},
	} {
		_, lo := WeightedChiSquareLogTails(c.x, c.lam)
		if math.Abs(math.Exp(lo)-c.want) > 1e-6*c.want {
			t.Errorf("λ %v, x %g: lower %.16g, want %.16g", c.lam, c.x, math.Exp(lo), c.want)
		}
	}
	up, _ := WeightedChiSquareLogTails(5, []float64{0.7})
	if want := math.Exp(ChiSquareLogSF(5/0.7, 1)); math.Abs(math.Exp(up)-want) > 1e-12 {
		t.Errorf("one weight: %g, want %g", math.Exp(up), want)
	}
	// Equal weights are χ² with that many df.
	up, lo := WeightedChiSquareLogTails(7, []float64{1, 1, 1, 1})
	if math.Abs(up-ChiSquareLogSF(7, 4)) > 1e-12 || math.Abs(lo-ChiSquareLogCDF(7, 4)) > 1e-12 {
		t.Errorf("equal weights: %g %g", up, lo)
	}
	// Far tail: finite and below the χ²(3) bound (every λ ≤ 1).
	up, _ = WeightedChiSquareLogTails(2000, []float64{1, 0.6, 0.2})
	if math.IsInf(up, 0) || up > ChiSquareLogSF(2000, 3) || up < ChiSquareLogSF(2000, 1)-10 {
		t.Errorf("far tail ln p %g outside (%g, %g)", up, ChiSquareLogSF(2000, 1), ChiSquareLogSF(2000, 3))
	}
}
