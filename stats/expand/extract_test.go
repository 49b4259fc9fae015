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

// The Montgomery lanes against the 128-bit path, at random moduli and
// exponents across the fast range, its edges included.
func TestFrac64x4(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 1))
	odd := func() uint64 {
		switch rng.IntN(4) {
		case 0:
			return montMin + 1
		case 1:
			return montMax - 1
		}
		return (montMin + rng.Uint64N(montMax-montMin)) | 1
	}
	for range 20000 {
		var E, m [4]uint64
		for i := range 4 {
			E[i], m[i] = rng.Uint64N(1<<uint(1+rng.IntN(40))), odd()
		}
		f0, f1, f2, f3 := frac64x4(E[0], E[1], E[2], E[3], m[0], m[1], m[2], m[3])
		for i, f := range [4]uint64{f0, f1, f2, f3} {
			if want := frac64(E[i], m[i]); f != want {
				t.Fatalf("frac(2^%d/%d): lanes %x, 128-bit %x", E[i], m[i], f, want)
			}
		}
	}
	// frac64 against math/big: floor(2^64·frac(2^E/m)) = floor(2^(E+64)/m) mod 2^64.
	for range 2000 {
		E, m := rng.Uint64N(3000), 1+rng.Uint64N(1<<uint(1+rng.IntN(62)))
		q := new(big.Int).Lsh(big.NewInt(1), uint(E+64))
		q.Quo(q, new(big.Int).SetUint64(m))
		want := new(big.Int).And(q, mask64).Uint64()
		if got := frac64(E, m); got != want {
			t.Fatalf("frac64(%d, %d) = %x, big %x", E, m, got, want)
		}
	}
	if montMax*montMax > 1<<62 || bits.Len64(montMax) != 32 {
		t.Fatal("the Montgomery range no longer keeps products below 2^62")
	}
}
