package checks

import (
	"fmt"
	"math"
)

// blocksCheck tests non-overlapping k-blocks, k = 2..K.
//
// The sequence is cut into m = ⌊n/k⌋ disjoint blocks (remainder discarded);
// with N_w the count of block w and E_w = m p(w), p(w) = p_{w_1}···p_{w_k},
//
//	X²_k = Σ_w (N_w - E_w)²/E_w  ~  χ² with S^k - 1 df
//
// (S^k - S under a fitted null: S-1 parameters estimated). Blocks must not
// overlap for this law to hold (Knuth, TAOCP vol. 2 §3.3.2 B and exercise
// 3.3.2-1); Knuth's serial test is the k = 2 case. Validity: m·min_w p(w) ≥ 5
// (rule of thumb); a k that misses it is skipped with the length that would
// make it valid.
type blocksCheck struct{}

var _ Check = blocksCheck{}

func (blocksCheck) Name() string { return "blocks" }

// Needs: the aligned non-overlapping blocks.
func (blocksCheck) Needs(Setting) Needs { return Needs{Windows: true, Blocks: true} }

func (blocksCheck) Run(in Input, out *Result) {
	t := in.Tally
	S := float64(in.Null.Symbols())
	if in.MaxBlock() < 2 {
		minP := math.Pow(in.Null.MinProb(), 2)
		out.Skips = append(out.Skips, Skip{Check: "blocks", Params: map[string]int{"k": 2},
			Reason: fmt.Sprintf("the sequence is too short for blocks of length 2; needs %d digits or more", 2*digitsNeeded(in.Opts.MinExpected, minP))})
		return
	}
	for k := 2; k <= in.MaxBlock(); k++ {
		params := map[string]int{"k": k}
		counts := t.BlockCounts(k)
		var m int64
		for _, c := range counts {
			m += c
		}
		if !t.HasBlocks(k) { // not counted: the plan knew they would be too few
			m = t.N / int64(k)
		}
		minP := math.Pow(in.Null.MinProb(), float64(k))
		if !t.HasBlocks(k) && float64(m)*minP >= in.Opts.MinExpected {
			out.Skips = append(out.Skips, Skip{Check: "blocks", Params: params,
				Reason: fmt.Sprintf("blocks of length %d were not counted: the input was expected to be shorter (%d digits arrived)", k, t.N)})
			continue
		}
		if float64(m)*minP < in.Opts.MinExpected {
			out.Skips = append(out.Skips, Skip{Check: "blocks", Params: params,
				Reason: fmt.Sprintf("%d blocks of length %d give expected counts of %.3g, below %g; needs %d digits or more",
					m, k, float64(m)*minP, in.Opts.MinExpected, int64(k)*digitsNeeded(in.Opts.MinExpected, minP))})
			continue
		}
		var x2 float64
		expOf := func(int) float64 { return float64(m) / float64(len(counts)) }
		if in.Null.IsUniform() {
			x2 = uniformX2(counts, m)
		} else {
			cs := newCellStat()
			probs := in.Null.BlockProbs(k)
			for w, pw := range probs {
				cs.add(counts[w], float64(m)*pw)
			}
			x2 = cs.x2
			expOf = func(w int) float64 { return float64(m) * probs[w] }
		}
		df := math.Pow(S, float64(k)) - 1
		if in.Null.Kind == Fitted {
			df = math.Pow(S, float64(k)) - S
		}
		f := chiSquareFinding("blocks", "X2", params, x2, df, float64(m)*minP)
		f.Where = topResidualsOf(counts, expOf, 3, func(w int) string { return "block " + blockName(w, k, t.Base) })
		out.Findings = append(out.Findings, f)
	}
}
