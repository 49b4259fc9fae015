package tests

import (
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"strconv"
	"testing"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/expand"
)

// Calibration: under the null every check's p-values are uniform, and the
// battery says "not consistent" at a rate no higher than alpha.
//
// For each base, 300 seeded sequences (ChaCha8 keyed by base and index),
// lengths cycling through 10^4, 3·10^4 and 10^5 digits. For every statistic
// (check, statistic, parameters) seen in at least 100 sequences, the
// upper-tail p-values (randomized for discrete statistics, Tocher 1950)
// must pass a Kolmogorov–Smirnov uniformity test at 0.001 (exact finite-m
// law, Marsaglia–Tsang–Wang). The count of "not consistent" verdicts at
// alpha = 0.01 must not exceed the end of the central 99.9% binomial
// interval of Binomial(300, 0.01), and nor must the count of "too uniform"
// verdicts. Only the upper end: Holm holds the family's rate at most alpha,
// and over a family of dependent and discrete statistics it sits below
// (7 to 12 in 3000 instead of 30 under BOREL_CALIBRATION=long); a rate
// below alpha is the conservatism the README states, not a defect.
//
// BOREL_CALIBRATION=long runs ten times as many sequences in these tests,
// the coupon-restart and the fitted-poker ones (about 10 minutes on two
// cores instead of one): the same bounds, with ten times the power to see
// a rate off alpha.

var calibrationRuns = calibrationScale(300)

// calibrationScale returns n, or 10n when BOREL_CALIBRATION=long.
func calibrationScale(n int) int {
	if os.Getenv("BOREL_CALIBRATION") == "long" {
		return 10 * n
	}
	return n
}

var calibrationLengths = []int{10_000, 30_000, 100_000}

type calibration struct {
	pValues  map[string][]float64
	verdicts map[audit.Verdict]int
}

func calibrate(t *testing.T, base int, p []float64, opts audit.Options, seedTag byte) calibration {
	t.Helper()
	c := calibration{pValues: map[string][]float64{}, verdicts: map[audit.Verdict]int{}}
	u := rand.New(rand.NewPCG(uint64(base), 99))
	for i := range calibrationRuns {
		var key [32]byte
		key[0], key[1], key[2], key[3] = seedTag, byte(base), byte(i), byte(i>>8)
		rng := rand.New(rand.NewChaCha8(key))
		n := calibrationLengths[i%len(calibrationLengths)]
		d := expand.IID(n, p, rng)
		r, err := audit.Digits(d, base, audit.Source{Name: "calibration", Kind: "built-in", Bytes: -1}, opts)
		if err != nil {
			t.Fatal(err)
		}
		c.verdicts[r.Verdict]++
		for _, f := range r.Findings {
			pr := checks.RandomizedP(f.Finding, u.Float64())
			c.pValues[f.Label()] = append(c.pValues[f.Label()], math.Exp(pr.LogP))
		}
	}
	return c
}

// binomialInterval returns the central interval of Binomial(n, p) that
// leaves at most tail probability on each side.
func binomialInterval(n int, p, tail float64) (lo, hi int) {
	pmf := make([]float64, n+1)
	for k := 0; k <= n; k++ {
		lg, _ := math.Lgamma(float64(n + 1))
		lk, _ := math.Lgamma(float64(k + 1))
		lnk, _ := math.Lgamma(float64(n - k + 1))
		pmf[k] = math.Exp(lg - lk - lnk + float64(k)*math.Log(p) + float64(n-k)*math.Log1p(-p))
	}
	cum := 0.0
	for lo = 0; lo <= n; lo++ {
		if cum+pmf[lo] > tail {
			break
		}
		cum += pmf[lo]
	}
	cum = 0
	for hi = n; hi >= 0; hi-- {
		if cum+pmf[hi] > tail {
			break
		}
		cum += pmf[hi]
	}
	return lo, hi
}

