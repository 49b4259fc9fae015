package tally

import "fmt"

// Limits of a decoded spec beyond which a shard is refused as damaged: far
// above what any audit plans (the plan's largest gap cap is DefaultGapCap,
// hands are 4–5 digits, lags 5, values up to 63 bits, coupon caps a few
// hundred), and small enough that no table size overflows.
const (
	maxGapCap     = 1 << 20
	maxHand       = 64
	maxLags       = 1 << 10
	maxCouponCap  = 1 << 20
	maxUpDown     = 64
	maxCouponStep = 1<<31 - 1
	maxPosition   = 1 << 62
)

// wellFormed checks a decoded tally completely: its spec, the length of
// every table against the spec, and every value against what one pass over
// N digits starting at Offset can produce (non-negative counts whose sums
// match the number of windows, blocks, hands, values and gaps inside the
// stretch; digits below the base; positions inside the stretch and in
// order). A shard that passes merges and audits without a panic; one that
// fails is a one-line error.
func (t *Tally) wellFormed() error {
	if err := t.Spec.Validate(); err != nil {
		return err
	}
	if err := t.checkSpecLimits(); err != nil {
		return fmt.Errorf("tally: %v (damaged shard)", err)
	}
	if err := t.checkRecords(); err != nil {
		return fmt.Errorf("tally: %v (damaged shard)", err)
	}
	return nil
}

func (t *Tally) checkSpecLimits() error {
	s := t.Spec
	b, K := s.Base, s.MaxBlock
	if K > 64 || float64(ipow(b, min(K, 8))) <= 0 || pow(float64(b), K) > 1<<40 {
		return fmt.Errorf("block length %d is out of range", K)
	}
	switch {
	case s.GapCap < 0 || s.GapCap > maxGapCap:
		return fmt.Errorf("gap cap %d is out of range", s.GapCap)
	case s.PokerHand < 0 || s.PokerHand > maxHand:
		return fmt.Errorf("hand size %d is out of range", s.PokerHand)
	case s.UpDownDigits < 0 || s.UpDownDigits > maxUpDown:
		return fmt.Errorf("up/down value length %d is out of range", s.UpDownDigits)
	case s.Lags < 0 || s.Lags > maxLags:
		return fmt.Errorf("largest lag %d is out of range", s.Lags)
	case s.CouponClasses < 0 || s.CouponCap < 0 || s.CouponCap > maxCouponCap || s.CouponEvery < 0 || s.CouponEvery > maxCouponStep:
		return fmt.Errorf("coupon parameters are out of range")
	}
	for _, c := range s.CouponClass {
		if c < 0 || c >= s.CouponClasses {
			return fmt.Errorf("coupon class %d is not below the class count %d", c, s.CouponClasses)
		}
	}
	if s.CouponClasses == 0 && s.CouponClass != nil {
		return fmt.Errorf("coupon classes given for a tally without coupons")
	}
	return nil
}

func pow(b float64, k int) float64 {
	p := 1.0
	for range k {
		p *= b
	}
	return p
}

// aligned returns the number of blocks of length k starting at multiples
// of k that lie inside [off, off+n).
func aligned(off, n int64, k int) int64 {
	kk := int64(k)
	first := (off + kk - 1) / kk
	last := (off + n) / kk // blocks j with j·k + k ≤ off + n: j < last
	return max(0, last-first)
}

func nonNegative(name string, v []int64) (int64, error) {
	var s int64
	for _, x := range v {
		if x < 0 {
			return 0, fmt.Errorf("%s holds a negative count", name)
		}
		if s += x; s < 0 || s > maxPosition {
			return 0, fmt.Errorf("%s counts overflow", name)
		}
	}
	return s, nil
}

func (t *Tally) digitsBelowBase(name string, d []byte) error {
	for _, x := range d {
		if int(x) >= t.Base {
			return fmt.Errorf("%s holds digit %d, not a digit of base %d", name, x, t.Base)
		}
	}
	return nil
}

