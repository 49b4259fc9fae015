package checks

import (
	"math"
	"math/rand/v2"
	"os"
	"testing"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats/expand"
	"github.com/borel-audit/borel/stats/seq"
)

func closeTo(got, want, tol float64) bool {
	d := math.Abs(got - want)
	return d <= tol || d <= tol*math.Abs(want)
}

// batterySpec is the tally every check needs (Needs), at block length K.
func batterySpec(base, K int, null Null) tally.Spec {
	s := tally.Spec{Base: base, MaxBlock: K}
	for _, c := range All() {
		for _, r := range c.Needs(Setting{Base: base, Null: null.Kind, P: null.P}).Records {
			s = s.With(r)
		}
	}
	return s
}

// input tallies digits for every check at block length K and resolves the
// null.
func input(t testing.TB, d []byte, base, K int, null Null) Input {
	t.Helper()
	tl, err := tally.New(batterySpec(base, K, null), 0)
	if err != nil {
		t.Fatal(err)
	}
	tl.Add(d)
	cyc, err := tl.Cyclic()
	if err != nil {
		t.Fatal(err)
	}
	if null.Kind == Fitted {
		null = FittedNull(tl.DigitCounts())
	}
	return Input{Tally: tl, Cyclic: cyc, Null: null, Opts: DefaultOptions()}
}

func find(t *testing.T, r Result, check string, stat Statistic, param string, v int) Finding {
	t.Helper()
	for _, f := range r.Findings {
		if f.Check == check && f.Statistic == stat && f.Params[param] == v {
			return f
		}
	}
	t.Fatalf("no %s %s %s=%d in %+v", check, stat, param, v, r.Findings)
	return Finding{}
}

// Worked example (computed with scipy 1.10 / mpmath 1.2): ε = 0011011101, k = 3, n = 10:
// ψ²_3 = 2.8, ψ²_2 = 1.2, ψ²_1 = 0.4; ∇ψ² = 1.6 (4 df, p 0.808792),
// ∇²ψ² = 0.8 (2 df, p 0.670320).
func TestGoodWorkedExample(t *testing.T) {
	d := []byte{0, 0, 1, 1, 0, 1, 1, 1, 0, 1}
	in := input(t, d, 2, 3, UniformNull(2))
	psi := Psi2(in.Cyclic, in.Null, in.Tally.N)
	for k, want := range []float64{0, 0.4, 1.2, 2.8} {
		if !closeTo(psi[k], want, 1e-12) {
			t.Errorf("ψ²_%d = %g, want %g", k, psi[k], want)
		}
	}
	var r Result
	serialCheck{}.Run(in, &r)
	d1 := find(t, r, "serial", "dpsi2", "k", 3)
	d2 := find(t, r, "serial", "d2psi2", "k", 3)
	if !closeTo(d1.Value, 1.6, 1e-12) || d1.DF != 4 || !closeTo(math.Exp(d1.LogPUpper), 0.808792, 1e-6) {
		t.Errorf("∇ψ²_3 = %g on %g df, p %g; want 1.6, 4, 0.808792", d1.Value, d1.DF, math.Exp(d1.LogPUpper))
	}
	if !closeTo(d2.Value, 0.8, 1e-12) || d2.DF != 2 || !closeTo(math.Exp(d2.LogPUpper), 0.670320, 1e-6) {
		t.Errorf("∇²ψ²_3 = %g on %g df, p %g; want 0.8, 2, 0.670320", d2.Value, d2.DF, math.Exp(d2.LogPUpper))
	}
}

// readPi reads testdata/pi-1e6.txt.gz: the first 10^6 decimals of π,
// computed with Debian's python3-mpmath 1.2.1 (see testdata/README.md).
func readPi(t testing.TB) []byte {
	t.Helper()
	f, err := os.Open("../../testdata/pi-1e6.txt.gz")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r, err := seq.NewReader(f, seq.Options{Source: "pi", Base: 10})
	if err != nil {
		t.Fatal(err)
	}
	var d []byte
	for r.Scan() {
		d = append(d, r.Digits()...)
	}
	if r.Err() != nil {
		t.Fatal(r.Err())
	}
	return d
}

