package stats

import (
	"math"
	"testing"
)

// Values from an exact DP (computed with scipy 1.10 / mpmath 1.2), confirmed by an exact rational DP in
// Python (fractions): n = 1000 fair bits, runs of ones: P(L ≥ 10) =
// 0.385450, P(L ≥ 15) = 0.014951, E[L] = 9.3001; base 10, identical
// digits, n = 1000: P(L ≥ 4) = 0.593526, P(L ≥ 5) = 0.085782.
func TestLongestRunExact(t *testing.T) {
	bits := []float64{0.5, 0.5}
	for _, c := range []struct {
		l    int64
		want float64
	}{{10, 0.385450}, {15, 0.014951}} {
		up, _, approx := LongestRunLogTails(1000, bits, 1, c.l)
		if approx || !closeTo(math.Exp(up), c.want, 2e-6) {
			t.Errorf("P(L ≥ %d) = %.6f (approx %v), want %.6f", c.l, math.Exp(up), approx, c.want)
		}
	}
	mean := 0.0
	for l := int64(1); l < 60; l++ {
		up, _, _ := LongestRunLogTails(1000, bits, 1, l)
		mean += math.Exp(up)
	}
	if !closeTo(mean, 9.3001, 1e-4) {
		t.Errorf("E[L] = %.4f, want 9.3001", mean)
	}
	dec := make([]float64, 10)
	for i := range dec {
		dec[i] = 0.1
	}
	for _, c := range []struct {
		l    int64
		want float64
	}{{4, 0.593526}, {5, 0.085782}} {
		up, _, _ := LongestRunLogTails(1000, dec, -1, c.l)
		if !closeTo(math.Exp(up), c.want, 2e-6) {
			t.Errorf("identical digits: P(L ≥ %d) = %.6f, want %.6f", c.l, math.Exp(up), c.want)
		}
	}
	// The non-uniform chain at a uniform vector (perturbed in the 16th digit
	// so the uniform shortcut is not taken) agrees with the uniform one.
	near := []float64{0.25, 0.25, 0.25, 0.25 + 1e-14}
	unif := []float64{0.25, 0.25, 0.25, 0.25}
	for l := int64(2); l < 9; l++ {
		a, b, _ := LongestRunLogTails(500, near, -1, l)
		c, d, _ := LongestRunLogTails(500, unif, -1, l)
		if !closeTo(a, c, 1e-9) || !closeTo(b, d, 1e-9) {
			t.Errorf("l=%d: vector chain %g/%g, uniform chain %g/%g", l, a, b, c, d)
		}
	}
	// Both tails of one law add to 1 + P(L = l).
	up, lo, _ := LongestRunLogTails(1000, bits, 1, 9)
	up10, _, _ := LongestRunLogTails(1000, bits, 1, 10)
	if eq := math.Exp(up) + math.Exp(lo) - 1; !closeTo(eq, math.Exp(up)-math.Exp(up10), 1e-12) {
		t.Errorf("P(L=9) from the tails %g, from differences %g", eq, math.Exp(up)-math.Exp(up10))
	}
}

// Far tails stay finite and exact: a periodic sequence's longest run of 1 in 10^5
// decimal digits has P(L ≤ 1) = 0.9^99999 ≈ 10^-4575.6 (no two neighbours equal).
func TestLongestRunFarTail(t *testing.T) {
	dec := make([]float64, 10)
	for i := range dec {
		dec[i] = 0.1
	}
	_, lo, approx := LongestRunLogTails(100_000, dec, -1, 1)
	want := 99999 * math.Log(0.9)
	if approx || !closeTo(lo, want, 1e-9) {
		t.Errorf("ln P(L ≤ 1) = %g (approx %v), want about %g", lo, approx, want)
	}
	up, _, _ := LongestRunLogTails(1000, dec, -1, 400)
	if math.IsInf(up, 0) || up > math.Log(1e-300) {
		t.Errorf("ln P(L ≥ 400) = %g", up)
	}
}

// A digit that never occurs has L = 0: P(L ≤ 0) = (1 − q)^n, the chance
// that it is absent (0.9^10 = 0.3486784401 for a decimal digit in 10
// digits), and P(L ≥ 0) = 1. For runs of any digit L ≥ 1 as soon as n ≥ 1.
func TestLongestRunOfAbsentDigit(t *testing.T) {
	dec := make([]float64, 10)
	for i := range dec {
		dec[i] = 0.1
	}
	up, lo, _ := LongestRunLogTails(10, dec, 9, 0)
	if up != 0 || math.Abs(lo-10*math.Log(0.9)) > 1e-12 {
		t.Errorf("digit absent from 10 decimals: ln P(L≥0) = %v, ln P(L≤0) = %v, want 0 and %v", up, lo, 10*math.Log(0.9))
	}
	if _, lo, _ := LongestRunLogTails(5, []float64{0.5, 0.5}, 0, 0); math.Abs(lo-5*math.Log(0.5)) > 1e-12 {
		t.Errorf("bit absent from 5 bits: ln P(L≤0) = %v", lo)
	}
	if _, lo, _ := LongestRunLogTails(10, dec, -1, 0); !math.IsInf(lo, -1) {
		t.Errorf("no run of any digit in 10 digits: ln P = %v, want -Inf", lo)
	}
}
