package tally

import (
	"encoding/json"
	"fmt"
)

// UpDownSpec asks for the up/down record: aligned non-overlapping values of
// Digits digits each (starting at global multiples of Digits).
type UpDownSpec struct {
	Digits int `json:"digits"`
}

func init() { registerKind("updown", func() RecordSpec { return new(UpDownSpec) }) }

const maxUpDown = 64 // beyond it a decoded shard is damaged

func (s *UpDownSpec) Kind() string { return "updown" }

func (s *UpDownSpec) validate(int) error {
	if s.Digits < 1 || s.Digits > maxUpDown {
		return fmt.Errorf("up/down value length %d is out of range", s.Digits)
	}
	return nil
}

func (s *UpDownSpec) span() int         { return 3 * s.Digits }
func (s *UpDownSpec) cells(int) float64 { return 0 } // three counters, not worth a cell
func (s *UpDownSpec) newRecord(*Spec, int64) record {
	return &UpDown{UpDownSpec: *s}
}

// UpDown is the up/down record: the number of aligned values, of ties
// between consecutive values, and of turning points (the middle value of
// three consecutive ones a strict peak or trough).
type UpDown struct {
	UpDownSpec
	Values, Ties, Turns int64

	scratch []byte // tail‖chunk buffer of the kernel
}

// UpDown returns the up/down record, or nil when the tally has none.
func (t *Tally) UpDown() *UpDown { t.settle(); r, _ := t.find("updown").(*UpDown); return r }

func (r *UpDown) kind() string { return "updown" }

func (r *UpDown) kernels(t *Tally) []kernel {
	k := kernel{name: "updown", cost: 5, run: func(d []byte) { r.add(t, d) }}
	if s := packWidth(t.Base); s > 0 && r.Digits*s <= 64 {
		k.packed = func(p []byte) { r.addPacked(t, p, s) }
	}
	return []kernel{k}
}

// addPacked is add for a packed chunk (packed.go): a value that lies in
// the chunk is its L·s-bit field; the few that begin in the kept tail are
// read from the digits.
func (r *UpDown) addPacked(t *Tally, p []byte, s int) {
	L := r.Digits
	keep := min(len(t.Tail), 3*L-1)
	r.count(keep, keep+len(p)*(8/s), t.Offset+t.N-int64(keep), func(st int) uint64 {
		if st >= keep {
			return bitField(p, (st-keep)*s, L*s)
		}
		from := len(t.Tail) - keep + st
		w := append(append([]byte{}, t.Tail[from:min(len(t.Tail), from+L)]...), digitsOf(p, s, 0, st+L-keep)...)
		return udValue(w, t.Base)
	})
}

// add counts the aligned values that end inside d, and the ties and
// turning points among consecutive values whose last value ends inside d
// (count), each value computed once from the kept tail followed by d.
func (r *UpDown) add(t *Tally, d []byte) {
	L := r.Digits
	keep := min(len(t.Tail), 3*L-1)
	x := append(r.scratch[:0], t.Tail[len(t.Tail)-keep:]...)
	x = append(x, d...)
	r.scratch = x // reused: no garbage per chunk
	r.count(keep, len(x), t.Offset+t.N-int64(keep), func(st int) uint64 { return udValue(x[st:st+L], t.Base) })
}

// count reads the aligned values among digits 0 … total of the kept tail
// (its last keep digits) followed by the new digits, digit 0 at global
// position xs; value(st) is the value that starts at digit st. It counts
// the values that end among the new digits, and their ties and turning
// points; the tail's values (already counted) serve only as the context
// of the first pairs and triples.
func (r *UpDown) count(keep, total int, xs int64, value func(st int) uint64) {
	L := r.Digits
	st := 0
	if rem := xs % int64(L); rem != 0 {
		st = L - int(rem)
	}
	var v1, v2 uint64 // the previous two values
	have := 0
	for ; st+L <= total; st += L {
		v := value(st)
		if st+L > keep { // this value ends among the new digits
			r.Values++
			if have >= 1 && v == v1 {
				r.Ties++
			}
			if have >= 2 && ((v1 > v2 && v1 > v) || (v1 < v2 && v1 < v)) {
				r.Turns++
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

// merge adds next's counts and those of the values, pairs and triples that
// cross the cut.
func (r *UpDown) merge(next record, sm *seam) {
	n := next.(*UpDown)
	r.Values += n.Values
	r.Ties += n.Ties
	r.Turns += n.Turns
	L, b := r.Digits, sm.a.Base
	forCrossing(sm.x, sm.xs, sm.cut, L, L, func([]byte) { r.Values++ })
	forCrossing(sm.x, sm.xs, sm.cut, L, 2*L, func(w []byte) {
		if udValue(w[:L], b) == udValue(w[L:], b) {
			r.Ties++
		}
	})
	forCrossing(sm.x, sm.xs, sm.cut, L, 3*L, func(w []byte) {
		p, q, s := udValue(w[:L], b), udValue(w[L:2*L], b), udValue(w[2*L:], b)
		if (q > p && q > s) || (q < p && q < s) {
			r.Turns++
		}
	})
}

func (r *UpDown) clone() record {
	return &UpDown{UpDownSpec: r.UpDownSpec, Values: r.Values, Ties: r.Ties, Turns: r.Turns}
}

func (r *UpDown) settle(*Tally) { r.scratch = nil }

type updownEntry struct {
	Values int64 `json:"values"`
	Ties   int64 `json:"ties"`
	Turns  int64 `json:"turns"`
}

func (r *UpDown) entry(*blobs) any { return updownEntry{r.Values, r.Ties, r.Turns} }

func (r *UpDown) decode(data json.RawMessage, _ *blobs) error {
	var e updownEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Values, r.Ties, r.Turns = e.Values, e.Ties, e.Turns
	return nil
}

// check: the aligned values inside the stretch, at most one tie per pair
// and one turn per triple.
func (r *UpDown) check(t *Tally) error {
	v := aligned(t.Offset, t.N, r.Digits)
	if r.Values != v || r.Ties < 0 || r.Turns < 0 || r.Ties > max(0, v-1) || r.Turns > max(0, v-2) {
		return fmt.Errorf("up/down counts (%d values, %d ties, %d turns) do not fit %d values", r.Values, r.Ties, r.Turns, v)
	}
	return nil
}
