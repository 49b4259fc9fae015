package stats

import (
	"math"
	"testing"
)

// closeTo reports whether got is within an absolute or relative tolerance of want.
func closeTo(got, want, tol float64) bool {
	if math.IsInf(want, 0) {
		return got == want
	}
	d := math.Abs(got - want)
	return d <= tol || d <= tol*math.Abs(want)
}

// Reference values: mpmath 1.2.1 (Debian python3-mpmath) at 50 digits,
// ln gammainc(df/2, x/2, inf, regularized=True) and its lower counterpart.
var chiSquareCases = []struct {
	df, x      float64
	lnQ, lnP   float64
	whyChecked string
}{
	{9, 100, -38.690632938879074, -1.5735176303753944e-17, "mpmath 1.2: 1-cdf gives 0 here"},
	{9, 150, -62.295402689932206, -8.8196299548054143e-28, "mpmath 1.2"},
	{100, 200, -18.256480667091793, -1.1784500790416652e-8, "mpmath 1.2"},
	{9, 5000, -2475.068175113051, 0, "far tail, below double underflow"},
	{9, 72519.6, -36225.509012653212, 0, "Champernowne 1e6 digits, X² from exact counts"},
	{46655, 46655, -0.6948900434148959, -0.69140734999183202, "b=36,k=3 df, centre"},
	{46655, 47500, -5.8217434574659676, -0.0029668324572977542, "large df, upper"},
	{46655, 45800, -0.0024487585678442621, -6.0133982192803818, "large df, lower"},
	{9, 0.5, -3.0434204276776058e-5, -10.399958658428612, "too-uniform example, mpmath 1.2"},
	{4, 1.6, -0.21221333509788101, -1.6543941464231031, "Good's differences of ε = 0011011101"},
	{2, 0.8, -0.40000000000000002, -1.109632931588928, "Good's differences of ε = 0011011101"},
	{9, 5.5091, -0.23842846550741429, -1.5505326302713023, "pi 1e6 decimals, X² of the published counts"},
	{900, 863.80, -0.22050660983589707, -1.6200557679488951, "pi serial k=3, computed with scipy 1.10 / mpmath 1.2"},
	{1e6, 1e6 + 3000, -4.0735557782050272, -0.017163221984885311, "df 1e6"},
}

func TestChiSquareTailsAgainstMpmath(t *testing.T) {
	for _, c := range chiSquareCases {
		if got := ChiSquareLogSF(c.x, c.df); !closeTo(got, c.lnQ, 1e-9) {
			t.Errorf("ln Q(df=%g, x=%g) = %.17g, want %.17g (%s)", c.df, c.x, got, c.lnQ, c.whyChecked)
		}
		if got := ChiSquareLogCDF(c.x, c.df); !closeTo(got, c.lnP, 1e-9) {
			t.Errorf("ln P(df=%g, x=%g) = %.17g, want %.17g (%s)", c.df, c.x, got, c.lnP, c.whyChecked)
		}
	}
}

// p-values of Good's differences for ε = 0011011101 (computed with scipy 1.10 / mpmath 1.2):
// p = 0.808792 (∇ψ² = 1.6, 4 df) and 0.670320 (∇²ψ² = 0.8, 2 df).
func TestChiSquareGoodExample(t *testing.T) {
	if p := math.Exp(ChiSquareLogSF(1.6, 4)); !closeTo(p, 0.808792, 1e-6) {
		t.Errorf("p(1.6; 4) = %.6f, want 0.808792", p)
	}
	if p := math.Exp(ChiSquareLogSF(0.8, 2)); !closeTo(p, 0.670320, 1e-6) {
		t.Errorf("p(0.8; 2) = %.6f, want 0.670320", p)
	}
}

// Percentage points from the standard chi-square table (Abramowitz & Stegun
// Table 26.8 [table number from memory]; Biometrika Tables vol. 1), as
// recomputed with scipy 1.10 stats.chi2.ppf.
func TestChiSquareQuantileHandbook(t *testing.T) {
	cases := []struct{ df, p95, p99, p01 float64 }{
		{1, 3.8415, 6.6349, 0.000157},
		{9, 16.919, 21.666, 2.0879},
		{15, 24.996, 30.578, 5.2293},
		{90, 113.145, 124.116, 61.754},
		{100, 124.342, 135.807, 70.065},
		{255, 293.248, 310.457, 205.421},
		{900, 970.904, 1001.630, 804.252},
	}
	for _, c := range cases {
		for _, q := range []struct{ prob, want float64 }{{0.95, c.p95}, {0.99, c.p99}, {0.01, c.p01}} {
			got := ChiSquareQuantile(q.prob, c.df)
			// The table prints 5 significant digits.
			if !closeTo(got, q.want, 6e-5) {
				t.Errorf("χ²(%g) quantile %.2f = %.6g, want %.6g", c.df, q.prob, got, q.want)
			}
		}
	}
}

// mpmath 1.2.1: log(erfc(z/sqrt(2))/2) at 50 digits gives
// Φc(5) = 2.866516e-7, Φc(10) = 7.619853e-24, log10 Φc(40) = -349.4370.
func TestNormalLogSF(t *testing.T) {
	cases := []struct{ z, want float64 }{
		{5, -15.064998393988726},
		{10, -53.231285150512471},
		{38, -726.55721601882013},
		{40, -804.60844201375379},
	}
	for _, c := range cases {
		if got := NormalLogSF(c.z); !closeTo(got, c.want, 1e-10) {
			t.Errorf("ln Φc(%g) = %.17g, want %.17g", c.z, got, c.want)
		}
	}
	if got := NormalLogSF(40) / math.Ln10; !closeTo(got, -349.4370, 1e-4) {
		t.Errorf("log10 Φc(40) = %.4f, want -349.4370 (mpmath 1.2)", got)
	}
}
