package tally

import (
	"encoding/json"
	"fmt"
	"slices"
)

// CouponRestart is the default spacing of the global positions at which coupon
// segments restart, so that a stretch starting at a multiple can be tallied
// on its own and merged exactly. A segment is started only where its
// outcome — its length, or "Cap or more" — is decided before the next
// restart and before the end of the input: at position s only if s + Cap
// does not pass either. Every segment started is then counted, and since
// each start is a stopping time of the digits before it, the counted
// lengths are i.i.d. with the capped law of T. (Dropping the segment still
// open at a restart, as a plain restart would, keeps the short segments
// only: a bias that matters when E[T] is not small against the spacing.)
// At most Cap digits before each restart go unused.
const CouponRestart = 1 << 16

// Beyond these a decoded shard is damaged.
const (
	maxCouponCap  = 1 << 20
	maxCouponStep = 1<<31 - 1
)

// CouponSpec asks for the coupon-collector record (Knuth, TAOCP §3.3.2 E):
// Classes ≤ 32 classes, Class[d] the class of digit d (len Base), segment
// lengths of Cap or more pooled, segments restarting at global multiples
// of Every (0: CouponRestart).
type CouponSpec struct {
	Classes int   `json:"classes"`
	Class   []int `json:"class"`
	Cap     int   `json:"cap"`
	Every   int   `json:"every,omitempty"`
}

func init() { registerKind("coupon", func() RecordSpec { return new(CouponSpec) }) }

func (s *CouponSpec) Kind() string { return "coupon" }

func (s *CouponSpec) validate(b int) error {
	if s.Classes < 1 || s.Classes > 32 || len(s.Class) != b || s.Cap < s.Classes {
		return fmt.Errorf("coupon classes need 1 to 32 classes, one per digit, and a cap of at least the class count")
	}
	if s.Cap > maxCouponCap || s.Every < 0 || s.Every > maxCouponStep {
		return fmt.Errorf("coupon parameters are out of range")
	}
	for _, c := range s.Class {
		if c < 0 || c >= s.Classes {
			return fmt.Errorf("coupon class %d is not below the class count %d", c, s.Classes)
		}
	}
	return nil
}

// Spacing is the distance between restart positions (Every, or CouponRestart).
func (s *CouponSpec) Spacing() int64 {
	if s.Every > 0 {
		return int64(s.Every)
	}
	return CouponRestart
}

func (s *CouponSpec) span() int         { return 1 }
func (s *CouponSpec) cells(int) float64 { return float64(s.Cap + CouponRestart/8) }
func (s *CouponSpec) newRecord(_ *Spec, offset int64) record {
	return &Coupons{CouponSpec: *s, Hist: make([]int64, s.Cap+1), Head: []byte{}, Restarted: offset%s.Spacing() == 0}
}

// Coupons is the coupon record: Hist[r] counts the counted segments of
// length r (Hist[Cap] those of Cap or more; one still open at the end is
// in Counted, not in Hist). Head holds the stretch's digits before its first restart
// position, which only the merge with the preceding stretch can process.
// Seen and Len are the state of the segment open at the end; Idle says that
// none is open and none may start before the next restart. Pending holds
// the segments that completed shorter than Cap but started fewer than Cap
// digits before the end: each counts once the sequence reaches its Due
// position, and not at all if the sequence ends first.
type Coupons struct {
	CouponSpec
	Hist      []int64
	Head      []byte
	Restarted bool
	Seen      uint32
	Len       int64
	Idle      bool
	Pending   []PendingSegment

	table *[16][256]couponStep // addPacked's byte table (steps)
	// inner counts, by state and byte (state·256 + byte), the bytes of
	// runPacked that completed a segment: the segments they complete after
	// their first (couponStep.lens) are added to Hist when the record
	// settles, not one by one in the loop, whose varying count the
	// processor could not predict.
	inner *[16 * 256]int64
}

// PendingSegment is a completed coupon segment of Len digits that counts
// once the sequence reaches global position Due (its start plus Cap).
type PendingSegment struct{ Due, Len int64 }

// Coupons returns the coupon record, or nil when the tally has none.
func (t *Tally) Coupons() *Coupons { t.settle(); r, _ := t.find("coupon").(*Coupons); return r }

func (r *Coupons) kind() string { return "coupon" }

