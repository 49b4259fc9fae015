package checks

import (
	"math"
	"testing"
)

// The rank law against python3-mpmath at 30 digits (the product formula
// of Kovalenko 1972 and Marsaglia & Tsay 1985, evaluated independently):
// 32×32 matrices have full rank with probability 0.288788095…, rank 31
// with 0.577576190…; 8×8 ones 0.289919117…
func TestRankLaw(t *testing.T) {
	for _, c := range []struct {
		W, r int
		want float64
	}{
		{32, 32, 0.28878809515384114}, {32, 31, 0.57757619017320484}, {32, 30, 0.12835026442316666},
		{64, 64, 0.28878809508660242}, {64, 63, 0.57757619017320484}, {8, 8, 0.28991911785851698}, {8, 7, 0.5775732426087643},
		{31, 31, 0.28878809522107986}, {31, 30, 0.57757619017320484},
	} {
		if got := math.Exp(RankLogP(c.W, c.r)); math.Abs(got-c.want) > 1e-13 {
			t.Errorf("P(rank %d of %d×%d) = %.17g, mpmath %.17g", c.r, c.W, c.W, got, c.want)
		}
	}
	sum := 0.0
	for r := 0; r <= 8; r++ {
		sum += math.Exp(RankLogP(8, r))
	}
	if math.Abs(sum-1) > 1e-12 {
		t.Errorf("the 8×8 rank law sums to %v", sum)
	}
}

// The linear-complexity law: its pieces sum to 1 and agree with each
// other for small n (where every value is summed directly), and near n/2
// for n = 10^5 it is P(L = n/2) = 1/2, P(L = n/2 + 1) = 1/4, P(L = n/2 −
// 1) = 1/8 (Rueppel 1986: 2^min(2n−2L, 2L−1) sequences of complexity L).
func TestLincompLaw(t *testing.T) {
	for _, n := range []int{1, 2, 7, 20, 21} {
		cum := 0.0
		for l := 0; l <= n; l++ {
			cum += math.Exp(lincompLogP(n, l))
			if got := math.Exp(lincompLogCDF(n, l)); math.Abs(got-cum) > 1e-12 {
				t.Errorf("n %d: P(L ≤ %d) = %v, summed %v", n, l, got, cum)
			}
			if got := math.Exp(lincompLogSF(n, l)); math.Abs(got-(1-cum+math.Exp(lincompLogP(n, l)))) > 1e-12 {
				t.Errorf("n %d: P(L ≥ %d) = %v", n, l, got)
			}
		}
		if math.Abs(cum-1) > 1e-12 {
			t.Errorf("n %d: the law sums to %v", n, cum)
		}
	}
	n := 100000
	for _, c := range []struct {
		l    int
		want float64
	}{{50000, 0.5}, {50001, 0.25}, {49999, 0.125}, {50002, 1.0 / 16}, {49998, 1.0 / 32}} {
		if got := math.Exp(lincompLogP(n, c.l)); math.Abs(got-c.want) > 1e-15 {
			t.Errorf("P(L = %d) = %v, want %v", c.l, got, c.want)
		}
	}
	// MT19937's bit 0 over a segment: L ≈ 19937, ln P(L ≤ 19940) = (2·19940 − 10^5) ln 2 + ln(2/3).
	if got, want := lincompLogCDF(n, 19940), float64(2*19940-n)*math.Ln2+math.Log(2.0/3); math.Abs(got-want) > 1e-9*math.Abs(want) {
		t.Errorf("ln P(L ≤ 19940) = %v, want %v", got, want)
	}
	// The smallest of S: ln(1 − (1 − F)^S) ≈ ln S + ln F for tiny F.
	if got, want := logOneMinusPow(-50000, 3), math.Log(3)-50000; math.Abs(got-want) > 1e-9 {
		t.Errorf("logOneMinusPow(-50000, 3) = %v, want %v", got, want)
	}
}

// Poisson tails against scipy.stats.poisson (Debian python3-scipy 1.10.1):
// 1302 repeated spacings expected (651 samples of λ = 2), and the 2310 that
// the subtract-with-borrow generator gives; no collision where 7.3 are
// expected.
func TestPoissonTails(t *testing.T) {
	up, lo, eq := poissonLogTails(1302, 1302)
	for _, c := range []struct{ got, want float64 }{
		{math.Exp(up), 0.5036854045603943}, {math.Exp(lo), 0.507370054408389}, {math.Exp(eq), 0.011055458968795128},
	} {
		if math.Abs(c.got-c.want) > 1e-9 {
			t.Errorf("Poisson(1302) at 1302: %v, scipy %v", c.got, c.want)
		}
	}
	if up, _, _ := poissonLogTails(2310, 1302); math.Abs(up-(-320.3926882618789)) > 1e-6 {
		t.Errorf("ln P(X ≥ 2310) = %v, scipy -320.3926882618789", up)
	}
	if _, lo, _ := poissonLogTails(0, 7.3); math.Abs(math.Exp(lo)-0.0006755387751938441) > 1e-15 {
		t.Errorf("P(X ≤ 0) = %v", math.Exp(lo))
	}
}

// Hamming weight classes of 32-bit words against scipy.stats.binom.
func TestHammingClassProbs(t *testing.T) {
	want := []float64{0.29830744792707264, 0.13171758502721803, 0.1399499340914188, 0.13171758502721798, 0.29830744792707264}
	for i, q := range HammingClassProbs(32) {
		if math.Abs(q-want[i]) > 1e-14 {
			t.Errorf("class %d: %v, scipy %v", i, q, want[i])
		}
	}
}

// The expected collisions per block against python3-mpmath at 30 digits.
func TestCollisionMean(t *testing.T) {
	for _, c := range []struct {
		W    int
		want float64
	}{{32, 0.49998982760007283}, {64, 0.49998982760007283}, {24, 0.49983727186057463}, {16, 0.49740406337059081}} {
		if got := CollisionMean(c.W); math.Abs(got-c.want) > 1e-9 {
			t.Errorf("W %d: %.17g, mpmath %.17g", c.W, got, c.want)
		}
	}
}

// The birthday mean by hand: 2 (1 − 2/512) − 2^45/(18 · 2^48) = 1.9921875 −
// 1/144.
func TestBirthdayMean(t *testing.T) {
	if got, want := BirthdayMean(), 1.9921875-1.0/144; math.Abs(got-want) > 1e-15 {
		t.Errorf("BirthdayMean() = %.10f, want %.10f", got, want)
	}
}
