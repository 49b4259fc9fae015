package checks

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
	"github.com/borel-audit/borel/stats/expand"
)

// Poker probabilities, Knuth's formula (TAOCP §3.3.2 D); numbers
// computed with scipy 1.10 / mpmath 1.2: P(R = r) for (b, h).
func TestPokerProbs(t *testing.T) {
	uni := func(b int) []float64 {
		p := make([]float64, b)
		for i := range p {
			p[i] = 1 / float64(b)
		}
		return p
	}
	cases := []struct {
		b, h int
		want []float64 // r = 1..h
	}{
		{10, 5, []float64{0.0001, 0.0135, 0.18, 0.504, 0.3024}},
		{10, 4, []float64{0.001, 0.063, 0.432, 0.504}},
		{16, 4, []float64{0.000244, 0.025635, 0.307617, 0.666504}},
		{8, 4, []float64{0.001953, 0.095703, 0.492188, 0.410156}},
	}
	for _, c := range cases {
		got := PokerProbs(uni(c.b), c.h)
		for r, w := range c.want {
			if math.Abs(got[r+1]-w) > 5.01e-7 { // the table is rounded to 6 decimals
				t.Errorf("b=%d h=%d: P(R=%d) = %.6f, want %.6f", c.b, c.h, r+1, got[r+1], w)
			}
		}
	}
	// A non-uniform vector: the probabilities still sum to 1 and R=1 is Σ p_j^h.
	p := []float64{0.5, 0.3, 0.2}
	got := PokerProbs(p, 4)
	sum := 0.0
	for _, v := range got {
		sum += v
	}
	if math.Abs(sum-1) > 1e-12 || math.Abs(got[1]-(math.Pow(.5, 4)+math.Pow(.3, 4)+math.Pow(.2, 4))) > 1e-12 {
		t.Errorf("vector poker law %v (sum %g)", got, sum)
	}
}

// Coupon-collector law (computed with scipy 1.10 / mpmath 1.2): d = 10: P(T = 10..21) =
// 0.000363, 0.001633, 0.004191, 0.008083, 0.013046, 0.018634, 0.024360,
// 0.029785, 0.034578, 0.038529, 0.041536, 0.043587; P(T ≥ 41) = 0.141903;
// d = 4: P(T = 4..7) = 0.09375, 0.140625, 0.146484, 0.131836.
func TestCouponCDF(t *testing.T) {
	q := make([]float64, 10)
	for i := range q {
		q[i] = 0.1
	}
	cdf := CouponCDF(q, 60)
	want := []float64{0.000363, 0.001633, 0.004191, 0.008083, 0.013046, 0.018634, 0.024360, 0.029785, 0.034578, 0.038529, 0.041536, 0.043587}
	for i, w := range want {
		r := 10 + i
		if got := cdf[r] - cdf[r-1]; math.Abs(got-w) > 5e-7 {
			t.Errorf("d=10: P(T=%d) = %.6f, want %.6f", r, got, w)
		}
	}
	if got := 1 - cdf[40]; math.Abs(got-0.141903) > 5e-7 {
		t.Errorf("P(T ≥ 41) = %.6f, want 0.141903", got)
	}
	mean := 0.0
	for r := 0; r < 60; r++ {
		mean += 1 - cdf[r]
	}
	q4 := []float64{.25, .25, .25, .25}
	c4 := CouponCDF(q4, 8)
	for i, w := range []float64{0.09375, 0.140625, 0.146484, 0.131836} {
		r := 4 + i
		if got := c4[r] - c4[r-1]; math.Abs(got-w) > 5e-7 {
			t.Errorf("d=4: P(T=%d) = %.6f, want %.6f", r, got, w)
		}
	}
	// The subset form (unequal classes) agrees with the equal-class form.
	near := []float64{.25, .25, .25 + 1e-13, .25 - 1e-13}
	cn := CouponCDF(near, 8)
	for r := range cn {
		if math.Abs(cn[r]-c4[r]) > 1e-9 {
			t.Errorf("subset form at r=%d: %g vs %g", r, cn[r], c4[r])
		}
	}
}

