package stats

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"sync"
)

// DiscreteLaw is the exact law of a statistic with finitely many values,
// held as its distinct values in increasing order with, for each, ln P(T ≥ v),
// ln P(T ≤ v) and ln P(T = v). Each tail is a log-sum of its own terms, so
// neither is formed as one minus the other and tails far below 1e-300 keep
// their digits.
type DiscreteLaw struct {
	values       []float64
	logUp, logLo []float64
	logEq        []float64
	outcomes     int     // number of outcomes enumerated
	tol          float64 // relative tolerance for matching a value
}

// Outcomes returns the number of elementary outcomes the law was built from.
func (d *DiscreteLaw) Outcomes() int { return d.outcomes }

// LogTails returns ln P(T ≥ t), ln P(T ≤ t) and ln P(T = t) for an observed
// value t. Values are matched with a relative tolerance of 1e-9 (the
// statistic computed by a check and by the law's enumeration may differ in
// the last bits); a t between two values of the law has P(T = t) = 0.
func (d *DiscreteLaw) LogTails(t float64) (up, lo, eq float64) {
	tol := d.tol * math.Max(1, math.Abs(t))
	i := sort.SearchFloat64s(d.values, t-tol) // first value ≥ t − tol
	n := len(d.values)
	if i < n && d.values[i] <= t+tol {
		return d.logUp[i], d.logLo[i], d.logEq[i]
	}
	up, lo, eq = math.Inf(-1), math.Inf(-1), math.Inf(-1)
	if i < n {
		up = d.logUp[i]
	}
	if i > 0 {
		lo = d.logLo[i-1]
	}
	return up, lo, eq
}

// newDiscreteLaw builds a law from (value, ln probability) pairs, merging
// values equal to within the relative tolerance tol.
func newDiscreteLaw(vals, logp []float64, tol float64) *DiscreteLaw {
	idx := make([]int, len(vals))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return vals[idx[a]] < vals[idx[b]] })
	d := &DiscreteLaw{outcomes: len(vals), tol: tol}
	for _, i := range idx {
		v := vals[i]
		if k := len(d.values) - 1; k >= 0 && v-d.values[k] <= tol*math.Max(1, math.Abs(v)) {
			d.logEq[k] = logAddExp(d.logEq[k], logp[i])
			continue
		}
		d.values = append(d.values, v)
		d.logEq = append(d.logEq, logp[i])
	}
	n := len(d.values)
	d.logUp = make([]float64, n)
	d.logLo = make([]float64, n)
	acc := math.Inf(-1)
	for k := n - 1; k >= 0; k-- {
		acc = logAddExp(acc, d.logEq[k])
		d.logUp[k] = math.Min(acc, 0)
	}
	acc = math.Inf(-1)
	for k := 0; k < n; k++ {
		acc = logAddExp(acc, d.logEq[k])
		d.logLo[k] = math.Min(acc, 0)
	}
	return d
}

// MaxExactOutcomes bounds the enumeration of MultinomialX2Law: about a
// second of work at most on one core, 0.1 s typically.
const MaxExactOutcomes = 1 << 20

// MultinomialOutcomes returns the number of count vectors of n items in k
// cells, C(n+k−1, k−1), as a float (it may be huge).
func MultinomialOutcomes(n int64, k int) float64 {
	if k <= 1 {
		return 1
	}
	lg := func(x float64) float64 { v, _ := math.Lgamma(x); return v }
	return math.Exp(lg(float64(n+int64(k))) - lg(float64(n+1)) - lg(float64(k)))
}