func (r *Coupons) kernels(t *Tally) []kernel {
	k := kernel{name: "coupon", cost: 4.5, run: func(d []byte) { r.add(d, t.Offset+t.N) }}
	if s := packWidth(len(r.Class)); s > 0 && s < 4 && r.Classes <= 4 && r.Spacing()%int64(8/s) == 0 {
		k.packed = func(p []byte) { r.addPacked(p, t.Offset+t.N) }
	}
	return []kernel{k}
}

// addPacked is add for a packed chunk (packed.go) of bits or bit pairs,
// with at most 4 classes and restarts at whole bytes: pos0 and the restart
// positions are multiples of the digits in a byte.
func (r *Coupons) addPacked(p []byte, pos0 int64) {
	s := packWidth(len(r.Class))
	m := 8 / s
	r.windows(pos0, len(p)*m, func(i, next int, pos, restart, end int64) {
		if r.Restarted {
			r.runPacked(p[i/m:next/m], pos, restart, end)
		} else {
			r.Head = append(r.Head, unpack(nil, p[i/m:next/m], s)...)
		}
	})
}

// couponStep is what one byte does to the collector from a state seen
// (the classes seen in the open segment): nc segments complete in it, the
// first at its digit first−1 (its length is the open length plus first),
// the next ones with lengths lens; then the classes seen and the digits
// counted in the segment left open are seen and tail.
type couponStep struct {
	nc, first, seen, tail uint8
	lens                  [3]uint8
}

// steps returns the byte table of the collector, made on first use.
func (r *Coupons) steps() *[16][256]couponStep {
	if r.table != nil {
		return r.table
	}
	s := packWidth(len(r.Class))
	m := 8 / s
	full := uint8(1)<<r.Classes - 1
	tab := new([16][256]couponStep)
	for st := range 1 << r.Classes {
		for v := range 256 {
			e := couponStep{}
			seen, n := uint8(st), 0
			for j := range m {
				seen |= 1 << r.Class[v>>(8-s*(j+1))&(1<<s-1)]
				n++
				if seen == full {
					if e.nc == 0 {
						e.first = uint8(j + 1)
					} else {
						e.lens[e.nc-1] = uint8(n)
					}
					e.nc++
					seen, n = 0, 0
				}
			}
			e.seen, e.tail = seen, uint8(n)
			tab[st][v] = e
		}
	}
	r.table = tab
	return tab
}

// runPacked is run over the packed window seg (seg's first digit at global
// position pos): the bytes whose every digit may complete a segment the
// common way (at or before run's kSafe) go through the byte table, the
// rest through run.
func (r *Coupons) runPacked(seg []byte, pos, restart, end int64) {
	s := packWidth(len(r.Class))
	m := int64(8 / s)
	capLen := int64(r.Cap)
	lastStart := restart - capLen
	if r.Idle || (r.Len == 0 && pos > lastStart) {
		r.Idle = true
		return
	}
	kSafe := min(int64(len(seg))*m, min(lastStart, end-capLen)-pos-1)
	q := int64(0)
	if kSafe >= m-1 {
		tab := r.steps()
		hist := r.Hist
		if r.inner == nil {
			r.inner = new([16 * 256]int64)
		}
		inner := r.inner
		seen, n := r.Seen, r.Len
		for ; q < (kSafe+1)/m; q++ {
			e := &tab[seen][seg[q]]
			if e.nc == 0 {
				seen, n = uint32(e.seen), n+m
				continue
			}
			hist[min(n+int64(e.first), capLen)]++
			inner[seen<<8|uint32(seg[q])]++ // its other segments: by kind, added when the record settles
			seen, n = uint32(e.seen), int64(e.tail)
		}
		r.Seen, r.Len = seen, n
	}
	if q < int64(len(seg)) {
		r.run(unpack(nil, seg[q:], s), pos+q*m, restart, end)
	}
}

// add runs the coupon collector over d (d[0] at global position pos0),
// window by window between the restart positions; before the stretch's
// first restart the digits are kept in Head (a merge processes them).
func (r *Coupons) add(d []byte, pos0 int64) {
	r.windows(pos0, len(d), func(i, next int, pos, restart, end int64) {
		if r.Restarted {
			r.run(d[i:next], pos, restart, end)
		} else {
			r.Head = append(r.Head, d[i:next]...)
		}
	})
}

