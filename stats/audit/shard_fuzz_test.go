package audit

import (
	"bytes"
	"math/rand/v2"
	"testing"

	"github.com/borel-audit/borel/internal/tally"
)

// damage applies ops to a decoded tally, three bytes an operation: which
// field, which cell, what value (a small signed number, or an extreme one).
// Lengths change too: a cell index of 255 appends a cell, 254 drops one.
func damage(t *tally.Tally, ops []byte) {
	value := func(b byte) int64 {
		switch b {
		case 127:
			return 1 << 40
		case 128:
			return -(1 << 62)
		case 126:
			return t.N + 1
		}
		return int64(int8(b))
	}
	cell := func(v []int64, i byte, x int64) []int64 {
		switch {
		case i == 255:
			return append(v, x)
		case i == 254 && len(v) > 0:
			return v[:len(v)-1]
		case len(v) > 0:
			v[int(i)%len(v)] = x
		}
		return v
	}
	digit := func(v []byte, i byte, x int64) []byte {
		switch {
		case i == 255:
			return append(v, byte(x))
		case i == 254 && len(v) > 0:
			return v[:len(v)-1]
		case len(v) > 0:
			v[int(i)%len(v)] = byte(x)
		}
		return v
	}
	// set changes the tally's record list: parameters a shard could state.
	set := func(r tally.RecordSpec) { t.Spec = t.Spec.With(r) }
	for len(ops) >= 3 {
		f, i, x := ops[0], ops[1], value(ops[2])
		ops = ops[3:]
		// The digit counts, windows and blocks are changed in place (their
		// accessors hand out the tables); lengths of those are damaged in
		// the tally package's own tests. Everything else, lengths too.
		switch f % 32 {
		case 0:
			if c := t.DigitCounts(); len(c) > 0 {
				c[int(i)%len(c)] = x
			}
		case 1:
			if c := t.Windows(); len(c) > 0 {
				c[int(i)%len(c)] = x
			}
		case 2:
			if c := t.BlockCounts(int(i) % max(1, t.MaxBlock+1)); len(c) > 0 {
				c[int(i/8)%len(c)] = x
			}
		case 3:
			if g := t.Gaps(); g != nil && len(g.Classes) > 0 {
				c := int(i) % len(g.Classes)
				g.Classes[c].Hist = cell(g.Classes[c].Hist, i/8, x)
			}
		case 4:
			if g := t.Gaps(); g != nil && len(g.Classes) > 0 {
				c := &g.Classes[int(i)%len(g.Classes)]
				c.First, c.Last, c.Seen = c.First+x%3, c.Last+x, x%2 == 0
			}
		case 5:
			if h := t.Hands(); h != nil {
				h.Counts = cell(h.Counts, i, x)
			}
		case 6:
			if l := t.Lags(); l != nil {
				l.Products = cell(l.Products, i, x)
			}
		case 7:
			if u := t.UpDown(); u != nil {
				u.Values, u.Ties, u.Turns = u.Values+x%2, u.Ties+x%3, u.Turns+x
			}
		case 8: // the seams swapped
			t.Head, t.Tail = t.Tail, t.Head
		case 9: // a window count moved to another cell
			if c := t.Windows(); len(c) > 1 {
				c[int(i)%len(c)]--
				c[int(x&0x7fff)%len(c)]++
			}
		case 10:
			if w := t.Walk(); w != nil {
				w.Sum, w.UMax, w.UMin = w.Sum+x%2, w.UMax+x, w.UMin-x%3
			}
		case 11:
			if w := t.Walk(); w != nil && len(w.Upper) > 0 {
				p := &w.Upper[int(i)%len(w.Upper)]
				p.K, p.T = p.K+x%2, p.T+x
			}
		case 12:
			if c := t.Coupons(); c != nil {
				c.Hist = cell(c.Hist, i, x)
			}
		case 13:
			if c := t.Coupons(); c != nil {
				c.Head = digit(c.Head, i, x)
			}
		case 14:
			if c := t.Coupons(); c != nil {
				c.Seen, c.Len, c.Restarted = uint32(x), c.Len+x%3, x%2 == 0
			}
		case 15:
			if tr := t.Trace(); len(tr) > 0 {
				tp := &tr[int(i)%len(tr)]
				tp.Pos += x % 3
				tp.Counts = cell(tp.Counts, i/8, x)
			}
		case 16:
			t.Head = digit(t.Head, i, x)
		case 17:
			t.Tail = digit(t.Tail, i, x)
		case 18:
			t.N += x
		case 19:
			t.Offset += x
		case 20:
			if g, ok := t.Spec.Record("gaps").(*tally.GapSpec); ok {
				set(&tally.GapSpec{Class: g.Class, Cap: g.Cap + int(x)})
			}
		case 21:
			if h, ok := t.Spec.Record("poker").(*tally.HandSpec); ok {
				set(&tally.HandSpec{Size: h.Size + int(x%4)})
			}
		case 22:
			if l, ok := t.Spec.Record("lags").(*tally.LagSpec); ok {
				set(&tally.LagSpec{Max: l.Max + int(x%4)})
			}
		case 23:
			if u, ok := t.Spec.Record("updown").(*tally.UpDownSpec); ok {
				set(&tally.UpDownSpec{Digits: u.Digits + int(x%4)})
			}
		case 24, 25, 26:
			if c, ok := t.Spec.Record("coupon").(*tally.CouponSpec); ok {
				d := *c
				switch f % 32 {
				case 24:
					d.Cap += int(x)
				case 25:
					d.Every += int(x)
				default:
					d.Classes += int(x % 4)
				}
				set(&d)
			}
		case 27:
			t.MaxBlock += int(x % 3)
		case 28:
			t.BlocksMax += int(x % 3)
		case 29: // the stretch moved by a block length
			t.Offset += int64(t.MaxBlock) * (x % 3)
		case 30:
			t.Base += int(x % 3)
		case 31:
			switch x % 3 { // a record dropped from the list, or its entry
			case 0:
				t.Spec = t.Spec.Without([]string{"gaps", "poker", "coupon", "updown", "lags", "runs", "walk"}[int(i)%7])
			case 1:
				set(&tally.WalkSpec{Hull: x%2 == 0})
			}
		}
	}
}