// MultinomialX2Law returns the exact law of Pearson's statistic
// X² = Σ_j (N_j − n p_j)² / (n p_j) for counts (N_1..N_k) ~ Multinomial(n, p),
// by enumerating every count vector with its probability
// n!/∏N_j! ∏p_j^{N_j}; cells with p_j = 0 are left out (they hold no counts
// under the null). ok is false when the enumeration would exceed
// MaxExactOutcomes count vectors; the chi-square law with k−1 df is then the
// usual approximation (Pearson 1900; Cochran, Ann. Math. Statist. 23 (1952)
// 315–345, on its accuracy for small expectations). Laws are kept in a small
// cache, since the segments of a second-level audit share one n.
func MultinomialX2Law(n int64, p []float64) (law *DiscreteLaw, ok bool) {
	var q []float64
	for _, v := range p {
		if v > 0 {
			q = append(q, v)
		}
	}
	if n < 0 || len(q) == 0 || MultinomialOutcomes(n, len(q)) > MaxExactOutcomes {
		return nil, false
	}
	key := lawKey("x2", n, q)
	if d, ok := lawCache.get(key); ok {
		return d, true
	}
	k := len(q)
	nn := int(n)
	lgf := make([]float64, nn+1) // ln c!
	for c := 1; c <= nn; c++ {
		lgf[c] = lgf[c-1] + math.Log(float64(c))
	}
	lnp := make([]float64, k)
	exp := make([]float64, k)
	for j := range q {
		lnp[j] = math.Log(q[j])
		exp[j] = float64(n) * q[j]
	}
	size := int(MultinomialOutcomes(n, k) + 0.5)
	vals := make([]float64, 0, size)
	logp := make([]float64, 0, size)
	var rec func(j, left int, lp, x2 float64)
	rec = func(j, left int, lp, x2 float64) {
		if j == k-1 {
			c := float64(left)
			d := c - exp[j]
			vals = append(vals, x2+d*d/exp[j])
			logp = append(logp, lgf[nn]+lp+c*lnp[j]-lgf[left])
			return
		}
		for c := 0; c <= left; c++ {
			d := float64(c) - exp[j]
			rec(j+1, left-c, lp+float64(c)*lnp[j]-lgf[c], x2+d*d/exp[j])
		}
	}
	rec(0, nn, 0, 0)
	d := newDiscreteLaw(vals, logp, 1e-9)
	lawCache.put(key, d)
	return d, true
}

// MaxExactRunsUpDown bounds the exact law of RunsUpDownLaw (m² / 2 cell
// updates: 4.5·10^6 at the bound, a few milliseconds).
const MaxExactRunsUpDown = 3000

// RunsUpDownLaw returns the exact law of the number R of runs up and down
// (maximal monotone stretches) among m ≥ 2 continuous i.i.d. values, R =
// 1..m−1, from André's recurrence for the number of permutations of m with r
// alternating runs,
//
//	P_m(r) = r·P_{m−1}(r) + 2·P_{m−1}(r−1) + (m−r)·P_{m−1}(r−2),
//
// (André 1884; David & Barton, Combinatorial Chance, 1962, ch. 10; Knuth,
// TAOCP vol. 3 §5.1.3; citations from memory, the recurrence is checked in
// the tests against a brute-force count). It is run on probabilities
// P_m(r)/m!. ok is false for m > MaxExactRunsUpDown. Far tails below 1e-280
// underflow the recurrence and are taken from the normal law with
// continuity correction (Levene & Wolfowitz 1944): there the p-value is
// astronomically small either way.
func RunsUpDownLaw(m int) (law *DiscreteLaw, ok bool) {
	if m < 2 || m > MaxExactRunsUpDown {
		return nil, false
	}
	key := fmt.Sprintf("updown %d", m)
	if d, ok := lawCache.get(key); ok {
		return d, true
	}
	prev := make([]float64, m+1) // prev[r], r = 0..m
	cur := make([]float64, m+1)
	prev[1] = 1 // m = 2: one run
	for n := 3; n <= m; n++ {
		for r := 0; r <= n; r++ {
			v := 0.0
			if r <= n-2 {
				v += float64(r) * prev[r]
			}
			if r >= 1 {
				v += 2 * prev[r-1]
			}
			if r >= 2 {
				v += float64(n-r) * prev[r-2]
			}
			cur[r] = v / float64(n)
		}
		prev, cur = cur, prev
	}
	vals := make([]float64, 0, m-1)
	logp := make([]float64, 0, m-1)
	for r := 1; r <= m-1; r++ {
		vals = append(vals, float64(r))
		logp = append(logp, math.Log(prev[r]))
	}
	d := newDiscreteLaw(vals, logp, 1e-12)
	// Replace tails that lost their digits to underflow by the normal law.
	const floor = -644.0 // ln 1e-280
	for i, r := range d.values {
		up, lo, eq := RunsUpDownLatticeLogTails(int64(m), int64(r))
		if !(d.logUp[i] >= floor) {
			d.logUp[i] = up
		}
		if !(d.logLo[i] >= floor) {
			d.logLo[i] = lo
		}
		if !(d.logEq[i] >= floor) {
			d.logEq[i] = eq
		}
	}
	lawCache.put(key, d)
	return d, true
}