// checkRecords checks each record of the tally: shape first, then values.
func (t *Tally) checkRecords() error {
	b, K, N := t.Base, t.MaxBlock, t.N
	if N < 0 || t.Offset < 0 || t.Offset > maxPosition-N || N > maxPosition {
		return fmt.Errorf("stretch position %d and length %d are out of range", t.Offset, N)
	}
	// Digit counts.
	if len(t.Digits) != b {
		return fmt.Errorf("%d digit counts for base %d", len(t.Digits), b)
	}
	if sum, err := nonNegative("the digit counts", t.Digits); err != nil {
		return err
	} else if sum != N {
		return fmt.Errorf("the digit counts add up to %d, not the %d digits of the stretch", sum, N)
	}
	// Head and tail.
	keep := int64(t.span() - 1)
	if int64(len(t.Head)) != min(N, keep) || int64(len(t.Tail)) != min(N, keep) {
		return fmt.Errorf("head or tail of %d and %d digits, want %d", len(t.Head), len(t.Tail), min(N, keep))
	}
	if err := t.digitsBelowBase("the head", t.Head); err != nil {
		return err
	}
	if err := t.digitsBelowBase("the tail", t.Tail); err != nil {
		return err
	}
	// Overlapping windows inside the stretch.
	if len(t.Overlap) != ipow(b, K) {
		return fmt.Errorf("window table of %d cells, want %d", len(t.Overlap), ipow(b, K))
	}
	if sum, err := nonNegative("the window table", t.Overlap); err != nil {
		return err
	} else if K > 1 && sum != max(0, N-int64(K)+1) {
		return fmt.Errorf("the window table counts %d windows, not the %d inside the stretch", sum, max(0, N-int64(K)+1))
	}
	// Aligned blocks.
	if len(t.Blocks) != K+1 {
		return fmt.Errorf("%d block tables for block length %d", len(t.Blocks), K)
	}
	for k := range t.Blocks {
		want := 0
		if t.HasBlocks(k) {
			want = ipow(b, k)
		}
		if len(t.Blocks[k]) != want {
			return fmt.Errorf("block table %d has %d cells, want %d", k, len(t.Blocks[k]), want)
		}
		if want == 0 {
			continue
		}
		if sum, err := nonNegative("a block table", t.Blocks[k]); err != nil {
			return err
		} else if sum != aligned(t.Offset, N, k) {
			return fmt.Errorf("block table %d counts %d blocks, not the %d inside the stretch", k, sum, aligned(t.Offset, N, k))
		}
	}
	if err := t.checkGaps(); err != nil {
		return err
	}
	if err := t.checkExtras(); err != nil {
		return err
	}
	return t.checkTrace()
}

func (t *Tally) checkGaps() error {
	if len(t.Gaps) != t.classes() {
		return fmt.Errorf("%d gap records for %d classes", len(t.Gaps), t.classes())
	}
	occ := make([]int64, t.classes())
	for d, n := range t.Digits {
		c := d
		if t.GapClass != nil {
			c = t.GapClass[d]
		}
		occ[c] += n
	}
	for c, g := range t.Gaps {
		if len(g.Hist) != t.gapCap()+1 {
			return fmt.Errorf("gap histogram of %d cells, want %d", len(g.Hist), t.gapCap()+1)
		}
		sum, err := nonNegative("a gap histogram", g.Hist)
		if err != nil {
			return err
		}
		if t.SkipGaps {
			continue
		}
		if g.Seen != (occ[c] > 0) {
			return fmt.Errorf("gap class %d is marked %v with %d occurrences", c, g.Seen, occ[c])
		}
		if !g.Seen {
			if sum != 0 {
				return fmt.Errorf("gap class %d has gaps but no occurrence", c)
			}
			continue
		}
		if sum != occ[c]-1 || g.First < 0 || g.First > g.Last || g.Last >= t.N {
			return fmt.Errorf("gap record of class %d does not fit its %d occurrences", c, occ[c])
		}
	}
	return nil
}

func (t *Tally) checkExtras() error {
	s, N := t.Spec, t.N
	// Poker hands: aligned hands inside the stretch.
	if (s.PokerHand > 0) != (t.Poker != nil) || (s.PokerHand > 0 && len(t.Poker) != s.PokerHand+1) {
		return fmt.Errorf("poker table of %d cells for hands of %d", len(t.Poker), s.PokerHand)
	}
	if s.PokerHand > 0 {
		if sum, err := nonNegative("the poker table", t.Poker); err != nil {
			return err
		} else if sum != aligned(t.Offset, N, s.PokerHand) || t.Poker[0] != 0 {
			return fmt.Errorf("the poker table counts %d hands, not the %d inside the stretch", sum, aligned(t.Offset, N, s.PokerHand))
		}
	}
	// Up/down values.
	if L := s.UpDownDigits; L > 0 {
		v := aligned(t.Offset, N, L)
		if t.UDValues != v || t.UDTies < 0 || t.UDTurns < 0 || t.UDTies > max(0, v-1) || t.UDTurns > max(0, v-2) {
			return fmt.Errorf("up/down counts (%d values, %d ties, %d turns) do not fit %d values", t.UDValues, t.UDTies, t.UDTurns, v)
		}
	} else if t.UDValues != 0 || t.UDTies != 0 || t.UDTurns != 0 {
		return fmt.Errorf("up/down counts in a tally without them")
	}
	// Lag products: Σ x_i x_{i+h} over the N−h pairs, each at most (b−1)².
	if (s.Lags > 0) != (t.LagProd != nil) || (s.Lags > 0 && len(t.LagProd) != s.Lags+1) {
		return fmt.Errorf("lag table of %d cells for %d lags", len(t.LagProd), s.Lags)
	}
	top := int64(t.Base-1) * int64(t.Base-1)
	for h, v := range t.LagProd {
		if v < 0 || (h > 0 && v > max(0, N-int64(h))*top) || (h == 0 && v != 0) {
			return fmt.Errorf("lag product %d is out of range", h)
		}
	}
	// Longest runs.
	for _, r := range []RunTally{t.RunAny, t.RunDig} {
		if r.Max < 0 || r.Lead < 0 || r.Trail < 0 || r.Max > N || r.Lead > r.Max || r.Trail > r.Max {
			return fmt.Errorf("run record (%d, %d, %d) does not fit %d digits", r.Max, r.Lead, r.Trail, N)
		}
	}
	if !s.SkipWalk {
		if err := t.checkWalk(); err != nil {
			return err
		}
	}
	return t.checkCoupon()
}