func checkCalibration(t *testing.T, name string, c calibration) {
	t.Helper()
	labels := make([]string, 0, len(c.pValues))
	for l := range c.pValues {
		labels = append(labels, l)
	}
	sort.Strings(labels)
	tested := 0
	for _, l := range labels {
		ps := c.pValues[l]
		if len(ps) < 100 {
			t.Logf("%s: %s seen in only %d sequences; not tested", name, l, len(ps))
			continue
		}
		tested++
		d := stats.KSStatistic(ps)
		up, _ := stats.KSLogTails(len(ps), d)
		if math.Exp(up) < 0.001 {
			t.Errorf("%s: %s p-values are not uniform: KS D = %.4f over %d sequences, p = %.2g", name, l, d, len(ps), math.Exp(up))
		}
	}
	if tested < 10 {
		t.Errorf("%s: only %d statistics tested", name, tested)
	}
	_, hi := binomialInterval(calibrationRuns, 0.01, 0.0005)
	for _, v := range []audit.Verdict{audit.NotConsistent, audit.TooUniform} {
		if k := c.verdicts[v]; k > hi {
			t.Errorf("%s: %d of %d verdicts %q, above the 99.9%% binomial interval's end %d for rate 0.01", name, k, calibrationRuns, v, hi)
		}
	}
	t.Logf("%s: %d statistics tested; verdicts %v", name, tested, c.verdicts)
}

func TestCalibrationUniformNull(t *testing.T) {
	for _, base := range []int{2, 10, 16} {
		p := make([]float64, base)
		for i := range p {
			p[i] = 1 / float64(base)
		}
		c := calibrate(t, base, p, audit.DefaultOptions(), 'u')
		checkCalibration(t, "uniform base "+string(rune('0'+base/10))+string(rune('0'+base%10)), c)
	}
}

func TestCalibrationVectorNull(t *testing.T) {
	p := []float64{0.2, 0.3, 0.5}
	opts := audit.DefaultOptions()
	opts.Null = audit.NullSpec{Kind: checks.Vector, P: p}
	checkCalibration(t, "vector (0.2,0.3,0.5) base 3", calibrate(t, 3, p, opts, 'v'))
}

// The binomial interval used above, against R 4.x: qbinom(c(0.0005, 0.9995),
// 300, 0.01) = 0 10 [value from memory of R's quantile convention; the test
// below recomputes it from the definition].
func TestBinomialInterval(t *testing.T) {
	lo, hi := binomialInterval(300, 0.01, 0.0005)
	if lo != 0 || hi < 9 || hi > 11 {
		t.Errorf("interval [%d, %d]", lo, hi)
	}
}

