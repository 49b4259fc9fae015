package checks

import (
	"math"
	"slices"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"

	"github.com/borel-audit/borel/stats"
)

// EntropyRow is the entropy profile at one block length k (nats).
type EntropyRow struct {
	K           int
	Blocks      int64   // windows counted: n (cyclic)
	PlugIn      float64 // Ĥ_k, plug-in block entropy
	MillerMadow float64 // Ĥ_k + (K̂-1)/(2n)
	Conditional float64 // ĥ_{k-1} = Ĥ_k - Ĥ_{k-1}: entropy of a digit given the k-1 before it
	Dimension   float64 // bias-corrected estimate of h / ln b (see entropyCheck)
	DimLow      float64 // interval for the dimension (NaN when none)
	DimHigh     float64
	Deficit     float64 // 1 - Dimension
	// OrderG is the likelihood-ratio test of a Markov chain of order k−2
	// against order k−1 (k ≥ 2): G = 2n(ĥ_{k−2} − ĥ_{k−1}) from the plug-in
	// conditionals, OrderDF = S^(k−2)(S−1)² (stats.MarkovOrderG),
	// divided by its exact null mean over OrderDF (the difference of the two
	// orders' E₀[G], exactMeanQ; Williams' correction where contexts are
	// full), and OrderLogP ln of its upper tail. It says whether the order-(k−1)
	// dimension's drop below the order-(k−2) one is more than chance. Not
	// in the verdict's family: Good's ∇²ψ² (serial) is its asymptotic twin
	// there. NaN at k = 1.
	OrderG, OrderDF, OrderLogP float64
}

// Position is where the sequence sits among the sets F(q): its digit
// frequencies q̂ with their confidence region (stats.FrequencyRegion) and,
// under a stated vector p (the null's), the local dimension α̂ of μ_p
// along the sequence with its interval (stats.LocalDimension). With the
// dimension of F(q̂) (the profile's row at k = 1) they are the sequence's
// coordinates (α̂, dim F(q̂)) in the multifractal decomposition of μ_p,
// which for a sequence generic for μ_p are (H(p)/ln b, H(p)/ln b).
type Position struct {
	Region stats.FrequencyRegion
	// NullInside says whether the null's vector lies in the region (the
	// Pearson test of it at the region's level, unadjusted).
	NullInside bool
	HasAlpha   bool // the null is a stated vector (not uniform, not fitted)
	Alpha      float64
	AlphaLow   float64
	AlphaHigh  float64
}

// EntropyProfile is the output of the entropy check.
type EntropyProfile struct {
	Rows       []EntropyRow
	Confidence float64
	// NullDimension is the Besicovitch–Eggleston dimension H(p)/ln b of the
	// null's digit vector (1 under the uniform null).
	NullDimension float64
	// Summary is the row at the largest k: the entropy-rate estimate.
	Summary EntropyRow
	// Position is the sequence's place among the sets F(q).
	Position *Position
}

// entropyCheck estimates block entropies, the entropy rate h of the law that
// produced the digits, its dimension h/ln b and the entropy deficit
// 1 - h/ln b. It adds no p-value to the family: its test forms are the freq
// check's G and the serial check's ∇ψ² (asymptotically the same statistics).
//
// From cyclic counts over n windows, Ĥ_k = -Σ_w (N_w/n) ln(N_w/n) (plug-in)
// and Ĥ_k + (K̂-1)/(2n) (Miller–Madow; Miller 1955); ĥ_{k-1} = Ĥ_k - Ĥ_{k-1}
// is a proper conditional entropy with cyclic counts. For i.i.d. digits with
// frequency vector p, h/ln b is the Besicovitch–Eggleston dimension
// H(p)/ln b; for an ergodic law it is the entropy rate over ln b
// (Billingsley, Ergodic Theory and Information, 1965).
//
// The estimate at order k splits h_{k-1} = H_1 - I_{k-1}, where H_1 is the
// digit entropy and I_{k-1} ≥ 0 the information the k-1 preceding digits
// carry about the next one:
//
//   - H_1: Miller–Madow Ĥ_1; its interval is the union of the delta-method
//     interval Ĥ_1 ± z·√((Σ f ln² f - Ĥ_1²)/n) (Basharin 1959; right away from
//     uniform frequencies, where it collapses) and the inversion of
//     G = 2n(ln b - Ĥ_1) ~ χ'²(b-1, 2n(ln b - H_1)) (right near them: the
//     usual noncentral approximation of a likelihood-ratio statistic under
//     local alternatives, common practice), capped at ln b.
//   - I_{k-1}: the fitted Markov likelihood ratio G = 2n(Ĥ_1 - ĥ_{k-1}), with
//     (S^(k-1) - 1)(S - 1) df (Anderson & Goodman 1957; S = digits seen),
//     divided by q = E₀[G]/df, its exact mean under independence over df
//     (exactMeanQ: per context the binomial sums of the cells, where a
//     context holds few windows; Williams' first-order factor, Williams
//     1976, where it holds many). Each context is a goodness-of-fit G of
//     mean (S-1) + (Σ_j 1/f_j - 1)/(6 N_c) + O(N_c^-2); without q the
//     estimate is biased up once contexts hold ~100 windows (π, 10^6
//     digits, k = 5: E[G] ≈ 90000 + 1650), and with the first-order factor
//     only it is still biased at the 5–6 windows per cell of bases 2 and 3
//     (two standard deviations of G). Point Î = max(0, G - df)/(2n)
//     (E[G] = df + λ);
//     interval by inverting the noncentral chi-square law in λ, which is
//     exact because that law is stochastically increasing in λ.
//
// Each part is taken at level 1 - (1-c)/2, so the interval for
// h = H_1 - I has coverage at least c (Bonferroni). The construction does not
// depend on the null: the dimension belongs to the data's law; the null's
// own dimension H(p)/ln b is reported beside it.
type entropyCheck struct{}

