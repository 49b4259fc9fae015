package checks

import (
	"fmt"
	"math"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
)

// The word-level checks read a raw byte stream as words (Setting.Word bits,
// little- or big-endian) and test the structure generator defects leave
// in them: GF(2)-linear recurrences (linear complexity, matrix rank), the
// lattice structure of lagged-Fibonacci and subtract-with-borrow
// generators (birthday spacings), repeated words (collisions), and the
// dependence of consecutive words (Hamming weights, relative order). They
// run only on words under the uniform null: i.i.d. words, every value
// equally likely. Each reads its record of the tally (tally.WordSpec),
// whose items are aligned to global word positions, so shards merge
// exactly.

// wordNeeds returns the record of a word test when the setting reads words.
func wordNeeds(s Setting, test string) Needs {
	if s.Word == 0 || s.Base != 256 || s.Null != Uniform {
		return Needs{}
	}
	spec := &tally.WordSpec{Test: test, Word: s.Word, BigEndian: s.BigEndian}
	if spec.Test == tally.Birthday && s.Word < tally.BirthdayBits || spec.Test == tally.WordColl && s.Word < 16 {
		return Needs{}
	}
	return Needs{Records: []tally.RecordSpec{spec}}
}

// lincompCheck is the linear complexity of single bit positions across
// words: for bit 0 (the lowest, where power-of-two-modulus generators are
// weakest) and bit W−1, the sequence of that bit in n = 10^5 consecutive
// words, segment by segment, and its linear complexity L by the
// Berlekamp–Massey algorithm (stats/gf2). For n random bits the number of
// sequences of complexity L ≥ 1 is 2^min(2n−2L, 2L−1) (Gustavson 1976;
// Rueppel, Analysis and Design of Stream Ciphers, 1986, ch. 4), so
//
//	P(L) = 2^(min(2n−2L, 2L−1) − n),  P(L ≤ l) = 2^−n (1/3 + (2/3)·4^l) for l ≤ n/2,
//
// L concentrates at n/2 (P(L = ⌊n/2⌋ + d) ≈ 2^−2d above, 2^−(2|d|+1)
// below for even n). Two findings per bit: Lmin, the smallest L over the S
// tested segments, with its exact law P(Lmin ≤ l) = 1 − (1 − P(L ≤ l))^S
// (a generator with an LFSR of degree < n/2 in that bit — MT19937's 19937,
// xorshift's 32 or 64, the lagged Fibonacci's 55 — is caught in one
// segment); and X² of L − ⌊n/2⌋ in 25 classes (the last two open) against
// their exact probabilities, pooled to expected counts of 5, df = classes
// − 1. Only the first 8 segments and every 32nd are tested (the algorithm
// is quadratic: 0.13 s a segment); the detail says how many.
type lincompCheck struct{}

func (lincompCheck) Description() string   { return "linear complexity" }
func (lincompCheck) Name() string          { return "lincomp" }
func (lincompCheck) Needs(s Setting) Needs { return wordNeeds(s, tally.LinComp) }
func (lincompCheck) StatisticNames() map[string]StatName {
	return map[string]StatName{"Lmin": {"L min", `$L_{\min}$`}}
}

// lincompLogCDF returns ln P(L ≤ l) for n random bits (l ≥ 0).
func lincompLogCDF(n, l int) float64 {
	if l >= n {
		return 0
	}
	if 2*l <= n {
		// 2^−n (1/3 + (2/3) 4^l) = 2^(2l−n) (2/3 + 4^−l/3)
		return float64(2*l-n)*math.Ln2 + math.Log(2.0/3+math.Pow(4, -float64(l))/3)
	}
	return math.Log1p(-math.Exp(lincompLogSF(n, l+1)))
}

// lincompLogSF returns ln P(L ≥ l) for n random bits.
func lincompLogSF(n, l int) float64 {
	if l <= 0 {
		return 0
	}
	if 4*l > 2*n+1 { // every L ≥ l has exponent 2n−2L: Σ 2^(n−2L) = (4/3) 2^(n−2l) (1 − 4^−(n−l+1))
		return float64(n-2*l)*math.Ln2 + math.Log(4.0/3) + math.Log1p(-math.Pow(4, -float64(n-l+1)))
	}
	return math.Log1p(-math.Exp(lincompLogCDF(n, l-1)))
}

// lincompLogP returns ln P(L = l).
func lincompLogP(n, l int) float64 {
	if l == 0 {
		return -float64(n) * math.Ln2
	}
	return float64(min(2*n-2*l, 2*l-1)-n) * math.Ln2
}