// Short inputs (n = 30, 100, 1000 digits in bases 2, 10 and 36, and 200
// bytes): the verdict rates stay within the 99.9% binomial interval of
// alpha. At these lengths most statistics are discrete and conservative,
// so only the verdicts are tested. The longest run of a digit that never
// occurs made "too uniform" 5.6% of verdicts at n = 30 in base 10 before
// P(L ≤ 0) = (1 − q)^n was used.
func TestCalibrationShortInputs(t *testing.T) {
	_, hi := binomialInterval(calibrationRuns, 0.01, 0.0005)
	for _, c := range []struct{ base, n int }{{2, 30}, {2, 100}, {2, 1000}, {10, 30}, {10, 100}, {10, 1000},
		{36, 30}, {36, 100}, {36, 1000}, {256, 200}} {
		p := make([]float64, c.base)
		for i := range p {
			p[i] = 1 / float64(c.base)
		}
		verdicts, exactTail := map[audit.Verdict]int{}, map[string]int{}
		for i := range calibrationRuns {
			var key [32]byte
			key[0], key[1], key[2], key[3], key[4] = 's', byte(c.base), byte(c.n), byte(c.n>>8), byte(i)
			key[5] = byte(i >> 8)
			d := expand.IID(c.n, p, rand.New(rand.NewChaCha8(key)))
			r, err := audit.Digits(d, c.base, audit.Source{Name: "short", Kind: "built-in", Bytes: -1}, audit.DefaultOptions())
			if err != nil {
				t.Fatal(err)
			}
			verdicts[r.Verdict]++
			for _, f := range r.Findings {
				if f.Check != "drift" && f.Check != "maxrun" {
					continue
				}
				if f.LogPUpper <= math.Log(0.01) {
					exactTail[f.Label()+" upper"]++
				}
				if f.LogPLower <= math.Log(0.01) {
					exactTail[f.Label()+" lower"]++
				}
			}
		}
		for _, v := range []audit.Verdict{audit.NotConsistent, audit.TooUniform} {
			if k := verdicts[v]; k > hi {
				t.Errorf("base %d, n = %d: %d of %d verdicts %q, above %d (the 99.9%% binomial interval's end for rate 0.01)", c.base, c.n, k, calibrationRuns, v, hi)
			}
		}
		// The statistics with exact laws at these lengths (drift's lattice
		// walk, the longest runs): each tail at or below 0.01 at most as
		// often as the binomial interval of 0.01 allows. Drift's lower tail
		// used the Brownian limit and reached 3.2% at n = 100 bits.
		for l, k := range exactTail {
			if k > hi {
				t.Errorf("base %d, n = %d: %s p ≤ 0.01 in %d of %d sequences, above %d", c.base, c.n, l, k, calibrationRuns, hi)
			}
		}
		t.Logf("base %d, n = %d: %v; exact tails ≤ 0.01: %v", c.base, c.n, verdicts, exactTail)
	}
}

// The second level with many segments: 10^6 i.i.d. bits (and 10^6 decimal
// digits) cut into 1000 segments of 1000 digits. At that length the segment
// statistics are visibly discrete (poker has a handful of classes, the
// longest run a few values, the runs-up-and-down count is an integer), so
// their randomized p-values are uniform only when each uses its true atom
// P(T = t) (Tocher 1950). Before the exact laws and atoms were used, the
// poker segments' KS test failed on every such input and 82% of bit audits
// said "not consistent". For each seeded input every second-level finding's
// raw p-values in both tails must stay above 0.001 (at most a few expected
// to fall below it by chance over the 8 inputs × 14 findings × 2 tails; the
// test allows 2), and the input's verdict must be "consistent" in at least
// 7 of the 8.
func TestCalibrationManySegments(t *testing.T) {
	if testing.Short() {
		t.Skip("second-level calibration: several audits of 10^6 digits")
	}
	for _, base := range []int{2, 10} {
		p := make([]float64, base)
		for i := range p {
			p[i] = 1 / float64(base)
		}
		opts := audit.DefaultOptions()
		opts.Segments = 1000
		small, consistent := 0, 0
		const inputs = 8
		for i := range inputs {
			var key [32]byte
			key[0], key[1], key[2] = 'm', byte(base), byte(i)
			d := expand.IID(1_000_000, p, rand.New(rand.NewChaCha8(key)))
			opts.Seed = uint64(i + 1)
			r, err := audit.Digits(d, base, audit.Source{Name: "segments", Kind: "built-in", Bytes: -1}, opts)
			if err != nil {
				t.Fatal(err)
			}
			if r.Verdict == audit.Consistent {
				consistent++
			}
			seen := 0
			for _, f := range r.Findings {
				if f.Check != "segments" {
					continue
				}
				seen++
				for tail, lp := range map[string]float64{"upper": f.LogPUpper, "lower": f.LogPLower} {
					if lp <= math.Log(0.001) {
						small++
						t.Logf("base %d input %d: %s %s p = %.3g", base, i, f.Label(), tail, math.Exp(lp))
					}
				}
			}
			if seen < 10 {
				t.Fatalf("base %d input %d: only %d second-level findings", base, i, seen)
			}
		}
		if small > 2 {
			t.Errorf("base %d: %d second-level p-values ≤ 0.001 over %d inputs of 1000 segments", base, small, inputs)
		}
		if consistent < inputs-1 {
			t.Errorf("base %d: only %d of %d inputs consistent", base, consistent, inputs)
		}
	}
}

