package expand

import (
	"math"
	"math/big"
	"sync"
)

// Conversion of a binary fraction to base-b digits by a scaled remainder
// tree (Bernstein, "Scaled remainder trees", 2004; Brent & Zimmermann,
// Modern Computer Arithmetic, §1.7): the digits of x = F/2^Q split as
//
//	first h digits  = the digits of x itself, to h digits,
//	the rest        = the digits of frac(x·b^h),
//
// so each level costs one multiplication by a cached power b^h, and no
// division or reciprocal. Each part is carried with only the bits its digits
// need plus fracGuard guard bits. Truncation can change a digit only when the
// exact value lies within 2^-fracGuard of a digit boundary; every such place
// is tested (exactly at the split, by an upper bound on the leftover
// fraction below it), and fracDigits reports failure instead of guessing, so
// the caller can take the exact integer path. The result is exactly the
// digits of floor(F·b^n/2^Q).

// fracGuard is the guard bits each part keeps.
const fracGuard = 64

// fracBits is the precision n base-b digits take with the guard bits.
func fracBits(n, base int) uint {
	return uint(math.Ceil(float64(n)*math.Log2(float64(base)))) + fracGuard + 2
}

// fracDigits writes the n = len(out) digits of floor(F·b^n/2^Q) into out,
// for 0 ≤ F < 2^Q and Q ≥ fracBits(n, base). It returns an upper bound,
// in units of 2^-64 and saturating at 2^64 − 1, on the leftover
// frac(F·b^n/2^Q), and ok = false if a guard-bit test failed (out is then
// unusable).
func fracDigits(F *big.Int, Q uint, out []byte, base int, c *powerCache, depth int) (leftover uint64, ok bool) {
	_, hi, ok := fracDigitsBounds(F, Q, out, base, c)
	return hi, ok
}

// fracDigitsBounds is fracDigits returning a lower bound on the leftover as
// well: the rightmost leaf's exact leftover (rounded down), which the
// truncations above it can only have lowered.
func fracDigitsBounds(F *big.Int, Q uint, out []byte, base int, c *powerCache) (lo, hi uint64, ok bool) {
	lo = math.MaxUint64
	hi, ok = fracTree(F, Q, out, base, c, 0, &lo)
	return lo, hi, ok
}

// fracTree is the recursion; the rightmost leaf stores its leftover in *last.
func fracTree(F *big.Int, Q uint, out []byte, base int, c *powerCache, depth int, last *uint64) (leftover uint64, ok bool) {
	n := len(out)
	if n <= 2*leafDigits {
		y := new(big.Int).Mul(F, c.pow(n))
		rem := new(big.Int).Sub(y, new(big.Int).Lsh(new(big.Int).Rsh(y, Q), Q))
		y.Rsh(y, Q)
		writeDigits(y, out, base)
		c.meter.add(float64(n))
		top := fracTop(rem, Q)
		if last != nil {
			*last = max(top, 1) - 1
		}
		return top, true
	}
	h := leafDigits
	for 2*h < n {
		h *= 2
	}
	y := c.mulPow(F, h)
	R := new(big.Int).Rsh(y, Q)
	R.Lsh(R, Q)
	R.Sub(y, R) // frac(x·b^h)·2^Q, exact
	// The first part from F truncated to Q1 bits is below the exact one by
	// less than b^h·2^-Q1 ≤ 2^-(fracGuard+2) of a unit in its last digit;
	// its digits are exact as long as frac(x·b^h) ≥ 2^-fracGuard.
	if R.BitLen() <= int(Q)-fracGuard {
		return 0, false
	}
	Q1, Q2 := fracBits(h, base), fracBits(n-h, base)
	F1 := new(big.Int).Rsh(F, Q-Q1)
	R2 := R.Rsh(R, Q-Q2)
	var ok1, ok2 bool
	var left uint64
	if depth < 2 {
		var wg sync.WaitGroup
		wg.Add(1)
		go func() { defer wg.Done(); _, ok1 = fracTree(F1, Q1, out[:h], base, c, depth+1, nil) }()
		left, ok2 = fracTree(R2, Q2, out[h:], base, c, depth+1, last)
		wg.Wait()
	} else {
		_, ok1 = fracTree(F1, Q1, out[:h], base, c, depth+1, nil)
		left, ok2 = fracTree(R2, Q2, out[h:], base, c, depth+1, last)
	}
	// R2 is below the exact remainder by less than 2^-(fracGuard+2) in
	// units of the second part's last digit: its digits are exact unless
	// its own leftover is within that of 1.
	if !ok1 || !ok2 || left >= math.MaxUint64-1 {
		return 0, false
	}
	return left + 1, true
}

// fracTop returns an upper bound on rem/2^Q in units of 2^-64, saturating.
func fracTop(rem *big.Int, Q uint) uint64 {
	if Q <= 64 {
		v := new(big.Int).Lsh(rem, 64-Q)
		if !v.IsUint64() {
			return math.MaxUint64
		}
		return v.Uint64()
	}
	v := new(big.Int).Rsh(rem, Q-64)
	if !v.IsUint64() || v.Uint64() == math.MaxUint64 {
		return math.MaxUint64
	}
	return v.Uint64() + 1
}

// writeDigits writes v (0 ≤ v < base^len(out)) as len(out) digits.
func writeDigits(v *big.Int, out []byte, base int) {
	s := v.Text(base)
	off := len(out) - len(s)
	for i := 0; i < off; i++ {
		out[i] = 0
	}
	for i := 0; i < len(s); i++ {
		ch := s[i]
		if ch <= '9' {
			out[off+i] = ch - '0'
		} else {
			out[off+i] = ch - 'a' + 10
		}
	}
}
