package tally

import (
	"math/bits"
	"slices"
)

// CouponRestart is the default spacing of the global positions at which coupon
// segments restart: the partial segment before each multiple is discarded,
// like the trailing one, so that a stretch starting at a multiple can be
// tallied on its own and merged exactly. One segment in every 65 536 digits
// is lost (E[T] is 29 for d = 10).
const CouponRestart = 1 << 16

// RunTally records the runs of one kind in a stretch: the longest, and the
// lengths of the runs touching its start and its end (equal to N when the
// whole stretch is one run).
type RunTally struct {
	Max, Lead, Trail int64
}

// WalkTally records the digit-sum walk T_k = x_1 + … + x_k of a stretch,
// k = 0..N, relative to its start. Under a uniform null it keeps the
// integer extremes of U_k = 2T_k - k(b-1); otherwise the upper and lower
// convex hulls of the points (k, T_k), from which max_k (T_k - kμ) follows
// exactly for any μ, including one estimated from the data. Both are unique
// for a given sequence, so merged tallies are exactly equal to one pass.
type WalkTally struct {
	Sum          int64
	UMax, UMin   int64 // uniform: extremes of U_k over k = 0..N
	Upper, Lower []Point
}

// Point is a vertex of the walk's hull.
type Point struct{ K, T int64 }

// CouponTally records coupon-collector segments (Knuth, TAOCP §3.3.2 E):
// Hist[r] counts completed segments of length r (Hist[cap] those of cap or
// more). Head holds the stretch's raw digits before its first restart
// position, which only the merge with the preceding stretch can process;
// Seen and Len are the state of the segment open at the end.
type CouponTally struct {
	Hist      []int64
	Head      []byte
	Restarted bool
	Seen      uint32
	Len       int64
}

func (s Spec) couponEvery() int64 {
	if s.CouponEvery > 0 {
		return int64(s.CouponEvery)
	}
	return CouponRestart
}

func (s Spec) span() int {
	return max(2, s.MaxBlock, s.PokerHand, 3*s.UpDownDigits, s.Lags+1)
}

func newExtras(t *Tally) {
	s := t.Spec
	if s.PokerHand > 0 {
		t.Poker = make([]int64, s.PokerHand+1)
	}
	if s.Lags > 0 {
		t.LagProd = make([]int64, s.Lags+1)
	}
	if s.CouponClasses > 0 {
		t.Coupon.Hist = make([]int64, s.CouponCap+1)
		t.Coupon.Head = []byte{}
		t.Coupon.Restarted = t.Offset%s.couponEvery() == 0
	}
	if s.WalkHull {
		t.Walk.Upper = []Point{{0, 0}}
		t.Walk.Lower = []Point{{0, 0}}
	}
}

// distinct returns the number of distinct digits in a poker hand.
func distinct(w []byte) int {
	var seen [4]uint64 // a bit per digit value 0..255
	for _, x := range w {
		seen[x>>6] |= 1 << (x & 63)
	}
	return bits.OnesCount64(seen[0]) + bits.OnesCount64(seen[1]) + bits.OnesCount64(seen[2]) + bits.OnesCount64(seen[3])
}

// addUpDown counts the aligned L-digit values that end inside d, and the
// ties and turning points among consecutive values whose last value ends
// inside d. Each value is computed once: the groups fully inside the kept
// tail and d are read in order, the tail's (already counted) ones only as
// the context of the first pairs and triples.
func (t *Tally) addUpDown(d []byte) {
	L := t.UpDownDigits
	keep := min(len(t.Tail), 3*L-1)
	x := append(t.udScratch[:0], t.Tail[len(t.Tail)-keep:]...)
	x = append(x, d...)
	t.udScratch = x                    // reused: no garbage per chunk
	xs := t.Offset + t.N - int64(keep) // global position of x[0]
	s := 0
	if r := xs % int64(L); r != 0 {
		s = L - int(r)
	}
	var v1, v2 uint64 // the previous two values
	have := 0
	for ; s+L <= len(x); s += L {
		v := udValue(x[s:s+L], t.Base)
		if s+L > keep { // this value ends inside d
			t.UDValues++
			if have >= 1 && v == v1 {
				t.UDTies++
			}
			if have >= 2 && ((v1 > v2 && v1 > v) || (v1 < v2 && v1 < v)) {
				t.UDTurns++
			}
		}
		v2, v1 = v1, v
		have++
	}
}

