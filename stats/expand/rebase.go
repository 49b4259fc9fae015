package expand

import (
	"math"
	"math/big"
)

// parseDigits returns the integer whose base-b digits (values, most
// significant first) are d, by divide and conquer: value(hi‖lo) =
// value(hi)·b^len(lo) + value(lo), splitting so that len(lo) = leaf·2^j and
// the powers come from one cache of squarings, with FFT multiplication.
// This avoids the quadratic digit-by-digit loop of big.Int.SetString.
func parseDigits(d []byte, base int) *big.Int {
	cache := newPowerCache(base)
	var rec func(d []byte) *big.Int
	rec = func(d []byte) *big.Int {
		if len(d) <= 256 {
			v := new(big.Int)
			b := big.NewInt(int64(base))
			chunk := new(big.Int)
			// 8 digits at a time in a machine word (base ≤ 256: 256^8 = 2^64 would
			// overflow int64, so take 7 digits for the largest bases).
			step := 8
			if base > 150 {
				step = 7
			}
			for i := 0; i < len(d); i += step {
				end := min(len(d), i+step)
				var w uint64
				for _, x := range d[i:end] {
					w = w*uint64(base) + uint64(x)
				}
				v.Mul(v, new(big.Int).Exp(b, big.NewInt(int64(end-i)), nil))
				v.Add(v, chunk.SetUint64(w))
			}
			return v
		}
		h := leafDigits
		for 2*h < len(d) {
			h *= 2
		}
		if h >= len(d) {
			h = len(d) / 2
		}
		m := len(d) - h
		hi, lo := rec(d[:m]), rec(d[m:])
		var p *big.Int
		if h%leafDigits == 0 && h >= leafDigits {
			p, _, _ = cache.get(h)
		} else {
			p = new(big.Int).Exp(big.NewInt(int64(base)), big.NewInt(int64(h)), nil)
		}
		hi = mul(hi, p)
		return hi.Add(hi, lo)
	}
	return rec(d)
}

// Rebase returns the base-to digits that every number in the interval a
// base-from digit string determines: the n digits d stand for every x in
// [M, M+1]·from^-n, M = value(d), and the result is the longest common
// prefix of the base-to expansions of the two ends. (Where an end's
// expansion is ambiguous — x = k·to^-j — the prefix stops before it.)
func Rebase(d []byte, from, to int) []byte {
	n := len(d)
	if n == 0 {
		return []byte{}
	}
	M := parseDigits(d, from)
	j := int(math.Floor(float64(n)*math.Log(float64(from))/math.Log(float64(to)))) + 2
	den := pow(int64(from), n)
	scale := pow(int64(to), j)
	inv := recip(den, uint(scale.BitLen())+64)
	lo, _ := quoRem(mul(M, scale), den, inv, uint(scale.BitLen())+64)
	hi, _ := quoRem(mul(new(big.Int).Add(M, big.NewInt(1)), scale), den, inv, uint(scale.BitLen())+64)
	// Both are below to^j; write them with j digits and compare.
	a, b := toDigits(lo, j, to), toDigits(hi, j, to)
	c := 0
	for c < j && a[c] == b[c] {
		c++
	}
	return a[:c]
}
