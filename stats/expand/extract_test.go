package expand

import (
	"math/big"
	"math/bits"
	"math/rand/v2"
	"testing"
)

// circularDist returns |a − b| mod 2^64, the distance of two 64-bit binary
// fractions on the circle.
func circularDist(a, b uint64) uint64 {
	return min(a-b, b-a)
}

// floor(2^64·frac(16^d·π)) and floor(2^64·frac(2^d·ln 2)) from Debian's
// python3-mpmath 1.2.1 (gmpy backend): libelefun.pi_fixed(4d+128) >> 64
// and ln2_fixed(d+128) >> 64, low 64 bits. d = 0: 0x243f6a8885a308d3 are
// π's first hexadecimal digits (OEIS A062964).
func TestExtractionAgainstMpmath(t *testing.T) {
	pis := []struct{ d, want uint64 }{
		{0, 0x243f6a8885a308d3}, {1, 0x43f6a8885a308d31}, {2, 0x3f6a8885a308d313},
		{7, 0x885a308d313198a2}, {100, 0x29b7c97c50dd3f84}, {1000, 0x49f1c09b075372c9},
		{32767, 0x19e8149929ad99c7}, {40000, 0x1bb9156d760228b4}, {100000, 0x35ea16c406363a30},
		{1000003, 0x5e52cb459350050e},
	}
	for _, c := range pis {
		got, e := piExtract(c.d)
		if dist := circularDist(got, c.want); dist > e {
			t.Errorf("π at hex digit %d: %016x, mpmath %016x (distance %d > bound %d)", c.d, got, c.want, dist, e)
		}
	}
	ln2s := []struct{ d, want uint64 }{
		{0, 0xb17217f7d1cf79ab}, {1, 0x62e42fefa39ef357}, {5, 0x2e42fefa39ef3579},
		{69, 0x3c7673007e5ed5e8}, {70, 0x78ece600fcbdabd0}, {71, 0xf1d9cc01f97b57a0},
		{140, 0x343267298b62d8a0}, {1000, 0x3fd5c607f4ca11fb}, {100000, 0x4b3fd4b99b9fbc82},
		{300001, 0xf692e3a551b55bbb}, {1000000, 0xa923f30077196e37},
	}
	for _, c := range ln2s {
		got, e := ln2Extract(c.d)
		if dist := circularDist(got, c.want); dist > e {
			t.Errorf("ln 2 at bit %d: %016x, mpmath %016x (distance %d > bound %d)", c.d, got, c.want, dist, e)
		}
	}
}

// The Montgomery lanes (R = 2^32 and R = 2^64) and the scalar path against
// math/big: W = 3 words of floor(2^(64W)·frac(2^E/m)) = floor(2^(E+64W)/m)
// mod 2^(64W), at random odd moduli across each range, its edges included,
// and at lanes of mixed ranges.
func TestFracWordsAgainstBig(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 1))
	in := func(lo, hi uint64) uint64 {
		switch rng.IntN(4) {
		case 0:
			return lo | 1
		case 1:
			return hi - 1
		}
		return (lo + rng.Uint64N(hi-lo-1)) | 1
	}
	ranges := [][2]uint64{{montMin, montMax}, {montMax, mont64Max}, {1, montMin}}
	const W = 3
	q := make([]uint64, W)
	for n := range 6000 {
		var E, m, r, inv [4]uint64
		for i := range 4 {
			rg := ranges[n%3]
			if n%7 == 6 {
				rg = ranges[rng.IntN(3)] // mixed lanes
			}
			E[i], m[i] = rng.Uint64N(1<<uint(1+rng.IntN(40))), in(rg[0], rg[1])
		}
		pow2Mod4(&E, &m, &r, &inv)
		for i := range 4 {
			s := make(wideSum, W)
			s.addFrac(r[i], inv[i], m[i], false, q)
			// With 2^E = a·m + b, the words are floor(2^(64W)·b/m).
			b := new(big.Int).Exp(big.NewInt(2), new(big.Int).SetUint64(E[i]), new(big.Int).SetUint64(m[i]))
			b.Lsh(b, 64*W)
			b.Quo(b, new(big.Int).SetUint64(m[i]))
			got := new(big.Int)
			for _, w := range s {
				got.Lsh(got, 64)
				got.Or(got, new(big.Int).SetUint64(w))
			}
			if got.Cmp(b) != 0 {
				t.Fatalf("frac(2^%d/%d) in %d words: %x, big %x", E[i], m[i], W, got, b)
			}
		}
	}
	if montMax*montMax > 1<<62 || bits.Len64(montMax) != 32 || mont64Max > 1<<62 {
		t.Fatal("the Montgomery ranges no longer keep the sums below 2^64")
	}
}