// udValue returns the value of an L-digit group, as two halves in
// independent chains (hi·base^(L−h) + lo), which halves the latency of the
// multiply-add chain.
func udValue(w []byte, base int) uint64 {
	h := len(w) / 2
	var hi, lo, scale uint64 = 0, 0, 1
	b := uint64(base)
	for i, x := range w[:h] {
		hi = hi*b + uint64(x)
		lo = lo*b + uint64(w[h+i])
		scale *= b
	}
	if len(w)%2 == 1 {
		lo = lo*b + uint64(w[len(w)-1])
		scale *= b
	}
	return hi*scale + lo
}

// b2i is 1 for true, 0 for false.
func b2i(v bool) int64 {
	if v {
		return 1
	}
	return 0
}

func (t *Tally) countHand(w []byte)  { t.Poker[distinct(w)]++ }
func (t *Tally) countValue(w []byte) { t.UDValues++ }

func (t *Tally) countTie(w []byte) {
	L := t.UpDownDigits
	if udValue(w[:L], t.Base) == udValue(w[L:], t.Base) {
		t.UDTies++
	}
}

// countTurn counts a turning point: the middle value of three is a strict
// peak or a strict trough.
func (t *Tally) countTurn(w []byte) {
	L := t.UpDownDigits
	a, b, c := udValue(w[:L], t.Base), udValue(w[L:2*L], t.Base), udValue(w[2*L:], t.Base)
	if (b > a && b > c) || (b < a && b < c) {
		t.UDTurns++
	}
}

// addLags adds x_i·x_{i+h} for the pairs that end inside d.
func (t *Tally) addLags(d []byte) {
	H := t.Lags
	tail := t.Tail
	for h := 1; h <= H; h++ {
		var s int64
		for i := 0; i < min(h, len(d)); i++ { // partner in the tail
			if j := len(tail) - h + i; j >= 0 {
				s += int64(tail[j]) * int64(d[i])
			}
		}
		for i := h; i < len(d); i++ {
			s += int64(d[i-h]) * int64(d[i])
		}
		t.LagProd[h] += s
	}
}

// addRuns extends the run records over d: the longest run of any digit and
// of RunDigit, the runs that reach back to the stretch's first digit (Lead)
// and the current runs (Trail). Leads can only grow while every digit so far
// belongs to them, which is checked once per call; the main loop keeps its
// state in locals.
func (t *Tally) addRuns(d []byte) {
	if len(d) == 0 {
		return
	}
	n := t.N
	c := byte(t.RunDigit)
	any, dig := &t.RunAny, &t.RunDig
	var prev byte
	if n > 0 {
		prev = t.Tail[len(t.Tail)-1]
	}
	// Leads: while the stretch so far is one run, it grows with equal digits.
	if any.Lead == n {
		i := 0
		for i < len(d) && (n+int64(i) == 0 || d[i] == d[0] && (n == 0 || d[i] == prev)) {
			i++
		}
		any.Lead = n + int64(i)
	}
	if dig.Lead == n {
		i := 0
		for i < len(d) && d[i] == c {
			i++
		}
		dig.Lead = n + int64(i)
	}
	aTrail, aMax := any.Trail, any.Max
	dTrail, dMax := dig.Trail, dig.Max
	if n == 0 {
		aTrail = 0 // the first digit starts a run of 1 below
		prev = d[0] + 1
	}
	// Branch-free: runs of random digits end at unpredictable places.
	for _, x := range d {
		aTrail = aTrail*b2i(x == prev) + 1
		aMax = max(aMax, aTrail)
		dTrail = (dTrail + 1) * b2i(x == c)
		dMax = max(dMax, dTrail)
		prev = x
	}
	any.Trail, any.Max = aTrail, aMax
	dig.Trail, dig.Max = dTrail, dMax
}