// The dimension interval at the plan's largest block length, in the bases
// where the block rule leaves only 5–6 windows per cell (bases 2 and 3 at
// these lengths): the 99% interval must contain the true dimension 1 at a
// rate within the 99.9% binomial interval of 0.99. With Williams' first-order
// mean correction alone it excluded 1 in 10 of 30 bit streams of 332 192
// bits and 12 of 40 base-3 streams of 3·10^5 digits.
func TestCalibrationDimensionCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("dimension coverage: 100 audits")
	}
	const runs = 50
	_, hi := binomialInterval(runs, 0.01, 0.0005)
	for _, c := range []struct{ base, n int }{{2, 332_192}, {3, 300_000}} {
		p := make([]float64, c.base)
		for i := range p {
			p[i] = 1 / float64(c.base)
		}
		opts := audit.DefaultOptions()
		opts.Checks = []string{"entropy"}
		misses, K := 0, 0
		for i := range runs {
			var key [32]byte
			key[0], key[1], key[2] = 'd', byte(c.base), byte(i)
			d := expand.IID(c.n, p, rand.New(rand.NewChaCha8(key)))
			r, err := audit.Digits(d, c.base, audit.Source{Name: "coverage", Kind: "built-in", Bytes: -1}, opts)
			if err != nil {
				t.Fatal(err)
			}
			s := r.Entropy.Summary
			K = s.K
			if !(s.DimLow <= 1 && 1 <= s.DimHigh+1e-12) {
				misses++
			}
		}
		if K < 10 {
			t.Errorf("base %d: the plan chose k = %d; the test wants the thin-context block lengths", c.base, K)
		}
		if misses > hi {
			t.Errorf("base %d, n = %d, k = %d: the 99%% dimension interval missed 1 in %d of %d sequences (at most %d allowed)", c.base, c.n, K, misses, runs, hi)
		}
		t.Logf("base %d, n = %d, k = %d: %d misses in %d", c.base, c.n, K, misses, runs)
	}
}

// A skewed vector null with an entry of 1e-4, p = (1e-4, 0.4999, 0.5): the
// rare digit occurs about once in 10^4, so the coupon segments (which end
// only when it has appeared) are about 10^4 digits long, of the order of
// the 65 536-digit restart spacing. Dropping the segment open at each
// restart kept the short ones only: 13.6% of coupon p upper fell below 0.01
// at 10^5 digits.
func TestCalibrationSkewedVector(t *testing.T) {
	p := []float64{1e-4, 0.4999, 0.5}
	opts := audit.DefaultOptions()
	opts.Null = audit.NullSpec{Kind: checks.Vector, P: p}
	checkCalibration(t, "vector (1e-4,0.4999,0.5) base 3", calibrate(t, 3, p, opts, 's'))
}

