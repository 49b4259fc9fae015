package tally

import (
	"encoding/json"
	"fmt"
	"math/bits"
	"slices"
)

// WalkSpec asks for the walk record; Hull keeps the convex hulls (needed
// when the null is not uniform).
type WalkSpec struct {
	Hull bool `json:"hull"`
}

func init() { registerKind("walk", func() RecordSpec { return new(WalkSpec) }) }

func (s *WalkSpec) Kind() string       { return "walk" }
func (s *WalkSpec) validate(int) error { return nil }
func (s *WalkSpec) span() int          { return 1 }
func (s *WalkSpec) cells(int) float64  { return 0 }
func (s *WalkSpec) newRecord(sp *Spec, _ int64) record {
	r := &Walk{WalkSpec: *s, base: sp.Base}
	if s.Hull {
		r.Upper, r.Lower = []Point{{0, 0}}, []Point{{0, 0}}
	}
	return r
}

// Walk records the digit-sum walk T_k = x_1 + … + x_k of a stretch,
// k = 0..N, relative to its start. Without Hull (a uniform null) it keeps
// the integer extremes of U_k = 2T_k - k(b-1); with Hull the upper and
// lower convex hulls of the points (k, T_k), from which max_k (T_k - kμ)
// follows exactly for any μ, including one estimated from the data. Both
// are unique for a given sequence, so merged tallies are exactly equal to
// one pass.
type Walk struct {
	WalkSpec
	Sum          int64
	UMax, UMin   int64 // without Hull: extremes of U_k over k = 0..N
	Upper, Lower []Point

	base int
}

// Point is a vertex of the walk's hull.
type Point struct{ K, T int64 }

// Walk returns the walk record, or nil when the tally has none.
func (t *Tally) Walk() *Walk { t.settle(); r, _ := t.find("walk").(*Walk); return r }

func (r *Walk) kind() string { return "walk" }

func (r *Walk) kernels(t *Tally) []kernel {
	k := kernel{name: "walk", cost: 1.2, run: func(d []byte) { r.add(d, t.N) }}
	if packWidth(r.base) > 0 && !r.Hull {
		k.packed = func(p []byte) { r.addPacked(p, t.N) }
	}
	return []kernel{k}
}

// walkByte is a byte of packed digits as steps of U (without Hull): the
// sum of its steps and the highest and lowest partial sums after each of
// its digits.
type walkByte struct{ sum, hi, lo int8 }

// walkBytes holds the tables for bits, bit pairs and nibbles.
var walkBytes = func() (tab [3][256]walkByte) {
	for si, s := range []int{1, 2, 4} {
		step := 1<<s - 1
		for v := range 256 {
			e := &tab[si][v]
			e.hi, e.lo = -128, 127
			u := 0
			for _, x := range unpack(nil, []byte{byte(v)}, s) {
				u += 2*int(x) - step
				e.hi, e.lo = max(e.hi, int8(u)), min(e.lo, int8(u))
			}
			e.sum = int8(u)
		}
	}
	return tab
}()

// addPacked is add without Hull for a packed chunk (packed.go), a byte at
// a time.
func (r *Walk) addPacked(p []byte, n int64) {
	s := packWidth(r.base)
	tab := &walkBytes[bits.TrailingZeros(uint(s))] // s = 1, 2, 4: tables 0, 1, 2
	step := int64(r.base - 1)
	u := 2*r.Sum - n*step
	hi, lo := r.UMax, r.UMin
	for _, v := range p {
		e := tab[v]
		hi = max(hi, u+int64(e.hi))
		lo = min(lo, u+int64(e.lo))
		u += int64(e.sum)
	}
	r.UMax, r.UMin = hi, lo
	r.Sum = (u + (n+int64(len(p)*(8/s)))*step) / 2
}