// Published digit counts of the first 10^6 decimals of π (widely reproduced
// tables, e.g. Wagon, Math. Intelligencer 7 (1985)): X² = 5.5091 (p 0.7879), G = 5.5105;
// Good's differences and Ĥ_1 computed with scipy 1.10 / mpmath 1.2.
func TestPiMillionDigits(t *testing.T) {
	d := readPi(t)
	if len(d) != 1_000_000 {
		t.Fatalf("%d digits", len(d))
	}
	in := input(t, d, 10, 5, UniformNull(10))
	wantCounts := []int64{99959, 99758, 100026, 100229, 100230, 100359, 99548, 99800, 99985, 100106}
	for j, c := range wantCounts {
		if in.Tally.DigitCounts()[j] != c {
			t.Errorf("count of %d = %d, want %d", j, in.Tally.DigitCounts()[j], c)
		}
	}
	var r Result
	freqCheck{}.Run(in, &r)
	serialCheck{}.Run(in, &r)
	entropyCheck{}.Run(in, &r)
	x2 := find(t, r, "freq", "X2", "k", 1)
	if !closeTo(x2.Value, 5.5091, 1e-4) || !closeTo(math.Exp(x2.LogPUpper), 0.7879, 1e-4) {
		t.Errorf("X² = %.4f p %.4f, want 5.5091, 0.7879", x2.Value, math.Exp(x2.LogPUpper))
	}
	if g := find(t, r, "freq", "G", "k", 1); !closeTo(g.Value, 5.5105, 1e-4) {
		t.Errorf("G = %.4f, want 5.5105", g.Value)
	}
	for _, c := range []struct {
		stat      string
		k         int
		value, df float64
		p         float64
	}{
		{"dpsi2", 2, 88.729, 90, 0.518},
		{"dpsi2", 3, 863.80, 900, 0.802},
		{"d2psi2", 3, 775.07, 810, 0.806},
		{"dpsi2", 4, 9021.18, 9000, 0.435},
	} {
		f := find(t, r, "serial", Statistic(c.stat), "k", c.k)
		if !closeTo(f.Value, c.value, 6e-6) || f.DF != c.df || !closeTo(math.Exp(f.LogPUpper), c.p, 2e-3) {
			t.Errorf("%s_%d = %.3f on %g df (p %.3f), want %.3f on %g (p %.3f)", c.stat, c.k, f.Value, f.DF, math.Exp(f.LogPUpper), c.value, c.df, c.p)
		}
	}
	if h1 := r.Entropy.Rows[0].PlugIn; !closeTo(h1, 2.3025823377, 1e-10) {
		t.Errorf("Ĥ_1 = %.10f, want 2.3025823377", h1)
	}
	// G = 2n(ln 10 - Ĥ_1) (Kullback 1959): the interval's statistic is the freq G.
	if g := 2 * 1e6 * (math.Log(10) - r.Entropy.Rows[0].PlugIn); !closeTo(g, 5.5105, 1e-4) {
		t.Errorf("2n(ln b - Ĥ_1) = %.4f, want 5.5105", g)
	}
	for _, row := range r.Entropy.Rows {
		if !(row.DimLow <= row.Dimension && row.Dimension <= row.DimHigh && row.DimHigh <= 1+1e-12) {
			t.Errorf("k=%d: dimension %.8f outside its interval [%.8f, %.8f]", row.K, row.Dimension, row.DimLow, row.DimHigh)
		}
		// π passes every serial test here, so full dimension must lie inside.
		if row.DimHigh < 1-1e-12 {
			t.Errorf("k=%d: interval [%.8f, %.8f] excludes full dimension", row.K, row.DimLow, row.DimHigh)
		}
	}
}