// encodeShard writes a damaged decoded tally as a shard with a valid
// checksum. A decoded tally has no pending work, so WriteShard writes its
// records as they are (nothing is derived again from damaged tables).
func encodeShard(t *tally.Tally) []byte {
	var buf bytes.Buffer
	if err := tally.WriteShard(&buf, &tally.Shard{Null: tally.ShardNull{Kind: "uniform"}, Tally: t}); err != nil {
		return nil
	}
	return buf.Bytes()
}

// FuzzMergeDamagedShards: three consecutive shards of a base-10 audit, one
// of them damaged after decoding (tables of other lengths, counts, offsets,
// spec parameters) and written again with a valid checksum, are read,
// merged and audited as borel merge does: a damaged shard is refused by
// ReadShard or, when what it holds is still a possible tally, audited; no
// input panics. The record list itself is damaged too (parameters changed,
// a record dropped while its entry stays). The record list itself is damaged too (parameters changed,
// a record dropped while its entry stays, or the reverse).
func FuzzMergeDamagedShards(f *testing.F) {
	opts := DefaultOptions()
	opts.Workers = 1
	plan, err := NewPlan(10, 3000, opts)
	if err != nil {
		f.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(7, 7))
	d := make([]byte, 3000)
	for i := range d {
		d[i] = byte(rng.IntN(10))
	}
	var shards [3][]byte
	for i := range shards {
		if err := plan.StartAt(int64(1000 * i)); err != nil {
			f.Fatal(err)
		}
		plan.Add(d[1000*i : 1000*(i+1)])
		var buf bytes.Buffer
		if err := tally.WriteShard(&buf, &tally.Shard{Null: tally.ShardNull{Kind: "uniform"}, Tally: plan.t}); err != nil {
			f.Fatal(err)
		}
		shards[i] = buf.Bytes()
	}
	f.Add(uint8(0), []byte{})
	f.Add(uint8(1), []byte{12, 255, 0})         // the coupon histogram one cell longer
	f.Add(uint8(2), []byte{0, 3, 1, 0, 4, 255}) // a digit moved
	f.Add(uint8(1), []byte{19, 0, 5})           // offset moved
	f.Add(uint8(0), []byte{24, 0, 1, 12, 255, 0})
	f.Fuzz(func(t *testing.T, which uint8, ops []byte) {
		var ts [3]*tally.Tally
		for i, raw := range shards {
			s, err := tally.ReadShard(bytes.NewReader(raw), "shard")
			if err != nil {
				t.Fatalf("an undamaged shard is refused: %v", err)
			}
			ts[i] = s.Tally
		}
		k := int(which) % 3
		damage(ts[k], ops)
		s, err := tally.ReadShard(bytes.NewReader(encodeShard(ts[k])), "shard")
		if err != nil {
			return
		}
		ts[k] = s.Tally
		merged := ts[0]
		for _, next := range ts[1:] {
			if merged, err = tally.Merge(merged, next); err != nil {
				return
			}
		}
		p, err := PlanForSpec(merged.Spec, opts)
		if err != nil {
			return
		}
		p.Finish(merged, Source{Name: "3 shards", Kind: "shards", Bytes: -1})
	})
}
