// Package tally computes the sufficient statistics of one pass over a digit
// sequence (a Tally) and merges the tallies of consecutive stretches into the
// tally of their concatenation, exactly. Every check in borel reads a
// finished Tally; nothing reads the digits twice.
//
// A Tally is a stretch — its global offset, its length n, its first and last
// span−1 digits (the seams from which everything crossing a cut is
// recovered) — and an ordered set of records, each one small mergeable
// statistic in its own file:
//
//	digits.go   digit counts and their trace at fixed checkpoints
//	windows.go  overlapping K-windows (and the cyclic tables derived from them)
//	blocks.go   non-overlapping k-blocks aligned to global positions
//	gaps.go     gap-length histograms per digit class
//	hands.go    poker hands (distinct digits per aligned hand)
//	updown.go   aligned L-digit values: ties and turning points
//	lags.go     lag products Σ x_i x_{i+h}
//	runs.go     longest runs
//	walk.go     the digit-sum walk
//	coupon.go   coupon-collector segments
//
// packed.go adds chunks of bits, bit pairs or nibbles as the bytes that
// hold them (AddPacked), for the records that can read bytes.
//
// Each record owns its kernels over a digit buffer, its exact merge with
// the next stretch given the seam digits, its cell count for the memory
// budget, its shard entry and its validation. Values a record exposes are
// exact whenever they can be read: the accessors (DigitCounts, Windows,
// Hands, …) finish any pending work first.
package tally

import (
	"encoding/json"
	"fmt"
	"slices"
	"sync"
)

// record is one mergeable statistic of a stretch.
type record interface {
	kind() string
	// kernels returns the record's loops of the pass. Each reads the new
	// digits and the stretch (t.Offset, t.N, t.Tail: unchanged until the
	// tally advances) and writes only the record's own fields, so kernels
	// run concurrently on the same chunk. None when the record is derived
	// from another record's tables when it settles.
	kernels(t *Tally) []kernel
	// merge folds next, the same record of the stretch that follows, into
	// the record, which holds the earlier stretch's values.
	merge(next record, sm *seam)
	clone() record
	// settle makes the record's values exact: folds private counters and
	// derives values from records settled before it (records settle in
	// the tally's order).
	settle(t *Tally)
	// entry returns the shard entry (a value json can encode); decode
	// reads one back into the empty record. A record with large tables
	// puts them in b, the shard's table section, and writes their indices
	// (b nil: the tables go inline, as comparisons of entries do).
	entry(b *blobs) any
	decode(data json.RawMessage, b *blobs) error
	// check validates a decoded record against its stretch completely, so
	// a record that passes merges and is audited without a panic.
	check(t *Tally) error
}

// seam is what a merge of a‖b sees across the cut: x = a.Tail‖b.Head,
// with b's first digit at x[cut] and x[0] at global position xs.
type seam struct {
	a, b *Tally
	x    []byte
	xs   int64
	cut  int
}

// Tally is the one-pass summary of a stretch of a sequence that starts at
// global digit position Offset. The zero value is not usable: call New.
type Tally struct {
	Spec
	Offset int64
	N      int64
	Head   []byte // first min(N, span−1) digits
	Tail   []byte // last min(N, span−1) digits

	recs []record // digits, windows, blocks, then Spec.Records in order
	dig  *DigitCounts
	win  *Windows
	blk  *Blocks

	mu       sync.Mutex // guards settled: accessors may run concurrently
	settled  bool       // every record is exact since the last Add
	finished bool       // set by CyclicInPlace

	spreadBuf []byte // AddPacked's spread-out digits, reused
}

// New returns an empty Tally for a stretch starting at global position offset.
func New(spec Spec, offset int64) (*Tally, error) {
	return newTally(spec, offset, true)
}

// newTally is New; without tables (tables false) the window and block
// records have none yet, for a shard's decoder to fill: a shard at K = 7
// would otherwise allocate and clear 170 MB it then drops.
func newTally(spec Spec, offset int64, tables bool) (*Tally, error) {
	if err := spec.Validate(); err != nil {
		return nil, err
	}
	spec.Records = slices.Clone(spec.Records)
	t := &Tally{Spec: spec, Offset: offset, Head: []byte{}, Tail: []byte{}}
	t.dig = newDigitCounts(spec.Base)
	if tables {
		t.win = newWindows(spec.Base, spec.MaxBlock)
		t.blk = newBlocks(&t.Spec)
	} else {
		t.win = &Windows{K: spec.MaxBlock, base: spec.Base}
		t.blk = &Blocks{spec: &t.Spec, Counts: make([][]int64, spec.MaxBlock+1), hot: make([][]uint8, spec.MaxBlock+1)}
	}
	t.recs = []record{t.dig, t.win, t.blk}
	for _, r := range spec.Records {
		t.recs = append(t.recs, r.newRecord(&t.Spec, offset))
	}
	t.settled = true
	return t, nil
}

// find returns the record of the given kind, or nil.
func (t *Tally) find(kind string) record {
	for _, r := range t.recs {
		if r.kind() == kind {
			return r
		}
	}
	return nil
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
	for _, k := range t.kernels() {
		if k.run != nil {
			k.run(d)
		}
	}
	t.advance(d)
}

