package checks

import (
	"fmt"
	"math"

	"borel/internal/tally"
)

// couponCheck is the coupon-collector test: the sequence (digit classes
// when b > 16) is cut into consecutive segments, each ending as soon as all
// d classes have appeared; the lengths T are counted. Under the null, by
// inclusion–exclusion over the classes J left out,
//
//	P(T ≤ r) = Σ_{J ⊆ classes} (-1)^|J| (1 - q_J)^r,
//
// which for d equiprobable classes is d!/d^r S(r-1, d-1) per length
// (Knuth's form) and for unequal classes the formula of Flajolet, Gardy &
// Thimonier (1992). Lengths are pooled from both ends until every expected
// count is at least 5; X² is χ² with classes - 1 df. Segments restart at
// global multiples of 65 536 digits so that shards tally independently (one
// partial segment lost per restart, like the trailing one). Under a fitted
// null the df are not reduced (Chernoff–Lehmann bounds, as for poker).
// References: Knuth, TAOCP vol. 2 §3.3.2 E; Flajolet, Gardy & Thimonier,
// Discrete Appl. Math. 39 (1992) 207–229 (unequal probabilities).
type couponCheck struct{}

var _ Check = couponCheck{}

func (couponCheck) Name() string { return "coupon" }

// Needs: coupon classes — the digits up to base 16, else 16 classes of
// consecutive digits — with segment lengths pooled from 8 times the
// expected segment length (at most 4096).
func (couponCheck) Needs(s Setting) Needs {
	d := min(s.Base, 16)
	c := &tally.CouponSpec{Classes: d, Class: make([]int, s.Base)}
	q := make([]float64, d)
	for j := range c.Class {
		c.Class[j] = j * d / s.Base
		if s.Null == Vector {
			q[c.Class[j]] += s.P[j]
		} else {
			q[c.Class[j]] += 1 / float64(s.Base)
		}
	}
	minQ, harmonic := 1.0, 0.0
	for i, v := range q {
		minQ = math.Min(minQ, v)
		harmonic += 1 / float64(i+1)
	}
	c.Cap = min(4096, max(d+1, int(math.Ceil(8*harmonic/minQ))))
	return Needs{Records: []tally.RecordSpec{c}}
}

// CouponCDF returns P(T ≤ r) for r = 0..maxR, for classes with
// probabilities q (d ≤ 32):
//
//	P(T ≤ r) = Σ_J (−1)^|J| (1 − q_J)^r
//
// over the subsets J of classes, q_J their total probability
// (inclusion–exclusion). Classes of equal probability make equal terms, so
// the subsets are grouped by how many classes of each distinct value they
// hold, with binomial weights (groupedTerms): d + 1 terms for equal
// classes, 81 instead of 65 536 for base 36's 16 classes of 2 or 3 digits,
// 2^d for distinct ones. Each term is advanced one power at a time.
func CouponCDF(q []float64, maxR int) []float64 {
	cdf := make([]float64, maxR+1)
	base, weight := groupedTerms(q)
	val := make([]float64, len(base))
	for i := range val {
		val[i] = 1
	}
	for r := 0; r <= maxR; r++ {
		s := 0.0
		for i := range val {
			s += weight[i] * val[i]
			val[i] *= base[i]
		}
		cdf[r] = math.Min(1, math.Max(0, s))
	}
	return cdf
}

// groupedTerms returns the inclusion–exclusion terms of CouponCDF grouped
// by equal class probabilities: for each choice of a_i classes among the
// c_i of the i-th distinct value v_i, the base 1 − Σ a_i v_i and the
// weight (−1)^Σa_i Π C(c_i, a_i).
func groupedTerms(q []float64) (base, weight []float64) {
	var vals []float64
	var counts []int
	for _, v := range q {
		found := false
		for i, u := range vals {
			if math.Abs(u-v) <= 1e-12 {
				counts[i]++
				found = true
				break
			}
		}
		if !found {
			vals, counts = append(vals, v), append(counts, 1)
		}
	}
	a := make([]int, len(vals))
	for {
		qj, w, size := 0.0, 1.0, 0
		for i, k := range a {
			qj += float64(k) * vals[i]
			w *= binomial(counts[i], k)
			size += k
		}
		if size%2 == 1 {
			w = -w
		}
		base, weight = append(base, math.Max(0, 1-qj)), append(weight, w)
		i := 0
		for i < len(a) && a[i] == counts[i] {
			a[i] = 0
			i++
		}
		if i == len(a) {
			return base, weight
		}
		a[i]++
	}
}

// binomial returns C(n, k) as a float (n ≤ 32 here: exact).
func binomial(n, k int) float64 {
	c := 1.0
	for j := 0; j < k; j++ {
		c = c * float64(n-j) / float64(j+1)
	}
	return c
}

func (couponCheck) Run(in Input, out *Result) {
	rec := in.Tally.Coupons()
	d := rec.Classes
	params := map[string]int{"classes": d}
	q := make([]float64, d)
	for j, p := range in.Null.P {
		q[rec.Class[j]] += p
	}
	for _, v := range q {
		if v <= 0 { // a class the data never showed (fitted null): segments never end
			out.Skips = append(out.Skips, Skip{Check: "coupon", Params: params,
				Reason: "a digit class has probability 0 under the null, so no segment can complete"})
			return
		}
	}
	hist := rec.Hist
	capIdx := len(hist) - 1
	var segs int64
	for _, c := range hist {
		segs += c
	}
	cdf := CouponCDF(q, capIdx)
	obs := make([]int64, 0, capIdx-d+1)
	exp := make([]float64, 0, capIdx-d+1)
	for r := d; r < capIdx; r++ {
		obs = append(obs, hist[r])
		exp = append(exp, float64(segs)*(cdf[r]-cdf[r-1]))
	}
	obs = append(obs, hist[capIdx])
	exp = append(exp, float64(segs)*(1-cdf[capIdx-1]))
	x2, classes, smallest := pooledChiSquare(obs, exp, in.Opts.MinExpected)
	if classes < 2 || segs == 0 {
		mean := 0.0
		for r := 0; r < capIdx; r++ {
			mean += 1 - cdf[r]
		}
		out.Skips = append(out.Skips, Skip{Check: "coupon", Params: params,
			Reason: fmt.Sprintf("%d segments are too few for 2 classes of expected count %g; needs about %d digits",
				segs, in.Opts.MinExpected, int64(math.Ceil(4*in.Opts.MinExpected*mean)))})
		return
	}
	f := chiSquareFinding("coupon", "X2", params, x2, float64(classes-1), smallest)
	f.Detail = fmt.Sprintf("%d segments over %d classes, %d length classes after pooling", segs, d, classes)
	if in.Null.Kind == Fitted {
		f.Notes = append(f.Notes, "fitted null: df not reduced for the estimated vector; the exact law lies between the reported df and df minus the fitted parameters (Chernoff–Lehmann)")
	}
	out.Findings = append(out.Findings, f)
}
