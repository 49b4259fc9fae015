package audit

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"testing"

	"borel/stats/tally"
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
	for len(ops) >= 3 {
		f, i, x := ops[0], ops[1], value(ops[2])
		ops = ops[3:]
		switch f % 32 {
		case 0:
			t.Digits = cell(t.Digits, i, x)
		case 1:
			t.Overlap = cell(t.Overlap, i, x)
		case 2:
			if k := int(i) % len(t.Blocks); len(t.Blocks) > 0 {
				t.Blocks[k] = cell(t.Blocks[k], i/8, x)
			}
		case 3:
			if c := int(i) % max(1, len(t.Gaps)); len(t.Gaps) > 0 {
				t.Gaps[c].Hist = cell(t.Gaps[c].Hist, i/8, x)
			}
		case 4:
			if len(t.Gaps) > 0 {
				g := &t.Gaps[int(i)%len(t.Gaps)]
				g.First, g.Last, g.Seen = g.First+x%3, g.Last+x, x%2 == 0
			}
		case 5:
			t.Poker = cell(t.Poker, i, x)
		case 6:
			t.LagProd = cell(t.LagProd, i, x)
		case 7:
			t.UDValues, t.UDTies, t.UDTurns = t.UDValues+x%2, t.UDTies+x%3, t.UDTurns+x
		case 8:
			t.RunAny.Max, t.RunAny.Lead, t.RunAny.Trail = t.RunAny.Max+x, t.RunAny.Lead+x%2, t.RunAny.Trail+x%3
		case 9:
			t.RunDig.Max, t.RunDig.Lead = t.RunDig.Max+x, t.RunDig.Lead+x%2
		case 10:
			t.Walk.Sum, t.Walk.UMax, t.Walk.UMin = t.Walk.Sum+x%2, t.Walk.UMax+x, t.Walk.UMin-x%3
		case 11:
			if len(t.Walk.Upper) > 0 {
				p := &t.Walk.Upper[int(i)%len(t.Walk.Upper)]
				p.K, p.T = p.K+x%2, p.T+x
			}
		case 12:
			t.Coupon.Hist = cell(t.Coupon.Hist, i, x)
		case 13:
			t.Coupon.Head = digit(t.Coupon.Head, i, x)
		case 14:
			t.Coupon.Seen, t.Coupon.Len, t.Coupon.Restarted = uint32(x), t.Coupon.Len+x%3, x%2 == 0
		case 15:
			if len(t.Trace) > 0 {
				tp := &t.Trace[int(i)%len(t.Trace)]
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
			t.GapCap += int(x)
		case 21:
			t.PokerHand += int(x % 4)
		case 22:
			t.Lags += int(x % 4)
		case 23:
			t.UpDownDigits += int(x % 4)
		case 24:
			t.CouponCap += int(x)
		case 25:
			t.CouponEvery += int(x)
		case 26:
			t.CouponClasses += int(x % 4)
		case 27:
			t.MaxBlock += int(x % 3)
		case 28:
			t.BlocksMax += int(x % 3)
		case 29:
			t.RunDigit += int(x % 11)
		case 30:
			t.Base += int(x % 3)
		case 31:
			if len(t.GapClass) > 0 {
				t.GapClass[int(i)%len(t.GapClass)] += int(x % 4)
			}
		}
	}
}

// encodeShard writes t in the shard format as it is, without WriteShard's
// Settle (which would recompute derived records from damaged tables before
// ReadShard sees them): a damaged file with a valid checksum.
func encodeShard(t *tally.Tally) []byte {
	var payload bytes.Buffer
	zw := gzip.NewWriter(&payload)
	json.NewEncoder(zw).Encode(&tally.Shard{Format: "borel-tally", Version: tally.ShardVersion, Null: tally.ShardNull{Kind: "uniform"}, Tally: t})
	zw.Close()
	sum := sha256.Sum256(payload.Bytes())
	return append([]byte(fmt.Sprintf("borel-tally %d sha256:%x bytes:%d\n", tally.ShardVersion, sum, payload.Len())), payload.Bytes()...)
}

// FuzzMergeDamagedShards: three consecutive shards of a base-10 audit, one
// of them damaged after decoding (tables of other lengths, counts, offsets,
// spec parameters) and written again with a valid checksum, are read,
// merged and audited as borel merge does: a damaged shard is refused by
// ReadShard or, when what it holds is still a possible tally, audited; no
// input panics.
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
