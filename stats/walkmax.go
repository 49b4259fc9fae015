package stats

import (
	"fmt"
	"math"
	"strings"
	"sync"
)

// WalkMaxCost is the largest number of cell updates WalkMaxLogTails spends
// (n steps × window width × digits, or × 4 when the digits are equally
// likely: see walkMaxCost): beyond it the caller uses the Brownian limit.
const WalkMaxCost = 1e7

// walkMaxCost is the work of the dynamic program in cell updates: each step
// convolves about 2e+b cells with the digit law, b products a cell, or,
// when every digit has the same probability (and b > 4), a box sum read
// from prefix and suffix sums, about 4 operations a cell whatever b is (raw
// bytes: 64 times cheaper, so 200 bytes take the exact law instead of the
// limit).
func walkMaxCost(n int64, p []float64, e float64) float64 {
	if useBox(p) {
		return float64(n) * (2*e + 2 + float64(len(p))) * 4
	}
	return float64(n) * (2*e + 2) * float64(len(p))
}

// useBox reports whether the program takes box sums: equal probabilities
// in a base above 4 (in bases 2 to 4 the direct convolution is cheaper).
func useBox(p []float64) bool { return len(p) > 4 && equalProbs(p) && !walkBoxOff }

// equalProbs reports whether every digit has the same positive probability.
func equalProbs(p []float64) bool {
	for _, v := range p {
		if v <= 0 || v != p[0] {
			return false
		}
	}
	return len(p) > 0
}

// WalkMaxLogTails returns the exact ln P(M ≥ e) and ln P(M ≤ e) for the
// maximal excursion M = max_{0≤k≤n} |T_k − kμ| of the digit-sum walk
// T_k = x_1 + … + x_k of n i.i.d. digits with P(x = j) = p[j] and mean
// μ = Σ j p_j. ok is false (and nothing is computed) when the cost would
// exceed WalkMaxCost.
//
// A dynamic program over the integer sums T_k kept inside the window
// kμ − e ≤ T_k ≤ kμ + e: each step convolves the mass with p and removes
// what leaves the window. P(M ≤ e) is the mass left after n steps; P(M ≥ e)
// is the sum of the mass that reaches |T_k − kμ| ≥ e, first exits, a sum
// of positive terms (neither tail is 1 minus the other). The mass is
// rescaled each step and its logarithm kept, so neither tail underflows.
// Boundary values are compared with a relative tolerance of 1e-9, so that
// the observed excursion itself counts in both tails (M is discrete).
// This is the exact law the Brownian limit approximates (Erdős & Kac 1946);
// the program is the standard one for first-passage probabilities of a
// lattice walk (Feller, vol. 1, ch. XIV).
func WalkMaxLogTails(n int64, p []float64, e float64) (upper, lower float64, ok bool) {
	if walkMaxCost(n, p, e) > WalkMaxCost || n < 1 {
		return 0, 0, false
	}
	var kb strings.Builder
	fmt.Fprintf(&kb, "%d %x", n, math.Float64bits(e))
	for _, v := range p {
		fmt.Fprintf(&kb, " %x", math.Float64bits(v))
	}
	key := kb.String()
	if t, hit := walkTails.get(key); hit {
		return t[0], t[1], true
	}
	upper, lower = walkMaxLogTails(n, p, e)
	walkTails.put(key, [2]float64{upper, lower})
	return upper, lower, true
}

// walkTails remembers recent tails: the segments of a second-level audit
// share one length and, in a small base, a few dozen excursions, so most
// segments find theirs here instead of rerunning the program.
var walkTails = &tailCache{max: 1 << 12}

type tailCache struct {
	mu    sync.Mutex
	max   int
	items map[string][2]float64
}

func (c *tailCache) get(k string) ([2]float64, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	t, ok := c.items[k]
	return t, ok
}

// put stores a result; a full cache starts afresh (simpler than an
// eviction order, and a second-level audit refills it in one pass).
func (c *tailCache) put(k string, t [2]float64) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.items == nil || len(c.items) >= c.max {
		c.items = make(map[string][2]float64)
	}
	c.items[k] = t
}