// kernels lists the pass's loops, record by record.
func (t *Tally) kernels() []kernel {
	var ks []kernel
	for _, r := range t.recs {
		ks = append(ks, r.kernels(t)...)
	}
	return ks
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

// settle makes every record exact (folding the byte counters of the large
// tables, deriving the records that come from others). It is idempotent
// and safe to call from several goroutines at once, but not while digits
// are being added.
func (t *Tally) settle() {
	t.mu.Lock()
	defer t.mu.Unlock()
	if t.settled || t.finished {
		return
	}
	for _, r := range t.recs {
		r.settle(t)
	}
	t.settled = true
}

// Clone returns a deep copy.
func (t *Tally) Clone() *Tally {
	if t.finished {
		panic("tally: Clone of a finished tally (after CyclicInPlace)")
	}
	t.settle()
	u := &Tally{Spec: t.Spec, Offset: t.Offset, N: t.N, Head: slices.Clone(t.Head), Tail: slices.Clone(t.Tail), settled: true}
	u.Spec.Records = slices.Clone(t.Spec.Records)
	for _, r := range t.recs {
		u.recs = append(u.recs, r.clone())
	}
	u.bind()
	return u
}

// bind sets the handles of the records every tally has.
func (t *Tally) bind() {
	t.dig = t.recs[0].(*DigitCounts)
	t.win = t.recs[1].(*Windows)
	t.blk = t.recs[2].(*Blocks)
	t.blk.spec = &t.Spec
	for _, r := range t.recs[3:] {
		if s, ok := r.(interface{ setSpec(*Spec) }); ok {
			s.setSpec(&t.Spec)
		}
	}
}

// Merge returns the tally of the concatenation a‖b, where b's stretch starts
// right where a's ends. The result equals, record by record, the tally of
// one pass over a‖b; a and b are not changed.
//
// Windows and aligned blocks that cross the cut are counted from a's tail
// followed by b's head (each span−1 digits): a window that crosses the cut
// has at most span−1 digits on either side. One that reaches beyond a short
// piece is not complete yet and is counted by the merge that completes it.
func Merge(a, b *Tally) (*Tally, error) {
	if a.finished || b.finished {
		panic("tally: Merge of a finished tally (after CyclicInPlace)")
	}
	if err := mergeable(a, b); err != nil {
		return nil, err
	}
	t := a.Clone()
	if err := t.Append(b); err != nil {
		return nil, err
	}
	return t, nil
}

// mergeable says why a‖b cannot be merged, or nil.
func mergeable(a, b *Tally) error {
	if !a.Spec.Equal(b.Spec) {
		return fmt.Errorf("tally: cannot merge tallies of different specs (base %d, K %d vs base %d, K %d)",
			a.Base, a.MaxBlock, b.Base, b.MaxBlock)
	}
	if a.Offset+a.N != b.Offset {
		return fmt.Errorf("tally: stretches are not consecutive: the first ends at digit %d, the second starts at %d",
			a.Offset+a.N, b.Offset)
	}
	return nil
}

// Append makes t the tally of t‖b in place (Merge without the copy of t):
// a fold over many shards then holds one tally and the one being added,
// whatever their number. b is not changed.
func (t *Tally) Append(b *Tally) error {
	if t.finished || b.finished {
		panic("tally: Append of a finished tally (after CyclicInPlace)")
	}
	if err := mergeable(t, b); err != nil {
		return err
	}
	b.settle()
	t.settle()
	if b.N == 0 {
		return nil
	}
	if t.N == 0 {
		u := b.Clone()
		t.Spec, t.N, t.Head, t.Tail, t.recs, t.settled = u.Spec, u.N, u.Head, u.Tail, u.recs, true
		t.bind()
		return nil
	}
	x := append(slices.Clone(t.Tail), b.Head...)
	cut := len(t.Tail)
	// The seam's left side as it was: the records' merges read its length,
	// ends and base while t's own records change.
	left := &Tally{Spec: t.Spec, Offset: t.Offset, N: t.N, Head: t.Head, Tail: t.Tail, settled: true}
	sm := &seam{a: left, b: b, x: x, xs: b.Offset - int64(cut), cut: cut}
	for i, r := range t.recs {
		r.merge(b.recs[i], sm)
	}
	keep := t.span() - 1
	if len(t.Head) < keep {
		t.Head = append(t.Head, b.Head[:min(len(b.Head), keep-len(t.Head))]...)
	}
	tail := append(slices.Clone(t.Tail), b.Tail...)
	t.Tail = slices.Clone(tail[max(0, len(tail)-keep):])
	t.N += b.N
	return nil
}

func addInto(dst, src []int64) {
	for i, v := range src {
		dst[i] += v
	}
}

// digitAt returns local digit i of the stretch from Head or Tail (the
// derivations only ask for digits near the ends).
func (t *Tally) digitAt(i int64) byte {
	if i < int64(len(t.Head)) {
		return t.Head[i]
	}
	return t.Tail[i-(t.N-int64(len(t.Tail)))]
}
