// Package tally computes the sufficient statistics of one pass over a digit
// sequence (a Tally) and merges the tallies of consecutive stretches into the
// tally of their concatenation, exactly. Every check in borel reads a
// finished Tally; nothing reads the digits twice.
//
// A Tally holds: n; the digit counts; overlapping K-block counts of the
// windows that lie inside the stretch; non-overlapping k-block counts for
// k = 2..K aligned to global digit positions (blocks start at multiples of k
// counted from the start of the whole sequence, so a shard cut anywhere gives
// the same blocks); gap-length histograms per digit class; and the first and
// last K-1 digits, from which the blocks crossing a cut and the cyclic
// wrap-around windows are recovered.
package tally

import (
	"fmt"
	"slices"
)

// DefaultGapCap is the gap length from which gaps are tallied together in
// one tail cell. A gap check never needs classes beyond it: at q = 1/36 and
// 10^9 digits the validity rule G(1-q)^t ≥ 5 stops at t ≈ 550.
const DefaultGapCap = 2048

// Spec fixes what a Tally records. Tallies merge only when their Specs are equal.
type Spec struct {
	Base     int // 2..256
	MaxBlock int // K ≥ 1: overlapping counts at order K, blocks k = 2..K
	// BlocksMax, when in 1..K−1, is the largest k whose non-overlapping
	// blocks are counted (the plan leaves out lengths too long for the
	// blocks check at the known input length); 0 means K.
	BlocksMax int
	// GapClass maps each digit to its gap class (len Base); nil means one
	// class per digit.
	GapClass []int
	GapCap   int // 0 means DefaultGapCap

	PokerHand     int   // hand size h of the poker check; 0: off
	UpDownDigits  int   // digits L per value of the up/down runs check; 0: off
	Lags          int   // largest lag H of the serial-correlation check; 0: off
	RunDigit      int   // the digit whose longest run is tallied
	WalkHull      bool  // keep the walk's convex hulls (non-uniform or fitted null)
	CouponClasses int   // number d ≤ 32 of coupon classes; 0: off
	CouponClass   []int // class of each digit (len Base) when CouponClasses > 0
	CouponCap     int   // coupon segment length from which lengths are pooled
	CouponEvery   int   // restart spacing of coupon segments; 0: CouponRestart
	SkipGaps      bool  // no gap histograms (their check is not run)
	SkipRuns      bool  // no longest-run records
	SkipWalk      bool  // no digit-sum walk
}

// Cells returns the number of int64 counters a Tally of this Spec holds,
// including the cyclic tables a check derives at the end (k = 1..K): the
// measure the memory budget is checked against.
func (s Spec) Cells() float64 {
	b := float64(s.Base)
	cells := 0.0
	pow := 1.0
	for k := 1; k <= s.MaxBlock; k++ {
		pow *= b
		cells += pow // cyclic table of order k
		if s.HasBlocks(k) {
			cells += pow // non-overlapping blocks
		}
	}
	cells += pow // overlapping linear counts at K
	return cells + float64(s.classes()*(s.gapCap()+1)) + float64(s.PokerHand+s.Lags+s.CouponCap+CouponRestart/8)
}

// blocksMax returns the largest k of the non-overlapping block counts.
func (s Spec) blocksMax() int {
	if s.BlocksMax > 0 && s.BlocksMax < s.MaxBlock {
		return s.BlocksMax
	}
	return s.MaxBlock
}

// HasBlocks reports whether the non-overlapping k-blocks are counted.
func (s Spec) HasBlocks(k int) bool { return k >= 2 && k <= s.blocksMax() }

func (s Spec) gapCap() int {
	if s.GapCap <= 0 {
		return DefaultGapCap
	}
	return s.GapCap
}

func (s Spec) classes() int {
	if s.GapClass == nil {
		return s.Base
	}
	return slices.Max(s.GapClass) + 1
}

// Validate reports whether the Spec is usable.
func (s Spec) Validate() error {
	if s.Base < 2 || s.Base > 256 {
		return fmt.Errorf("tally: base %d outside 2..256", s.Base)
	}
	if s.BlocksMax < 0 {
		return fmt.Errorf("tally: largest counted block length %d is negative", s.BlocksMax)
	}
	if s.MaxBlock < 1 {
		return fmt.Errorf("tally: block length %d, need at least 1", s.MaxBlock)
	}
	if s.CouponClasses > 32 || (s.CouponClasses > 0 && (len(s.CouponClass) != s.Base || s.CouponCap < s.CouponClasses)) {
		return fmt.Errorf("tally: coupon classes need ≤ 32 classes, one per digit, and a cap of at least the class count")
	}
	if s.RunDigit < 0 || s.RunDigit >= s.Base {
		return fmt.Errorf("tally: run digit %d is not a digit of base %d", s.RunDigit, s.Base)
	}
	if s.GapClass != nil {
		if len(s.GapClass) != s.Base {
			return fmt.Errorf("tally: %d gap classes given for base %d", len(s.GapClass), s.Base)
		}
		for _, c := range s.GapClass {
			if c < 0 {
				return fmt.Errorf("tally: negative gap class")
			}
		}
	}
	return nil
}

