package stats

import (
	"compress/gzip"
	"io"
	"math"
	"os"
	"strings"
	"testing"
)

// piDecimals returns the first n decimals of π from the test data.
func piDecimals(t *testing.T, n int) []int {
	t.Helper()
	f, err := os.Open("../testdata/pi-1e6.txt.gz")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	z, err := gzip.NewReader(f)
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]byte, n+2)
	if _, err := io.ReadFull(z, buf); err != nil {
		t.Fatal(err)
	}
	s := strings.TrimPrefix(string(buf), "3.")
	d := make([]int, n)
	for i := range d {
		d[i] = int(s[i] - '0')
	}
	return d
}

// The first 1000 decimals of π against Debian's python3-scipy 1.10: the
// Quesenberry–Hurst ends as roots of n(q̂ − q)² = A·q(1 − q) found by
// scipy.optimize.brentq with A = chi2.ppf(0.99, 9); the G test of
// independence of (cyclically) consecutive digits by
// scipy.stats.chi2_contingency(lambda_="log-likelihood"); the local
// dimension and its normal interval by numpy.
func TestPositionAgainstScipy(t *testing.T) {
	d := piDecimals(t, 1000)
	counts := make([]int64, 10)
	for _, x := range d {
		counts[x]++
	}
	r := NewFrequencyRegion(counts, 0.99)
	if math.Abs(r.A-21.665994333461924) > 1e-9 {
		t.Errorf("A = %.15g", r.A)
	}
	for _, c := range []struct {
		j      int
		lo, hi float64
	}{{0, 0.05846524511476776, 0.14479687331263838}, {5, 0.06160832697629829, 0.14948413918155115}, {9, 0.0687546260545983, 0.15995612249674832}} {
		if math.Abs(r.Low[c.j]-c.lo) > 1e-12 || math.Abs(r.High[c.j]-c.hi) > 1e-12 {
			t.Errorf("digit %d: [%.15g, %.15g], scipy [%.15g, %.15g]", c.j, r.Low[c.j], r.High[c.j], c.lo, c.hi)
		}
	}
	// Plug-in entropies of digits and cyclic pairs give the contingency G.
	var pairs [100]int64
	for i := range d {
		pairs[d[i]*10+d[(i+1)%len(d)]]++
	}
	h1, _, _ := PlugInEntropy(counts)
	h2, _, _ := PlugInEntropy(pairs[:])
	g, df := MarkovOrderG(h1, h2-h1, int64(len(d)), 10, 1)
	logP := ChiSquareLogSF(g, df)
	if math.Abs(g-85.45262699385987) > 1e-9 || df != 81 || math.Abs(logP-(-1.0609441268887592)) > 1e-9 {
		t.Errorf("G %.15g df %g ln p %.15g", g, df, logP)
	}
	p := []float64{0.05, 0.05, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.15, 0.15}
	a, lo, hi := LocalDimension(counts, p, 10, 0.99)
	if math.Abs(a-1.026464378469246) > 1e-12 || math.Abs(lo-1.0136737056822276) > 1e-9 || math.Abs(hi-1.0392550512562644) > 1e-9 {
		t.Errorf("α̂ %.15g [%.15g, %.15g]", a, lo, hi)
	}
	if a, _, _ := LocalDimension(counts, []float64{0.5, 0.5}, 10, 0.99); !math.IsInf(a, 1) {
		t.Errorf("digits outside p's support: α̂ = %g, want +Inf", a)
	}
}

// The region's boundary points lie on its boundary (Pearson distance A/n)
// and the region covers the true vector at its level: 4000 seeded samples
// of 500 digits from a three-digit vector, 99% asked; the binomial
// standard error of the rate is 0.16%, the bound 3 of them.
func TestFrequencyRegionCoverage(t *testing.T) {
	p := []float64{0.5, 0.3, 0.2}
	x := uint64(88172645463325252)
	next := func() float64 {
		x ^= x << 13
		x ^= x >> 7
		x ^= x << 17
		return float64(x>>11) / (1 << 53)
	}
	const trials, n = 4000, 500
	covered := 0
	for range trials {
		counts := make([]int64, 3)
		for range n {
			u := next()
			switch {
			case u < p[0]:
				counts[0]++
			case u < p[0]+p[1]:
				counts[1]++
			default:
				counts[2]++
			}
		}
		r := NewFrequencyRegion(counts, 0.99)
		if r.Contains(p) {
			covered++
		}
	}
	rate := float64(covered) / trials
	if math.Abs(rate-0.99) > 3*math.Sqrt(0.99*0.01/trials) {
		t.Errorf("coverage %.4f at 99%%", rate)
	}
	r := NewFrequencyRegion([]int64{260, 140, 100}, 0.99)
	for _, u := range [][]float64{{1, -1, 0}, {0, 1, -1}, {-1, 0.5, 0.5}, {0.3, 0.2, -0.5}} {
		q := r.Boundary(u)
		var x2 float64
		for j := range q {
			x2 += (r.QHat[j] - q[j]) * (r.QHat[j] - q[j]) / q[j]
		}
		if math.Abs(500*x2-r.A) > 1e-6 {
			t.Errorf("direction %v: n·X² = %g at the boundary, A = %g", u, 500*x2, r.A)
		}
	}
}
