package checks

import (
	"fmt"
	"math"

	"github.com/borel-audit/borel/internal/tally"
)

// gapCheck is Knuth's gap test, once per digit class (one class per digit
// for b ≤ 36; the audit groups larger alphabets).
//
// For a class A of null probability q, a gap is the number r ≥ 0 of digits
// outside A between consecutive A-digits; the leading and trailing partial
// gaps are discarded. Under the null, gaps are i.i.d. geometric:
//
//	P(r) = q (1-q)^r  (0 ≤ r < t),   P(r ≥ t) = (1-q)^t,
//
// and the X² over these t+1 classes is χ² with t df (t-1 under a fitted null,
// where q is estimated). t is the largest value with every class's expected
// count at least 5 — for q ≤ 1/2 that is G·q·(1-q)^(t-1) ≥ 5 with G the
// number of gaps, stricter than Knuth's tail-only rule. The b tests are
// dependent (they share the digits) and the sample size is G, not n.
// References: Knuth, TAOCP vol. 2 §3.3.2 C; Kendall & Babington Smith,
// JRSS 101 (1938) 147–166.
type gapCheck struct{}

var _ Check = gapCheck{}

func (gapCheck) Name() string { return "gap" }

// Needs: the gap histograms, one class per digit in the text bases; above
// them (raw bytes) 16 classes of consecutive digits, so that each class
// keeps enough gaps.
func (gapCheck) Needs(s Setting) Needs {
	g := &tally.GapSpec{}
	if s.Base > 36 {
		g.Class = make([]int, s.Base)
		for d := range g.Class {
			g.Class[d] = d * 16 / s.Base
		}
	}
	return Needs{Records: []tally.RecordSpec{g}}
}

func (gapCheck) Run(in Input, out *Result) {
	rec := in.Tally.Gaps()
	classes := len(rec.Classes)
	q := make([]float64, classes)
	for d, p := range in.Null.P {
		q[rec.ClassOf(d)] += p
	}
	paramName := "digit"
	if rec.Class != nil {
		paramName = "class"
	}
	minDF := 1
	if in.Null.Kind == Fitted {
		minDF = 2
	}
	for c := range classes {
		params := map[string]int{paramName: c}
		hist := rec.Classes[c].Hist
		capIdx := len(hist) - 1
		var gaps int64
		for _, h := range hist {
			gaps += h
		}
		qc := q[c]
		if qc <= 0 {
			continue // a digit the fitted null never saw has no gaps to test
		}
		G := float64(gaps)
		tmax := 0
		switch {
		case G == 0:
		case qc <= 0.5: // the last regular class binds: G·q·(1-q)^(t-1) ≥ 5
			tmax = int(math.Floor(1 + math.Log(in.Opts.MinExpected/(G*qc))/math.Log(1-qc)))
		case qc < 1: // the tail class binds: G(1-q)^t ≥ 5
			tmax = int(math.Floor(math.Log(in.Opts.MinExpected/G) / math.Log(1-qc)))
		}
		tmax = min(tmax, capIdx)
		if G*qc < in.Opts.MinExpected || tmax < minDF {
			out.Skips = append(out.Skips, Skip{Check: "gap", Params: params,
				Reason: fmt.Sprintf("%d gaps are too few for %d classes of expected count %g or more; needs about %d digits",
					gaps, minDF+1, in.Opts.MinExpected, gapDigitsNeeded(in.Opts.MinExpected, qc, minDF))})
			continue
		}
		cs := newCellStat()
		var tail int64
		obs, exp := make([]int64, 0, tmax+1), make([]float64, 0, tmax+1)
		for r, h := range hist {
			if r < tmax {
				cs.add(h, G*qc*math.Pow(1-qc, float64(r)))
				obs, exp = append(obs, h), append(exp, G*qc*math.Pow(1-qc, float64(r)))
			} else {
				tail += h
			}
		}
		cs.add(tail, G*math.Pow(1-qc, float64(tmax)))
		obs, exp = append(obs, tail), append(exp, G*math.Pow(1-qc, float64(tmax)))
		df := float64(tmax)
		if in.Null.Kind == Fitted {
			df--
		}
		f := chiSquareFinding("gap", "X2", params, cs.x2, df, cs.minExp)
		f.Detail = fmt.Sprintf("%d gaps, lengths 0..%d and ≥%d", gaps, tmax-1, tmax)
		if rec.Class != nil { // say which digits form the class
			lo, hi := -1, -1
			for d, cl := range rec.Class {
				if cl == c {
					if lo < 0 {
						lo = d
					}
					hi = d
				}
			}
			f.Detail = fmt.Sprintf("class %d: digits %s to %s; %s", c, DigitName(lo, in.Tally.Base), DigitName(hi, in.Tally.Base), f.Detail)
		}
		f.Where = topResiduals(obs, exp, 3, func(r int) string {
			if r == tmax {
				return fmt.Sprintf("gaps ≥ %d", tmax)
			}
			return fmt.Sprintf("gaps of %d", r)
		})
		out.Findings = append(out.Findings, f)
	}
}

// gapDigitsNeeded estimates the sequence length that yields enough gaps for
// t = minDF: G ≈ n q gaps, each class expectation ≥ minExpected.
func gapDigitsNeeded(minExpected, q float64, minDF int) int64 {
	perGap := q * math.Pow(1-q, float64(minDF-1))
	if q > 0.5 {
		perGap = math.Pow(1-q, float64(minDF))
	}
	return int64(math.Ceil(minExpected / perGap / q))
}