// GapTally is the gap record of one digit class: Hist[r] counts complete gaps
// of r other digits between consecutive occurrences (r < cap) and Hist[cap]
// the gaps of cap or more. First and Last are the local positions of the
// first and last occurrence (valid when Seen).
type GapTally struct {
	Hist        []int64
	Seen        bool
	First, Last int64
}

// Tally is the one-pass summary of a stretch of a sequence that starts at
// global digit position Offset. The zero value is not usable: call New.
type Tally struct {
	Spec
	Offset  int64
	N       int64
	Digits  []int64   // Digits[d]: occurrences of digit d
	Overlap []int64   // K-windows lying inside the stretch, indexed by block value (unused at K = 1: the digits)
	Blocks  [][]int64 // Blocks[k], k = 2..K: aligned non-overlapping k-blocks
	Gaps    []GapTally
	Head    []byte // first min(N, span-1) digits (span: the longest window any record needs)
	Tail    []byte // last min(N, span-1) digits

	Poker    []int64 // Poker[r]: aligned hands with r distinct digits
	UDValues int64   // aligned L-digit values
	UDTurns  int64   // turning points among consecutive values
	UDTies   int64   // consecutive equal values
	LagProd  []int64 // LagProd[h]: Σ x_i x_{i+h} over pairs inside the stretch
	RunAny   RunTally
	RunDig   RunTally // runs of the digit RunDigit
	Walk     WalkTally
	Coupon   CouponTally
	Trace    []TracePoint // digit counts at fixed global checkpoints, for plots

	finished bool // set by CyclicInPlace

	// Hot byte counters of the large tables (see hot.go): the true count
	// of cell w is Overlap[w] + hotOverlap[w] until Settle folds them in.
	hotOverlap []uint8
	hotBlocks  [][]uint8
	udScratch  []byte // addUpDown's tail‖chunk buffer
	settled    bool   // Settle has run since the last digits were added
}

// New returns an empty Tally for a stretch starting at global position offset.
func New(spec Spec, offset int64) (*Tally, error) {
	if err := spec.Validate(); err != nil {
		return nil, err
	}
	t := &Tally{Spec: spec, Offset: offset}
	b := spec.Base
	t.Digits = make([]int64, b)
	t.Overlap = make([]int64, ipow(b, spec.MaxBlock))
	t.Blocks = make([][]int64, spec.MaxBlock+1)
	for k := 2; k <= spec.blocksMax(); k++ {
		t.Blocks[k] = make([]int64, ipow(b, k))
	}
	t.Gaps = make([]GapTally, spec.classes())
	for i := range t.Gaps {
		t.Gaps[i].Hist = make([]int64, spec.gapCap()+1)
	}
	t.Head = []byte{}
	t.Tail = []byte{}
	newExtras(t)
	return t, nil
}

func ipow(b, k int) int {
	p := 1
	for range k {
		p *= b
	}
	return p
}

// value returns the block value of digits d (most significant first).
func value(d []byte, base int) int {
	v := 0
	for _, x := range d {
		v = v*base + int(x)
	}
	return v
}

// Add tallies the next digits of the stretch. Every digit must be below Base
// (the reader guarantees it); Add panics otherwise.
func (t *Tally) Add(d []byte) {
	if t.finished {
		panic("tally: Add to a finished tally (after CyclicInPlace)")
	}
	if len(d) == 0 {
		return
	}
	t.prepare()
	for _, k := range t.kernels() {
		k.run(d)
	}
	t.advance(d)
}

// addDigits counts the digits of d, stopping at each trace checkpoint
// inside d to record the counts so far (trace.go): every digit is counted
// once.
func (t *Tally) addDigits(d []byte) {
	pos0 := t.Offset + t.N // global position of d[0]
	end := pos0 + int64(len(d))
	done := 0
	for p := traceNext(pos0); p <= end; p = traceNext(p) {
		cut := int(p - pos0)
		t.countDigits(d[done:cut])
		done = cut
		t.Trace = append(t.Trace, TracePoint{Pos: p, Counts: slices.Clone(t.Digits)})
	}
	t.countDigits(d[done:])
}

// countDigits counts the digits into four interleaved tables, so that a
// repeated digit does not make each increment wait for the previous one.
func (t *Tally) countDigits(d []byte) {
	var c [4][256]int64
	i := 0
	for ; i+4 <= len(d); i += 4 {
		c[0][d[i]]++
		c[1][d[i+1]]++
		c[2][d[i+2]]++
		c[3][d[i+3]]++
	}
	for ; i < len(d); i++ {
		c[0][d[i]]++
	}
	for x := range t.Digits {
		t.Digits[x] += c[0][x] + c[1][x] + c[2][x] + c[3][x]
	}
}

