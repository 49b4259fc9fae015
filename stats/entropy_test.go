package stats

import (
	"math"
	"testing"
)

// computed with scipy 1.10 / mpmath 1.2: counts (5,3,1,1,0), M = 10 → plug-in 1.168282,
// Miller–Madow 1.318282 nats.
func TestEntropyEstimators(t *testing.T) {
	counts := []int64{5, 3, 1, 1, 0}
	h, m, k := PlugInEntropy(counts)
	if !closeTo(h, 1.168282, 1e-6) || m != 10 || k != 4 {
		t.Errorf("plug-in = %.6f (M=%d, K=%d), want 1.168282 (10, 4)", h, m, k)
	}
	if mm := MillerMadowEntropy(counts); !closeTo(mm, 1.318282, 1e-6) {
		t.Errorf("Miller–Madow = %.6f, want 1.318282", mm)
	}
}

// Besicovitch–Eggleston values (computed with scipy 1.10 / mpmath 1.2): b=2, p=(1/3,2/3) → 0.918296;
// b=10 with five digits at 1/5 → ln5/ln10 = 0.698970; the middle-third
// Cantor set b=3, p=(1/2,0,1/2) → ln2/ln3 = 0.630930.
func TestBesicovitchEgglestonDimension(t *testing.T) {
	cases := []struct {
		p    []float64
		base int
		want float64
	}{
		{[]float64{1.0 / 3, 2.0 / 3}, 2, 0.918296},
		{[]float64{.2, 0, .2, 0, .2, 0, .2, 0, .2, 0}, 10, 0.698970},
		{[]float64{.5, 0, .5}, 3, 0.630930},
		{[]float64{.1, .1, .1, .1, .1, .1, .1, .1, .1, .1}, 10, 1},
	}
	for _, c := range cases {
		if got := BesicovitchEgglestonDimension(c.p, c.base); !closeTo(got, c.want, 1e-6) {
			t.Errorf("dim F(%v) in base %d = %.6f, want %.6f", c.p, c.base, got, c.want)
		}
	}
}

// scipy 1.10.1 (Debian python3-scipy): scipy.stats.ncx2.cdf(x, df, nc).
func TestNoncentralChiSquareCDF(t *testing.T) {
	cases := []struct{ x, df, nc, want float64 }{
		{15, 9, 3.5, 0.7115346566687217},
		{120, 90, 20, 0.7421478107645406},
		{1e4, 9000, 500, 0.9997496883447375},
		{5e3, 9, 4000, 0.9999999999999384},
	}
	for _, c := range cases {
		if got := NoncentralChiSquareCDF(c.x, c.df, c.nc); !closeTo(got, c.want, 1e-10) {
			t.Errorf("ncx2.cdf(%g; %g, %g) = %.16g, want %.16g", c.x, c.df, c.nc, got, c.want)
		}
	}
	// λ = 0 is the central law.
	if got, want := NoncentralChiSquareCDF(5.5091, 9, 0), math.Exp(-1.5505326302713023); !closeTo(got, want, 1e-12) {
		t.Errorf("λ=0: %g, want %g", got, want)
	}
}

// The interval must cover: at its ends the CDF equals the target levels.
func TestNoncentralityInterval(t *testing.T) {
	lo, hi := NoncentralityInterval(200, 9, 0.95)
	if !closeTo(NoncentralChiSquareCDF(200, 9, lo), 0.975, 1e-8) ||
		!closeTo(NoncentralChiSquareCDF(200, 9, hi), 0.025, 1e-8) {
		t.Errorf("interval [%g, %g] does not hit 0.975/0.025", lo, hi)
	}
	if !(lo < 191 && 191 < hi) { // E[X] = df + λ, so λ ≈ 191 is central
		t.Errorf("interval [%g, %g] misses the moment estimate 191", lo, hi)
	}
	// A statistic below the df: the data are consistent with λ = 0.
	if lo, _ := NoncentralityInterval(5, 9, 0.95); lo != 0 {
		t.Errorf("lower end for stat 5 on 9 df = %g, want 0", lo)
	}
}

// Check values from mpmath 1.2.1 at 30 digits, from the definition
// 2·Σ_{x=1}^{N} C(N,x) f^x (1−f)^(N−x) x ln(x/(N f)).
func TestBinomialGMean(t *testing.T) {
	lf := LnFactorials(400)
	for _, c := range []struct {
		N    int64
		f    float64
		want float64
	}{{10, 0.3, 0.779732536584955202810745277976}, {17, 1.0 / 3, 0.698317228559920360358795312905},
		{50, 0.5, 0.505140970480615048761609489602}, {400, 0.01, 1.05423134706965844933565375575}} {
		if got := BinomialGMean(c.N, c.f, lf); math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("N=%d f=%g: %.15g, want %.15g", c.N, c.f, got, c.want)
		}
	}
	if BinomialGMean(0, 0.5, lf) != 0 || BinomialGMean(5, 1, lf) != 0 {
		t.Error("degenerate cells must give 0")
	}
}
