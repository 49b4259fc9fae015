package checks

import (
	"fmt"
	"math"
	"slices"

	"github.com/borel-audit/borel/stats"
)

// freqCheck tests the digit frequencies.
//
// Pearson's chi-square and the G-test (likelihood ratio) on the b digit
// counts N_j with expectations E_j = n p_j:
//
//	X² = Σ_j (N_j - E_j)²/E_j,     G = 2 Σ_j N_j ln(N_j/E_j),
//
// both χ² with S-1 df under the null (S = digits of positive probability).
// G's p-value uses Williams' correction G/q with
// q = 1 + (Σ_j 1/p_j - 1)/(6n(S-1)) (Williams, Biometrika 63 (1976) 33–37;
// general-p form derived in docs/derivations.md). Under the uniform null X² is formed from
// the exact integers b·N_j - n. Order is ignored: a sorted sequence passes;
// the block and serial checks see order. Under a fitted null the frequencies
// are the estimate, so there is nothing to test. Validity: every E_j ≥ 5
// (rule of thumb; Koehler & Larntz, JASA 75 (1980) 336–344); below it the
// digits are pooled with their neighbours into classes that expect 5 or
// more, X² and G (without Williams' factor) have pooled classes − 1 df,
// and a note says how many digits test every digit. X² is discrete: when its
// count vectors number at most stats.MaxExactOutcomes (short sequences in
// few digits, such as segments of bits or base-3 digits), its p-values come
// from the exact multinomial law instead of the chi-square limit, and the
// second level randomizes with its true atoms.
// Reference: Knuth, TAOCP vol. 2, §3.3.1.
type freqCheck struct{}

var _ Check = freqCheck{}

func (freqCheck) Name() string { return "freq" }

// SegmentStatistic: X² of the digit frequencies.
func (freqCheck) SegmentStatistic(f Finding) bool { return f.Label() == "freq X2 k=1" }

// Needs: the digit counts only, which every tally has.
func (freqCheck) Needs(Setting) Needs { return Needs{} }

func (freqCheck) Run(in Input, out *Result) {
	params := map[string]int{"k": 1}
	if in.Null.Kind == Fitted {
		out.Skips = append(out.Skips, Skip{Check: "freq", Params: params,
			Reason: "under a fitted null the digit frequencies are the estimate itself, so there is nothing to test; use " + in.Opts.name("Null") + " uniform or a vector to test them"})
		return
	}
	t := in.Tally
	n := float64(t.N)
	counts, exps := t.DigitCounts(), make([]float64, len(in.Null.P))
	for j, p := range in.Null.P {
		exps[j] = n * p
	}
	cs := newCellStat()
	for j, c := range counts {
		cs.add(c, exps[j])
	}
	if in.Null.IsUniform() {
		cs.x2 = uniformX2(counts, t.N)
	}
	df := float64(in.Null.Symbols() - 1)
	sparse := cs.minExp < in.Opts.MinExpected
	unit := "digit "
	if len(counts) == 256 {
		unit = "byte "
	}
	where := topResiduals(counts, exps, 3, func(i int) string { return unit + DigitName(i, len(counts)) })
	defer func() { // every freq finding names its most deviant digits
		for i := range out.Findings {
			if out.Findings[i].Check == "freq" && out.Findings[i].Where == "" {
				out.Findings[i].Where = where
			}
		}
	}()
	if law, ok := stats.MultinomialX2Law(t.N, in.Null.P); ok {
		x2 := chiSquareFinding("freq", "X2", params, cs.x2, df, cs.minExp)
		x2.setDiscrete(law.LogTails(cs.x2))
		x2.Detail = fmt.Sprintf("p-values from the exact multinomial law of X² (%d count vectors)", law.Outcomes())
		out.Findings = append(out.Findings, x2)
		if sparse {
			out.Skips = append(out.Skips, Skip{Check: "freq", Params: params,
				Reason: "G-test not reported: expected counts below 5 make its chi-square law unreliable (Pearson's X² is exact here)"})
			return
		}
	} else if sparse {
		// Digits of small expected count are pooled with their neighbours
		// (in digit order) until every class expects 5: the chi-square law
		// holds for the pooled classes, not for a cell expecting 1.
		var nonzero []int64
		var nzExp []float64
		for j, e := range exps {
			if e > 0 {
				nonzero, nzExp = append(nonzero, counts[j]), append(nzExp, e)
			}
		}
		po, pe := poolClasses(nonzero, nzExp, in.Opts.MinExpected)
		need := digitsNeeded(in.Opts.MinExpected, in.Null.MinProb())
		if len(po) < 2 {
			out.Skips = append(out.Skips, Skip{Check: "freq", Params: params,
				Reason: fmt.Sprintf("%d digits leave fewer than 2 classes of expected count %g even pooled; needs about %d digits",
					t.N, in.Opts.MinExpected, int64(math.Ceil(2*in.Opts.MinExpected/(1-slices.Max(in.Null.P)))))})
			return
		}
		pcs := newCellStat()
		for i := range po {
			pcs.add(po[i], pe[i])
		}
		pdf := float64(len(po) - 1)
		note := Notef(NotePooled, "digits pooled into %d classes of expected count %g or more (the smallest digit expects %.3g); %d digits test every digit", len(po), in.Opts.MinExpected, cs.minExp, need)
		x2 := chiSquareFinding("freq", "X2", params, pcs.x2, pdf, pcs.minExp)
		x2.Notes = append(x2.Notes, note)
		g := chiSquareFinding("freq", "G", params, pcs.g, pdf, pcs.minExp)
		g.Notes = append(g.Notes, note)
		g.Detail = "pooled classes; no Williams correction"
		out.Findings = append(out.Findings, x2, g)
		return
	} else {
		out.Findings = append(out.Findings, chiSquareFinding("freq", "X2", params, cs.x2, df, cs.minExp))
	}
	invSum := 0.0
	for _, p := range in.Null.P {
		if p > 0 {
			invSum += 1 / p
		}
	}
	q := 1 + (invSum-1)/(6*n*df)
	g := chiSquareFinding("freq", "G", params, cs.g, df, cs.minExp)
	g.LogPUpper = chiSquareLogSF(cs.g/q, df)
	g.LogPLower = chiSquareLogCDF(cs.g/q+1/cs.minExp, df)
	g.Detail = fmt.Sprintf("p-values from G/q with Williams' q = %.6g", q)
	out.Findings = append(out.Findings, g)
}

// uniformX2 returns Σ_w (b^k N_w - m)² / (b^k m) for counts over cells = b^k
// cells, forming each difference exactly in integers when it cannot overflow
// (common practice: the difference of two large floats loses the digits
// that matter at n ~ 10^12).
func uniformX2(counts []int64, m int64) float64 {
	cells := int64(len(counts))
	exact := m < math.MaxInt64/4/cells
	s := 0.0
	for _, c := range counts {
		var d float64
		if exact {
			d = float64(cells*c - m)
		} else {
			d = float64(cells)*float64(c) - float64(m)
		}
		s += d * d
	}
	return s / (float64(cells) * float64(m))
}

// digitsNeeded returns the n at which n·minProb reaches minExpected.
func digitsNeeded(minExpected, minProb float64) int64 {
	return int64(math.Ceil(minExpected / minProb))
}