// Coupon restarts under skewed nulls, where a segment's mean length (10^4
// and 500 digits) is not small against the 65 536-digit restart spacing.
// Two checks on 300 seeded inputs of 3·10^5 digits per vector:
//
//   - the counted segment lengths, pooled over all inputs, follow the capped
//     law P(min(T, Cap) = r) (X² over classes of expected count ≥ 50,
//     p > 0.001). Dropping the segment open at each restart kept the short
//     ones only: the pooled X² had p ≈ 3·10^-12 for p = (1e-4, 0.4999, 0.5).
//   - the audit's coupon p upper falls at or below 0.01 in a share within
//     the 99.9% binomial interval of 0.01, and passes KS. Before, the
//     share was 2.3% at 10^6 digits and 13.6% at 10^5 for the first vector.
func TestCalibrationCouponRestarts(t *testing.T) {
	runs, n := calibrationScale(300), 300_000
	for vi, p := range [][]float64{{1e-4, 0.4999, 0.5}, {0.002, 0.499, 0.499}} {
		opts := audit.DefaultOptions()
		opts.Null = audit.NullSpec{Kind: checks.Vector, P: p}
		opts.Checks = []string{"coupon"}
		const capLen = 4096
		spec := tally.Spec{Base: 3, MaxBlock: 1, Records: []tally.RecordSpec{
			&tally.CouponSpec{Classes: 3, Class: []int{0, 1, 2}, Cap: capLen}}}
		pooled := make([]int64, capLen+1)
		var pUpper []float64
		small := 0
		for i := range runs {
			var key [32]byte
			key[0], key[1], key[2], key[3] = 'k', byte(vi), byte(i), byte(i>>8)
			d := expand.IID(n, p, rand.New(rand.NewChaCha8(key)))
			tl, err := tally.New(spec, 0)
			if err != nil {
				t.Fatal(err)
			}
			tl.Add(d)
			for r, c := range tl.Coupons().Counted() {
				pooled[r] += c
			}
			res, err := audit.Digits(d, 3, audit.Source{Name: "calibration", Kind: "built-in", Bytes: -1}, opts)
			if err != nil {
				t.Fatal(err)
			}
			for _, f := range res.Findings {
				if f.Check == "coupon" {
					pu := math.Exp(f.LogPUpper)
					pUpper = append(pUpper, pu)
					if pu <= 0.01 {
						small++
					}
				}
			}
		}
		cdf := checks.CouponCDF(p, capLen)
		var total int64
		for _, c := range pooled {
			total += c
		}
		x2, classes := 0.0, 0
		var o int64
		e := 0.0
		for r := 3; r <= capLen; r++ {
			pr := cdf[r] - cdf[r-1]
			if r == capLen {
				pr = 1 - cdf[capLen-1]
			}
			o, e = o+pooled[r], e+float64(total)*pr
			if e >= 50 || r == capLen {
				x2 += (float64(o) - e) * (float64(o) - e) / e
				classes++
				o, e = 0, 0
			}
		}
		if lp := stats.ChiSquareLogSF(x2, float64(classes-1)); lp < math.Log(0.001) {
			t.Errorf("p = %v: pooled coupon lengths of %d segments depart from the capped law: X² = %.1f on %d df, ln p = %.1f",
				p, total, x2, classes-1, lp)
		}
		if len(pUpper) != runs {
			t.Fatalf("p = %v: coupon tested in %d of %d inputs", p, len(pUpper), runs)
		}
		lo, hi := binomialInterval(runs, 0.01, 0.0005)
		if small < lo || small > hi {
			t.Errorf("p = %v: coupon p upper ≤ 0.01 in %d of %d inputs, outside [%d, %d]", p, small, runs, lo, hi)
		}
		ks := stats.KSStatistic(pUpper)
		if up, _ := stats.KSLogTails(len(pUpper), ks); math.Exp(up) < 0.001 {
			t.Errorf("p = %v: coupon p upper not uniform: KS D = %.4f, p = %.2g", p, ks, math.Exp(up))
		}
		t.Logf("p = %v: %d segments pooled, X² = %.1f on %d df; p upper ≤ 0.01 in %d of %d", p, total, x2, classes-1, small, runs)
	}
}