// windows cuts n new digits (the first at global position pos0) at the
// restart positions, restarting the collector at each, and hands each
// piece [i, next) to feed with its global position, the next restart and
// the end of the digits known; then it counts the pending segments now due.
func (r *Coupons) windows(pos0 int64, n int, feed func(i, next int, pos, restart, end int64)) {
	every := r.Spacing()
	end := pos0 + int64(n)
	for i := 0; i < n; {
		pos := pos0 + int64(i)
		rem := pos % every
		if rem == 0 {
			r.close(pos)
			r.Restarted, r.Seen, r.Len, r.Idle = true, 0, 0, false
		}
		next := min(n, i+int(every-rem))
		feed(i, next, pos, pos-rem+every, end)
		i = next
	}
	r.confirm(end)
}

// run feeds seg (seg[0] at global position pos, no restart inside it) to
// the collector; restart is the next restart position and end the end of
// the digits known so far. A segment starts only where its Cap digits fit
// before restart. One that completes shorter than Cap counts at once if
// its start plus Cap is within the known digits, else it waits in Pending;
// one of Cap or more counts when it completes or its window closes. The
// loop keeps its state in locals and tests one condition per digit.
func (r *Coupons) run(seg []byte, pos, restart, end int64) {
	capLen := int64(r.Cap)
	lastStart := restart - capLen
	if r.Idle || (r.Len == 0 && pos > lastStart) {
		r.Idle = true
		return
	}
	seen, n := r.Seen, r.Len
	full := uint32(1)<<r.Classes - 1
	var mask [256]uint32
	for d, c := range r.Class {
		mask[d] = 1 << c
	}
	// Completions at k ≤ kSafe are the common case: the next segment may
	// start and this one's start plus Cap is within the known digits.
	// couponScan counts them; it stops at any other.
	kSafe := int(max(-1, min(int64(len(seg)), min(lastStart, end-capLen)-pos-1)))
	for k := 0; k < len(seg); k++ {
		k, seen, n = couponScan(seg, k, &mask, r.Hist, full, capLen, kSafe, seen, n)
		if k == len(seg) {
			break
		}
		next := pos + int64(k) + 1 // where the next segment would start
		if n >= capLen {
			r.Hist[capLen]++
		} else if due := next - n + capLen; due <= end {
			r.Hist[n]++
		} else {
			r.Pending = append(r.Pending, PendingSegment{due, n})
		}
		seen, n = 0, 0
		if next > lastStart {
			r.Idle = true
			break
		}
	}
	r.Seen, r.Len = seen, n
}

// couponScan runs the collector over seg from index k and state (seen, n),
// counting the segments that complete at an index up to kSafe into hist
// (lengths of Cap or more in the last cell). It returns the index of the
// first completion after kSafe, or len(seg), and the state there (that
// segment not yet counted or reset). Its few live values stay in
// registers: this loop is the coupon record's whole cost.
func couponScan(seg []byte, k int, mask *[256]uint32, hist []int64, full uint32, capLen int64, kSafe int,
	seen uint32, n int64) (int, uint32, int64) {
	for ; k < len(seg); k++ {
		seen |= mask[seg[k]]
		n++
		if seen == full {
			if k > kSafe {
				return k, seen, n
			}
			hist[min(n, capLen)]++
			seen, n = 0, 0
		}
	}
	return k, seen, n
}

// close ends the window at restart position at: every pending segment is
// due, and an open one of Cap digits or more counts.
func (r *Coupons) close(at int64) {
	r.confirm(at)
	if r.Len >= int64(r.Cap) {
		r.Hist[r.Cap]++
	}
}

// Counted returns the counted segments by length (the last cell: Cap or
// more) of the stretch as it ends: Hist with the open segment if it has
// Cap digits already. The pending ones do not count: they started too
// close to the end.
func (r *Coupons) Counted() []int64 {
	h := slices.Clone(r.Hist)
	if r.Len >= int64(r.Cap) {
		h[r.Cap]++
	}
	return h
}

// confirm counts the pending segments due at or before global position at.
func (r *Coupons) confirm(at int64) {
	k := 0
	for k < len(r.Pending) && r.Pending[k].Due <= at {
		r.Hist[r.Pending[k].Len]++
		k++
	}
	r.Pending = append(r.Pending[:0], r.Pending[k:]...)
}

// merge continues the open segment over next's head, then takes next's
// segments and state.
func (r *Coupons) merge(next record, sm *seam) {
	n := next.(*Coupons)
	if !r.Restarted {
		r.Head = append(r.Head, n.Head...)
		r.Restarted, r.Seen, r.Len, r.Idle = n.Restarted, n.Seen, n.Len, n.Idle
		r.Hist, r.Pending = slices.Clone(n.Hist), slices.Clone(n.Pending)
		return
	}
	r.add(n.Head, sm.b.Offset) // no restart position inside next's head
	addInto(r.Hist, n.Hist)
	if n.Restarted { // r's window ended at next's first restart
		r.close(sm.b.Offset + int64(len(n.Head)))
		r.Seen, r.Len, r.Idle = n.Seen, n.Len, n.Idle
		r.Pending = slices.Clone(n.Pending)
	}
}