// Levene & Wolfowitz (1944): the number of runs up and down R in m distinct
// values has E = (2m-1)/3 and Var = (16m-29)/90 — checked here against full
// enumeration of the permutations of m = 5..8 (Levene & Wolfowitz 1944 give the moments).
func TestRunsUpDownMoments(t *testing.T) {
	for m := 5; m <= 8; m++ {
		perm := make([]int, m)
		for i := range perm {
			perm[i] = i
		}
		var count, sum, sumSq float64
		var rec func(k int)
		rec = func(k int) {
			if k == m {
				turns := 0
				for i := 1; i+1 < m; i++ {
					a, b, c := perm[i-1], perm[i], perm[i+1]
					if (b > a && b > c) || (b < a && b < c) {
						turns++
					}
				}
				r := float64(turns + 1)
				count++
				sum += r
				sumSq += r * r
				return
			}
			for i := k; i < m; i++ {
				perm[k], perm[i] = perm[i], perm[k]
				rec(k + 1)
				perm[k], perm[i] = perm[i], perm[k]
			}
		}
		rec(0)
		mean := sum / count
		v := sumSq/count - mean*mean
		if math.Abs(mean-float64(2*m-1)/3) > 1e-12 || math.Abs(v-float64(16*m-29)/90) > 1e-12 {
			t.Errorf("m=%d: E %.6f Var %.6f, want %.6f %.6f", m, mean, v, float64(2*m-1)/3, float64(16*m-29)/90)
		}
	}
}

// π's first 10^6 decimals: lag-h correlations centred on the sample mean,
// z = -1.3896453409604075, 0.21938966362955742, -0.6425604503956929 for
// h = 1, 2, 3 (Debian's python3-numpy, from the definition in lagcorr.go:
// d = x - x.mean(); r = (d[:-h]*d[h:]).sum()/(d*d).sum(), then z).
func TestBatteryOnPi(t *testing.T) {
	d := readPi(t)
	spec := tally.Spec{Base: 10, MaxBlock: 2, Records: []tally.RecordSpec{&tally.HandSpec{Size: 5},
		&tally.UpDownSpec{Digits: 18}, &tally.LagSpec{Max: 3}}}
	tl, err := tally.New(spec, 0)
	if err != nil {
		t.Fatal(err)
	}
	tl.Add(d)
	cyc, _ := tl.Cyclic()
	in := Input{Tally: tl, Cyclic: cyc, Null: UniformNull(10), Opts: DefaultOptions()}
	var r Result
	lagcorrCheck{}.Run(in, &r)
	for h, want := range []float64{-1.3896453409604075, 0.21938966362955742, -0.6425604503956929} {
		if f := find(t, r, "lagcorr", "z", "lag", h+1); math.Abs(f.Value-want) > 1e-9 {
			t.Errorf("lag %d: z = %.4f, want %.3f", h+1, f.Value, want)
		}
	}
}

// Biased digits are a frequency question, not a correlation: i.i.d. base-3
// digits with p = (0.2, 0.3, 0.5), audited against the uniform null, give
// lag correlations of a few standard deviations at most (centred on the
// null's mean 1 instead of the sample mean 1.3, lag 1 gave z ≈ 30 at this
// length).
func TestLagcorrIgnoresFrequencyBias(t *testing.T) {
	d := expand.IID(100_000, []float64{0.2, 0.3, 0.5}, rand.New(rand.NewPCG(13, 3)))
	in := input(t, d, 3, 2, UniformNull(3))
	var r Result
	lagcorrCheck{}.Run(in, &r)
	for h := 1; h <= 5; h++ {
		if f := find(t, r, "lagcorr", "z", "lag", h); math.Abs(f.Value) > 4.5 {
			t.Errorf("lag %d: z = %.2f on independent biased digits", h, f.Value)
		}
	}
	if f := find(t, r, "lagcorr", "Q", "lags", 5); math.Exp(f.LogPUpper) < 1e-4 {
		t.Errorf("Q = %.2f, p = %.2g on independent biased digits", f.Value, math.Exp(f.LogPUpper))
	}
}

