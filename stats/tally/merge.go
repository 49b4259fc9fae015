package tally

import (
	"fmt"
	"slices"
)

// Merge returns the tally of the concatenation a‖b, where b's stretch starts
// right where a's ends. The result equals, field by field, the tally of one
// pass over a‖b; a and b are not changed.
//
// Windows and aligned blocks that cross the cut are counted from a's tail
// followed by b's head (each K-1 digits): a window that crosses the cut has
// at most K-1 digits on either side. One that reaches beyond a short piece
// is not complete yet and is counted by the merge that completes it.
func Merge(a, b *Tally) (*Tally, error) {
	a.Settle()
	b.Settle()
	if a.finished || b.finished {
		panic("tally: Merge of a finished tally (after CyclicInPlace)")
	}
	if !sameSpec(a.Spec, b.Spec) {
		return nil, fmt.Errorf("tally: cannot merge tallies of different specs (base %d, K %d vs base %d, K %d)",
			a.Base, a.MaxBlock, b.Base, b.MaxBlock)
	}
	if a.Offset+a.N != b.Offset {
		return nil, fmt.Errorf("tally: stretches are not consecutive: the first ends at digit %d, the second starts at %d",
			a.Offset+a.N, b.Offset)
	}
	t := a.Clone()
	if b.N == 0 {
		return t, nil
	}
	if a.N == 0 {
		u := b.Clone()
		u.Offset = a.Offset
		return u, nil
	}
	t.mergeTrace(a, b)
	addInto(t.Digits, b.Digits)
	addInto(t.Overlap, b.Overlap)
	for k := 2; k <= t.blocksMax(); k++ {
		addInto(t.Blocks[k], b.Blocks[k])
	}

	K, base := t.MaxBlock, t.Base
	x := append(slices.Clone(a.Tail), b.Head...)
	cut := len(a.Tail)          // index in x of b's first digit
	xs := b.Offset - int64(cut) // global position of x[0]
	for s := max(0, cut-K+1); s < cut && s+K <= len(x); s++ {
		t.Overlap[value(x[s:s+K], base)]++
	}
	for k := 2; k <= t.blocksMax(); k++ {
		for s := 0; s < cut && s+k <= len(x); s++ {
			if (xs+int64(s))%int64(k) == 0 && s+k > cut {
				t.Blocks[k][value(x[s:s+k], base)]++
			}
		}
	}

	capIdx := int64(t.gapCap())
	for c := range t.Gaps {
		ga, gb := &t.Gaps[c], &b.Gaps[c]
		addInto(ga.Hist, gb.Hist)
		if !gb.Seen {
			continue
		}
		if ga.Seen {
			gap := (a.N - 1 - ga.Last) + gb.First
			ga.Hist[min(gap, capIdx)]++
		} else {
			ga.Seen, ga.First = true, a.N+gb.First
		}
		ga.Last = a.N + gb.Last
	}

	t.mergeExtras(a, b, x, xs, cut)

	keep := t.span() - 1
	if len(t.Head) < keep {
		t.Head = append(t.Head, b.Head[:min(len(b.Head), keep-len(t.Head))]...)
	}
	tail := append(slices.Clone(a.Tail), b.Tail...)
	t.Tail = slices.Clone(tail[max(0, len(tail)-keep):])
	t.N += b.N
	return t, nil
}

func sameSpec(a, b Spec) bool {
	return a.Base == b.Base && a.MaxBlock == b.MaxBlock && a.gapCap() == b.gapCap() &&
		slices.Equal(a.GapClass, b.GapClass) && a.PokerHand == b.PokerHand &&
		a.UpDownDigits == b.UpDownDigits && a.Lags == b.Lags && a.RunDigit == b.RunDigit &&
		a.WalkHull == b.WalkHull && a.CouponClasses == b.CouponClasses &&
		slices.Equal(a.CouponClass, b.CouponClass) && a.CouponCap == b.CouponCap &&
		a.CouponEvery == b.CouponEvery && a.SkipGaps == b.SkipGaps && a.SkipRuns == b.SkipRuns &&
		a.SkipWalk == b.SkipWalk
}

func addInto(dst, src []int64) {
	for i, v := range src {
		dst[i] += v
	}
}