// Knuth's gap probabilities (TAOCP §3.3.2 C), numbers computed with scipy 1.10 / mpmath 1.2:
// q = 0.1, t = 10 → 0.1, 0.09, …, 0.038742, tail 0.348678. Checked through
// the check itself: a tally whose gap histogram equals its expectation
// exactly gives X² = 0.
func TestGapExpectations(t *testing.T) {
	want := []float64{0.1, 0.09, 0.081, 0.0729, 0.06561, 0.059049, 0.053144, 0.047830, 0.043047, 0.038742}
	q := 0.1
	tail := 1.0
	for r, w := range want {
		p := q * math.Pow(1-q, float64(r))
		if !closeTo(p, w, 1e-5) {
			t.Errorf("P(r=%d) = %.6f, want %.6f", r, p, w)
		}
		tail -= p
	}
	if !closeTo(tail, 0.348678, 1e-6) {
		t.Errorf("tail = %.6f, want 0.348678", tail)
	}
}

// On π's decimals every digit's gap test runs with a sensible t and the
// p-values are not extreme (π is not known to fail any of these).
func TestGapOnPi(t *testing.T) {
	in := input(t, readPi(t), 10, 2, UniformNull(10))
	var r Result
	gapCheck{}.Run(in, &r)
	if len(r.Findings) != 10 || len(r.Skips) != 0 {
		t.Fatalf("%d findings, %d skips", len(r.Findings), len(r.Skips))
	}
	for _, f := range r.Findings {
		if f.DF < 50 || f.DF > 120 || f.LogPUpper < math.Log(1e-4) || f.LogPLower < math.Log(1e-4) {
			t.Errorf("gap digit %d: X² %.1f on %g df, ln p %g/%g", f.Params["digit"], f.Value, f.DF, f.LogPUpper, f.LogPLower)
		}
	}
}

// Simulation under a vector null and a fitted null: the mean of each
// statistic over seeded i.i.d. sequences matches its df. Reference values
// from simulations (computed with scipy 1.10 / mpmath 1.2): b = 3, p = (.5,.3,.2): ∇ψ²_3 mean 17.95
// (χ²_18), ∇²ψ²_3 mean 11.99 (χ²_12); fitted, n = 6000: non-overlapping pairs
// mean 5.97 (χ²_6), k = 2 Markov test mean 3.92 (χ²_4).
func TestDegreesOfFreedomBySimulation(t *testing.T) {
	p := []float64{.5, .3, .2}
	vec, err := VectorNull(p, 3)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(11, 12))
	draw := func(n int) []byte { return expand.IID(n, p, rng) }
	const reps = 400
	type key struct {
		stat string
		k    int
	}
	run := func(null Null, n int, want map[key]float64, check Check, checkName string) {
		sum := map[key]float64{}
		for range reps {
			in := input(t, draw(n), 3, 3, null)
			var r Result
			check.Run(in, &r)
			for _, f := range r.Findings {
				sum[key{string(f.Statistic), f.Params["k"]}] += f.Value
			}
		}
		for k, df := range want {
			mean := sum[k] / reps
			// The mean of reps χ²_df draws has sd sqrt(2df/reps): allow 4 sd.
			if math.Abs(mean-df) > 4*math.Sqrt(2*df/reps) {
				t.Errorf("%s %v under %v null: mean %.2f, want df %g", checkName, k, null.Kind, mean, df)
			}
		}
	}
	run(vec, 5000, map[key]float64{{"dpsi2", 3}: 18, {"d2psi2", 3}: 12, {"dpsi2", 2}: 6}, serialCheck{}, "serial")
	run(Null{Kind: Fitted}, 6000, map[key]float64{{"X2", 2}: 6, {"X2", 3}: 24}, blocksCheck{}, "blocks")
	run(Null{Kind: Fitted}, 6000, map[key]float64{{"dpsi2", 2}: 4, {"dpsi2", 3}: 16, {"d2psi2", 3}: 12}, serialCheck{}, "serial")
}