func (t *Tally) addWalk(d []byte) {
	w := &t.Walk
	if !t.WalkHull {
		step := int64(t.Base - 1)
		u := 2*w.Sum - t.N*step
		hi, lo := w.UMax, w.UMin
		for _, x := range d {
			u += 2*int64(x) - step
			hi = max(hi, u)
			lo = min(lo, u)
		}
		w.UMax, w.UMin = hi, lo
		w.Sum = (u + (t.N+int64(len(d)))*step) / 2
		return
	}
	k := t.N
	for _, x := range d {
		k++
		w.Sum += int64(x)
		p := Point{k, w.Sum}
		w.Upper = pushHull(w.Upper, p, 1)
		w.Lower = pushHull(w.Lower, p, -1)
	}
}

// pushHull appends p (with K beyond every point of h) to a monotone-chain
// hull: dir = 1 keeps the upper hull, -1 the lower one (Andrew 1979).
func pushHull(h []Point, p Point, dir int) []Point {
	for len(h) >= 2 && crossSign(h[len(h)-2], h[len(h)-1], p)*dir >= 0 {
		h = h[:len(h)-1]
	}
	return append(h, p)
}

// crossSign returns the sign of (b-a)×(c-a), computed in 128 bits so that
// walks of 10^12 digits cannot overflow it.
func crossSign(a, b, c Point) int {
	return cmp128(b.K-a.K, c.T-a.T, b.T-a.T, c.K-a.K)
}

// cmp128 returns the sign of x1·y1 - x2·y2 for int64 operands.
func cmp128(x1, y1, x2, y2 int64) int {
	h1, l1 := mul128(x1, y1)
	h2, l2 := mul128(x2, y2)
	switch {
	case h1 != h2:
		if h1 < h2 {
			return -1
		}
		return 1
	case l1 != l2:
		if l1 < l2 {
			return -1
		}
		return 1
	}
	return 0
}

// mul128 returns the signed 128-bit product of x and y as (high, low).
func mul128(x, y int64) (int64, uint64) {
	neg := (x < 0) != (y < 0)
	ux, uy := uint64(x), uint64(y)
	if x < 0 {
		ux = uint64(-x)
	}
	if y < 0 {
		uy = uint64(-y)
	}
	hi, lo := bits.Mul64(ux, uy)
	if neg { // two's complement of the 128-bit value
		lo = ^lo + 1
		hi = ^hi
		if lo == 0 {
			hi++
		}
	}
	return int64(hi), lo
}

func (t *Tally) couponStep(c *CouponTally, x byte) {
	cls := t.CouponClass[x]
	c.Seen |= 1 << cls
	c.Len++
	if c.Seen == 1<<t.CouponClasses-1 {
		c.Hist[min(c.Len, int64(t.CouponCap))]++
		c.Seen, c.Len = 0, 0
	}
}

// addCoupon runs the coupon collector over d: segments restart at global
// positions that are multiples of couponEvery; before the stretch's first
// restart the digits are kept in Head (a merge completes that segment).
// The loop between restarts keeps its state in locals.
func (t *Tally) addCoupon(d []byte, pos0 int64) {
	c := &t.Coupon
	every := t.couponEvery()
	i := 0
	for i < len(d) {
		// Digits up to the next restart position (exclusive).
		next := len(d)
		if r := (pos0 + int64(i)) % every; r == 0 {
			c.Restarted, c.Seen, c.Len = true, 0, 0
			next = min(len(d), i+int(every))
		} else {
			next = min(len(d), i+int(every-r))
		}
		if !c.Restarted {
			c.Head = append(c.Head, d[i:next]...)
			i = next
			continue
		}
		seen, n := c.Seen, c.Len
		full := uint32(1)<<t.CouponClasses - 1
		class, hist, capLen := t.CouponClass, c.Hist, int64(t.CouponCap)
		for _, x := range d[i:next] {
			seen |= 1 << class[x]
			n++
			if seen == full {
				hist[min(n, capLen)]++
				seen, n = 0, 0
			}
		}
		c.Seen, c.Len = seen, n
		i = next
	}
}

