package checks

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/mat"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
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
// classes - 1 - (b-1) and classes - 1 df (Chernoff & Lehmann 1954): it is
// Σ λ_i χ²_1 with the weights of PokerFittedWeights, which borel uses
// (a segment tested against the whole sequence's estimate sees a known
// vector and keeps classes - 1 df). Under a stated null, when the pooled
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
	poly, fact := pokerPoly(p, h, -1)
	out := make([]float64, h+1)
	for r := 1; r <= h; r++ {
		out[r] = fact[h] * poly[r][h]
	}
	return out
}

// PokerGradient returns ∂P(R = r)/∂p_k (rows r = 0..h, columns k), the
// derivative of the polynomial law, from
//
//	∂/∂p_k Π_j (1 + y(e^(p_j x) − 1)) = y x e^(p_k x) Π_{j≠k} (1 + y(e^(p_j x) − 1)).
//
// Each P(R = r) is homogeneous of degree h in p, so Σ_k p_k ∂P(R=r)/∂p_k =
// h P(R = r) (Euler), and ∂P(R=r)/∂p_k = h P(R = r | a given digit of the
// hand is k). O(b²·h³).
func PokerGradient(p []float64, h int) [][]float64 {
	grad := make([][]float64, h+1)
	for r := range grad {
		grad[r] = make([]float64, len(p))
	}
	for k, pk := range p {
		poly, fact := pokerPoly(p, h, k)
		for r := 1; r <= h; r++ {
			s, pw := 0.0, 1.0
			for t := 0; t <= h-1; t++ {
				s += pw / fact[t] * poly[r-1][h-1-t]
				pw *= pk
			}
			grad[r][k] = fact[h] * s
		}
	}
	return grad
}

// pokerPoly returns the coefficients poly[r][m] of y^r x^m (r, m ≤ h) of
// Π_{j≠skip} (1 + y(e^(p_j x) − 1)), and the factorials 0!..h!.
func pokerPoly(p []float64, h, skip int) (poly [][]float64, fact []float64) {
	poly = make([][]float64, h+1)
	for r := range poly {
		poly[r] = make([]float64, h+1)
	}
	poly[0][0] = 1
	fact = make([]float64, h+1)
	fact[0] = 1
	for i := 1; i <= h; i++ {
		fact[i] = fact[i-1] * float64(i)
	}
	next := make([][]float64, h+1)
	for r := range next {
		next[r] = make([]float64, h+1)
	}
	for j, pj := range p {
		if pj <= 0 || j == skip {
			continue
		}
		for r := range next {
			copy(next[r], poly[r])
		}
		for r := 1; r <= h; r++ {
			for m := 1; m <= h; m++ {
				pw := 1.0
				for t := 1; t <= m; t++ {
					pw *= pj
					next[r][m] += poly[r-1][m-t] * pw / fact[t]
				}
			}
		}
		poly, next = next, poly
	}
	return poly, fact
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
	po, pe := poolClasses(rec.Counts[1:], exp[1:], in.Opts.MinExpected)
	x2, classes, smallest := pooledChiSquare(rec.Counts[1:], exp[1:], in.Opts.MinExpected)
	if classes < 2 {
		out.Skips = append(out.Skips, Skip{Check: "poker", Params: params,
			Reason: fmt.Sprintf("%d hands of %d digits leave fewer than 2 classes with expected count %g or more; needs roughly %d digits",
				hands, h, in.Opts.MinExpected, int64(h)*int64(math.Ceil(2*in.Opts.MinExpected/secondLargest(probs))))})
		return
	}
	f := chiSquareFinding("poker", "X2", params, x2, float64(classes-1), smallest)
	group, _ := poolIndex(exp[1:], in.Opts.MinExpected)
	f.Where = topResiduals(po, pe, 2, func(g int) string { // hands of r distinct digits, r in the pooled class g
		lo, hi := -1, -1
		for r, gr := range group {
			if gr == g {
				if lo < 0 {
					lo = r + 1
				}
				hi = r + 1
			}
		}
		if lo == hi {
			return fmt.Sprintf("hands of %d distinct digits", lo)
		}
		return fmt.Sprintf("hands of %d–%d distinct digits", lo, hi)
	})
	f.Detail = fmt.Sprintf("%d hands, %d classes of distinct-digit counts after pooling", hands, classes)
	switch {
	case in.Null.Kind != Fitted:
		probs := make([]float64, len(pe))
		for i, e := range pe {
			probs[i] = e / float64(hands)
		}
		if law, ok := stats.MultinomialX2Law(hands, probs); ok {
			f.setDiscrete(law.LogTails(x2))
			f.Detail += fmt.Sprintf("; p-values from the exact multinomial law of X² (%d count vectors)", law.Outcomes())
		}
	case in.Null.Digits == t.N:
		lam := PokerFittedWeights(in.Null.P, h, group, classes)
		f.LogPUpper, f.LogPLower = stats.WeightedChiSquareLogTails(x2, lam)
		ws := make([]string, len(lam))
		for i, l := range lam {
			ws[i] = fmt.Sprintf("%.3g", l)
		}
		f.Notes = append(f.Notes, Notef(NoteFittedNull, "fitted null: the vector is estimated from these digits, so X² follows Σ λ_i χ²_1 with λ = (%s) instead of χ² with %d df (Chernoff–Lehmann weights for this vector)",
			strings.Join(ws, ", "), classes-1))
	default: // a segment against the whole sequence's estimate: a known vector to it
		f.Notes = append(f.Notes, Note{NoteFittedNull, "fitted null estimated from the whole sequence: within a segment it acts as a known vector"})
	}
	out.Findings = append(out.Findings, f)
}