// Moments of the coupon segment length. Equal classes: E[T] = d H_d and
// Var T = d² Σ_{k≤d} 1/k² − d H_d (textbook; for d = 10, E[T] =
// 29.2896825396825…, E[T²] = 983.572593852355…). Unequal classes: Σ_r P(T >
// r) and Σ_r (2r+1) P(T > r) summed with mpmath 1.2 (nsum, 40 digits) from
// the inclusion–exclusion tail: q = (0.2, 0.3, 0.5) gives 6.654761904761904
// and 60.36082766439909; q = (1e-4, 0.4999, 0.5) gives 10000.00069999003 and
// 199990000.0052999.
func TestCouponMoments(t *testing.T) {
	ten := make([]float64, 10)
	for i := range ten {
		ten[i] = 0.1
	}
	for _, c := range []struct {
		q      []float64
		m1, m2 float64
		tol    float64
	}{
		{ten, 29.289682539682538, 983.5725938523557, 1e-12},
		{[]float64{0.2, 0.3, 0.5}, 6.654761904761904, 60.36082766439909, 1e-12},
		{[]float64{1e-4, 0.4999, 0.5}, 10000.00069999003, 199990000.0052999, 1e-10},
	} {
		m1, m2 := CouponMoments(c.q)
		if math.Abs(m1-c.m1) > c.tol*c.m1 || math.Abs(m2-c.m2) > c.tol*c.m2 {
			t.Errorf("q %v: moments %.16g %.16g, want %.16g %.16g", c.q, m1, m2, c.m1, c.m2)
		}
	}
}

// E[N] of couponExpectedSegments against the count of segments in
// simulated windows: geometric-like lengths (the rare class) make the
// renewal formula exact; equal classes make it asymptotic. 200 seeded
// sequences of 3·65 536 + 20 000 digits; the mean count must agree within
// 4 standard errors.
func TestCouponExpectedSegments(t *testing.T) {
	for _, q := range [][]float64{{1e-4, 0.4999, 0.5}, {0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1}} {
		mu, m2 := CouponMoments(q)
		const every, capLen, n = 65536, 4096, 3*65536 + 20000
		want := couponExpectedSegments(0, n, every, capLen, mu, m2)
		rng := rand.New(rand.NewPCG(3, uint64(len(q))))
		var sum, sum2 float64
		const runs = 200
		for range runs {
			d := expand.IID(n, q, rng)
			count := 0.0
			for w := 0; w < n; w += every {
				end := min(n, w+every)
				for s := w; s+capLen <= end; {
					seen, full := 0, 1<<len(q)-1
					j := s
					for j < end && seen != full {
						seen |= 1 << d[j]
						j++
					}
					count++
					if seen != full {
						break
					}
					s = j
				}
			}
			sum, sum2 = sum+count, sum2+count*count
		}
		mean := sum / runs
		se := math.Sqrt((sum2/runs - mean*mean) / runs)
		if math.Abs(mean-want) > 4*se+1e-9 {
			t.Errorf("q %v: %.4f segments expected, %.4f ± %.4f counted", q, want, mean, se)
		}
		t.Logf("q of %d classes: E[N] %.4f, simulated %.4f ± %.4f", len(q), want, mean, se)
	}
}