// addOverlap counts the K-windows that end inside d, and, when
// windowBlocks, the counted non-overlapping blocks too (count.go): those
// that end before the first batched window by addBlocks, the others from
// the batches.
func (t *Tally) addOverlap(d []byte) {
	K, b := t.MaxBlock, t.Base
	cnt := t.Overlap
	var blocks []blockCounter
	if t.windowBlocks() {
		for _, k := range t.countedBlockLengths() {
			t.addBlocks(k, d[:min(len(d), K)])
			blocks = append(blocks, t.blockCounter(k))
		}
	}
	// Windows that begin in the tail: at most K-1 of them.
	lead := min(len(d), K-1)
	y := append(slices.Clip(t.Tail), d[:lead]...)
	for end := len(t.Tail); end < len(y); end++ {
		if end+1 >= K {
			cnt[value(y[end+1-K:end+1], b)]++
		}
	}
	if len(d) < K {
		return
	}
	// Windows inside d, rolling: w' = (w - d[i-K]·b^(K-1))·b + d[i].
	pow := ipow(b, K-1)
	w := value(d[:K], b)
	cnt[w]++
	if hot := t.hotTable(&t.hotOverlap, len(cnt)); hot != nil {
		// Window values first, then counted a batch at a time (count.go).
		var buf [windowBatch]uint32
		for i := K; i < len(d); {
			idx := buf[:min(windowBatch, len(d)-i)]
			for j := range idx {
				w = (w-int(d[i+j-K])*pow)*b + int(d[i+j])
				idx[j] = uint32(w)
			}
			countBytes(hot, cnt, idx)
			for bc := range blocks {
				blocks[bc].count(idx, t.Offset+t.N+int64(i))
			}
			i += len(idx)
		}
		return
	}
	for i := K; i < len(d); i++ {
		w = (w-int(d[i-K])*pow)*b + int(d[i])
		cnt[w]++
	}
}

// addBlocks counts the non-overlapping k-blocks, aligned to global positions
// that are multiples of k, that end inside d.
func (t *Tally) addBlocks(k int, d []byte) {
	b := t.Base
	cnt := t.Blocks[k]
	pos := t.Offset + t.N // global position of d[0]
	have := int(pos % int64(k))
	cur, skip := 0, 0
	if have > 0 {
		if int64(have) <= t.N {
			cur = value(t.Tail[len(t.Tail)-have:], b)
		} else { // the block began before this stretch: not ours to count
			skip = k - have
			have = 0
		}
	}
	i := 0
	for ; i < len(d) && skip > 0; i++ {
		skip--
	}
	for ; i < len(d) && have > 0; i++ {
		cur = cur*b + int(d[i])
		have++
		if have == k {
			cnt[cur]++
			have, cur = 0, 0
		}
	}
	// Straight into the 64-bit table, byte table or not (the count of a cell
	// is the sum of both): with large tables the blocks come from the
	// window batches (count.go) and only the few at a chunk's start come
	// here.
	for ; i+k <= len(d); i += k {
		cnt[value(d[i:i+k], b)]++
	}
}

// addGaps extends each digit class's gap record over d, with the
// positions of the last occurrences in a local array (−1: not seen yet).
func (t *Tally) addGaps(d []byte) {
	cap64 := int64(t.gapCap())
	var last [256]int64
	for c := range t.Gaps {
		last[c] = -1
		if t.Gaps[c].Seen {
			last[c] = t.Gaps[c].Last
		}
	}
	hists := make([][]int64, len(t.Gaps))
	for c := range t.Gaps {
		hists[c] = t.Gaps[c].Hist
	}
	class := t.GapClass
	n := t.N
	for i, x := range d {
		c := int(x)
		if class != nil {
			c = class[x]
		}
		pos := n + int64(i)
		if l := last[c]; l >= 0 {
			hists[c][min(pos-l-1, cap64)]++
		} else {
			t.Gaps[c].Seen, t.Gaps[c].First = true, pos
		}
		last[c] = pos
	}
	for c := range t.Gaps {
		if last[c] >= 0 {
			t.Gaps[c].Last = last[c]
		}
	}
}

// advance updates n, head and tail after d has been counted.
func (t *Tally) advance(d []byte) {
	t.settled = false
	keep := t.span() - 1
	if len(t.Head) < keep {
		t.Head = append(t.Head, d[:min(len(d), keep-len(t.Head))]...)
	}
	if len(d) >= keep {
		t.Tail = append(t.Tail[:0], d[len(d)-keep:]...)
	} else {
		t.Tail = append(t.Tail, d...)
		if len(t.Tail) > keep {
			t.Tail = append(t.Tail[:0], t.Tail[len(t.Tail)-keep:]...)
		}
	}
	t.N += int64(len(d))
}
