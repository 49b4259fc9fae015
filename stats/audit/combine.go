package audit

import (
	"math"

	"github.com/borel-audit/borel/stats"
)

// InputVerdict is the one verdict of an input audited in several views
// (raw bytes as bits, bit pairs, nibbles and bytes) or bases: the views'
// verdicts are detail, this is the answer.
//
// The rule: each view's smallest adjusted p-value on the deviation side
// (upper tails, and both tails of two-sided statistics) and on the
// too-uniform side (lower tails) is a valid p-value for that view's null —
// its family-wise adjustment already covers the view's findings — so the
// 2V values of the V views tested are adjusted once more, by Holm across
// the views, which holds the input's false-alarm rate at alpha whatever
// the dependence between the views (they read the same bytes). Then, as
// within a view: not consistent when an adjusted deviation p is at or
// below alpha, else too uniform when an adjusted too-uniform p is, else
// consistent; nothing tested when no view formed a statistic.
type InputVerdict struct {
	Input   string
	Views   []*Result
	Verdict Verdict
	// LogPDeviation and LogPTooUniform: the smallest p of each side after
	// the adjustment across views (natural logs; 0 when the side is empty).
	LogPDeviation, LogPTooUniform float64
	// Decisive is the index in Views of the view the verdict rests on
	// (its smallest adjusted p), -1 when the verdict is consistent or
	// nothing was tested.
	Decisive int
}

// Combine gives the one verdict of an input from the results of its views.
func Combine(input string, views []*Result, alpha float64) InputVerdict {
	v := InputVerdict{Input: input, Views: views, Verdict: Untested, Decisive: -1}
	var logP []float64
	var owner []int
	for i, r := range views {
		if r.Verdict == Untested || len(r.Findings) == 0 {
			continue
		}
		up, lo := 0.0, 0.0
		for _, f := range r.Findings {
			up = math.Min(up, f.LogAdjUpper)
			if f.TwoSided {
				up = math.Min(up, f.LogAdjLower)
			} else {
				lo = math.Min(lo, f.LogAdjLower)
			}
		}
		logP = append(logP, up, lo)
		owner = append(owner, i, i)
	}
	if len(logP) == 0 {
		return v
	}
	adj := stats.HolmLog(logP)
	lnAlpha := math.Log(alpha)
	v.Verdict = Consistent
	v.LogPDeviation, v.LogPTooUniform = 0, 0
	bestUp, bestLo := -1, -1
	for k, a := range adj {
		if k%2 == 0 {
			if a < v.LogPDeviation || bestUp < 0 {
				v.LogPDeviation, bestUp = math.Min(a, 0), k
			}
		} else if a < v.LogPTooUniform || bestLo < 0 {
			v.LogPTooUniform, bestLo = math.Min(a, 0), k
		}
	}
	switch {
	case v.LogPDeviation <= lnAlpha:
		v.Verdict, v.Decisive = NotConsistent, owner[bestUp]
	case v.LogPTooUniform <= lnAlpha:
		v.Verdict, v.Decisive = TooUniform, owner[bestLo]
	}
	return v
}