func TestVectorNullValidation(t *testing.T) {
	bad := [][]float64{{.5, .5}, {.5, .6, -.1}, {0, .5, .5}, {.2, .3, .5000001}, {math.NaN(), .5, .5}, {math.Inf(1), 0, 0}}
	for _, p := range bad {
		if _, err := VectorNull(p, 3); err == nil {
			t.Errorf("vector %v accepted for base 3", p)
		}
	}
	if _, err := VectorNull([]float64{.2, .3, .5 + 1e-10}, 3); err != nil {
		t.Errorf("sum within 1e-9 refused: %v", err)
	}
}

// Coverage: for seeded i.i.d. uniform digits the 99% dimension interval
// contains 1 in about 99% of sequences at every k, including thin contexts:
// base 4, n = 6000, k = 5 leaves about 23 windows per context (expected
// cell count 5.9, within the rule of thumb), where the uncorrected G^M
// overshoots its df by about one standard deviation.
func TestEntropyIntervalCoverage(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	const reps = 300
	misses := make([]int, 6)
	for range reps {
		d := make([]byte, 6000)
		for i := range d {
			d[i] = byte(rng.IntN(4))
		}
		in := input(t, d, 4, 5, UniformNull(4))
		var r Result
		entropyCheck{}.Run(in, &r)
		for _, row := range r.Entropy.Rows {
			if row.DimHigh < 1-1e-12 {
				misses[row.K]++
			}
		}
	}
	// Binomial(300, 0.01): P(misses > 9) ≈ 0.001.
	for k := 1; k <= 5; k++ {
		if misses[k] > 9 {
			t.Errorf("k=%d: the 99%% interval missed full dimension in %d of %d sequences", k, misses[k], reps)
		}
	}
}

// Coverage under a non-uniform law: i.i.d. digits from p = (.2, .3, .5) in
// base 3; the 99% interval must contain their Besicovitch–Eggleston
// dimension 0.9372305632 (mpmath 1.2.1) in about 99% of sequences. An
// interval that treats the digit entropy as known fails this badly.
func TestEntropyIntervalCoverageVector(t *testing.T) {
	const want = 0.9372305632
	rng := rand.New(rand.NewPCG(41, 42))
	vec, _ := VectorNull([]float64{.2, .3, .5}, 3)
	const reps = 300
	misses := make([]int, 5)
	for range reps {
		in := input(t, expand.IID(6000, vec.P, rng), 3, 4, vec)
		var r Result
		entropyCheck{}.Run(in, &r)
		for _, row := range r.Entropy.Rows {
			if !(row.DimLow <= want && want <= row.DimHigh) {
				misses[row.K]++
			}
		}
	}
	for k := 1; k <= 4; k++ {
		if misses[k] > 9 { // Binomial(300, 0.01): P(> 9) ≈ 0.001
			t.Errorf("k=%d: the 99%% interval missed %.6f in %d of %d sequences", k, want, misses[k], reps)
		}
	}
}

// Clamp bounds both tails to p ≤ 1 and turns NaN into p = 1.
func TestClamp(t *testing.T) {
	f := Clamp(Finding{LogPUpper: 1e-15, LogPLower: math.NaN()})
	if f.LogPUpper != 0 || f.LogPLower != 0 {
		t.Errorf("clamped to %v, %v", f.LogPUpper, f.LogPLower)
	}
	if g := Clamp(Finding{LogPUpper: -3, LogPLower: math.Inf(-1)}); g.LogPUpper != -3 || !math.IsInf(g.LogPLower, -1) {
		t.Errorf("a valid finding changed: %v, %v", g.LogPUpper, g.LogPLower)
	}
}

