package expand

import (
	"math/big"
	"math/bits"
	"runtime"
	"sync"
)

// Digit extraction: binary digits of π and ln 2 far out, without the
// digits before them (Bailey, Borwein & Plouffe, "On the rapid computation
// of various polylogarithmic constants", Math. Comp. 66 (1997) 903–913).
// Both sums have the shape Σ_k frac(2^E_k / m_k) with E_k falling as k
// grows: each term is one modular power, and a 64-bit binary fraction of
// the sum gives the digits at the chosen position to within the sum of the
// truncation errors (one unit of 2^-64 a term). They are the independent
// checks of the series computations in constants.go.

// frac64 returns floor(2^64·frac(2^E/m)) for m ≥ 1: the fractional part of
// 2^E/m as a truncated 64-bit binary fraction (exact), by a modular power
// with 128-bit products.
func frac64(E, m uint64) uint64 {
	if m == 1 {
		return 0
	}
	r := powMod(2%m, E, m)
	q, _ := bits.Div64(r, 0, m)
	return q
}

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

// frac64x4 returns frac64(E_i, m_i) for four odd moduli in [montMin,
// montMax). With L = E + 64, floor(2^64·frac(2^E/m)) = floor(2^L/m) mod 2^64
// = (2^L − (2^L mod m))/m mod 2^64, an exact division: −(2^L mod m)·m^-1
// mod 2^64. So only 2^L mod m is needed, by left-to-right binary powering
// in Montgomery form (a squaring per bit, a doubling per set bit: no
// multiplication by the base).
func frac64x4(E0, E1, E2, E3, m0, m1, m2, m3 uint64) (f0, f1, f2, f3 uint64) {
	L0, L1, L2, L3 := E0+64, E1+64, E2+64, E3+64
	nb := bits.Len64(L0 | L1 | L2 | L3)
	s := uint(nb - 5) // the top bits (below 2^5) start the powering
	i0, i1, i2, i3 := montInv(m0), montInv(m1), montInv(m2), montInv(m3)
	n0, n1, n2, n3 := -i0&0xffffffff, -i1&0xffffffff, -i2&0xffffffff, -i3&0xffffffff
	// Montgomery form of 2^top is 2^(top+32) mod m.
	x0 := pow2Init(L0>>s+32, m0)
	x1 := pow2Init(L1>>s+32, m1)
	x2 := pow2Init(L2>>s+32, m2)
	x3 := pow2Init(L3>>s+32, m3)
	for i := int(s) - 1; i >= 0; i-- {
		x0 = redc(x0*x0, m0, n0)
		x1 = redc(x1*x1, m1, n1)
		x2 = redc(x2*x2, m2, n2)
		x3 = redc(x3*x3, m3, n3)
		x0 <<= L0 >> uint(i) & 1
		x1 <<= L1 >> uint(i) & 1
		x2 <<= L2 >> uint(i) & 1
		x3 <<= L3 >> uint(i) & 1
		if x0 >= m0 {
			x0 -= m0
		}
		if x1 >= m1 {
			x1 -= m1
		}
		if x2 >= m2 {
			x2 -= m2
		}
		if x3 >= m3 {
			x3 -= m3
		}
	}
	// Out of Montgomery form, then the exact division.
	f0 = -redc(x0, m0, n0) * i0
	f1 = -redc(x1, m1, n1) * i1
	f2 = -redc(x2, m2, n2) * i2
	f3 = -redc(x3, m3, n3) * i3
	return
}

// fracTail returns floor(c·2^(64+s)/m) mod 2^64, exactly (in big
// integers): a term at or past the extraction position (s ≤ 0), or just
// before it (s > 0), whose integer part drops out mod 1.
func fracTail(c int64, s int, m uint64) uint64 {
	if 64+s < 0 {
		return 0
	}
	num := new(big.Int).Lsh(big.NewInt(c), uint(64+s))
	num.Quo(num, new(big.Int).SetUint64(m))
	return num.And(num, mask64).Uint64()
}

var mask64 = new(big.Int).SetUint64(1<<64 - 1)

// parallelSum splits [lo, hi) into pieces for the available cores and adds
// (mod 2^64) what f returns for each piece.
func parallelSum(lo, hi uint64, f func(lo, hi uint64) uint64) uint64 {
	workers := uint64(runtime.GOMAXPROCS(0))
	if hi-lo < 1<<16 || workers < 2 {
		return f(lo, hi)
	}
	// More pieces than workers, so that a slow core does not hold the rest.
	pieces := 8 * workers
	step := (hi - lo + pieces - 1) / pieces
	sums := make([]uint64, pieces)
	var wg sync.WaitGroup
	next := make(chan uint64, pieces)
	for p := range pieces {
		next <- uint64(p)
	}
	close(next)
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for p := range next {
				a := lo + p*step
				b := min(a+step, hi)
				if a < b {
					sums[p] = f(a, b)
				}
			}
		}()
	}
	wg.Wait()
	var s uint64
	for _, v := range sums {
		s += v
	}
	return s
}