var _ Check = entropyCheck{}

func (entropyCheck) Name() string { return "entropy" }

// Needs: the overlapping windows (their cyclic tables).
func (entropyCheck) Needs(Setting) Needs { return Needs{Windows: true} }

func (entropyCheck) Run(in Input, out *Result) {
	t := in.Tally
	n := float64(t.N)
	b := t.Base
	lnb := math.Log(float64(b))
	conf := in.Opts.Confidence
	partConf := 1 - (1-conf)/2
	prof := &EntropyProfile{Confidence: conf,
		NullDimension: stats.BesicovitchEgglestonDimension(in.Null.P, b)}

	h1, h1Lo, h1Hi := digitEntropyInterval(t.DigitCounts(), b, partConf)
	freq := make([]float64, b)
	seen := 0
	for j, c := range t.DigitCounts() {
		freq[j] = float64(c) / n
		if c > 0 {
			seen++
		}
	}
	plugIn1, _, _ := stats.PlugInEntropy(t.DigitCounts())
	prev, meanPrev := 0.0, 0.0
	for k := 1; k <= in.MaxBlock(); k++ {
		hk, total, occupied := stats.PlugInEntropy(in.Cyclic[k])
		row := EntropyRow{K: k, Blocks: t.N, PlugIn: hk, MillerMadow: stats.MillerMadowFrom(hk, total, occupied),
			Conditional: hk - prev, OrderG: math.NaN(), OrderDF: math.NaN(), OrderLogP: math.NaN()}
		prev = hk
		info, infoLo, infoHi := 0.0, 0.0, 0.0
		df := (math.Pow(float64(seen), float64(k-1)) - 1) * float64(seen-1)
		meanG := 0.0 // E₀[G] of the order-(k−1) fit against independence
		if k >= 2 && df > 0 {
			q := exactMeanQ(freq, in.Cyclic[k-1], df)
			meanG = q * df
			g := math.Max(0, 2*n*(plugIn1-row.Conditional)) / q
			info = math.Max(0, g-df) / (2 * n)
			lamLo, lamHi := stats.NoncentralityInterval(g, df, partConf)
			infoLo, infoHi = lamLo/(2*n), lamHi/(2*n)
		}
		if k >= 2 && seen >= 2 {
			// Order k−2 against k−1: the difference of the two fits' G
			// against independence, scaled by the difference of their exact
			// null means (as the dimension's G is): without it, sparse
			// contexts push G up (π, 10^6 digits, order 4 against 3:
			// p = 1e-8 raw).
			g, dfD := stats.MarkovOrderG(prof.Rows[k-2].Conditional, row.Conditional, t.N, seen, k-1)
			if e0 := meanG - meanPrev; e0 > 0 && dfD > 0 {
				g *= dfD / e0
			}
			row.OrderG, row.OrderDF, row.OrderLogP = g, dfD, stats.ChiSquareLogSF(g, dfD)
		}
		meanPrev = meanG
		row.Dimension = (h1 - info) / lnb
		row.DimLow = math.Max(0, (h1Lo-infoHi)/lnb)
		row.DimHigh = math.Min(1, (h1Hi-infoLo)/lnb)
		row.Deficit = 1 - row.Dimension
		prof.Rows = append(prof.Rows, row)
	}
	if len(prof.Rows) > 0 {
		prof.Summary = prof.Rows[len(prof.Rows)-1]
		pos := &Position{Region: stats.NewFrequencyRegion(t.DigitCounts(), conf)}
		pos.NullInside = pos.Region.Contains(in.Null.P)
		if in.Null.Kind == Vector {
			pos.HasAlpha = true
			pos.Alpha, pos.AlphaLow, pos.AlphaHigh = stats.LocalDimension(t.DigitCounts(), in.Null.P, b, conf)
		}
		prof.Position = pos
	}
	out.Entropy = prof
}