// RunsUpDownLatticeLogTails returns the continuity-corrected normal
// approximation of ln P(R ≥ r), ln P(R ≤ r) and ln P(R = r) for the number of
// runs up and down among m values, E R = (2m−1)/3, Var R = (16m−29)/90
// (Levene & Wolfowitz 1944): the law beyond MaxExactRunsUpDown, where its
// error is far below the atoms' size.
func RunsUpDownLatticeLogTails(m int64, r int64) (up, lo, eq float64) {
	mean := (2*float64(m) - 1) / 3
	sd := math.Sqrt((16*float64(m) - 29) / 90)
	a := (float64(r) - 0.5 - mean) / sd
	b := (float64(r) + 0.5 - mean) / sd
	up, lo = NormalLogSF(a), NormalLogSF(-b)
	// P(a < Z < b) = Φc(a) − Φc(b), formed on the side where it is accurate.
	if a > 0 {
		eq = up + math.Log(-math.Expm1(NormalLogSF(b)-up))
	} else {
		eq = lo + math.Log(-math.Expm1(NormalLogSF(-a)-lo))
	}
	return up, lo, eq
}

func lawKey(kind string, n int64, p []float64) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s %d", kind, n)
	for _, v := range p {
		fmt.Fprintf(&b, " %x", math.Float64bits(v))
	}
	return b.String()
}

// lawCache keeps the most recent laws (a second-level audit asks for the
// same few laws once per segment and statistic).
var lawCache = &boundedCache{max: 16}

type boundedCache struct {
	mu    sync.Mutex
	max   int
	keys  []string
	items map[string]*DiscreteLaw
}

func (c *boundedCache) get(k string) (*DiscreteLaw, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	d, ok := c.items[k]
	return d, ok
}

func (c *boundedCache) put(k string, d *DiscreteLaw) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.items == nil {
		c.items = map[string]*DiscreteLaw{}
	}
	if _, ok := c.items[k]; ok {
		return
	}
	if len(c.keys) >= c.max {
		delete(c.items, c.keys[0])
		c.keys = c.keys[1:]
	}
	c.keys = append(c.keys, k)
	c.items[k] = d
}

// CyclicBitPairLaw returns the exact law of Good's ∇ψ²_2 (second false) or
// ∇²ψ²_2 (second true) for n i.i.d. bits with P(0) = p[0], P(1) = p[1],
// from the cyclic counts of the sequence and its overlapping pairs (the
// sequence wrapped around, as the serial check counts them). A cyclic
// binary sequence is fixed up to its arrangement by its number of zeros n0
// and its number j of runs of zeros, and then N01 = N10 = j, N00 = n0 − j,
// N11 = n − n0 − j; for 0 < n0 < n there are (n/j)·C(n0−1, j−1)·C(n1−1, j−1)
// sequences with j runs (the circular-runs count; e.g. Bateman, Biometrika 35
// (1948) 97–112, citation from memory, checked in the tests by brute force),
// each of probability p0^n0 p1^n1. ok is false when the outcomes exceed
// MaxExactOutcomes (n beyond about 2000).
func CyclicBitPairLaw(n int64, p [2]float64, second bool) (law *DiscreteLaw, ok bool) {
	if n < 2 || !(p[0] > 0 && p[1] > 0) || float64(n)*float64(n)/4 > MaxExactOutcomes {
		return nil, false
	}
	key := lawKey(fmt.Sprintf("bitpair %v", second), n, p[:])
	if d, ok := lawCache.get(key); ok {
		return d, true
	}
	nf := float64(n)
	lgf := make([]float64, n+1)
	for c := int64(1); c <= n; c++ {
		lgf[c] = lgf[c-1] + math.Log(float64(c))
	}
	lnC := func(a, b int64) float64 { return lgf[a] - lgf[b] - lgf[a-b] }
	lp0, lp1 := math.Log(p[0]), math.Log(p[1])
	x2 := func(obs, prob float64) float64 { e := nf * prob; return (obs - e) * (obs - e) / e }
	stat := func(n0, j int64) float64 {
		n1 := n - n0
		psi1 := x2(float64(n0), p[0]) + x2(float64(n1), p[1])
		psi2 := x2(float64(n0-j), p[0]*p[0]) + 2*x2(float64(j), p[0]*p[1]) + x2(float64(n1-j), p[1]*p[1])
		if second {
			return psi2 - 2*psi1
		}
		return psi2 - psi1
	}
	var vals, logp []float64
	add := func(n0, j int64, lc float64) {
		vals = append(vals, stat(n0, j))
		logp = append(logp, lc+float64(n0)*lp0+float64(n-n0)*lp1)
	}
	add(0, 0, 0)
	add(n, 0, 0)
	for n0 := int64(1); n0 < n; n0++ {
		n1 := n - n0
		for j := int64(1); j <= min(n0, n1); j++ {
			add(n0, j, math.Log(nf/float64(j))+lnC(n0-1, j-1)+lnC(n1-1, j-1))
		}
	}
	d := newDiscreteLaw(vals, logp, 1e-9)
	lawCache.put(key, d)
	return d, true
}
