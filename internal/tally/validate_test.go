package tally

import (
	"bytes"
	"math/rand/v2"
	"strings"
	"testing"
)

// roundTrip writes t as a shard (a valid checksum over whatever t holds) and
// reads it back.
func roundTrip(t *Tally) (*Shard, error) {
	var buf bytes.Buffer
	if err := WriteShard(&buf, &Shard{Null: ShardNull{Kind: "uniform"}, Tally: t}); err != nil {
		return nil, err
	}
	return ReadShard(bytes.NewReader(buf.Bytes()), "s")
}

// randomStretch tallies n random digits at offset off, in random chunks,
// with the concurrent and byte-counter paths reachable.
func randomStretch(rng *rand.Rand, spec Spec, off int64, n int) *Tally {
	tl, err := New(spec, off)
	if err != nil {
		panic(err)
	}
	d := randomDigits(rng, n, spec.Base)
	for len(d) > 0 {
		c := min(len(d), 1+rng.IntN(64))
		tl.Add(d[:c])
		d = d[c:]
	}
	return tl
}

// Every tally one pass or a merge can produce passes the validation, at
// random offsets (restart and alignment positions inside and outside) and
// lengths down to zero.
func TestValidShardsAccepted(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 1))
	for trial := range 400 {
		base := 2 + rng.IntN(9)
		spec := randomSpec(rng, base, 1+rng.IntN(3))
		for _, kind := range []string{"gaps", "runs", "walk", "poker", "coupon"} {
			if rng.IntN(5) == 0 {
				spec = spec.Without(kind)
			}
		}
		if rng.IntN(3) == 0 {
			spec.BlocksMax = 1 + rng.IntN(spec.MaxBlock)
		}
		off := rng.Int64N(200)
		a := randomStretch(rng, spec, off, rng.IntN(120))
		b := randomStretch(rng, spec, off+a.N, rng.IntN(120))
		m, err := Merge(a, b)
		if err != nil {
			t.Fatal(err)
		}
		for _, x := range []*Tally{a, b, m} {
			if _, err := roundTrip(x); err != nil {
				t.Fatalf("trial %d: a valid tally (offset %d, %d digits, spec %+v) refused: %v", trial, x.Offset, x.N, x.Spec, err)
			}
		}
	}
}

