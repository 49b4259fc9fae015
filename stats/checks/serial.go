package checks

import (
	"fmt"
	"math"

	"github.com/borel-audit/borel/stats"
)

// serialCheck is Good's serial test on overlapping cyclic k-blocks.
//
// With cyclic counts N_w (n windows, the sequence wrapped around) and
//
//	ψ²_k = Σ_w (N_w - n p(w))² / (n p(w)),   ψ²_0 = ψ²_{-1} = 0,
//
// the plain ψ²_k is NOT χ²(b^k - 1): each digit enters k windows and its
// variance is too large. Good's differences are:
//
//	∇ψ²_k  = ψ²_k - ψ²_{k-1}              ~ χ² with S^k - S^(k-1) df,
//	∇²ψ²_k = ψ²_k - 2ψ²_{k-1} + ψ²_{k-2}  ~ χ² with S^(k-2) (S-1)² df,
//
// reported for k = 2..K. (∇ψ²_1 = ψ²_1 is the freq check's X² on the same
// counts and is not reported twice.) Under a fitted null ψ²_1 = 0 and
// ∇ψ²_k has (S^(k-1) - 1)(S - 1) df (the Markov-order likelihood-ratio
// parameter count of Anderson & Goodman, Ann. Math. Statist. 28 (1957)
// 89–110); ∇²ψ²_2 then equals ∇ψ²_2 and is skipped.
// ∇ψ²_k is asymptotically the likelihood ratio of an order-(k-1) Markov chain
// against i.i.d. digits (Anderson & Goodman 1957). Validity: n·min_w p(w) ≥ 5
// at the top order (a working rule by analogy with the chi-square test,
// common practice). In base 2 at k = 2 the statistics are discrete with
// atoms that matter for short sequences (segments): up to about 2000 bits
// their p-values come from the exact law of the cyclic counts
// (stats.CyclicBitPairLaw).
// References: Good, Proc. Camb. Phil. Soc. 49 (1953) 276–284; Good, Ann.
// Math. Statist. 28 (1957) 262–264.
type serialCheck struct{}

var _ Check = serialCheck{}

func (serialCheck) Name() string { return "serial" }

// SegmentStatistic: Good's ∇ψ² of pairs.
func (serialCheck) SegmentStatistic(f Finding) bool { return f.Label() == "serial dpsi2 k=2" }

// StatisticNames: Good's first and second differences of ψ².
func (serialCheck) StatisticNames() map[string]StatName {
	return map[string]StatName{"dpsi2": {"∇ψ²", `$\nabla\psi^2$`}, "d2psi2": {"∇²ψ²", `$\nabla^2\psi^2$`}}
}

// Needs: the overlapping windows (their cyclic tables).
func (serialCheck) Needs(Setting) Needs { return Needs{Windows: true} }

// Psi2 returns ψ²_k for k = 0..K from cyclic counts (index 0 is 0).
func Psi2(cyclic [][]int64, null Null, n int64) []float64 {
	psi := make([]float64, len(cyclic))
	for k := 1; k < len(cyclic); k++ {
		if null.IsUniform() {
			psi[k] = uniformX2(cyclic[k], n)
			continue
		}
		cs := newCellStat()
		for w, pw := range null.BlockProbs(k) {
			cs.add(cyclic[k][w], float64(n)*pw)
		}
		psi[k] = cs.x2
	}
	return psi
}

// windowResiduals names the overlapping k-windows of largest
// standardized residual (O − n p(w))/√(n p(w)), from the cyclic counts.
func windowResiduals(in Input, k int) string {
	counts := in.Cyclic[k]
	n := float64(in.Tally.N)
	expOf := func(int) float64 { return n / float64(len(counts)) }
	if !in.Null.IsUniform() {
		probs := in.Null.BlockProbs(k)
		expOf = func(w int) float64 { return n * probs[w] }
	}
	return topResidualsOf(counts, expOf, 3, func(w int) string { return "window " + blockName(w, k, in.Tally.Base) })
}

func (serialCheck) Run(in Input, out *Result) {
	K := in.MaxBlock()
	if K < 2 {
		out.Skips = append(out.Skips, Skip{Check: "serial", Params: map[string]int{"k": 2},
			Reason: fmt.Sprintf("the sequence is too short for blocks of length 2; needs %d digits or more",
				digitsNeeded(in.Opts.MinExpected, math.Pow(in.Null.MinProb(), 2)))})
		return
	}
	n := in.Tally.N
	psi := Psi2(in.Cyclic, in.Null, n)
	at := func(k int) float64 {
		if k < 0 {
			return 0
		}
		return psi[k]
	}
	S := float64(in.Null.Symbols())
	fitted := in.Null.Kind == Fitted
	for k := 2; k <= K; k++ {
		params := map[string]int{"k": k}
		var notes []Note
		minExp := float64(n) * math.Pow(in.Null.MinProb(), float64(k))
		if e := minExp; e < in.Opts.MinExpected {
			notes = append(notes, Notef(NoteSparse, "smallest expected count %.3g is below %g: the chi-square law is rough at this k", e, in.Opts.MinExpected))
		}
		dfD := math.Pow(S, float64(k)) - math.Pow(S, float64(k-1))
		if fitted {
			dfD = (math.Pow(S, float64(k-1)) - 1) * (S - 1)
		}
		d := chiSquareFinding("serial", "dpsi2", params, at(k)-at(k-1), dfD, minExp)
		d.Notes = notes
		d.Where = windowResiduals(in, k)
		bitLaw := func(second bool, f *Finding) {
			if k != 2 || fitted || len(in.Null.P) != 2 {
				return
			}
			if law, ok := stats.CyclicBitPairLaw(n, [2]float64{in.Null.P[0], in.Null.P[1]}, second); ok {
				f.setDiscrete(law.LogTails(f.Value))
				f.Detail = fmt.Sprintf("p-values from the exact law of the cyclic bit and pair counts (%d outcomes)", law.Outcomes())
				f.Notes = nil
			}
		}
		bitLaw(false, &d)
		out.Findings = append(out.Findings, d)
		if fitted && k == 2 {
			out.Skips = append(out.Skips, Skip{Check: "serial", Params: params,
				Reason: "second difference at k=2 equals the first difference under a fitted null; reported once"})
			continue
		}
		dfD2 := math.Pow(S, float64(k-2)) * (S - 1) * (S - 1)
		d2 := chiSquareFinding("serial", "d2psi2", params, at(k)-2*at(k-1)+at(k-2), dfD2, minExp)
		d2.Notes = notes
		d2.Where = d.Where
		bitLaw(true, &d2)
		out.Findings = append(out.Findings, d2)
	}
}