func (lincompCheck) Run(in Input, out *Result) {
	rec := in.Tally.Words(tally.LinComp)
	if rec == nil {
		return
	}
	n := rec.ItemWords()
	m := n / 2
	const C = 12
	stride := 2*C + 2
	for p, bit := range []int{0, rec.Word - 1} {
		params := map[string]int{"bit": bit}
		hist := rec.Counts[p*stride : p*stride+2*C+1]
		var S int64
		for _, v := range hist {
			S += v
		}
		if S == 0 {
			out.Skips = append(out.Skips, Skip{Check: "lincomp", Params: params,
				Reason: fmt.Sprintf("no whole segment of %d words (%d bytes) was read; needs at least that", n, n*rec.Word/8)})
			continue
		}
		lmin := int(rec.Counts[p*stride+stride-1] - 1)
		// Lmin: ln P(min ≤ lmin) = ln(1 − (1 − F)^S), ln P(min ≥ lmin) = S ln(1 − F(lmin−1)).
		logF := lincompLogCDF(n, lmin)
		up := logOneMinusPow(logF, S)
		lo := 0.0
		if lmin > 0 {
			lo = float64(S) * log1mExp(lincompLogCDF(n, lmin-1))
		}
		atom := math.Inf(-1)
		if next := float64(S) * log1mExp(logF); lo > next {
			atom = lo + log1mExp(next-lo)
		}
		f := Finding{Check: "lincomp", Statistic: "Lmin", Params: params, Value: float64(lmin),
			LogPUpper: up, LogPLower: lo, Discrete: true, LogPAtom: atom}
		f.Detail = fmt.Sprintf("smallest linear complexity of bit %d over %d segments of %d words (n/2 = %d); segments tested: the first 8 and every 32nd", bit, S, n, m)
		if lmin < m-C {
			f.Where = fmt.Sprintf("bit %d: L = %d in a segment of %d bits, %d below n/2 = %d", bit, lmin, n, m-lmin, m)
			f.WhereHow = "of the linear complexity"
		}
		out.Findings = append(out.Findings, Clamp(f))
		// X² of the classes L − m = −C (and below) … +C (and above).
		obs := make([]int64, 2*C+1)
		exp := make([]float64, 2*C+1)
		copy(obs, hist)
		for i := range exp {
			l := m - C + i
			var lp float64
			switch i {
			case 0:
				lp = lincompLogCDF(n, l)
			case 2 * C:
				lp = lincompLogSF(n, l)
			default:
				lp = lincompLogP(n, l)
			}
			exp[i] = float64(S) * math.Exp(lp)
		}
		x, classes, ok := pooledX2("lincomp", params, obs, exp, S, in.Opts.MinExpected)
		if !ok {
			out.Skips = append(out.Skips, Skip{Check: "lincomp", Params: params,
				Reason: fmt.Sprintf("%d tested segments are too few for 2 classes of expected count %g; needs about 20 (the first 8 and every 32nd are tested: %d segments of %d words, %d bytes)", S, in.Opts.MinExpected, 8+32*12, n, int64(8+32*12)*int64(n)*int64(rec.Word/8))})
			continue
		}
		x.Detail = fmt.Sprintf("%d segments of %d words, L − n/2 in %d classes after pooling", S, n, classes)
		out.Findings = append(out.Findings, x)
	}
}

// pooledX2 pools the classes to expected counts of minExp and returns X²
// of the N items with its tails: from the exact multinomial law of X² when
// it is affordable (a few segments or samples in 2 or 3 classes are far
// from the chi-square limit), else the chi-square law with classes − 1
// df. ok is false with fewer than 2 classes.
func pooledX2(check string, params map[string]int, obs []int64, exp []float64, N int64, minExp float64) (f Finding, classes int, ok bool) {
	po, pe := poolClasses(obs, exp, minExp)
	if len(po) < 2 {
		return Finding{}, len(po), false
	}
	cs := newCellStat()
	probs := make([]float64, len(pe))
	for i := range po {
		cs.add(po[i], pe[i])
		probs[i] = pe[i] / float64(N)
	}
	f = chiSquareFinding(check, "X2", params, cs.x2, float64(len(po)-1), cs.minExp)
	if law, exact := stats.MultinomialX2Law(N, probs); exact {
		f.setDiscrete(law.LogTails(cs.x2))
	}
	return f, len(po), true
}