// PokerFittedWeights returns the weights λ of the law Σ λ_i χ²_1 that the
// poker X² over pooled classes follows asymptotically when the digit
// vector is estimated from the same digits (p̂ = digit frequencies of the
// hands). With π_J the pooled class probabilities, g_Jk = P(class J | a
// given digit of the hand is k) = Σ_{r∈J} ∂P(R=r)/∂p_k / h, and G_Jk = (g_Jk
// − π_J)/√π_J, the standardized cell deviations (O_J − Nπ_J(p̂))/√(Nπ_J)
// have covariance
//
//	Σ = I − √π√π^T − h · G diag(p) G^T
//
// (the deviations of the hands' classes less the linearized effect of p̂,
// whose per-hand covariance with them is G diag(p), with Gp = 0). X² = V^T V
// is then Σ λ_i χ²_1 over the eigenvalues of Σ, one of which (on √π) is 0
// and the others in [0, 1]: 1 for a uniform vector, where every g_Jk = π_J,
// and smaller as p moves away from it. Reference: Chernoff & Lehmann, Ann.
// Math. Statist. 25 (1954) 579–586 (estimates from the ungrouped data);
// Moore & Spruill, Ann. Statist. 3 (1975) 599–616.
func PokerFittedWeights(p []float64, h int, group []int, classes int) []float64 {
	probs := PokerProbs(p, h)
	grad := PokerGradient(p, h)
	pi := make([]float64, classes)
	g := make([][]float64, classes)
	for j := range g {
		g[j] = make([]float64, len(p))
	}
	for r := 1; r <= h; r++ {
		j := group[r-1]
		pi[j] += probs[r]
		for k := range p {
			g[j][k] += grad[r][k] / float64(h)
		}
	}
	sig := mat.NewSymDense(classes, nil)
	for a := 0; a < classes; a++ {
		for b := a; b < classes; b++ {
			v := -math.Sqrt(pi[a] * pi[b])
			if a == b {
				v++
			}
			for k, pk := range p {
				ga := (g[a][k] - pi[a]) / math.Sqrt(pi[a])
				gb := (g[b][k] - pi[b]) / math.Sqrt(pi[b])
				v -= float64(h) * ga * pk * gb
			}
			sig.SetSym(a, b, v)
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(sig, false) {
		lam := make([]float64, classes-1)
		for i := range lam {
			lam[i] = 1
		}
		return lam
	}
	vals := eig.Values(nil) // ascending: the first is the 0 on √π
	lam := vals[1:]
	for i, v := range lam {
		lam[i] = math.Min(1, math.Max(0, v))
	}
	slices.Reverse(lam)
	return lam
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