// Poker under a fitted null whose true vector is not uniform: p̂ comes from
// the same digits, so X² is not χ² with classes − 1 df but Σ λ_i χ²_1 with
// the Chernoff–Lehmann weights (checks.PokerFittedWeights). 1000 seeded
// sequences of 30 000 digits per vector; the upper p-values must pass KS
// at 0.001. With classes − 1 df (the code before the weights) the KS p on
// these sequences was 2·10^-4 for (0.2, 0.3, 0.5) and 2·10^-19 for (0.3, 0.7).
func TestCalibrationFittedPoker(t *testing.T) {
	runs := calibrationScale(1000)
	for vi, p := range [][]float64{{0.2, 0.3, 0.5}, {0.3, 0.7}} {
		opts := audit.DefaultOptions()
		opts.Null = audit.NullSpec{Kind: checks.Fitted}
		opts.Checks = []string{"poker"}
		var up []float64
		for i := range runs {
			var key [32]byte
			key[0], key[1], key[2], key[3] = 'f', byte(vi), byte(i), byte(i>>8)
			d := expand.IID(30_000, p, rand.New(rand.NewChaCha8(key)))
			r, err := audit.Digits(d, len(p), audit.Source{Name: "calibration", Kind: "built-in", Bytes: -1}, opts)
			if err != nil {
				t.Fatal(err)
			}
			for _, f := range r.Findings {
				if f.Check == "poker" {
					up = append(up, math.Exp(f.LogPUpper))
				}
			}
		}
		if len(up) != runs {
			t.Fatalf("p = %v: poker tested in %d of %d sequences", p, len(up), runs)
		}
		d := stats.KSStatistic(up)
		lp, _ := stats.KSLogTails(len(up), d)
		if math.Exp(lp) < 0.001 {
			t.Errorf("p = %v: fitted-null poker p-values not uniform: KS D = %.4f, p = %.2g", p, d, math.Exp(lp))
		}
		t.Logf("p = %v: KS D = %.4f, p = %.3g", p, d, math.Exp(lp))
	}
}

// freq with a digit that expects about one occurrence: (1e-4, 0.4999,
// 0.5) at 10^4 digits. Pearson's X² over the three digits is far from its
// χ² law there (the rare cell alone gives X² = 9 for 4 occurrences); the
// digits are pooled until every class expects 5. 2000 seeded sequences:
// the X² p upper must pass KS at 0.001 (with the unpooled cells, the code
// before, KS p was 6·10^-44 on these sequences).
func TestCalibrationSparseFrequencies(t *testing.T) {
	p := []float64{1e-4, 0.4999, 0.5}
	opts := audit.DefaultOptions()
	opts.Null = audit.NullSpec{Kind: checks.Vector, P: p}
	opts.Checks = []string{"freq"}
	runs := calibrationScale(2000)
	var up []float64
	for i := range runs {
		var key [32]byte
		key[0], key[1], key[2] = 'r', byte(i), byte(i>>8)
		d := expand.IID(10_000, p, rand.New(rand.NewChaCha8(key)))
		r, err := audit.Digits(d, 3, audit.Source{Name: "calibration", Kind: "built-in", Bytes: -1}, opts)
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range r.Findings {
			if f.Label() == "freq X2 k=1" {
				up = append(up, math.Exp(f.LogPUpper))
			}
		}
	}
	if len(up) != runs {
		t.Fatalf("freq X² in %d of %d sequences", len(up), runs)
	}
	d := stats.KSStatistic(up)
	lp, _ := stats.KSLogTails(len(up), d)
	if math.Exp(lp) < 0.001 {
		t.Errorf("sparse freq X² p-values not uniform: KS D = %.4f, p = %.2g", d, math.Exp(lp))
	}
	t.Logf("KS D = %.4f, p = %.3g over %d sequences", d, math.Exp(lp), len(up))
}