// logOneMinusPow returns ln(1 − (1 − e^logF)^S) accurately for tiny F.
func logOneMinusPow(logF float64, S int64) float64 {
	if logF >= 0 {
		return 0
	}
	if logF < -40 { // 1 − (1 − F)^S = S F (1 + O(S F)): F is below 1e-17
		sf := math.Log(float64(S)) + logF
		if sf < -40 {
			return sf
		}
	}
	l := float64(S) * log1mExp(logF) // ln (1 − F)^S
	return log1mExp(l)
}

// log1mExp returns ln(1 − e^x) for x ≤ 0.
func log1mExp(x float64) float64 {
	if x >= 0 {
		return math.Inf(-1)
	}
	if x > -math.Ln2 {
		return math.Log(-math.Expm1(x))
	}
	return math.Log1p(-math.Exp(x))
}

// rankCheck is the rank over GF(2) of W×W binary matrices whose rows are
// W consecutive words (32×32 for 32-bit words, 64×64 for 64-bit ones): a
// generator linear over GF(2) whose state has at most W bits (xorshift)
// gives full-rank matrices only. The number of m×n binary matrices of rank
// r is ∏_{i<r} (2^m − 2^i)(2^n − 2^i)/(2^r − 2^i) (Landsberg 1893), so for
// a random W×W matrix
//
//	P(r) = 2^(r(2W−r) − W²) ∏_{i<r} (1 − 2^(i−W))² / (1 − 2^(i−r))
//
// (Kovalenko, Theory Probab. Appl. 17 (1972); Marsaglia & Tsay, Linear
// Algebra Appl. 67 (1985) 147–156): for W = 32, 0.2888, 0.5776 and 0.1336
// for ranks 32, 31 and less. X² over the three classes, pooled to expected
// counts of 5, df = classes − 1.
type rankCheck struct{}

func (rankCheck) Description() string   { return "GF(2) rank of word matrices" }
func (rankCheck) Name() string          { return "rank" }
func (rankCheck) Needs(s Setting) Needs { return wordNeeds(s, tally.Rank) }

// RankLogP returns ln P(rank = r) for a random W×W binary matrix.
func RankLogP(W, r int) float64 {
	lp := float64(r*(2*W-r)-W*W) * math.Ln2
	for i := 0; i < r; i++ {
		lp += 2*math.Log1p(-math.Pow(2, float64(i-W))) - math.Log1p(-math.Pow(2, float64(i-r)))
	}
	return lp
}

func (rankCheck) Run(in Input, out *Result) {
	rec := in.Tally.Words(tally.Rank)
	if rec == nil {
		return
	}
	rankFinding(in, out, "rank", rec.Counts, rec.Word, "one word a row")
}

// rankFinding adds the X² of the ranks of W×W matrices (counts of rank W,
// W−1 and less).
func rankFinding(in Input, out *Result, check string, counts []int64, W int, rows string) {
	params := map[string]int{"size": W}
	var N int64
	for _, v := range counts {
		N += v
	}
	pFull, pLess1 := math.Exp(RankLogP(W, W)), math.Exp(RankLogP(W, W-1))
	exp := []float64{float64(N) * pFull, float64(N) * pLess1, float64(N) * (1 - pFull - pLess1)}
	f, classes, ok := pooledX2(check, params, counts, exp, N, in.Opts.MinExpected)
	if !ok {
		need := int64(math.Ceil(in.Opts.MinExpected / math.Min(pFull, 1-pFull)))
		out.Skips = append(out.Skips, Skip{Check: check, Params: params,
			Reason: fmt.Sprintf("%d matrices are too few; needs about %d matrices (%d bytes)", N, 2*need, 2*need*int64(W*W/8))})
		return
	}
	f.Detail = fmt.Sprintf("%d matrices of %d×%d bits (%s): %d of full rank, %d of rank %d, %d lower; %d classes", N, W, W, rows, counts[0], counts[1], W-1, counts[2], classes)
	f.Where = topResiduals(counts, exp, 3, func(i int) string {
		return []string{fmt.Sprintf("rank %d", W), fmt.Sprintf("rank %d", W-1), fmt.Sprintf("rank ≤ %d", W-2)}[i]
	})
	out.Findings = append(out.Findings, f)
}

// rowrankCheck is rankCheck on 31×31 matrices whose rows are consecutive
// 31-bit pieces of the bit stream (most significant bit of each byte
// first), so that rows cut across words: the stream cut into rows of a
// length no word has (31×31: P(full rank) = 0.2888, as for 32×32).
type rowrankCheck struct{}

