package expand

import "math/big"

var mask64 = new(big.Int).SetUint64(1<<64 - 1)

// Digit extraction: binary digits of π and ln 2 far out, without the
// digits before them (Bailey, Borwein & Plouffe, "On the rapid computation
// of various polylogarithmic constants", Math. Comp. 66 (1997) 903–913).
// Both sums have the shape Σ_k frac(2^E_k / m_k) with E_k falling as k
// grows: each term is one modular power, and a 64-bit binary fraction of
// the sum gives the digits at the chosen position to within the sum of the
// truncation errors (one unit of 2^-64 a term). They are the independent
// checks of the series computations in constants.go.

// The fast path: Montgomery arithmetic (R = 2^32) for odd moduli in
// [montMin, montMax), four moduli in lock step so that their squarings
// overlap in the pipeline. With m < 2^31 every product plus the reduction
// term stays below 2^64.
const (
	montMin = 1 << 16
	montMax = 1 << 31
)

// montInv returns m^-1 mod 2^64 for odd m (Newton: each step doubles the
// correct low bits, from the 3 that m·m ≡ 1 mod 8 gives).
func montInv(m uint64) uint64 {
	inv := m
	for range 5 {
		inv *= 2 - m*inv
	}
	return inv
}

// redc returns t·2^-32 mod m for t < m·2^32, m odd < 2^31, neg = −m^-1 mod 2^32.
func redc(t, m, neg uint64) uint64 {
	u := uint64(uint32(t) * uint32(neg))
	r := (t + u*m) >> 32
	if r >= m {
		r -= m
	}
	return r
}

// pow2Init returns 2^e mod m for e < 64 and m in [montMin, montMax), by a
// floating-point quotient corrected once: 2^e/m < 2^48, so the product's
// rounding moves the quotient by less than one.
func pow2Init(e uint64, m uint64) uint64 {
	n := uint64(1) << e
	q := uint64(float64(n) / float64(m))
	r := int64(n - q*m)
	if r < 0 {
		r += int64(m)
	} else if r >= int64(m) {
		r -= int64(m)
	}
	return uint64(r)
}

// piExtract returns F = floor(2^64·frac(16^d·π)) up to an error of at most
// errUnits units of 2^-64 either way (circularly, mod 2^64): hexadecimal
// digits d+1, d+2, … of π, in one word, by Bellard's formula of the
// Bailey–Borwein–Plouffe family (piWide in far.go has the terms and the
// bound; the tests check it against the BBP sum itself).
func piExtract(d uint64) (F, errUnits uint64) {
	w, e := piWide(4*d, 1, nil)
	return w[0], e
}

// ln2Extract returns F = floor(2^64·frac(2^d·ln 2)) up to errUnits units of
// 2^-64 either way: binary digits d+1, d+2, … of ln 2 from
//
//	ln 2 = Σ_{k≥1} 1/(k·2^k)   (the series of −ln(1 − 1/2)),
//
// in one word (ln2Wide in far.go).
func ln2Extract(d uint64) (F, errUnits uint64) {
	w, e := ln2Wide(d, 1, nil)
	return w[0], e
}
