package stats

import (
	"math"
	"testing"
)

// Check values: scipy 1.10.1 (Debian python3-scipy), scipy.stats.binom and
// scipy.stats.multinomial, summed over every count vector in Python.
func TestMultinomialX2LawAgainstScipy(t *testing.T) {
	// Two cells, n = 20, N0 = 14: X² = (2·14 − 20)²/20 = 3.2 and
	// P(X² ≥ 3.2) = P(|N0 − 10| ≥ 4) = 2·binom.sf(13, 20, 0.5).
	law, ok := MultinomialX2Law(20, []float64{0.5, 0.5})
	if !ok {
		t.Fatal("n = 20 in 2 cells should be exact")
	}
	up, lo, eq := law.LogTails(3.2)
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"P(X2 >= 3.2)", math.Exp(up), 0.11531829833984375},
		{"P(X2 = 3.2)", math.Exp(eq), 0.07392883300781256},
		{"P(X2 <= 3.2)", math.Exp(lo), 0.9586105346679688},
	} {
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("%s = %.15g, scipy %.15g", c.name, c.got, c.want)
		}
	}
	// Three cells under p = (0.2, 0.3, 0.5), n = 12, counts (1, 3, 8).
	p := []float64{0.2, 0.3, 0.5}
	law, ok = MultinomialX2Law(12, p)
	if !ok {
		t.Fatal("n = 12 in 3 cells should be exact")
	}
	x2 := 0.0
	for j, c := range []float64{1, 3, 8} {
		e := 12 * p[j]
		x2 += (c - e) * (c - e) / e
	}
	up, lo, eq = law.LogTails(x2)
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"P(X2 >= t)", math.Exp(up), 0.4443501249999993},
		{"P(X2 <= t)", math.Exp(lo), 0.5974154999999998},
		{"P(X2 = t)", math.Exp(eq), 0.041765624999999876},
	} {
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("%s = %.15g, scipy %.15g", c.name, c.got, c.want)
		}
	}
}

// The far tail keeps its digits: n = 2000 bits all equal has X² = 2000 and
// P = 2·2^-2000, ln = −1385.60121393933067 (mpmath 1.2.1, 30 digits).
func TestMultinomialX2LawFarTail(t *testing.T) {
	law, ok := MultinomialX2Law(2000, []float64{0.5, 0.5})
	if !ok {
		t.Fatal("not exact")
	}
	up, _, eq := law.LogTails(2000)
	if math.Abs(up-(-1385.60121393933)) > 1e-8 || math.Abs(eq-up) > 1e-12 {
		t.Errorf("ln P(X2 >= 2000) = %.14g, ln P(=) = %.14g, want -1385.60121393933", up, eq)
	}
	if _, ok := MultinomialX2Law(5000, make10()); ok {
		t.Error("5000 digits in 10 cells cannot be enumerated and must say so")
	}
}

func make10() []float64 {
	p := make([]float64, 10)
	for i := range p {
		p[i] = 0.1
	}
	return p
}

