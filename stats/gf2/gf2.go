// Package gf2 holds the linear algebra over GF(2) that borel's word-level
// checks need: the linear complexity of a bit sequence (Berlekamp–Massey)
// and the rank of a binary matrix, on bits packed 64 to a word.
package gf2

import "math/bits"

// Bits is a bit sequence packed 64 to a word: bit i is bit i%64 of word
// i/64.
type Bits struct {
	W []uint64
	N int
}

// NewBits returns an all-zero sequence of n bits.
func NewBits(n int) Bits { return Bits{W: make([]uint64, (n+63)/64), N: n} }

// Set sets bit i to b (0 or 1).
func (s Bits) Set(i int, b uint64) { s.W[i>>6] |= (b & 1) << (i & 63) }

// Bit returns bit i.
func (s Bits) Bit(i int) uint64 { return s.W[i>>6] >> (i & 63) & 1 }

// LinearComplexity returns the length L of the shortest linear feedback
// shift register that generates the sequence s_0 … s_{n−1}: the smallest L
// with s_j = c_1 s_{j−1} ⊕ … ⊕ c_L s_{j−L} for all L ≤ j < n, by the
// algorithm of Massey, "Shift-register synthesis and BCH decoding", IEEE
// Trans. Inform. Theory 15 (1969) 122–127 (Berlekamp's decoding algorithm
// over GF(2)). It runs in O(n²/64): the connection polynomials C and B are
// packed, and the discrepancy d_j = s_j ⊕ Σ c_i s_{j−i} is one AND and a
// popcount per word, over the reversed sequence.
func LinearComplexity(s Bits) int {
	n := s.N
	// rev holds the sequence reversed, so that the window s_j, s_{j−1},
	// …, s_{j−L} is the bits from n−1−j upward: the discrepancy is the
	// parity of C AND (rev >> (n−1−j)).
	rev := NewBits(n + 192) // padding for the window's last word
	for i := 0; i < n; i++ {
		if s.Bit(i) == 1 {
			rev.Set(n-1-i, 1)
		}
	}
	words := (n + 64) / 64
	c := make([]uint64, words) // C(x) = 1 + c_1 x + …: bit i is c_i
	b := make([]uint64, words)
	t := make([]uint64, words)
	c[0], b[0] = 1, 1
	L, m := 0, 1 // m: steps since B was last replaced
	for j := 0; j < n; j++ {
		// d = Σ_{i=0}^{L} c_i s_{j−i}; s_{j−i} is rev bit n−1−j+i.
		off := n - 1 - j
		o := uint(off & 63)
		r := rev.W[off>>6 : off>>6+L>>6+2] // padded: r[w+1] exists
		d := uint64(0)
		for w := range L>>6 + 1 {
			d ^= c[w] & (r[w]>>o | r[w+1]<<(64-o)) // a shift by 64 is 0 in Go
		}
		if bits.OnesCount64(d)&1 == 0 {
			m++
			continue
		}
		if 2*L <= j {
			copy(t, c)
			xorShifted(c, b, m, j+1-L) // the new length bounds deg C
			copy(b, t)
			L, m = j+1-L, 1
		} else {
			xorShifted(c, b, m, L)
			m++
		}
	}
	return L
}

// xorShifted sets c ^= b·x^m for the coefficients up to degree deg (b's
// degree is at most deg−m).
func xorShifted(c, b []uint64, m, deg int) {
	ws, bs := m>>6, uint(m&63)
	last := deg >> 6
	for w := last; w >= ws; w-- {
		src := w - ws
		v := b[src] << bs
		if bs != 0 && src > 0 {
			v |= b[src-1] >> (64 - bs)
		}
		if w < len(c) {
			c[w] ^= v
		}
	}
}

// Rank returns the rank over GF(2) of the matrix whose rows are the given
// words, each holding its cols ≤ 64 entries in its low bits: each row is
// reduced by the basis vectors of its leading bits (Gaussian elimination,
// row by row); a row left nonzero joins the basis. The rows are not
// modified.
func Rank(rows []uint64, cols int) int {
	var basis [64]uint64
	r := 0
	mask := ^uint64(0)
	if cols < 64 {
		mask = 1<<cols - 1
	}
	for _, v := range rows {
		v &= mask
		for v != 0 {
			hb := 63 - bits.LeadingZeros64(v)
			if basis[hb] == 0 {
				basis[hb] = v
				r++
				break
			}
			v ^= basis[hb]
		}
	}
	return r
}