// The word-level checks under the null: seeded ChaCha8 bytes read as
// words, 300 sequences of 40 KB, 120 KB and 400 KB for each word size
// (16 and 32 bits; 24 and 64 too under BOREL_CALIBRATION=long). Each
// statistic's upper-tail p-values (randomized where discrete) must be
// uniform (KS at 0.001), and Holm over the word findings' two tails at
// alpha = 0.01 must flag no more sequences than the 99.9% binomial
// interval allows, on either side. lincomp runs on segments of 64 words
// here (its law is exact for every length; the audit's 10^5 would take
// minutes), through the same record and check as the audit.
func TestCalibrationWords(t *testing.T) {
	sizes := []int{16, 32}
	if os.Getenv("BOREL_CALIBRATION") == "long" {
		sizes = append(sizes, 24, 64)
	}
	lengths := []int{40_000, 120_000, 400_000}
	for _, W := range sizes {
		spec := tally.Spec{Base: 256, MaxBlock: 1}
		set := checks.Setting{Base: 256, Null: checks.Uniform, Word: W}
		var run []checks.Check
		for _, c := range checks.All() {
			for _, r := range c.Needs(set).Records {
				if ws, ok := r.(*tally.WordSpec); ok {
					if ws.Test == tally.LinComp {
						ws.Segment = 64
					}
					spec.Records = append(spec.Records, ws)
					run = append(run, c)
				}
			}
		}
		c := calibration{pValues: map[string][]float64{}, verdicts: map[audit.Verdict]int{}}
		u := rand.New(rand.NewPCG(uint64(W), 7))
		opts := checks.Options{MinExpected: 5, Confidence: 0.99}
		for i := range calibrationRuns {
			var key [32]byte
			key[0], key[1], key[2], key[3] = 'w', byte(W), byte(i), byte(i>>8)
			rng := rand.New(rand.NewChaCha8(key))
			d := make([]byte, lengths[i%len(lengths)])
			for j := range d {
				d[j] = byte(rng.Uint32())
			}
			tl, err := tally.New(spec, 0)
			if err != nil {
				t.Fatal(err)
			}
			tl.Add(d)
			var res checks.Result
			for _, ch := range run {
				ch.Run(checks.Input{Tally: tl, Null: checks.UniformNull(256), Opts: opts}, &res)
			}
			var logP []float64
			for _, f := range res.Findings {
				pr := checks.RandomizedP(f, u.Float64())
				c.pValues[f.Label()] = append(c.pValues[f.Label()], math.Exp(pr.LogP))
				logP = append(logP, f.LogPUpper, f.LogPLower)
			}
			adj := stats.HolmLog(logP)
			verdict := audit.Consistent
			for k, f := range res.Findings {
				if adj[2*k] <= math.Log(0.01) || f.TwoSided && adj[2*k+1] <= math.Log(0.01) {
					verdict = audit.NotConsistent
					break
				}
				if adj[2*k+1] <= math.Log(0.01) {
					verdict = audit.TooUniform
				}
			}
			c.verdicts[verdict]++
		}
		name := "words of " + strconv.Itoa(W) + " bits"
		labels := make([]string, 0, len(c.pValues))
		for l := range c.pValues {
			labels = append(labels, l)
		}
		sort.Strings(labels)
		for _, l := range labels {
			ps := c.pValues[l]
			if len(ps) < 100 {
				t.Logf("%s: %s seen in only %d sequences; not tested", name, l, len(ps))
				continue
			}
			d := stats.KSStatistic(ps)
			if up, _ := stats.KSLogTails(len(ps), d); math.Exp(up) < 0.001 {
				t.Errorf("%s: %s p-values are not uniform: KS D = %.4f over %d sequences, p = %.2g", name, l, d, len(ps), math.Exp(up))
			}
		}
		_, hi := binomialInterval(calibrationRuns, 0.01, 0.0005)
		for _, v := range []audit.Verdict{audit.NotConsistent, audit.TooUniform} {
			if k := c.verdicts[v]; k > hi {
				t.Errorf("%s: %d of %d verdicts %q, above the 99.9%% binomial interval's end %d", name, k, calibrationRuns, v, hi)
			}
		}
		t.Logf("%s: %d statistics (%v); verdicts %v", name, len(labels), labels, c.verdicts)
	}
}