// piExtract returns F = floor(2^64·frac(16^d·π)) up to an error of at most
// errUnits units of 2^-64 either way (circularly, mod 2^64): hexadecimal
// digits d+1, d+2, … of π by the Bailey–Borwein–Plouffe formula
//
//	π = Σ_{k≥0} 16^-k (4/(8k+1) − 2/(8k+4) − 1/(8k+5) − 1/(8k+6)).
//
// For k < d (e = d−k ≥ 1) the even denominators are reduced to odd ones:
// 2·16^e/(8k+4) = 2^(4e−1)/(2k+1) and 16^e/(8k+6) = 2^(4e−1)/(4k+3), so a
// term is frac(2^(4e+2)/(8k+1)) − frac(2^(4e−1)/(2k+1)) − frac(2^(4e)/(8k+5))
// − frac(2^(4e−1)/(4k+3)). The terms from k = d on are formed exactly in big
// integers up to k = d+16; the rest are below 2^-64 together. Each term is
// truncated once, and the truncations are centred (see the end): errUnits
// = 2(d+17) + 1.
func piExtract(d uint64) (F, errUnits uint64) {
	head := func(lo, hi uint64) uint64 {
		var s uint64
		for k := lo; k < hi; k++ {
			e := d - k
			if 2*k+1 >= montMin && 8*k+5 < montMax {
				// Lanes: (4e+2, 8k+1, +), (4e−1, 2k+1, −), (4e, 8k+5, −), (4e−1, 4k+3, −).
				f0, f1, f2, f3 := frac64x4(4*e+2, 4*e-1, 4*e, 4*e-1, 8*k+1, 2*k+1, 8*k+5, 4*k+3)
				s += f0 - f1 - f2 - f3
				continue
			}
			s += frac64(4*e+2, 8*k+1) - frac64(4*e-1, 2*k+1) - frac64(4*e, 8*k+5) - frac64(4*e-1, 4*k+3)
		}
		return s
	}
	F = parallelSum(0, d, head)
	for k := d; k <= d+16; k++ {
		sh := -4 * int(k-d)
		F += fracTail(4, sh, 8*k+1) - fracTail(2, sh, 8*k+4) - fracTail(1, sh, 8*k+5) - fracTail(1, sh, 8*k+6)
	}
	// A k's true sum exceeds its four floors' f0 − f1 − f2 − f3 by
	// ε0 − ε1 − ε2 − ε3 ∈ (−3, 1): centred by one unit a k, the error is
	// below 2 units a k. The rest from k = d+17 on is positive and below one.
	return F - (d + 17), 2*(d+17) + 1
}

// ln2Extract returns F = floor(2^64·frac(2^d·ln 2)) up to errUnits units of
// 2^-64 either way: binary digits d+1, d+2, … of ln 2 from
//
//	ln 2 = Σ_{k≥1} 1/(k·2^k)   (the series of −ln(1 − 1/2)),
//
// so that frac(2^d ln 2) = Σ_k frac(2^(d−k)/k). With k = 2^v·m (m odd) and
// k ≤ d−70 the term is frac(2^(d−k−v)/m) (zero when m = 1); the terms from
// k = d−69 to d+70 are formed exactly in big integers, and the rest add
// less than 2^-70. Each term is truncated once; the truncations are
// centred: errUnits = (d+71)/2 + 1.
func ln2Extract(d uint64) (F, errUnits uint64) {
	var split uint64 = 1
	if d > 70 {
		split = d - 69
	}
	head := func(lo, hi uint64) uint64 {
		var s uint64
		k := lo
		term := func(k uint64) (E, m uint64) {
			v := uint64(bits.TrailingZeros64(k))
			return d - k - v, k >> v
		}
		for ; k+4 <= hi; k += 4 {
			E0, m0 := term(k)
			E1, m1 := term(k + 1)
			E2, m2 := term(k + 2)
			E3, m3 := term(k + 3)
			if min(m0, m1, m2, m3) >= montMin && max(m0, m1, m2, m3) < montMax {
				f0, f1, f2, f3 := frac64x4(E0, E1, E2, E3, m0, m1, m2, m3)
				s += f0 + f1 + f2 + f3
				continue
			}
			s += frac64(E0, m0) + frac64(E1, m1) + frac64(E2, m2) + frac64(E3, m3)
		}
		for ; k < hi; k++ {
			E, m := term(k)
			s += frac64(E, m)
		}
		return s
	}
	F = parallelSum(1, split, head)
	for k := split; k <= d+70; k++ {
		F += fracTail(1, int(d)-int(k), k)
	}
	// Each of the d+70 floors is below its term by [0, 1): centred by half
	// a unit each, the error is at most (d+71)/2 units, plus the rest.
	return F + (d+70)/2, (d+71)/2 + 1
}