func (rowrankCheck) Description() string   { return "GF(2) rank of 31-bit rows" }
func (rowrankCheck) Name() string          { return "rowrank" }
func (rowrankCheck) Needs(s Setting) Needs { return wordNeeds(s, tally.RowRank) }

func (rowrankCheck) Run(in Input, out *Result) {
	rec := in.Tally.Words(tally.RowRank)
	if rec == nil {
		return
	}
	rankFinding(in, out, "rowrank", rec.Counts, tally.RowBits, fmt.Sprintf("31-bit rows of the bit stream, across %d-bit words", rec.Word))
}

// birthdayCheck is Marsaglia's birthday spacings (Knuth, TAOCP vol. 2, 3rd
// ed., §3.3.2 J): m = 512 birthdays, the top 24 bits of 512 consecutive
// words, in a year of n = 2^24 days; sorted, their m spacings (the last
// around the end of the year) sorted in turn, and R the number of spacings
// equal to the one before. R is asymptotically Poisson with λ = m³/(4n) =
// 2 (BirthdayMean gives the mean to second order). Two findings over the
// first 2048 samples: ΣR against Poisson(S·E[R]), with its tails
// (discrete); and X² of the per-sample R in classes 0, 1, … (pooled to
// expected counts of 5) against Poisson(E[R]), df = classes − 1.
// Lagged Fibonacci and subtract-with-borrow generators, whose words lie
// on few lattice planes, make R too large.
type birthdayCheck struct{}

func (birthdayCheck) Description() string   { return "birthday spacings" }
func (birthdayCheck) Name() string          { return "birthday" }
func (birthdayCheck) Needs(s Setting) Needs { return wordNeeds(s, tally.Birthday) }
func (birthdayCheck) StatisticNames() map[string]StatName {
	return map[string]StatName{"R": {"ΣR", `$\sum R$`}}
}

// poissonLogTails returns ln P(X ≥ k), ln P(X ≤ k) and ln P(X = k) for X
// Poisson with mean lambda.
func poissonLogTails(k int64, lambda float64) (up, lo, eq float64) {
	kf := float64(k)
	lg, _ := math.Lgamma(kf + 1)
	eq = kf*math.Log(lambda) - lambda - lg
	up = 0
	if k > 0 {
		up = stats.LogGammaP(kf, lambda)
	}
	lo = stats.LogGammaQ(kf+1, lambda)
	return up, lo, eq
}

// BirthdayMean is the mean of R used as the Poisson parameter: Knuth's
// λ = m³/(4n) = 2 with the second-order terms of the two things the limit
// leaves out, derived here: the spacings sum to n (pairs of equal spacings
// are fewer by a factor 1 − 1/m than for independent ones, on top of the
// 1 − 1/m of m(m−1)/2 against m²/2), and R counts k − 1, not k(k−1)/2, for
// a value k spacings share (less E[triples] ≈ m⁵/(18n²)):
//
//	E[R] ≈ m³/(4n) (1 − 2/m) − m⁵/(18 n²) = 1.98525 for m = 512, n = 2^24.
//
// (A seeded simulation of 4·10^5 samples gives 1.9870 ± 0.0022.) With it
// and at most 2048 samples the sum's bias is below 0.03 of its standard
// deviation; Knuth's λ = 2 shifted 3000 calibration runs of 260 samples
// enough to fail a uniformity test.
func BirthdayMean() float64 {
	m, n := float64(tally.BirthdayCount), math.Ldexp(1, tally.BirthdayBits)
	return m*m*m/(4*n)*(1-2/m) - math.Pow(m, 5)/(18*n*n)
}