func (r *Coupons) clone() record {
	u := *r
	u.Hist, u.Head, u.Pending = slices.Clone(r.Hist), slices.Clone(r.Head), slices.Clone(r.Pending)
	u.inner = nil // settled before any clone
	return &u
}

// settle adds the segments counted by kind in inner to Hist.
func (r *Coupons) settle(*Tally) {
	if r.inner == nil {
		return
	}
	tab := r.steps()
	capLen := int64(r.Cap)
	for i, k := range r.inner {
		if k == 0 {
			continue
		}
		e := &tab[i>>8][i&255]
		for _, l := range e.lens[:e.nc-1] {
			r.Hist[min(int64(l), capLen)] += k
		}
	}
	clear(r.inner[:])
}

// couponEntry is the record in a shard; a pending segment is the pair
// [due, length].
type couponEntry struct {
	Hist      table      `json:"hist"`
	Head      []byte     `json:"head"`
	Restarted bool       `json:"restarted"`
	Seen      uint32     `json:"seen"`
	Len       int64      `json:"len"`
	Idle      bool       `json:"idle,omitempty"`
	Pending   [][2]int64 `json:"pending,omitempty"`
}

func (r *Coupons) entry(*blobs) any {
	e := couponEntry{Hist: r.Hist, Head: r.Head, Restarted: r.Restarted, Seen: r.Seen, Len: r.Len, Idle: r.Idle}
	for _, p := range r.Pending {
		e.Pending = append(e.Pending, [2]int64{p.Due, p.Len})
	}
	return e
}

func (r *Coupons) decode(data json.RawMessage, _ *blobs) error {
	var e couponEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Hist, r.Head, r.Restarted, r.Seen, r.Len, r.Idle = e.Hist, e.Head, e.Restarted, e.Seen, e.Len, e.Idle
	r.Pending = nil
	for _, p := range e.Pending {
		r.Pending = append(r.Pending, PendingSegment{p[0], p[1]})
	}
	if r.Head == nil {
		r.Head = []byte{}
	}
	return nil
}

// check: Cap+1 cells, no segment shorter than the class count, at most one
// segment per Classes digits, the open segment's state, pending segments
// in order and due within Cap digits of the end, and a head that ends at
// the stretch's first restart position.
func (r *Coupons) check(t *Tally) error {
	if len(r.Hist) != r.Cap+1 {
		return fmt.Errorf("coupon histogram of %d cells, want %d", len(r.Hist), r.Cap+1)
	}
	sum, err := nonNegative("the coupon histogram", r.Hist)
	if err != nil {
		return err
	}
	for l := range min(r.Classes, len(r.Hist)) {
		if r.Hist[l] != 0 {
			return fmt.Errorf("coupon segment of length %d, shorter than the %d classes", l, r.Classes)
		}
	}
	every := r.Spacing()
	if uint64(r.Seen) >= uint64(1)<<r.Classes || r.Len < 0 || r.Len > min(t.N, every) || (r.Len == 0) != (r.Seen == 0) ||
		sum*int64(r.Classes) > t.N {
		return fmt.Errorf("coupon state does not fit %d digits", t.N)
	}
	end, due := t.Offset+t.N, int64(0)
	if r.Idle && r.Len != 0 || int64(len(r.Pending))*int64(r.Classes) > min(t.N, int64(r.Cap)) {
		return fmt.Errorf("coupon state does not fit %d digits", t.N)
	}
	for _, p := range r.Pending {
		if p.Len < int64(r.Classes) || p.Len >= int64(r.Cap) || p.Due <= max(end, due) || p.Due > end+int64(r.Cap) {
			return fmt.Errorf("coupon pending segment (due %d, length %d) does not fit the stretch's end %d", p.Due, p.Len, end)
		}
		due = p.Due
	}
	first := (t.Offset + every - 1) / every * every
	restarted := t.Offset%every == 0 || first < t.Offset+t.N
	if r.Restarted != restarted || int64(len(r.Head)) != min(t.N, first-t.Offset) {
		return fmt.Errorf("coupon state does not fit the stretch's restart positions")
	}
	return t.digitsBelowBase("the coupon head", r.Head)
}
