package expand

import (
	"math/big"
	"math/rand/v2"
	"testing"
)

// TestNTTMul checks the three-prime NTT product against math/big's own
// multiplication (schoolbook/Karatsuba, an independent implementation) on
// random operands, all-ones operands (the largest coefficients, which test
// the CRT bound) and squares.
func TestNTTMul(t *testing.T) {
	if !nttWords {
		t.Skip("the transforms need 64-bit words; products go to bigfft here")
	}
	rng := rand.New(rand.NewPCG(1, 2))
	random := func(words int) *big.Int { return randomInt(rng, words) }
	ones := func(words int) *big.Int {
		v := new(big.Int).Lsh(one, uint(64*words))
		return v.Sub(v, one)
	}
	sizes := [][2]int{{1, 1}, {1, 7}, {3, 5}, {64, 64}, {100, 3000}, {2048, 2048}, {4097, 4095}, {5000, 17}, {20000, 30000}, {1 << 15, 1 << 15},
		{700, 800}, {12000, 12000}, {3 << 12, 3 << 12}, {100000, 90000}, // the last four at lengths 3·2^k
		{300000, 300000}} // quarters of 2^16 words: transformed concurrently
	for _, s := range sizes {
		for _, gen := range []func(int) *big.Int{random, ones} {
			a, b := gen(s[0]), gen(s[1])
			if s[0] > 1 && rng.IntN(2) == 0 {
				a.Neg(a)
			}
			want := new(big.Int).Mul(a, b)
			if got := nttMul(a, b); got.Cmp(want) != 0 {
				t.Fatalf("%d×%d words: product differs from math/big", s[0], s[1])
			}
			if got := nttMul(a, a); got.Cmp(new(big.Int).Mul(a, a)) != 0 {
				t.Fatalf("%d words: square differs from math/big", s[0])
			}
		}
	}
}

// TestSumOfProducts checks signed sums of products formed in the transform
// domain (as binary splitting uses them) against math/big.
func TestSumOfProducts(t *testing.T) {
	if !nttWords {
		t.Skip("the transforms need 64-bit words; products go to bigfft here")
	}
	rng := rand.New(rand.NewPCG(3, 4))
	random := func(words int) *big.Int {
		v := randomInt(rng, words)
		if rng.IntN(2) == 0 {
			v.Neg(v)
		}
		return v
	}
	for trial := range 40 {
		w := 1 + rng.IntN(3000)
		a, b, c, d := random(w), random(w/2+1), random(w), random(1+rng.IntN(w))
		if trial%5 == 0 {
			c.Neg(a) // cancellation: a·b − a·b' with b' near b
			d.Add(b, big.NewInt(1))
		}
		n := nttLen(max(len(a.Bits())+len(b.Bits()), len(c.Bits())+len(d.Bits())))
		s := spectra(n, a, b, c, d)
		want := new(big.Int).Mul(a, b)
		want.Add(want, new(big.Int).Mul(c, d))
		if got := sumOfProducts(product{s[0], s[1]}, product{s[2], s[3]}); got.Cmp(want) != 0 {
			t.Fatalf("trial %d (%d words): a·b + c·d differs from math/big", trial, w)
		}
	}
}

// randomInt returns a natural number of the given count of random words.
func randomInt(rng *rand.Rand, words int) *big.Int {
	w := make([]big.Word, words)
	for i := range w {
		w[i] = big.Word(rng.Uint64())
	}
	return new(big.Int).SetBits(w)
}