func (birthdayCheck) Run(in Input, out *Result) {
	rec := in.Tally.Words(tally.Birthday)
	if rec == nil {
		return
	}
	lambda := BirthdayMean()
	hist := rec.Counts[:len(rec.Counts)-1]
	total := rec.Counts[len(rec.Counts)-1]
	var S int64
	for _, v := range hist {
		S += v
	}
	params := map[string]int{"bits": tally.BirthdayBits}
	if S == 0 {
		out.Skips = append(out.Skips, Skip{Check: "birthday", Params: params,
			Reason: fmt.Sprintf("no sample of %d words was read", tally.BirthdayCount)})
		return
	}
	up, lo, eq := poissonLogTails(total, lambda*float64(S))
	f := Finding{Check: "birthday", Statistic: "R", Params: params, Value: float64(total),
		LogPUpper: up, LogPLower: lo, Discrete: true, LogPAtom: eq}
	f.Detail = fmt.Sprintf("the first %d samples of %d birthdays in 2^%d days (of at most %d tested): %d repeated spacings, %.6g expected (Poisson, mean %.5g a sample)", S, tally.BirthdayCount, tally.BirthdayBits, tally.BirthdaySamples, total, lambda*float64(S), lambda)
	out.Findings = append(out.Findings, Clamp(f))
	exp := make([]float64, len(hist))
	cum := 0.0
	for r := range exp {
		if r == len(exp)-1 {
			exp[r] = float64(S) * math.Max(0, 1-cum)
			break
		}
		_, _, e := poissonLogTails(int64(r), lambda)
		exp[r] = float64(S) * math.Exp(e)
		cum += math.Exp(e)
	}
	x, classes, ok := pooledX2("birthday", params, hist, exp, S, in.Opts.MinExpected)
	if !ok {
		return
	}
	x.Detail = fmt.Sprintf("%d samples, R per sample in %d classes after pooling, against Poisson(%.5g)", S, classes, lambda)
	x.Where = topResiduals(hist, exp, 3, func(r int) string {
		if r == len(hist)-1 {
			return fmt.Sprintf("R ≥ %d", r)
		}
		return fmt.Sprintf("R = %d", r)
	})
	out.Findings = append(out.Findings, x)
}

// wordcollCheck counts collisions of words (Knuth §3.3.2 I): the top h =
// min(W, 32) bits of m = 2^(h/2) consecutive words thrown into n = 2^h
// urns; a collision is a word whose urn is already taken. In a block the
// number of collisions has the exact law of Knuth's Algorithm S (mean μ =
// m − n(1 − (1 − 1/n)^m)), and the total over B blocks the B-fold
// convolution of it (stats.CollisionSumLaw), whose tails the finding
// reports (beyond 1e-300 of the mode, Poisson tails with mean Bμ). A generator that never repeats a word
// in its period (xorshift32 is a permutation of the nonzero words) has
// none, and is caught on the too-uniform side.
type wordcollCheck struct{}

func (wordcollCheck) Description() string   { return "collisions of words" }
func (wordcollCheck) Name() string          { return "wordcoll" }
func (wordcollCheck) Needs(s Setting) Needs { return wordNeeds(s, tally.WordColl) }
func (wordcollCheck) StatisticNames() map[string]StatName {
	return map[string]StatName{"C": {"C", `$C$`}}
}

// CollisionMean is the expected number of collisions in one block of
// W-bit words: m − n(1 − (1 − 1/n)^m), n = 2^h urns, m = 2^(h/2) balls.
func CollisionMean(W int) float64 {
	m := float64(tally.CollisionBlock(W))
	n := math.Ldexp(1, tally.CollisionBits(W))
	return m - n*(-math.Expm1(m*math.Log1p(-1/n)))
}

func (wordcollCheck) Run(in Input, out *Result) {
	rec := in.Tally.Words(tally.WordColl)
	if rec == nil {
		return
	}
	h := tally.CollisionBits(rec.Word)
	m := float64(tally.CollisionBlock(rec.Word))
	mu := CollisionMean(rec.Word)
	B, C := rec.Counts[0], rec.Counts[1]
	params := map[string]int{"bits": h}
	if B == 0 {
		out.Skips = append(out.Skips, Skip{Check: "wordcoll", Params: params,
			Reason: fmt.Sprintf("no block of %d words was read", int(m))})
		return
	}
	law := stats.CollisionSumLaw(int(m), math.Ldexp(1, h), B)
	up, lo, eq := law.LogTails(float64(C))
	how := "exact law (Knuth's recurrence, convolved over the blocks)"
	if math.IsInf(up, -1) || math.IsInf(lo, -1) { // beyond the kept support (below 1e-300 of the mode)
		up, lo, eq = poissonLogTails(C, mu*float64(B))
		how = "far beyond the exact law's kept support: Poisson tails with the exact mean"
	}
	f := Finding{Check: "wordcoll", Statistic: "C", Params: params, Value: float64(C),
		LogPUpper: up, LogPLower: lo, Discrete: true, LogPAtom: eq}
	f.Detail = fmt.Sprintf("%d blocks of %d words, top %d bits: %d collisions, %.6g expected; %s", B, int(m), h, C, mu*float64(B), how)
	out.Findings = append(out.Findings, Clamp(f))
}

