package checks

import (
	"fmt"
	"math"

	"borel/internal/tally"
	"borel/stats"
)

// pokerCheck is the poker (partition) test: disjoint hands of h digits,
// aligned at multiples of h, classified by the number R of distinct digits.
// Under the null
//
//	P(R = r) = h! [y^r x^h] Π_j (1 + y(e^(p_j x) - 1)),
//
// which for uniform digits is b(b-1)…(b-r+1) S(h, r)/b^h (S: Stirling numbers
// of the second kind). The product is expanded as a polynomial in x and y
// (O(b·h³), no factorial overflow at b = 256). Classes are pooled until every
// expected count is at least 5; X² is χ² with classes - 1 df. Under a fitted
// null p̂ comes from the same digits and the law lies between χ² with
// classes - 1 - (b-1) and classes - 1 df (Chernoff & Lehmann 1954); borel
// reports classes - 1 and says so. Under a stated null, when the pooled
// class counts have at most stats.MaxExactOutcomes possible vectors (a few
// hundred hands), the p-values come from the exact multinomial law of X²
// over the pooled classes instead (the second level needs its atoms).
// References: Knuth, TAOCP vol. 2 §3.3.2 D (and its exercises for the
// Stirling-number law).
type pokerCheck struct{}

var _ Check = pokerCheck{}

func (pokerCheck) Name() string { return "poker" }

// SegmentStatistic: the poker X².
func (pokerCheck) SegmentStatistic(f Finding) bool { return f.Statistic == "X2" }

// Needs: hands of 5 digits (4 below base 5).
func (pokerCheck) Needs(s Setting) Needs {
	h := 5
	if s.Base < 5 {
		h = 4
	}
	return Needs{Records: []tally.RecordSpec{&tally.HandSpec{Size: h}}}
}

// PokerProbs returns P(R = r), r = 0..h, for hands of h digits drawn from p.
func PokerProbs(p []float64, h int) []float64 {
	// poly[r][m]: coefficient of y^r x^m.
	poly := make([][]float64, h+1)
	for r := range poly {
		poly[r] = make([]float64, h+1)
	}
	poly[0][0] = 1
	fact := make([]float64, h+1)
	fact[0] = 1
	for i := 1; i <= h; i++ {
		fact[i] = fact[i-1] * float64(i)
	}
	for _, pj := range p {
		if pj <= 0 {
			continue
		}
		next := make([][]float64, h+1)
		for r := range next {
			next[r] = append([]float64(nil), poly[r]...)
		}
		for r := 1; r <= h; r++ {
			for m := 1; m <= h; m++ {
				for t := 1; t <= m; t++ {
					next[r][m] += poly[r-1][m-t] * math.Pow(pj, float64(t)) / fact[t]
				}
			}
		}
		poly = next
	}
	out := make([]float64, h+1)
	for r := 1; r <= h; r++ {
		out[r] = fact[h] * poly[r][h]
	}
	return out
}

func (pokerCheck) Run(in Input, out *Result) {
	t := in.Tally
	rec := t.Hands()
	h := rec.Size
	params := map[string]int{"hand": h}
	var hands int64
	for _, c := range rec.Counts {
		hands += c
	}
	probs := PokerProbs(in.Null.P, h)
	exp := make([]float64, h+1)
	for r, pr := range probs {
		exp[r] = float64(hands) * pr
	}
	_, pe := poolClasses(rec.Counts[1:], exp[1:], in.Opts.MinExpected)
	x2, classes, smallest := pooledChiSquare(rec.Counts[1:], exp[1:], in.Opts.MinExpected)
	if classes < 2 {
		out.Skips = append(out.Skips, Skip{Check: "poker", Params: params,
			Reason: fmt.Sprintf("%d hands of %d digits leave fewer than 2 classes with expected count %g or more; needs roughly %d digits",
				hands, h, in.Opts.MinExpected, int64(h)*int64(math.Ceil(2*in.Opts.MinExpected/secondLargest(probs))))})
		return
	}
	f := chiSquareFinding("poker", "X2", params, x2, float64(classes-1), smallest)
	f.Detail = fmt.Sprintf("%d hands, %d classes of distinct-digit counts after pooling", hands, classes)
	if in.Null.Kind != Fitted {
		probs := make([]float64, len(pe))
		for i, e := range pe {
			probs[i] = e / float64(hands)
		}
		if law, ok := stats.MultinomialX2Law(hands, probs); ok {
			f.setDiscrete(law.LogTails(x2))
			f.Detail += fmt.Sprintf("; p-values from the exact multinomial law of X² (%d count vectors)", law.Outcomes())
		}
	}
	if in.Null.Kind == Fitted {
		f.Notes = append(f.Notes, "fitted null: df not reduced for the estimated vector; the exact law lies between the reported df and df minus the fitted parameters (Chernoff–Lehmann)")
	}
	out.Findings = append(out.Findings, f)
}

func secondLargest(p []float64) float64 {
	a, b := 0.0, 0.0
	for _, v := range p {
		if v > a {
			a, b = v, a
		} else if v > b {
			b = v
		}
	}
	return math.Max(b, 1e-12)
}
