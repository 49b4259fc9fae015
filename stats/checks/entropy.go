package checks

import (
	"math"

	"borel/stats"
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
}

// entropyCheck estimates block entropies, the entropy rate and the entropy
// deficit; it adds no p-value to the family, because its test forms are the
// freq check's G and the serial check's ∇ψ² (asymptotically the same
// statistics).
//
// From cyclic counts over n windows, Ĥ_k = -Σ_w (N_w/n) ln(N_w/n) (plug-in)
// and Ĥ_k + (K̂-1)/(2n) (Miller–Madow; Miller 1955); the conditional entropy
// ĥ_{k-1} = Ĥ_k - Ĥ_{k-1} is a proper conditional entropy with cyclic
// counts. ĥ/ln b estimates the dimension of the law that generated the
// digits: the Besicovitch–Eggleston value H(p)/ln b for i.i.d. p
// (Billingsley, Ergodic Theory and Information, 1965). The deficit is
// 1 - dimension.
//
// Interval: with cyclic counts the Markov-order likelihood ratio is exactly
//
//	G^M_k = 2n (CE - ĥ_{k-1}),   CE = -Σ_j (N_j/n) ln p_j,
//
// (CE = ln b under the uniform null; methods.md §3, §12). Treating G^M_k as
// noncentral χ² with S^(k-1)(S-1) df and noncentrality λ = 2n(CE - h) (the
// usual local-alternative law), inverting it for λ gives an interval for h
// and so for the dimension. The point estimate is the moment estimate
// λ̂ = max(0, G^M - df) (E[G^M] = df + λ): the plug-in ĥ is biased low by
// about df/(2n) and would fall outside its own interval near full dimension.
// G^M is divided by a Williams-type factor q = 1 + Σ_c (Σ_j 1/p_j - 1)/(6 N_c df)
// over the contexts c (the k-1 preceding digits, N_c windows each): each
// context is a goodness-of-fit G whose mean is (S-1) + (Σ_j 1/p_j - 1)/(6 N_c)
// (Williams 1976; methods.md §1). Without it the interval excludes full
// dimension for ideal digits once contexts hold ~100 windows (π, 10^6 digits,
// k = 5: E[G^M] ≈ 90000 + 1650).
// Near full dimension this interval is the right
// construction: a normal delta-method interval collapses there (Basharin
// 1959; methods.md §12). Under a fitted null CE is Ĥ_1 and the df drop by
// S-1; no interval is given at k = 1 there.
type entropyCheck struct{}

var _ Check = entropyCheck{}

func (entropyCheck) Name() string { return "entropy" }

func (entropyCheck) Run(in Input, out *Result) {
	n := in.Tally.N
	lnb := math.Log(float64(in.Tally.Base))
	ce := in.Null.CrossEntropy(in.Tally.Digits)
	S := float64(in.Null.Symbols())
	prof := &EntropyProfile{Confidence: in.Opts.Confidence,
		NullDimension: stats.BesicovitchEgglestonDimension(in.Null.P, in.Tally.Base)}
	prev := 0.0
	for k := 1; k <= in.MaxBlock(); k++ {
		h, _, _ := stats.PlugInEntropy(in.Cyclic[k])
		row := EntropyRow{K: k, Blocks: n, PlugIn: h, MillerMadow: stats.MillerMadowEntropy(in.Cyclic[k]),
			Conditional: h - prev, DimLow: math.NaN(), DimHigh: math.NaN()}
		prev = h
		df := math.Pow(S, float64(k-1)) * (S - 1)
		if in.Null.Kind == Fitted {
			df = (math.Pow(S, float64(k-1)) - 1) * (S - 1)
		}
		if df > 0 {
			twoN := 2 * float64(n)
			gm := math.Max(0, twoN*(ce-row.Conditional)) / williamsQ(in, k, df)
			row.Dimension = (ce - math.Max(0, gm-df)/twoN) / lnb
			lamLo, lamHi := stats.NoncentralityInterval(gm, df, in.Opts.Confidence)
			row.DimLow = (ce - lamHi/twoN) / lnb
			row.DimHigh = (ce - lamLo/twoN) / lnb
		} else {
			row.Dimension = row.MillerMadow / lnb
		}
		row.Deficit = 1 - row.Dimension
		prof.Rows = append(prof.Rows, row)
	}
	if len(prof.Rows) > 0 {
		prof.Summary = prof.Rows[len(prof.Rows)-1]
	}
	out.Entropy = prof
}

// williamsQ returns the mean correction of G^M_k: with N_c the cyclic count
// of each (k-1)-digit context, q = 1 + Σ_c (Σ_j 1/p_j - 1)/(6 N_c) / df.
func williamsQ(in Input, k int, df float64) float64 {
	inv := -1.0
	for _, p := range in.Null.P {
		if p > 0 {
			inv += 1 / p
		}
	}
	var contexts []int64
	if k == 1 {
		contexts = []int64{in.Tally.N}
	} else {
		contexts = in.Cyclic[k-1]
	}
	corr := 0.0
	for _, c := range contexts {
		if c > 0 {
			corr += inv / (6 * float64(c))
		}
	}
	return 1 + corr/df
}