// add extends the walk over d, whose first digit is the stretch's (n+1)-th.
func (r *Walk) add(d []byte, n int64) {
	if !r.Hull {
		step := int64(r.base - 1)
		u := 2*r.Sum - n*step
		hi, lo := r.UMax, r.UMin
		for _, x := range d {
			u += 2*int64(x) - step
			hi = max(hi, u)
			lo = min(lo, u)
		}
		r.UMax, r.UMin = hi, lo
		r.Sum = (u + (n+int64(len(d)))*step) / 2
		return
	}
	k := n
	for _, x := range d {
		k++
		r.Sum += int64(x)
		p := Point{k, r.Sum}
		r.Upper = pushHull(r.Upper, p, 1)
		r.Lower = pushHull(r.Lower, p, -1)
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

// merge shifts next's walk to start where this one ends.
func (r *Walk) merge(next record, sm *seam) {
	n := next.(*Walk)
	aN, aSum := sm.a.N, r.Sum
	r.Sum += n.Sum
	if !r.Hull {
		end := 2*aSum - aN*int64(r.base-1)
		r.UMax = max(r.UMax, end+n.UMax)
		r.UMin = min(r.UMin, end+n.UMin)
		return
	}
	join := func(ha, hb []Point, dir int) []Point {
		h := slices.Clone(ha)
		for _, p := range hb[1:] { // hb[0] is (0,0), a's last point once shifted
			h = pushHull(h, Point{p.K + aN, p.T + aSum}, dir)
		}
		return h
	}
	r.Upper = join(r.Upper, n.Upper, 1)
	r.Lower = join(r.Lower, n.Lower, -1)
}

func (r *Walk) clone() record {
	u := *r
	u.Upper, u.Lower = slices.Clone(r.Upper), slices.Clone(r.Lower)
	return &u
}

func (r *Walk) settle(*Tally) {}

type walkEntry struct {
	Sum   int64      `json:"sum"`
	UMax  int64      `json:"u_max"`
	UMin  int64      `json:"u_min"`
	Upper [][2]int64 `json:"upper,omitempty"`
	Lower [][2]int64 `json:"lower,omitempty"`
}

func (r *Walk) entry(*blobs) any {
	pts := func(h []Point) [][2]int64 {
		var out [][2]int64
		for _, p := range h {
			out = append(out, [2]int64{p.K, p.T})
		}
		return out
	}
	return walkEntry{r.Sum, r.UMax, r.UMin, pts(r.Upper), pts(r.Lower)}
}

func (r *Walk) decode(data json.RawMessage, _ *blobs) error {
	var e walkEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	pts := func(h [][2]int64) []Point {
		var out []Point
		for _, p := range h {
			out = append(out, Point{p[0], p[1]})
		}
		return out
	}
	r.Sum, r.UMax, r.UMin, r.Upper, r.Lower = e.Sum, e.UMax, e.UMin, pts(e.Upper), pts(e.Lower)
	return nil
}

// check: the digit sum within the stretch's reach; the extremes, or hulls
// that run from (0, 0) to (N, Sum) through possible digit sums.
func (r *Walk) check(t *Tally) error {
	N, top := t.N, int64(t.Base-1)
	if r.Sum < 0 || r.Sum > N*top {
		return fmt.Errorf("the walk's digit sum %d is out of range", r.Sum)
	}
	if !r.Hull {
		if r.Upper != nil || r.Lower != nil || r.UMax < 0 || r.UMin > 0 || r.UMax > N*top || -r.UMin > N*top {
			return fmt.Errorf("the walk's extremes (%d, %d) are out of range", r.UMin, r.UMax)
		}
		return nil
	}
	for _, h := range [][]Point{r.Upper, r.Lower} {
		if len(h) == 0 || h[0] != (Point{0, 0}) || h[len(h)-1] != (Point{N, r.Sum}) {
			return fmt.Errorf("the walk's hull does not run from (0, 0) to (%d, %d)", N, r.Sum)
		}
		for i := 1; i < len(h); i++ {
			dk, dt := h[i].K-h[i-1].K, h[i].T-h[i-1].T
			if dk <= 0 || dt < 0 || dt > dk*top {
				return fmt.Errorf("the walk's hull is not a path of the digit sums")
			}
		}
	}
	return nil
}