// digitEntropyInterval returns the Miller–Madow digit entropy and an
// interval at level conf: the union of the delta-method interval and the
// inversion of G against the uniform law, capped at ln b (see entropyCheck).
func digitEntropyInterval(counts []int64, base int, conf float64) (h, lo, hi float64) {
	n := 0.0
	for _, c := range counts {
		n += float64(c)
	}
	plug, total, occupied := stats.PlugInEntropy(counts)
	h = stats.MillerMadowFrom(plug, total, occupied)
	lnb := math.Log(float64(base))
	h = math.Min(h, lnb)
	// Delta method (Basharin 1959): Var Ĥ ≈ (Σ f ln² f - H²)/n.
	m2 := 0.0
	for _, c := range counts {
		if c > 0 {
			f := float64(c) / n
			m2 += f * math.Log(f) * math.Log(f)
		}
	}
	z := distuv.UnitNormal.Quantile(1 - (1-conf)/2)
	se := math.Sqrt(math.Max(0, m2-plug*plug) / n)
	lo, hi = h-z*se, h+z*se
	// Chi-square route: G = 2n(ln b - Ĥ_1), Williams q = 1 + (b+1)/(6n).
	df := float64(base - 1)
	g := math.Max(0, 2*n*(lnb-plug)) / (1 + float64(base+1)/(6*n))
	lamLo, lamHi := stats.NoncentralityInterval(g, df, conf)
	lo = math.Min(lo, lnb-lamHi/(2*n))
	hi = math.Min(lnb, math.Max(hi, lnb-lamLo/(2*n)))
	return h, lo, hi
}

// exactMeanQ returns q = E₀[G]/df for the fitted Markov likelihood ratio G
// whose contexts hold ctx[c] windows and whose digits have frequencies p:
// the factor that scales G to mean df under independence. G is the sum over
// contexts of each context's goodness-of-fit G against p, less the G of the
// margin that estimated p (mean S−1 to O(1/n)). A context with N windows
// contributes Σ_j 2·E[X ln(X/(N p_j))], X ~ Binomial(N, p_j)
// (stats.BinomialGMean): exact where the smallest expected cell N·min p is
// below 50, Williams' first-order (S−1) + (Σ_j 1/p_j − 1)/(6N) above, where
// the two agree to a few hundredths of a standard deviation of G. With only
// Williams' term, at the 5–6 windows per cell the block rule allows (bases 2
// and 3), G/q stood two standard deviations above df under the null and the
// dimension interval excluded 1 in a third of random sequences.
// Measured under the null (40 simulated sequences each, numpy): (G/q − df)
// in units of √(2df) is −0.58 (base 3, 10^6 digits, k = 11), −0.04 (base 2,
// 332 192 bits, k = 16), −0.20 (base 3, k = 10), −0.09 (base 10, k = 5): at
// most slightly conservative. Many distinct context sizes are interpolated
// linearly from 65 exact nodes (the mean is smooth in N).
func exactMeanQ(p []float64, ctx []int64, df float64) float64 {
	var q []float64
	minP := 1.0
	inv := -1.0
	for _, v := range p {
		if v > 0 {
			q = append(q, v)
			inv += 1 / v
			minP = math.Min(minP, v)
		}
	}
	s := float64(len(q))
	sizes := map[int64]int64{}
	for _, c := range ctx {
		if c > 0 {
			sizes[c]++
		}
	}
	williams := func(n int64) float64 { return (s - 1) + inv/(6*float64(n)) }
	exactBelow := int64(math.Ceil(50 / minP))
	var small []int64
	for n := range sizes {
		if n < exactBelow {
			small = append(small, n)
		}
	}
	exact := map[int64]float64{}
	if len(small) > 0 {
		slices.Sort(small)
		lnFact := stats.LnFactorials(small[len(small)-1])
		at := func(n int64) float64 {
			m := 0.0
			for _, v := range q {
				m += stats.BinomialGMean(n, v, lnFact)
			}
			return m
		}
		const nodes = 65
		if len(small) <= nodes {
			for _, n := range small {
				exact[n] = at(n)
			}
		} else {
			lo, hi := small[0], small[len(small)-1]
			xs, ys := make([]float64, nodes), make([]float64, nodes)
			for i := range nodes {
				n := lo + (hi-lo)*int64(i)/(nodes-1)
				xs[i], ys[i] = float64(n), at(n)
			}
			for _, n := range small {
				x := float64(n)
				i := min(nodes-2, sort.SearchFloat64s(xs, x)-1)
				i = max(i, 0)
				w := (x - xs[i]) / (xs[i+1] - xs[i])
				exact[n] = ys[i] + w*(ys[i+1]-ys[i])
			}
		}
	}
	total := -(s - 1)
	// In increasing size, so that the sum (and every report) is the same
	// from run to run: a map's order is not.
	keys := make([]int64, 0, len(sizes))
	for n := range sizes {
		keys = append(keys, n)
	}
	slices.Sort(keys)
	for _, n := range keys {
		mult := sizes[n]
		if m, ok := exact[n]; ok {
			total += float64(mult) * m
		} else {
			total += float64(mult) * williams(n)
		}
	}
	if !(total > 0) {
		return 1
	}
	return total / df
}
