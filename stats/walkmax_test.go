package stats

import (
	"math"
	"testing"
)

// The exact law against its definition: every sequence of n digits
// enumerated, M = max_k |T_k − kμ| computed, and the probabilities of
// M ≥ e and M ≤ e summed (to 1e-10: the sums of 10^5 terms round), for bits (n = 14), decimals (n = 5) and the
// vector (0.2, 0.3, 0.5) (n = 9), at every value M takes.
func TestWalkMaxAgainstEnumeration(t *testing.T) {
	for _, c := range []struct {
		p []float64
		n int
	}{
		{[]float64{0.5, 0.5}, 14},
		{[]float64{0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1}, 5},
		{[]float64{0.2, 0.3, 0.5}, 9},
	} {
		b := len(c.p)
		mu := 0.0
		for j, v := range c.p {
			mu += float64(j) * v
		}
		type mass struct{ m, pr float64 }
		var all []mass
		total := 1
		for range c.n {
			total *= b
		}
		for code := 0; code < total; code++ {
			pr, T, M := 1.0, 0, 0.0
			x := code
			for k := 1; k <= c.n; k++ {
				d := x % b
				x /= b
				pr *= c.p[d]
				T += d
				M = math.Max(M, math.Abs(float64(T)-float64(k)*mu))
			}
			all = append(all, mass{M, pr})
		}
		seen := map[float64]bool{}
		for _, a := range all {
			e := math.Round(a.m*1e9) / 1e9
			if seen[e] {
				continue
			}
			seen[e] = true
			up, lo := 0.0, 0.0
			for _, q := range all {
				if q.m >= a.m-1e-9 {
					up += q.pr
				}
				if q.m <= a.m+1e-9 {
					lo += q.pr
				}
			}
			gu, gl, ok := WalkMaxLogTails(int64(c.n), c.p, a.m)
			if !ok || math.Abs(math.Exp(gu)-up) > 1e-10 || math.Abs(math.Exp(gl)-lo) > 1e-10 {
				t.Fatalf("b = %d, n = %d, e = %g: P(M≥e) = %v, P(M≤e) = %v; enumeration %v, %v", b, c.n, a.m, math.Exp(gu), math.Exp(gl), up, lo)
			}
		}
	}
}

// Far tails stay finite in logs, and the exact law approaches the Brownian
// limit at large n.
func TestWalkMaxTails(t *testing.T) {
	bits := []float64{0.5, 0.5}
	up, lo, ok := WalkMaxLogTails(1000, bits, 400)
	if !ok || math.IsInf(up, 0) || up > -100 || lo != 0 {
		t.Errorf("far upper tail: ln P = %v, lower %v", up, lo)
	}
	_, lo, _ = WalkMaxLogTails(1000, bits, 1)
	if math.IsInf(lo, -1) || lo > -100 {
		t.Errorf("far lower tail: ln P = %v", lo)
	}
	// n = 20 000 bits at x = 1: the walk's law is within the lattice
	// correction, of order n^-1/2, of the limit (BrownianMaxLogSF, itself
	// checked in uniformity_test.go).
	e := 1.0 * 0.5 * math.Sqrt(20000)
	up, _, ok = WalkMaxLogTails(20000, bits, e)
	if lim := math.Exp(BrownianMaxLogSF(1)); !ok || math.Abs(math.Exp(up)-lim) > 0.02 {
		t.Errorf("n = 20000: P(M ≥ √n/2) = %v, Brownian %v", math.Exp(up), lim)
	}
}

// Equal digit probabilities take box sums instead of the b-term
// convolution: both tails agree with the general program to 1e-10 in ln p,
// into the far tails (ln p near −60), for bits, decimals and bytes.
func TestWalkMaxBoxSums(t *testing.T) {
	for _, c := range []struct {
		n int64
		b int
	}{{300, 2}, {200, 10}, {60, 256}, {150, 36}} {
		p := make([]float64, c.b)
		for i := range p {
			p[i] = 1 / float64(c.b)
		}
		sigma := math.Sqrt(float64(c.b*c.b-1) / 12)
		for _, m := range []float64{0.3, 0.8, 1.5, 3, 5} {
			e := math.Round(m * sigma * math.Sqrt(float64(c.n)))
			walkBoxOff = true
			wantUp, wantLo := walkMaxLogTails(c.n, p, e)
			walkBoxOff = false
			up, lo := walkMaxLogTails(c.n, p, e)
			if math.Abs(up-wantUp) > 1e-10*math.Max(1, -wantUp) || math.Abs(lo-wantLo) > 1e-10*math.Max(1, -wantLo) {
				t.Errorf("n %d, base %d, e %g: box sums give ln p %.12g %.12g, the convolution %.12g %.12g", c.n, c.b, e, up, lo, wantUp, wantLo)
			}
		}
	}
}