// hammingCheck tests the dependence of the Hamming weights of consecutive
// words: aligned pairs (w_2i, w_2i+1), each weight pooled into 5 classes
// (≤ W/2−2, W/2−1, W/2, W/2+1, ≥ W/2+2) with binomial(W, 1/2)
// probabilities q; X² over the 25 cells against q_a q_b, pooled to
// expected counts of 5, df = cells − 1 (the null is fully specified).
type hammingCheck struct{}

func (hammingCheck) Description() string   { return "Hamming weights of word pairs" }
func (hammingCheck) Name() string          { return "hamming" }
func (hammingCheck) Needs(s Setting) Needs { return wordNeeds(s, tally.Hamming) }

// HammingClassProbs returns the binomial(W, 1/2) probabilities of the 5
// weight classes.
func HammingClassProbs(W int) []float64 {
	q := make([]float64, tally.HammingClasses)
	for w := 0; w <= W; w++ {
		lc, _ := math.Lgamma(float64(W + 1))
		la, _ := math.Lgamma(float64(w + 1))
		lb, _ := math.Lgamma(float64(W - w + 1))
		q[tally.HammingClass(w, W)] += math.Exp(lc - la - lb - float64(W)*math.Ln2)
	}
	return q
}

func (hammingCheck) Run(in Input, out *Result) {
	rec := in.Tally.Words(tally.Hamming)
	if rec == nil {
		return
	}
	W := rec.Word
	q := HammingClassProbs(W)
	var N int64
	for _, v := range rec.Counts {
		N += v
	}
	exp := make([]float64, len(rec.Counts))
	for a := range q {
		for b := range q {
			exp[a*len(q)+b] = float64(N) * q[a] * q[b]
		}
	}
	params := map[string]int{"pairs": 2}
	x2, classes, smallest := pooledChiSquare(rec.Counts, exp, in.Opts.MinExpected)
	if classes < 2 {
		out.Skips = append(out.Skips, Skip{Check: "hamming", Params: params, Reason: fmt.Sprintf("%d pairs of words are too few", N)})
		return
	}
	f := chiSquareFinding("hamming", "X2", params, x2, float64(classes-1), smallest)
	f.Detail = fmt.Sprintf("%d aligned pairs of %d-bit words, weights in 5 classes each, %d cells after pooling", N, W, classes)
	names := []string{fmt.Sprintf("≤%d", W/2-2), fmt.Sprint(W/2 - 1), fmt.Sprint(W / 2), fmt.Sprint(W/2 + 1), fmt.Sprintf("≥%d", W/2+2)}
	f.Where = topResiduals(rec.Counts, exp, 3, func(i int) string {
		return fmt.Sprintf("weights (%s, %s)", names[i/len(q)], names[i%len(q)])
	})
	out.Findings = append(out.Findings, f)
}

// permCheck is Knuth's permutation test (§3.3.2 F) on t = 5 consecutive
// words (aligned groups): the relative order of the five is one of 120,
// each equally likely for i.i.d. words given that no two are equal (by
// symmetry, for any word law); groups with a tie are left out (counted in
// the detail). X² over the 120 orderings, df 119.
type permCheck struct{}

func (permCheck) Description() string   { return "relative order of 5 words" }
func (permCheck) Name() string          { return "perm" }
func (permCheck) Needs(s Setting) Needs { return wordNeeds(s, tally.Perm) }

func (permCheck) Run(in Input, out *Result) {
	rec := in.Tally.Words(tally.Perm)
	if rec == nil {
		return
	}
	obs := rec.Counts[:120]
	var N int64
	for _, v := range obs {
		N += v
	}
	params := map[string]int{"t": 5}
	exp := make([]float64, 120)
	for i := range exp {
		exp[i] = float64(N) / 120
	}
	if float64(N)/120 < in.Opts.MinExpected {
		out.Skips = append(out.Skips, Skip{Check: "perm", Params: params,
			Reason: fmt.Sprintf("%d groups of 5 words expect %.2g of each ordering, below %g; needs %d groups", N, float64(N)/120, in.Opts.MinExpected, int64(120*in.Opts.MinExpected))})
		return
	}
	cs := newCellStat()
	for i := range obs {
		cs.add(obs[i], exp[i])
	}
	f := chiSquareFinding("perm", "X2", params, cs.x2, 119, cs.minExp)
	f.Detail = fmt.Sprintf("%d groups of 5 words without ties (%d with a tie left out), 120 orderings", N, rec.Counts[120])
	f.Where = topResiduals(obs, exp, 3, func(i int) string { return fmt.Sprintf("ordering %d", i) })
	out.Findings = append(out.Findings, f)
}