func (t *Tally) checkWalk() error {
	w, N := t.Walk, t.N
	if w.Sum < 0 || w.Sum > N*int64(t.Base-1) {
		return fmt.Errorf("the walk's digit sum %d is out of range", w.Sum)
	}
	if !t.WalkHull {
		if w.Upper != nil || w.Lower != nil || w.UMax < 0 || w.UMin > 0 || w.UMax > N*int64(t.Base-1) || -w.UMin > N*int64(t.Base-1) {
			return fmt.Errorf("the walk's extremes (%d, %d) are out of range", w.UMin, w.UMax)
		}
		return nil
	}
	for _, h := range [][]Point{w.Upper, w.Lower} {
		if len(h) == 0 || h[0] != (Point{0, 0}) || h[len(h)-1] != (Point{N, w.Sum}) {
			return fmt.Errorf("the walk's hull does not run from (0, 0) to (%d, %d)", N, w.Sum)
		}
		for i := 1; i < len(h); i++ {
			dk, dt := h[i].K-h[i-1].K, h[i].T-h[i-1].T
			if dk <= 0 || dt < 0 || dt > dk*int64(t.Base-1) {
				return fmt.Errorf("the walk's hull is not a path of the digit sums")
			}
		}
	}
	return nil
}

func (t *Tally) checkCoupon() error {
	s, c := t.Spec, t.Coupon
	if s.CouponClasses == 0 {
		if c.Hist != nil || len(c.Head) != 0 || c.Seen != 0 || c.Len != 0 {
			return fmt.Errorf("coupon record in a tally without coupons")
		}
		return nil
	}
	if len(c.Hist) != s.CouponCap+1 {
		return fmt.Errorf("coupon histogram of %d cells, want %d", len(c.Hist), s.CouponCap+1)
	}
	sum, err := nonNegative("the coupon histogram", c.Hist)
	if err != nil {
		return err
	}
	for r := range min(s.CouponClasses, len(c.Hist)) {
		if c.Hist[r] != 0 {
			return fmt.Errorf("coupon segment of length %d, shorter than the %d classes", r, s.CouponClasses)
		}
	}
	every := s.couponEvery()
	if c.Seen >= 1<<s.CouponClasses || c.Len < 0 || c.Len > min(t.N, every) || (c.Len == 0) != (c.Seen == 0) ||
		sum*int64(s.CouponClasses) > t.N {
		return fmt.Errorf("coupon state does not fit %d digits", t.N)
	}
	// Segments restart at multiples of every; the digits before the first
	// restart inside the stretch wait in Head for the merge.
	first := (t.Offset + every - 1) / every * every
	restarted := t.Offset%every == 0 || first < t.Offset+t.N
	if c.Restarted != restarted || int64(len(c.Head)) != min(t.N, first-t.Offset) {
		return fmt.Errorf("coupon state does not fit the stretch's restart positions")
	}
	return t.digitsBelowBase("the coupon head", c.Head)
}

func (t *Tally) checkTrace() error {
	prev := t.Offset
	var prevCounts []int64
	for _, tp := range t.Trace {
		if tp.Pos <= prev || tp.Pos > t.Offset+t.N || tp.Pos != traceNext(prev) && prev != t.Offset {
			return fmt.Errorf("trace point at %d is out of order or outside the stretch", tp.Pos)
		}
		if len(tp.Counts) != t.Base {
			return fmt.Errorf("trace point with %d counts for base %d", len(tp.Counts), t.Base)
		}
		sum, err := nonNegative("a trace point", tp.Counts)
		if err != nil {
			return err
		}
		if sum != tp.Pos-t.Offset {
			return fmt.Errorf("trace point at %d counts %d digits", tp.Pos, sum)
		}
		for d := range tp.Counts {
			if prevCounts != nil && tp.Counts[d] < prevCounts[d] || tp.Counts[d] > t.Digits[d] {
				return fmt.Errorf("trace point at %d does not grow toward the digit counts", tp.Pos)
			}
		}
		prev, prevCounts = tp.Pos, tp.Counts
	}
	if len(t.Trace) > 0 && t.Trace[0].Pos != traceNext(t.Offset) {
		return fmt.Errorf("trace starts at %d, not at the stretch's first checkpoint", t.Trace[0].Pos)
	}
	if want := traceCount(t.Offset, t.N); len(t.Trace) != want {
		return fmt.Errorf("%d trace points, want %d", len(t.Trace), want)
	}
	return nil
}

// traceCount returns the number of checkpoints in (off, off+n].
func traceCount(off, n int64) int {
	c := 0
	for p := traceNext(off); p <= off+n; p = traceNext(p) {
		c++
	}
	return c
}
