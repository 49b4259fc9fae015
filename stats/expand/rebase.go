package expand

import (
	"math"
	"math/big"
	"sync"
)

// parseDigits returns the integer whose base-b digits (values, most
// significant first) are d, by divide and conquer: value(hi‖lo) =
// value(hi)·b^len(lo) + value(lo), splitting so that len(lo) = 32·2^k (the
// largest below len(d)), so every power comes from one cache of squarings;
// FFT/NTT multiplication, the two top levels on their own goroutines. This
// avoids the quadratic digit-by-digit loop of big.Int.SetString.
func parseDigits(d []byte, base int) *big.Int {
	cache := newPowerCache(base)
	for h := parseLeaf; h < len(d); h *= 2 {
		cache.pow(h)
	}
	return parseRec(d, base, cache, 0)
}

// parseLeaf is the digit count of the smallest split.
const parseLeaf = 32

func parseRec(d []byte, base int, cache *powerCache, depth int) *big.Int {
	if len(d) <= 2*parseLeaf {
		return parseSmall(d, base)
	}
	h := parseLeaf
	for 2*h < len(d) {
		h *= 2
	}
	var hi, lo *big.Int
	if depth < 2 {
		var wg sync.WaitGroup
		wg.Add(1)
		go func() { defer wg.Done(); hi = parseRec(d[:len(d)-h], base, cache, depth+1) }()
		lo = parseRec(d[len(d)-h:], base, cache, depth+1)
		wg.Wait()
	} else {
		hi = parseRec(d[:len(d)-h], base, cache, depth+1)
		lo = parseRec(d[len(d)-h:], base, cache, depth+1)
	}
	hi = cache.mulPow(hi, h)
	return hi.Add(hi, lo)
}

// parseSmall reads up to a few dozen digits, a machine word at a time
// (8 digits; 7 for bases above 150, since 256^8 overflows).
func parseSmall(d []byte, base int) *big.Int {
	step := 8
	if base > 150 {
		step = 7
	}
	v := new(big.Int)
	chunk, scale := new(big.Int), new(big.Int)
	for i := 0; i < len(d); i += step {
		end := min(len(d), i+step)
		var w, s uint64 = 0, 1
		for _, x := range d[i:end] {
			w = w*uint64(base) + uint64(x)
			s *= uint64(base)
		}
		v.Mul(v, scale.SetUint64(s))
		v.Add(v, chunk.SetUint64(w))
	}
	return v
}

// Rebase returns the base-to digits that every number in the interval a
// base-from digit string determines: the n digits d stand for every x in
// [M, M+1]·from^-n, M = value(d), and the result is the longest common
// prefix of the base-to expansions of the two ends. (Where an end's
// expansion is ambiguous — x = k·to^-j — the prefix stops before it.)
//
// The usual path converts only the lower end, by the scaled remainder tree
// (fraction.go), and finds where the upper end's expansion departs from it
// from the digits themselves (rebasePrefix); any case its guard tests cannot
// decide takes the exact path, which converts both ends as integers.
func Rebase(d []byte, from, to int) []byte {
	n := len(d)
	if n == 0 {
		return []byte{}
	}
	M := parseDigits(d, from)
	j := int(math.Floor(float64(n)*math.Log(float64(from))/math.Log(float64(to)))) + 2
	if to&(to-1) != 0 && j > 2*leafDigits {
		if out, ok := rebaseFast(M, n, from, to, j); ok {
			return out
		}
	}
	return rebaseExact(M, n, from, to, j)
}