// The recurrence against a brute-force count of alternating runs over all
// permutations (the definition), and the law's moments against Levene &
// Wolfowitz's E R = (2m−1)/3, Var R = (16m−29)/90 (Ann. Math. Statist. 15
// (1944) 58–69).
func TestRunsUpDownLaw(t *testing.T) {
	for m := 2; m <= 8; m++ {
		counts := make([]float64, m)
		total := 0.0
		perm := make([]int, m)
		for i := range perm {
			perm[i] = i
		}
		var gen func(k int)
		gen = func(k int) {
			if k == m {
				runs := 1
				for i := 1; i+1 < m; i++ {
					if (perm[i] > perm[i-1]) != (perm[i+1] > perm[i]) {
						runs++
					}
				}
				counts[runs]++
				total++
				return
			}
			for i := k; i < m; i++ {
				perm[k], perm[i] = perm[i], perm[k]
				gen(k + 1)
				perm[k], perm[i] = perm[i], perm[k]
			}
		}
		gen(0)
		law, ok := RunsUpDownLaw(m)
		if !ok {
			t.Fatalf("m = %d not exact", m)
		}
		for r := 1; r <= m-1; r++ {
			_, _, eq := law.LogTails(float64(r))
			if want := counts[r] / total; math.Abs(math.Exp(eq)-want) > 1e-13 {
				t.Errorf("m = %d: P(R = %d) = %.15g, brute force %.15g", m, r, math.Exp(eq), want)
			}
		}
	}
	for _, m := range []int{50, 1000} {
		law, _ := RunsUpDownLaw(m)
		mean, m2 := 0.0, 0.0
		for r := 1; r < m; r++ {
			_, _, eq := law.LogTails(float64(r))
			mean += float64(r) * math.Exp(eq)
			m2 += float64(r*r) * math.Exp(eq)
		}
		mf := float64(m)
		if math.Abs(mean-(2*mf-1)/3) > 1e-9*mf || math.Abs(m2-mean*mean-(16*mf-29)/90) > 1e-7*mf {
			t.Errorf("m = %d: mean %.12g var %.12g, want %.12g and %.12g", m, mean, m2-mean*mean, (2*mf-1)/3, (16*mf-29)/90)
		}
	}
	// Far tails: one run among 1000 values has probability 2/1000!, below
	// the recurrence's range; the tail is still finite and tiny.
	law, _ := RunsUpDownLaw(1000)
	if _, lo, _ := law.LogTails(1); !(lo < -600) || math.IsInf(lo, -1) {
		t.Errorf("ln P(R <= 1) at m = 1000 = %g, want a finite value below -600", lo)
	}
}

// The circular-runs count against the definition: every one of the 2^n
// sequences, its cyclic counts and its probability.
func TestCyclicBitPairLawBruteForce(t *testing.T) {
	const n = 12
	for _, p := range [][2]float64{{0.5, 0.5}, {0.3, 0.7}} {
		for _, second := range []bool{false, true} {
			law, ok := CyclicBitPairLaw(n, p, second)
			if !ok {
				t.Fatal("not exact")
			}
			type pt struct{ v, pr float64 }
			var all []pt
			for s := 0; s < 1<<n; s++ {
				bit := func(i int) int { return (s >> (i % n)) & 1 }
				var c1 [2]float64
				var c2 [4]float64
				pr := 1.0
				for i := 0; i < n; i++ {
					c1[bit(i)]++
					c2[2*bit(i)+bit(i+1)]++
					pr *= p[bit(i)]
				}
				x2 := func(o, q float64) float64 { e := n * q; return (o - e) * (o - e) / e }
				psi1 := x2(c1[0], p[0]) + x2(c1[1], p[1])
				psi2 := x2(c2[0], p[0]*p[0]) + x2(c2[1], p[0]*p[1]) + x2(c2[2], p[1]*p[0]) + x2(c2[3], p[1]*p[1])
				v := psi2 - psi1
				if second {
					v = psi2 - 2*psi1
				}
				all = append(all, pt{v, pr})
			}
			for _, probe := range all[:200] {
				up, lo, eq := 0.0, 0.0, 0.0
				for _, q := range all {
					tol := 1e-9 * math.Max(1, math.Abs(probe.v))
					if q.v >= probe.v-tol {
						up += q.pr
					}
					if q.v <= probe.v+tol {
						lo += q.pr
					}
					if math.Abs(q.v-probe.v) <= tol {
						eq += q.pr
					}
				}
				gu, gl, ge := law.LogTails(probe.v)
				if math.Abs(math.Exp(gu)-up) > 1e-12 || math.Abs(math.Exp(gl)-lo) > 1e-12 || math.Abs(math.Exp(ge)-eq) > 1e-12 {
					t.Fatalf("p %v second %v at %g: law (%g, %g, %g), brute force (%g, %g, %g)",
						p, second, probe.v, math.Exp(gu), math.Exp(gl), math.Exp(ge), up, lo, eq)
				}
			}
		}
	}
}
