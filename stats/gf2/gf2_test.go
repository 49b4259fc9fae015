package gf2

import (
	"math/rand/v2"
	"testing"
)

// naiveLC is the Berlekamp–Massey algorithm as Massey (1969) states it,
// one bit per byte, for comparison.
func naiveLC(s []byte) int {
	n := len(s)
	c, b := make([]byte, n+1), make([]byte, n+1)
	c[0], b[0] = 1, 1
	L, m := 0, 1
	for j := 0; j < n; j++ {
		d := s[j]
		for i := 1; i <= L; i++ {
			d ^= c[i] & s[j-i]
		}
		if d == 0 {
			m++
			continue
		}
		t := append([]byte(nil), c...)
		for i := 0; i+m <= n; i++ {
			c[i+m] ^= b[i]
		}
		if 2*L <= j {
			L, b, m = j+1-L, t, 1
		} else {
			m++
		}
	}
	return L
}

func pack(s []byte) Bits {
	b := NewBits(len(s))
	for i, v := range s {
		b.Set(i, uint64(v))
	}
	return b
}

// Every sequence of n ≤ 12 bits: the packed algorithm agrees with the
// plain one, and the number of sequences of linear complexity L is
// 2^min(2n−2L, 2L−1) (L ≥ 1; one for L = 0) — Gustavson, IBM J. Res. Dev.
// 20 (1976) 204–212; Rueppel, Analysis and Design of Stream Ciphers
// (Springer 1986), ch. 4.
func TestLinearComplexityExhaustive(t *testing.T) {
	for n := 1; n <= 12; n++ {
		count := make([]int, n+1)
		for v := 0; v < 1<<n; v++ {
			s := make([]byte, n)
			for i := range s {
				s[i] = byte(v >> i & 1)
			}
			got, want := LinearComplexity(pack(s)), naiveLC(s)
			if got != want {
				t.Fatalf("n %d, sequence %0*b: packed %d, plain %d", n, n, v, got, want)
			}
			count[got]++
		}
		for L, c := range count {
			want := 1
			if L > 0 {
				want = 1 << min(2*n-2*L, 2*L-1)
			}
			if c != want {
				t.Errorf("n %d: %d sequences of complexity %d, Gustavson's count %d", n, c, L, want)
			}
		}
	}
}

// Long sequences, across word boundaries: random bits agree with the plain
// algorithm; an LFSR of the trinomial x^55 + x^24 + 1 (the lowest bit of
// the additive lagged Fibonacci generator) has complexity 55, and one of
// degree 607 complexity 607, whatever their length.
func TestLinearComplexityLong(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{63, 64, 65, 127, 128, 129, 1000, 3001} {
		s := make([]byte, n)
		for i := range s {
			s[i] = byte(rng.IntN(2))
		}
		if got, want := LinearComplexity(pack(s)), naiveLC(s); got != want {
			t.Errorf("n %d: packed %d, plain %d", n, got, want)
		}
	}
	for _, c := range []struct{ deg, tap, n int }{{55, 24, 5000}, {607, 273, 4000}} {
		s := make([]byte, c.n)
		for i := 0; i < c.deg; i++ {
			s[i] = byte(rng.IntN(2))
		}
		s[0] = 1
		for i := c.deg; i < c.n; i++ {
			s[i] = s[i-c.deg] ^ s[i-c.tap]
		}
		if got := LinearComplexity(pack(s)); got != c.deg {
			t.Errorf("trinomial of degree %d: complexity %d", c.deg, got)
		}
	}
}

// Rank: every 3×3 and 2×4 binary matrix, counted by rank, against the
// number of m×n matrices of rank r over GF(2), ∏_{i<r} (2^m − 2^i)(2^n −
// 2^i)/(2^r − 2^i) (Landsberg 1893; the law Kovalenko and Marsaglia–Tsay
// use).
func TestRankExhaustive(t *testing.T) {
	for _, d := range []struct{ m, n int }{{3, 3}, {2, 4}, {4, 2}} {
		count := make([]int, min(d.m, d.n)+1)
		for v := 0; v < 1<<(d.m*d.n); v++ {
			rows := make([]uint64, d.m)
			for i := range rows {
				rows[i] = uint64(v >> (i * d.n) & (1<<d.n - 1))
			}
			count[Rank(rows, d.n)]++
		}
		for r, c := range count {
			num, den := 1, 1
			for i := 0; i < r; i++ {
				num *= ((1 << d.m) - (1 << i)) * ((1 << d.n) - (1 << i))
				den *= (1 << r) - (1 << i)
			}
			want := num / den
			if c != want {
				t.Errorf("%d×%d: %d matrices of rank %d, want %d", d.m, d.n, c, r, want)
			}
		}
	}
	id := []uint64{1, 2, 4, 8, 16, 32, 64, 1 << 63}
	if r := Rank(id, 64); r != 8 {
		t.Errorf("8 unit rows: rank %d", r)
	}
}

// BenchmarkLinearComplexity100k is one segment of the lincomp check.
func BenchmarkLinearComplexity100k(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	s := NewBits(100000)
	for i := range s.W {
		s.W[i] = rng.Uint64()
	}
	s.W[len(s.W)-1] &= 1<<(100000%64) - 1
	for b.Loop() {
		LinearComplexity(s)
	}
}

// BenchmarkRank32 is one 32×32 matrix of the rank check.
func BenchmarkRank32(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	rows := make([]uint64, 32)
	for i := range rows {
		rows[i] = rng.Uint64() >> 32
	}
	for b.Loop() {
		Rank(rows, 32)
	}
}