// walkMaxLogTails is WalkMaxLogTails without the cost test and the cache.
func walkMaxLogTails(n int64, p []float64, e float64) (upper, lower float64) {
	b := len(p)
	mu := 0.0
	for j, v := range p {
		mu += float64(j) * v
	}
	tol := 1e-9 * math.Max(1, e)
	// Window of T_k for the lower tail (|T_k − kμ| ≤ e, inclusive) and for
	// the upper tail (|T_k − kμ| < e: reaching e is an exit).
	bounds := func(k int64, strict bool) (lo, hi int64) {
		c := float64(k) * mu
		if strict {
			return int64(math.Floor(c-e+tol)) + 1, int64(math.Ceil(c+e-tol)) - 1
		}
		return int64(math.Ceil(c - e - tol)), int64(math.Floor(c + e + tol))
	}
	box := useBox(p)
	sums := &boxSums{}
	run := func(strict bool) (logStay, logExit float64) {
		lo0, hi0 := bounds(0, strict)
		logExit = math.Inf(-1)
		if lo0 > 0 || hi0 < 0 { // T_0 = 0 is already outside (e = 0, strict)
			return math.Inf(-1), 0
		}
		off := lo0
		cur := make([]float64, hi0-lo0+1)
		cur[-off] = 1
		logScale := 0.0
		var full, next []float64
		for k := int64(1); k <= n; k++ {
			lo, hi := bounds(k, strict)
			// The whole convolution, digit by digit over contiguous cells
			// (T from off to off+len(cur)+b−2), then split into the window
			// and what left it.
			if need := len(cur) + b - 1; cap(full) < need {
				full = make([]float64, need)
			} else {
				full = full[:need]
				clear(full)
			}
			if box {
				boxConvolve(full, cur, b, p[0], sums)
			} else {
				for j, pj := range p {
					if pj == 0 {
						continue
					}
					dst := full[j : j+len(cur)]
					for i, m := range cur {
						dst[i] += m * pj
					}
				}
			}
			exit, kept := 0.0, 0.0
			next = next[:0]
			for i, v := range full {
				if u := off + int64(i); u >= lo && u <= hi {
					kept += v
				} else {
					exit += v
				}
			}
			if exit > 0 {
				logExit = logAddExp(logExit, logScale+math.Log(exit))
			}
			if kept == 0 {
				return math.Inf(-1), logExit
			}
			first, last := max(lo, off)-off, min(hi, off+int64(len(full))-1)-off
			for i := first; i <= last; i++ {
				next = append(next, full[i]/kept)
			}
			logScale += math.Log(kept)
			cur, next = next, cur
			off = max(lo, off)
		}
		return logScale, logExit
	}
	stay, _ := run(false)
	_, exit := run(true)
	return math.Min(0, exit), math.Min(0, stay)
}

// walkBoxOff, set by tests only, makes equal probabilities take the general
// convolution: the reference the box sums are checked against.
var walkBoxOff bool

// boxSums holds the prefix and suffix sums boxConvolve reuses.
type boxSums struct{ pre, suf []float64 }

// boxConvolve writes into full (len(cur)+b−1 cells) the convolution of cur
// with b equal weights w: full[i] = w Σ_{t=i−b+1}^{i} cur[t]. Each box sum
// is a difference of prefix sums in the lower half and of suffix sums in
// the upper half, so the small values near either edge of the window — the
// mass that exits, which makes the upper tail — are differences of small
// partial sums, not of two numbers near 1.
func boxConvolve(full, cur []float64, b int, w float64, s *boxSums) {
	L := len(cur)
	if cap(s.pre) < L+1 {
		s.pre, s.suf = make([]float64, L+1), make([]float64, L+1)
	}
	pre, suf := s.pre[:L+1], s.suf[:L+1]
	pre[0], suf[L] = 0, 0
	for i, v := range cur {
		pre[i+1] = pre[i] + v
	}
	for i := L - 1; i >= 0; i-- {
		suf[i] = suf[i+1] + cur[i]
	}
	half := len(full) / 2
	for i := range full {
		a, c := max(0, i-b+1), min(i, L-1)+1 // the box is cur[a:c]
		if i < half {
			full[i] = w * (pre[c] - pre[a])
		} else {
			full[i] = w * (suf[a] - suf[c])
		}
	}
}

func logAddExp(a, b float64) float64 {
	if math.IsInf(a, -1) {
		return b
	}
	if math.IsInf(b, -1) {
		return a
	}
	if a < b {
		a, b = b, a
	}
	return a + math.Log1p(math.Exp(b-a))
}