// Clone returns a deep copy.
func (t *Tally) Clone() *Tally {
	if t.finished {
		panic("tally: Clone of a finished tally (after CyclicInPlace)")
	}
	t.Settle()
	u := *t
	u.hotOverlap, u.hotBlocks, u.udScratch = nil, nil, nil
	u.GapClass = slices.Clone(t.GapClass)
	u.Digits = slices.Clone(t.Digits)
	u.Overlap = slices.Clone(t.Overlap)
	u.Blocks = make([][]int64, len(t.Blocks))
	for k, blk := range t.Blocks {
		u.Blocks[k] = slices.Clone(blk)
	}
	u.Gaps = make([]GapTally, len(t.Gaps))
	for i, g := range t.Gaps {
		u.Gaps[i] = g
		u.Gaps[i].Hist = slices.Clone(g.Hist)
	}
	u.Head = slices.Clone(t.Head)
	u.Tail = slices.Clone(t.Tail)
	u.CouponClass = slices.Clone(t.CouponClass)
	u.Poker = slices.Clone(t.Poker)
	u.LagProd = slices.Clone(t.LagProd)
	u.Walk.Upper = slices.Clone(t.Walk.Upper)
	u.Walk.Lower = slices.Clone(t.Walk.Lower)
	u.Coupon.Hist = slices.Clone(t.Coupon.Hist)
	u.Coupon.Head = slices.Clone(t.Coupon.Head)
	u.Trace = make([]TracePoint, len(t.Trace))
	for i, tp := range t.Trace {
		u.Trace[i] = TracePoint{Pos: tp.Pos, Counts: slices.Clone(tp.Counts)}
	}
	return &u
}

// CyclicInPlace is Cyclic without the copy of the largest table: the K-1
// wrap-around windows are added to Overlap itself, which then holds the
// cyclic order-K counts. It saves b^K counters (80 MB at b = 10, K = 7) at
// the end of an audit. The tally is finished: Add, Merge and Clone panic
// afterwards.
func (t *Tally) CyclicInPlace() ([][]int64, error) {
	t.Settle()
	K, b := t.MaxBlock, t.Base
	if t.N < int64(K) {
		return nil, fmt.Errorf("tally: %d digits are too few for blocks of length %d", t.N, K)
	}
	t.finished = true
	if K == 1 {
		return lowerOrders(slices.Clone(t.Digits), 1, b), nil
	}
	wrap := append(slices.Clone(t.Tail[len(t.Tail)-(K-1):]), t.Head[:K-1]...)
	for s := 0; s < K-1; s++ {
		t.Overlap[value(wrap[s:s+K], b)]++
	}
	return lowerOrders(t.Overlap, K, b), nil
}

// lowerOrders returns cyclic counts of orders 1..K from the order-K table,
// summing out the last digit.
func lowerOrders(top []int64, K, b int) [][]int64 {
	out := make([][]int64, K+1)
	out[K] = top
	for k := K - 1; k >= 1; k-- {
		hi := out[k+1]
		lo := make([]int64, len(hi)/b)
		for w := range lo {
			var s int64
			for _, v := range hi[w*b : w*b+b] {
				s += v
			}
			lo[w] = s
		}
		out[k] = lo
	}
	return out
}

// Cyclic returns the overlapping k-block counts of the cyclic sequence
// (d_1..d_n followed by d_1..d_{k-1}), for 1 ≤ k ≤ K: exactly n windows,
// with consistent marginals Σ_a N_{wa} = Σ_a N_{aw} = N_w (docs/derivations.md).
// The order-K table adds the K-1 wrap-around windows to the inside counts;
// lower orders follow by summing out the last digit. It needs N ≥ K-1, and
// the stretch must be the whole sequence (a shard has no wrap-around).
func (t *Tally) Cyclic() ([][]int64, error) {
	if t.finished { // Overlap already holds the cyclic counts
		return nil, fmt.Errorf("tally: Cyclic of a finished tally (after CyclicInPlace)")
	}
	t.Settle()
	K, b := t.MaxBlock, t.Base
	if t.N < int64(K) {
		return nil, fmt.Errorf("tally: %d digits are too few for blocks of length %d", t.N, K)
	}
	if K == 1 {
		return lowerOrders(slices.Clone(t.Digits), 1, b), nil
	}
	top := slices.Clone(t.Overlap)
	// The wrap-around windows start in the last K-1 positions.
	wrap := append(slices.Clone(t.Tail[len(t.Tail)-(K-1):]), t.Head[:K-1]...)
	for s := 0; s < K-1; s++ {
		top[value(wrap[s:s+K], b)]++
	}
	return lowerOrders(top, K, b), nil
}
