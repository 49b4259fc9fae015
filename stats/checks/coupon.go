package checks

import (
	"fmt"
	"math"

	"github.com/borel-audit/borel/internal/tally"
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
// Thimonier (1992). Lengths of Cap or more form one class. Segments restart
// at global multiples of 65 536 digits so that shards tally independently,
// and one starts only where Cap digits fit before the next restart and the
// end (tally.CouponRestart): each start is a stopping time, so the counted
// lengths are i.i.d. with the capped law, however long E[T] is against the
// spacing. Their number N is random; by Wald's identities the cell
// deviations O_r − N p_r have mean 0 and the multinomial covariance with
// E[N] in place of N, so X² is χ² with classes − 1 df asymptotically.
// The length classes are pooled from the expected counts E[N]·p_r, E[N]
// from the renewal theorem, never from the observed N: pooling or skipping
// by the observed count selects inputs with many short segments (at 10^5
// digits under p = (1e-4, 0.4999, 0.5) 4% of the tested ones fell below
// 0.01). Under a fitted null the df are not reduced (Chernoff–Lehmann
// bounds, as for poker). References: Knuth, TAOCP vol. 2 §3.3.2 E;
// Flajolet, Gardy & Thimonier, Discrete Appl. Math. 39 (1992) 207–229
// (unequal probabilities); Feller, An Introduction to Probability Theory
// vol. 1, ch. XIII (renewal theorem, Wald).
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

// CouponMoments returns E[T] and E[T²] of the segment length for classes
// with probabilities q, all positive. With P(T > r) = −Σ_{J≠∅} (−1)^|J|
// (1 − q_J)^r (CouponCDF's terms without the empty set),
//
//	E[T]  = Σ_{r≥0} P(T > r)        = −Σ_{J≠∅} (−1)^|J| / q_J,
//	E[T²] = Σ_{r≥0} (2r+1) P(T > r) = −Σ_{J≠∅} (−1)^|J| (2 − q_J) / q_J².
//
// For d equal classes E[T] = d H_d and Var T = d² Σ 1/k² − d H_d.
func CouponMoments(q []float64) (mean, second float64) {
	base, weight := groupedTerms(q)
	for i, x := range base {
		if i == 0 { // the empty set: base 1, weight 1
			continue
		}
		qj := 1 - x
		mean -= weight[i] / qj
		second -= weight[i] * (2 - qj) / (qj * qj)
	}
	return mean, second
}

// couponExpectedSegments returns E[N], the expected number of counted
// segments in the stretch of n digits from global position offset: in each
// window between restart positions (those before the stretch's first
// restart belong to the preceding stretch) of w ≥ Cap digits, segments
// start at 0 and at each renewal up to w − Cap, and by the renewal theorem
// for lengths of mean μ and second moment m₂ the expected count of renewals
// in 0..m is (m + 1)/μ + (m₂ − μ)/(2μ²) + o(1) (Feller vol. 1, XIII.12;
// exact for geometric lengths), kept within [1, m + 1].
func couponExpectedSegments(offset, n, every int64, capLen int, mu, m2 float64) float64 {
	u := func(w int64) float64 {
		if w < int64(capLen) {
			return 0
		}
		m := float64(w - int64(capLen))
		return math.Min(m+1, math.Max(1, (m+1)/mu+(m2-mu)/(2*mu*mu)))
	}
	first := (offset + every - 1) / every * every
	end := offset + n
	if first >= end {
		return 0
	}
	full := (end - first) / every
	return float64(full)*u(every) + u((end-first)%every)
}

// scaled returns v times each of p.
func scaled(p []float64, v float64) []float64 {
	out := make([]float64, len(p))
	for i, x := range p {
		out[i] = v * x
	}
	return out
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
	hist := rec.Counted()
	capIdx := len(hist) - 1
	var segs int64
	for _, c := range hist {
		segs += c
	}
	cdf := CouponCDF(q, capIdx)
	mu, m2 := CouponMoments(q)
	expSegs := couponExpectedSegments(in.Tally.Offset, in.Tally.N, rec.Spacing(), rec.Cap, mu, m2)
	obs := make([]int64, 0, capIdx-d+1)
	prob := make([]float64, 0, capIdx-d+1)
	for r := d; r < capIdx; r++ {
		obs = append(obs, hist[r])
		prob = append(prob, cdf[r]-cdf[r-1])
	}
	obs = append(obs, hist[capIdx])
	prob = append(prob, 1-cdf[capIdx-1])
	ref, exp := make([]float64, len(prob)), make([]float64, len(prob))
	for i, p := range prob {
		ref[i], exp[i] = expSegs*p, float64(segs)*p
	}
	x2, classes, smallest := pooledChiSquareBy(obs, exp, ref, in.Opts.MinExpected)
	if classes < 2 || segs == 0 {
		// The smallest E[N] that pools into 2 classes, in digits.
		lo, hi := 1.0, 2.0
		for poolGroups(scaled(prob, hi), in.Opts.MinExpected) < 2 && hi < 1e15 {
			lo, hi = hi, 2*hi
		}
		for hi-lo > 0.5 {
			if mid := (lo + hi) / 2; poolGroups(scaled(prob, mid), in.Opts.MinExpected) < 2 {
				lo = mid
			} else {
				hi = mid
			}
		}
		need := fmt.Sprintf("segments cannot start: the length cap %d exceeds the restart spacing", rec.Cap)
		if per := couponExpectedSegments(0, rec.Spacing(), rec.Spacing(), rec.Cap, mu, m2); per > 0 {
			need = fmt.Sprintf("needs about %d digits", int64(math.Ceil(hi/per*float64(rec.Spacing()))))
		}
		out.Skips = append(out.Skips, Skip{Check: "coupon", Params: params,
			Reason: fmt.Sprintf("%.3g segments expected are too few for 2 classes of expected count %g; %s",
				expSegs, in.Opts.MinExpected, need)})
		return
	}
	f := chiSquareFinding("coupon", "X2", params, x2, float64(classes-1), smallest)
	f.Detail = fmt.Sprintf("%d segments (%.4g expected) over %d classes, %d length classes after pooling", segs, expSegs, d, classes)
	// Where: the pooled length classes of largest residual, named by the
	// segment lengths they hold (class i is length d+i; the last, the cap
	// and beyond).
	group, _ := poolIndex(ref, in.Opts.MinExpected)
	po, pe := poolClassesBy(obs, exp, ref, in.Opts.MinExpected)
	f.Where = topResiduals(po, pe, 3, func(g int) string {
		lo, hi := -1, -1
		for i, gi := range group {
			if gi == g {
				if lo < 0 {
					lo = i
				}
				hi = i
			}
		}
		switch {
		case hi == len(group)-1:
			return fmt.Sprintf("segments of ≥ %d digits", d+lo)
		case lo == hi:
			return fmt.Sprintf("segments of %d digits", d+lo)
		}
		return fmt.Sprintf("segments of %d–%d digits", d+lo, d+hi)
	})
	if in.Null.Kind == Fitted {
		f.Notes = append(f.Notes, Note{NoteFittedNull, "fitted null: df not reduced for the estimated vector; the exact law lies between the reported df and df minus the fitted parameters (Chernoff–Lehmann)"})
	}
	out.Findings = append(out.Findings, f)
}
