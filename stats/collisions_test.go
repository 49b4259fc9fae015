package stats

import (
	"math"
	"testing"
)

// Knuth's table for m = 2^14 balls in n = 2^20 urns (TAOCP vol. 2, 3rd
// ed., §3.3.2 I; the values are quoted from memory of that table, to its 3
// decimals): collisions ≤ 101, 108, 119, 126, 134, 145, 153 with
// probability .009, .043, .244, .476, .742, .946, .989.
func TestCollisionLawKnuthTable(t *testing.T) {
	p := CollisionLaw(1<<14, 1<<20)
	cum := 0.0
	cdf := make([]float64, len(p))
	for c, v := range p {
		cum += v
		cdf[c] = cum
	}
	if math.Abs(cum-1) > 1e-12 {
		t.Errorf("the law sums to %v", cum)
	}
	for _, c := range []struct {
		le   int
		want float64
	}{{101, .009}, {108, .043}, {119, .244}, {126, .476}, {134, .742}, {145, .946}, {153, .989}} {
		if math.Abs(cdf[c.le]-c.want) > 0.0015 {
			t.Errorf("P(C ≤ %d) = %.4f, Knuth's table %.3f", c.le, cdf[c.le], c.want)
		}
	}
}

// The law's mean is m − n(1 − (1 − 1/n)^m) exactly, and the B-fold sum
// has B times the mean; for 3 balls in 4 urns the law is P(0) = 24/64,
// P(1) = 36/64, P(2) = 4/64 by counting.
func TestCollisionSumLaw(t *testing.T) {
	p := CollisionLaw(3, 4)
	for c, want := range []float64{24.0 / 64, 36.0 / 64, 4.0 / 64} {
		if math.Abs(p[c]-want) > 1e-15 {
			t.Errorf("3 balls in 4 urns: P(%d) = %v, want %v", c, p[c], want)
		}
	}
	m, n := 1<<12, float64(1<<24)
	want := float64(m) - n*(-math.Expm1(float64(m)*math.Log1p(-1/n)))
	mean := 0.0
	for c, v := range CollisionLaw(m, n) {
		mean += float64(c) * v
	}
	if math.Abs(mean-want) > 1e-12 {
		t.Errorf("mean %v, exact %v", mean, want)
	}
	law := CollisionSumLaw(m, n, 37)
	up, lo, eq := law.LogTails(math.Round(37 * want))
	if !(up < 0 && lo < 0 && eq < 0) || math.Abs(math.Exp(up)+math.Exp(lo)-math.Exp(eq)-1) > 1e-12 {
		t.Errorf("tails at the mean: %v %v %v", up, lo, eq)
	}
	// The sum of 37 blocks against the convolution done slowly.
	slow := []float64{1}
	one := CollisionLaw(m, n)
	for b := 0; b < 37; b++ {
		next := make([]float64, len(slow)+len(one)-1)
		for i, x := range slow {
			for j, y := range one {
				next[i+j] += x * y
			}
		}
		slow = next
	}
	for c := 0; c < 40; c++ {
		_, _, eq := law.LogTails(float64(c))
		if math.Abs(math.Exp(eq)-slow[c]) > 1e-12*math.Max(slow[c], 1e-300) && math.Abs(math.Exp(eq)-slow[c]) > 1e-300 {
			t.Errorf("P(total = %d) = %v, slow %v", c, math.Exp(eq), slow[c])
		}
	}
}