// A shard whose tables were changed after tallying, with a checksum that
// matches the changed payload, is refused by ReadShard with one line —
// among them the case: a coupon histogram one cell longer passed
// ReadShard and made `borel merge` panic with "index out of range".
func TestDamagedShardsRefused(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 2))
	spec := randomSpec(rng, 6, 3)
	spec = spec.With(&WalkSpec{Hull: true})
	fresh := func() *Tally {
		r := rand.New(rand.NewPCG(3, 4))
		tl := randomStretch(r, spec, 40, 400)
		tl.settle()
		return tl
	}
	damages := map[string]func(*Tally){
		"coupon histogram one cell longer":  func(x *Tally) { x.Coupons().Hist = append(x.Coupons().Hist, 0) },
		"coupon histogram one cell shorter": func(x *Tally) { x.Coupons().Hist = x.Coupons().Hist[:len(x.Coupons().Hist)-1] },
		"poker table one cell longer":       func(x *Tally) { x.Hands().Counts = append(x.Hands().Counts, 1) },
		"lag table one cell shorter":        func(x *Tally) { x.Lags().Products = x.Lags().Products[:1] },
		"trace counts one short":            func(x *Tally) { x.dig.Trace[2].Counts = x.dig.Trace[2].Counts[:5] },
		"negative digit count":              func(x *Tally) { x.dig.Counts[0], x.dig.Counts[1] = -1, x.dig.Counts[1]+x.dig.Counts[0]+1 },
		"digit counts off by one":           func(x *Tally) { x.dig.Counts[3]++ },
		"window count moved off the sum":    func(x *Tally) { x.win.Counts[7]++ },
		"block count moved off the sum":     func(x *Tally) { x.blk.Counts[2][3]++ },
		"tail digit above the base":         func(x *Tally) { x.Tail[0] = 6 },
		"head digit above the base":         func(x *Tally) { x.Head[1] = 200 },
		"gap after the stretch":             func(x *Tally) { x.Gaps().Classes[0].Last = x.N + 5 },
		"gap histogram one gap more":        func(x *Tally) { x.Gaps().Classes[1].Hist[0]++ },
		"hull point out of order":           func(x *Tally) { x.Walk().Upper[1].K = x.Walk().Upper[0].K },
		"walk sum above the digits":         func(x *Tally) { x.Walk().Sum = x.N * 6 },
		"trace points out of order":         func(x *Tally) { x.dig.Trace[1], x.dig.Trace[2] = x.dig.Trace[2], x.dig.Trace[1] },
		"coupon head digit above the base":  func(x *Tally) { x.Coupons().Head = append(x.Coupons().Head[:0:0], 9) },
		"coupon state seen beyond classes":  func(x *Tally) { x.Coupons().Seen = 1 << 20 },
		"coupon pending beyond the end": func(x *Tally) {
			x.Coupons().Pending = []PendingSegment{{Due: x.Offset + x.N + int64(x.Coupons().Cap) + 1, Len: int64(x.Coupons().Classes)}}
		},
		"coupon pending already due": func(x *Tally) {
			x.Coupons().Pending = []PendingSegment{{Due: x.Offset + x.N, Len: int64(x.Coupons().Classes)}}
		},
		"up/down values off":       func(x *Tally) { x.UpDown().Values++ },
		"offset negative":          func(x *Tally) { x.Offset = -1 },
		"length beyond the counts": func(x *Tally) { x.N++ },
		"gap cap absurd":           func(x *Tally) { x.Spec = x.Spec.With(&GapSpec{Cap: 1 << 30}) },
		"coupon class beyond the count": func(x *Tally) {
			c := *x.Spec.Record("coupon").(*CouponSpec)
			c.Class = append([]int{31}, c.Class[1:]...)
			x.Spec = x.Spec.With(&c)
		},
		"unknown record kind":          func(x *Tally) { x.Spec = x.Spec.With(&bogusSpec{}) },
		"record entry of another kind": func(x *Tally) { x.recs[3], x.recs[4] = x.recs[4], x.recs[3] },
		"one record entry missing":     func(x *Tally) { x.recs = x.recs[:len(x.recs)-1] },
		"head longer than the seams":   func(x *Tally) { x.Head = append(x.Head, 0) },
		"windows of length 40":         func(x *Tally) { x.Spec.MaxBlock = 40 },
	}
	if _, err := roundTrip(fresh()); err != nil {
		t.Fatalf("the undamaged shard is refused: %v", err)
	}
	for name, damage := range damages {
		x := fresh()
		damage(x)
		_, err := roundTrip(x)
		if err == nil {
			t.Errorf("%s: accepted", name)
			continue
		}
		if msg := err.Error(); strings.Contains(msg, "\n") || !strings.HasPrefix(msg, "s: ") {
			t.Errorf("%s: error is not one line naming the shard: %q", name, msg)
		}
		// A fold refuses it too (its tables left encoded are checked all
		// the same), and the fold is left as it was.
		var buf bytes.Buffer
		if err := WriteShard(&buf, &Shard{Null: ShardNull{Kind: "uniform"}, Tally: x}); err != nil {
			continue // not encodable at all
		}
		acc := randomStretch(rand.New(rand.NewPCG(5, 6)), spec, 0, 40)
		before := acc.Clone()
		if _, err := acc.AppendShard(bytes.NewReader(buf.Bytes()), "s"); err == nil {
			t.Errorf("%s: accepted by AppendShard", name)
		} else if !same(acc, before) {
			t.Errorf("%s: a refused shard changed the fold", name)
		}
	}
}

// bogusSpec is a record kind this borel does not know (a shard from a
// newer one, or damage).
type bogusSpec struct{ GapSpec }

func (*bogusSpec) Kind() string { return "bogus" }