// PokerGradient against central differences of PokerProbs (a polynomial of
// degree h, so step 1e-5 is accurate to ~1e-9), and Euler's identity Σ_k
// p_k ∂P(R=r)/∂p_k = h P(R = r) for the homogeneous law. PokerFittedWeights
// is all ones for a uniform vector (every class is independent of any one
// digit's value by symmetry) and below one otherwise: for (0.3, 0.7) and
// hands of 4 (classes R = 1 and R = 2) the weight is 0.554, and a seeded
// simulation of 2000 sequences of 10^5 digits under that vector (audited
// with the fitted null) gave mean X² 0.552 ± 0.018 and variance 0.627
// against 2λ² = 0.614.
func TestPokerGradientAndWeights(t *testing.T) {
	p := []float64{0.1, 0.2, 0.3, 0.4}
	const h = 5
	grad := PokerGradient(p, h)
	probs := PokerProbs(p, h)
	for r := 1; r <= h; r++ {
		euler := 0.0
		for k := range p {
			up, dn := append([]float64(nil), p...), append([]float64(nil), p...)
			up[k] += 1e-5
			dn[k] -= 1e-5
			fd := (PokerProbs(up, h)[r] - PokerProbs(dn, h)[r]) / 2e-5
			if math.Abs(fd-grad[r][k]) > 1e-8 {
				t.Errorf("∂P(R=%d)/∂p_%d = %.12g, differences give %.12g", r, k, grad[r][k], fd)
			}
			euler += p[k] * grad[r][k]
		}
		if math.Abs(euler-h*probs[r]) > 1e-13 {
			t.Errorf("Euler: Σ p_k ∂P(R=%d)/∂p_k = %.15g, want %.15g", r, euler, h*probs[r])
		}
	}
	ten := make([]float64, 10)
	for i := range ten {
		ten[i] = 0.1
	}
	for _, l := range PokerFittedWeights(ten, h, []int{0, 0, 1, 2, 2}, 3) {
		if math.Abs(l-1) > 1e-12 {
			t.Errorf("uniform vector: weight %g, want 1", l)
		}
	}
	lam := PokerFittedWeights([]float64{0.3, 0.7}, 4, []int{0, 1, 1, 1}, 2)
	if len(lam) != 1 || math.Abs(lam[0]-0.552) > 4*0.018 {
		t.Errorf("(0.3, 0.7): weights %v, want one within 4 standard errors of the simulated 0.552 ± 0.018", lam)
	}
}

// Siegmund's corrected limit against the exact law of the walk where both
// are at hand (400 raw bytes, 300 digits in base 36, 2000 decimals, at M
// from 0.6 to 2): the corrected lower tail is within 4% of the exact one
// (the plain limit is off by up to 28%), and the upper within 1.5% (plain:
// up to 9%). The exact law is stats.WalkMaxLogTails; ρ = −ζ(1/2)/√(2π)
// = 0.58259715793901067 from mpmath 1.2.
func TestSiegmundCorrectedLimit(t *testing.T) {
	for _, c := range []struct {
		n int64
		b int
	}{{400, 256}, {300, 36}, {2000, 10}} {
		p := make([]float64, c.b)
		for i := range p {
			p[i] = 1 / float64(c.b)
		}
		sigma := math.Sqrt(float64(c.b*c.b-1) / 12)
		for _, m := range []float64{0.6, 0.8, 1.2, 2} {
			e := math.Round(m * sigma * math.Sqrt(float64(c.n)))
			up, lo, ok := stats.WalkMaxLogTails(c.n, p, e)
			if !ok {
				t.Fatalf("n %d base %d: no exact law", c.n, c.b)
			}
			Mc := (e + siegmundShift(sigma)) / (sigma * math.Sqrt(float64(c.n)))
			cl, cu := math.Exp(stats.BrownianMaxLogCDF(Mc)), math.Exp(stats.BrownianMaxLogSF(Mc))
			if math.Abs(cl/math.Exp(lo)-1) > 0.04 || math.Abs(cu/math.Exp(up)-1) > 0.015 {
				t.Errorf("n %d base %d M %.2f: corrected %.5f %.5f, exact %.5f %.5f", c.n, c.b, m, cl, cu, math.Exp(lo), math.Exp(up))
			}
		}
	}
}