// The grouped inclusion–exclusion of CouponCDF equals the sum over every
// subset, for the classes of base 36 (16 classes of 2 or 3 digits).
func TestCouponCDFGrouped(t *testing.T) {
	q := make([]float64, 16)
	for j := 0; j < 36; j++ {
		q[j*16/36] += 1.0 / 36
	}
	got := CouponCDF(q, 300)
	// The subset sum, directly.
	for _, r := range []int{16, 40, 100, 300} {
		s := 0.0
		for mask := 0; mask < 1<<16; mask++ {
			qj, sign := 0.0, 1.0
			for c := range 16 {
				if mask&(1<<c) != 0 {
					qj += q[c]
					sign = -sign
				}
			}
			s += sign * math.Pow(math.Max(0, 1-qj), float64(r))
		}
		if math.Abs(got[r]-math.Min(1, math.Max(0, s))) > 1e-9 {
			t.Errorf("r = %d: grouped %v, subsets %v", r, got[r], s)
		}
	}
	if base, _ := groupedTerms([]float64{0.2, 0.3, 0.5}); len(base) != 8 {
		t.Errorf("distinct probabilities give %d terms, want the 8 subsets", len(base))
	}
}

// Calibration of the Markov order test: for seeded i.i.d. digits its
// p-values are uniform at every order, thin contexts included (base 4,
// n = 6000, k = 5: about 23 windows per context; base 2, n = 4000, k = 9),
// so the rate at or below 0.05 stays near 5% and the p-values' mean near
// 1/2; and it detects a Markov chain of order 1 at order 1 (k = 2) but
// not at order 2 against 1 (k = 3), where the chain has nothing more.
func TestMarkovOrderCalibration(t *testing.T) {
	for _, c := range []struct{ base, n, K int }{{4, 6000, 5}, {2, 4000, 9}, {10, 20000, 3}} {
		rng := rand.New(rand.NewPCG(uint64(c.base), 77))
		const reps = 400
		small := make([]int, c.K+1)
		sum := make([]float64, c.K+1)
		for range reps {
			d := make([]byte, c.n)
			for i := range d {
				d[i] = byte(rng.IntN(c.base))
			}
			in := input(t, d, c.base, c.K, UniformNull(c.base))
			var r Result
			entropyCheck{}.Run(in, &r)
			for _, row := range r.Entropy.Rows[1:] {
				p := math.Exp(row.OrderLogP)
				sum[row.K] += p
				if p <= 0.05 {
					small[row.K]++
				}
			}
		}
		for k := 2; k <= c.K; k++ {
			// Binomial(400, 0.05): mean 20, sd 4.4; the mean of 400 uniforms: sd 0.0144.
			if small[k] > 36 || small[k] < 6 || math.Abs(sum[k]/reps-0.5) > 0.05 {
				t.Errorf("base %d, k=%d: %d of %d p-values at or below 0.05, mean %.3f", c.base, k, small[k], reps, sum[k]/reps)
			}
		}
	}
	// A sticky chain: the next digit repeats the last with probability 0.3 + 0.7/4.
	rng := rand.New(rand.NewPCG(5, 6))
	d := make([]byte, 20000)
	for i := 1; i < len(d); i++ {
		if rng.Float64() < 0.3 {
			d[i] = d[i-1]
		} else {
			d[i] = byte(rng.IntN(4))
		}
	}
	in := input(t, d, 4, 4, UniformNull(4))
	var r Result
	entropyCheck{}.Run(in, &r)
	if lp := r.Entropy.Rows[1].OrderLogP; lp > math.Log(1e-10) {
		t.Errorf("order 1 against 0: ln p = %g for a sticky chain", lp)
	}
	if lp := r.Entropy.Rows[2].OrderLogP; lp < math.Log(1e-3) {
		t.Errorf("order 2 against 1: ln p = %g for a chain of order 1", lp)
	}
}

// exactMeanQ is the same from call to call (it once summed in a map's
// order, and reports differed in their last digits from run to run).
func TestExactMeanQDeterministic(t *testing.T) {
	ctx := make([]int64, 5000)
	for i := range ctx {
		ctx[i] = int64(1 + i*7919%300)
	}
	p := []float64{0.2, 0.3, 0.5}
	want := exactMeanQ(p, ctx, 1000)
	for range 30 {
		if got := exactMeanQ(p, ctx, 1000); got != want {
			t.Fatalf("exactMeanQ: %v then %v", want, got)
		}
	}
}
