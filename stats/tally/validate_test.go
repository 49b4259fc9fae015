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
		spec.SkipGaps, spec.SkipRuns, spec.SkipWalk = rng.IntN(5) == 0, rng.IntN(5) == 0, rng.IntN(5) == 0
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
	spec.WalkHull = true
	fresh := func() *Tally {
		r := rand.New(rand.NewPCG(3, 4))
		tl := randomStretch(r, spec, 40, 400)
		tl.Settle()
		return tl
	}
	damages := map[string]func(*Tally){
		"coupon histogram one cell longer":  func(x *Tally) { x.Coupon.Hist = append(x.Coupon.Hist, 0) },
		"coupon histogram one cell shorter": func(x *Tally) { x.Coupon.Hist = x.Coupon.Hist[:len(x.Coupon.Hist)-1] },
		"poker table one cell longer":       func(x *Tally) { x.Poker = append(x.Poker, 1) },
		"lag table one cell shorter":        func(x *Tally) { x.LagProd = x.LagProd[:1] },
		"trace counts one short":            func(x *Tally) { x.Trace[2].Counts = x.Trace[2].Counts[:5] },
		"negative digit count":              func(x *Tally) { x.Digits[0], x.Digits[1] = -1, x.Digits[1]+x.Digits[0]+1 },
		"digit counts off by one":           func(x *Tally) { x.Digits[3]++ },
		"window count moved off the sum":    func(x *Tally) { x.Overlap[7]++ },
		"block count moved off the sum":     func(x *Tally) { x.Blocks[2][3]++ },
		"tail digit above the base":         func(x *Tally) { x.Tail[0] = 6 },
		"head digit above the base":         func(x *Tally) { x.Head[1] = 200 },
		"gap after the stretch":             func(x *Tally) { x.Gaps[0].Last = x.N + 5 },
		"gap histogram one gap more":        func(x *Tally) { x.Gaps[1].Hist[0]++ },
		"run longer than the stretch":       func(x *Tally) { x.RunAny.Max = x.N + 1 },
		"hull point out of order":           func(x *Tally) { x.Walk.Upper[1].K = x.Walk.Upper[0].K },
		"walk sum above the digits":         func(x *Tally) { x.Walk.Sum = x.N * 6 },
		"trace points out of order":         func(x *Tally) { x.Trace[1], x.Trace[2] = x.Trace[2], x.Trace[1] },
		"coupon head digit above the base":  func(x *Tally) { x.Coupon.Head = append(x.Coupon.Head[:0:0], 9) },
		"coupon state seen beyond classes":  func(x *Tally) { x.Coupon.Seen = 1 << 20 },
		"up/down values off":                func(x *Tally) { x.UDValues++ },
		"offset negative":                   func(x *Tally) { x.Offset = -1 },
		"length beyond the counts":          func(x *Tally) { x.N++ },
		"gap cap absurd":                    func(x *Tally) { x.GapCap = 1 << 30 },
		"coupon class beyond the count":     func(x *Tally) { x.CouponClass[0] = 31 },
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
	}
}