// rebaseExact: floor(M·to^j/from^n) and floor((M+1)·to^j/from^n) (the upper
// end excluded), both written with j digits and compared.
func rebaseExact(M *big.Int, n, from, to, j int) []byte {
	den := pow(int64(from), n)
	scale := pow(int64(to), j)
	inv := recip(den, uint(scale.BitLen())+64)
	lo, _ := quoRem(mul(M, scale), den, inv, uint(scale.BitLen())+64)
	hi, _ := quoRem(mul(new(big.Int).Add(M, big.NewInt(1)), scale), den, inv, uint(scale.BitLen())+64)
	if hi.Cmp(scale) >= 0 {
		// The upper end is 1 (every input digit the largest): the numbers
		// of the interval just below it read 0.(b−1)(b−1)… in any base.
		hi.Sub(scale, one)
	}
	// Both are below to^j; write them with j digits and compare.
	a, b := toDigits(lo, j, to, nil), toDigits(hi, j, to, nil)
	c := 0
	for c < j && a[c] == b[c] {
		c++
	}
	return a[:c]
}

// rebaseFast converts x = M/from^n through F = floor(x·2^Q) with the
// scaled remainder tree: the j digits D of F/2^Q are those of x when the
// leftover bound leaves room for F's truncation (less than 2^-Q·to^j, below
// one unit of 2^-64). The upper end x + from^-n shares the first c digits
// exactly when frac(x·to^c) + from^-n·to^c < 1; rebasePrefix decides that
// from the digits with a margin, or gives up.
func rebaseFast(M *big.Int, n, from, to, j int) ([]byte, bool) {
	Q := fracBits(j, to) + 8
	// from^n = 2^(s·n)·u^n with u odd: dividing by u^n alone is the same
	// floor with a shorter divisor (5^n instead of 10^n).
	s, u := 0, from
	for u%2 == 0 {
		s, u = s+1, u/2
	}
	if uint(s*n) > Q {
		return nil, false
	}
	F := quo(new(big.Int).Lsh(M, Q-uint(s*n)), pow(int64(u), n))
	D := make([]byte, j)
	c := newPowerCache(to)
	c.warm(j)
	lo, hi, ok := fracDigitsBounds(F, Q, D, to, c)
	if !ok || hi >= math.MaxUint64-1 {
		return nil, false
	}
	// r = log_to(from^-n · to^j) = j − n·log_to(from), in [1, 2]; float64
	// carries it to about 1e-8 here, covered by the margin below.
	r := float64(j) - float64(n)*math.Log(float64(from))/math.Log(float64(to))
	cLo, okLo := rebasePrefix(D, to, r, 1-float64(hi+1)/0x1p64)
	cHi, okHi := rebasePrefix(D, to, r, 1-float64(lo)/0x1p64)
	if !okLo || !okHi || cLo != cHi {
		return nil, false
	}
	return D[:cLo], true
}

// rebasePrefix returns the largest c ≤ j−2 with frac(x·b^c) + b^(c−j+r) < 1,
// where frac(x·b^c) = 0.d_{c+1}…d_j followed by a leftover whose complement
// is gEnd = 1 − leftover. It works with L_c = log_b(1 − frac(x·b^c)) from the
// right: 1 − frac(x·b^c) = (b − 1 − d_{c+1} + (1 − frac(x·b^(c+1))))/b. A
// comparison within the margin reports false (the caller goes exact).
func rebasePrefix(D []byte, base int, r, gEnd float64) (int, bool) {
	const margin = 1e-6
	if gEnd <= 0 {
		return 0, false
	}
	b := float64(base)
	lb := math.Log(b)
	L := math.Log(gEnd) / lb // log_b of 1 − frac(x·b^j)
	j := len(D)
	for c := j - 1; c >= 0; c-- {
		k := float64(base - 1 - int(D[c]))
		if k == 0 {
			L-- // 1 − frac = (1 − frac')/b
		} else {
			L = math.Log(k+math.Pow(b, L))/lb - 1
		}
		if c > j-2 {
			continue
		}
		need := float64(c-j) + r // log_b(b^(c−j)·from^-n·to^j)
		if math.Abs(L-need) < margin {
			return 0, false
		}
		if L > need {
			return c, true
		}
	}
	return 0, true
}