// mergeExtras folds b's extra records into t (a clone of a), given
// x = a.Tail‖b.Head with the cut at len(a.Tail) and xs the global position of x[0].
func (t *Tally) mergeExtras(a, b *Tally, x []byte, xs int64, cut int) {
	s := t.Spec
	if s.PokerHand > 0 {
		addInto(t.Poker, b.Poker)
		forCrossing(x, xs, cut, s.PokerHand, s.PokerHand, t.countHand)
	}
	if L := s.UpDownDigits; L > 0 {
		t.UDValues += b.UDValues
		t.UDTies += b.UDTies
		t.UDTurns += b.UDTurns
		forCrossing(x, xs, cut, L, L, t.countValue)
		forCrossing(x, xs, cut, L, 2*L, t.countTie)
		forCrossing(x, xs, cut, L, 3*L, t.countTurn)
	}
	if s.Lags > 0 {
		addInto(t.LagProd, b.LagProd)
		for h := 1; h <= s.Lags; h++ {
			forCrossing(x, xs, cut, 1, h+1, func(w []byte) { t.LagProd[h] += int64(w[0]) * int64(w[h]) })
		}
	}
	joined := a.Tail[len(a.Tail)-1] == b.Head[0]
	t.RunAny = mergeRuns(a.RunAny, b.RunAny, a.N, b.N, joined)
	t.RunDig = mergeRuns(a.RunDig, b.RunDig, a.N, b.N, true)
	t.mergeWalk(a, b)
	if s.CouponClasses > 0 {
		t.mergeCoupon(a, b)
	}
}

// mergeRuns joins run records; joined says whether a's last run and b's
// first run are of the same kind (for runs of one digit the lengths are 0
// when they are not, so joining is always right).
func mergeRuns(a, b RunTally, na, nb int64, joined bool) RunTally {
	r := RunTally{Max: max(a.Max, b.Max), Lead: a.Lead, Trail: b.Trail}
	if joined {
		r.Max = max(r.Max, a.Trail+b.Lead)
		if a.Lead == na {
			r.Lead = na + b.Lead
		}
		if b.Trail == nb {
			r.Trail = nb + a.Trail
		}
	}
	return r
}

func (t *Tally) mergeWalk(a, b *Tally) {
	w := &t.Walk
	w.Sum = a.Walk.Sum + b.Walk.Sum
	if !t.WalkHull {
		end := 2*a.Walk.Sum - a.N*int64(t.Base-1)
		w.UMax = max(a.Walk.UMax, end+b.Walk.UMax)
		w.UMin = min(a.Walk.UMin, end+b.Walk.UMin)
		return
	}
	join := func(ha, hb []Point, dir int) []Point {
		h := slices.Clone(ha)
		for _, p := range hb[1:] { // hb[0] is (0,0), a's last point once shifted
			h = pushHull(h, Point{p.K + a.N, p.T + a.Walk.Sum}, dir)
		}
		return h
	}
	w.Upper = join(a.Walk.Upper, b.Walk.Upper, 1)
	w.Lower = join(a.Walk.Lower, b.Walk.Lower, -1)
}

func (t *Tally) mergeCoupon(a, b *Tally) {
	c := &t.Coupon
	if !a.Coupon.Restarted {
		c.Head = append(slices.Clone(a.Coupon.Head), b.Coupon.Head...)
		c.Restarted, c.Seen, c.Len = b.Coupon.Restarted, b.Coupon.Seen, b.Coupon.Len
		c.Hist = slices.Clone(b.Coupon.Hist)
		return
	}
	for _, x := range b.Coupon.Head {
		t.couponStep(c, x)
	}
	addInto(c.Hist, b.Coupon.Hist)
	if b.Coupon.Restarted {
		c.Seen, c.Len = b.Coupon.Seen, b.Coupon.Len
	}
}
