package tally

import (
	"encoding/json"
	"fmt"
	"slices"
)

// CouponRestart is the default spacing of the global positions at which coupon
// segments restart: the partial segment before each multiple is discarded,
// like the trailing one, so that a stretch starting at a multiple can be
// tallied on its own and merged exactly. One segment in every 65 536 digits
// is lost (E[T] is 29 for d = 10).
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

func (s *CouponSpec) every() int64 {
	if s.Every > 0 {
		return int64(s.Every)
	}
	return CouponRestart
}

func (s *CouponSpec) span() int         { return 1 }
func (s *CouponSpec) cells(int) float64 { return float64(s.Cap + CouponRestart/8) }
func (s *CouponSpec) newRecord(_ *Spec, offset int64) record {
	return &Coupons{CouponSpec: *s, Hist: make([]int64, s.Cap+1), Head: []byte{}, Restarted: offset%s.every() == 0}
}

// Coupons is the coupon record: Hist[r] counts completed segments of length
// r (Hist[Cap] those of Cap or more). Head holds the stretch's digits
// before its first restart position, which only the merge with the
// preceding stretch can process; Seen and Len are the state of the segment
// open at the end.
type Coupons struct {
	CouponSpec
	Hist      []int64
	Head      []byte
	Restarted bool
	Seen      uint32
	Len       int64
}

// Coupons returns the coupon record, or nil when the tally has none.
func (t *Tally) Coupons() *Coupons { t.settle(); r, _ := t.find("coupon").(*Coupons); return r }

func (r *Coupons) kind() string { return "coupon" }

func (r *Coupons) kernels(t *Tally) []kernel {
	return []kernel{{"coupon", 4.5, func(d []byte) { r.add(d, t.Offset+t.N) }}}
}

// step feeds one digit to the open segment.
func (r *Coupons) step(x byte) {
	r.Seen |= 1 << r.Class[x]
	r.Len++
	if r.Seen == 1<<r.Classes-1 {
		r.Hist[min(r.Len, int64(r.Cap))]++
		r.Seen, r.Len = 0, 0
	}
}

// add runs the coupon collector over d (d[0] at global position pos0):
// segments restart at global positions that are multiples of every; before
// the stretch's first restart the digits are kept in Head (a merge
// completes that segment). The loop between restarts keeps its state in
// locals.
func (r *Coupons) add(d []byte, pos0 int64) {
	every := r.every()
	i := 0
	for i < len(d) {
		// Digits up to the next restart position (exclusive).
		next := len(d)
		if rem := (pos0 + int64(i)) % every; rem == 0 {
			r.Restarted, r.Seen, r.Len = true, 0, 0
			next = min(len(d), i+int(every))
		} else {
			next = min(len(d), i+int(every-rem))
		}
		if !r.Restarted {
			r.Head = append(r.Head, d[i:next]...)
			i = next
			continue
		}
		seen, n := r.Seen, r.Len
		full := uint32(1)<<r.Classes - 1
		class, hist, capLen := r.Class, r.Hist, int64(r.Cap)
		for _, x := range d[i:next] {
			seen |= 1 << class[x]
			n++
			if seen == full {
				hist[min(n, capLen)]++
				seen, n = 0, 0
			}
		}
		r.Seen, r.Len = seen, n
		i = next
	}
}

// merge completes the open segment with next's head, then takes next's
// segments and state.
func (r *Coupons) merge(next record, _ *seam) {
	n := next.(*Coupons)
	if !r.Restarted {
		r.Head = append(r.Head, n.Head...)
		r.Restarted, r.Seen, r.Len = n.Restarted, n.Seen, n.Len
		r.Hist = slices.Clone(n.Hist)
		return
	}
	for _, x := range n.Head {
		r.step(x)
	}
	addInto(r.Hist, n.Hist)
	if n.Restarted {
		r.Seen, r.Len = n.Seen, n.Len
	}
}

func (r *Coupons) clone() record {
	u := *r
	u.Hist, u.Head = slices.Clone(r.Hist), slices.Clone(r.Head)
	return &u
}

func (r *Coupons) settle(*Tally) {}

type couponEntry struct {
	Hist      table  `json:"hist"`
	Head      []byte `json:"head"`
	Restarted bool   `json:"restarted"`
	Seen      uint32 `json:"seen"`
	Len       int64  `json:"len"`
}

func (r *Coupons) entry() any { return couponEntry{r.Hist, r.Head, r.Restarted, r.Seen, r.Len} }

func (r *Coupons) decode(data json.RawMessage) error {
	var e couponEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Hist, r.Head, r.Restarted, r.Seen, r.Len = e.Hist, e.Head, e.Restarted, e.Seen, e.Len
	if r.Head == nil {
		r.Head = []byte{}
	}
	return nil
}

// check: Cap+1 cells, no segment shorter than the class count, at most one
// segment per Classes digits, the open segment's state, and a head that
// ends at the stretch's first restart position.
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
	every := r.every()
	if uint64(r.Seen) >= uint64(1)<<r.Classes || r.Len < 0 || r.Len > min(t.N, every) || (r.Len == 0) != (r.Seen == 0) ||
		sum*int64(r.Classes) > t.N {
		return fmt.Errorf("coupon state does not fit %d digits", t.N)
	}
	first := (t.Offset + every - 1) / every * every
	restarted := t.Offset%every == 0 || first < t.Offset+t.N
	if r.Restarted != restarted || int64(len(r.Head)) != min(t.N, first-t.Offset) {
		return fmt.Errorf("coupon state does not fit the stretch's restart positions")
	}
	return t.digitsBelowBase("the coupon head", r.Head)
}
