package expand

import (
	"math/big"
	"sync"

	"github.com/remyoudompheng/bigfft"
)

// mul returns a·b: by the three-prime NTT (ntt.go) when both operands have
// at least nttMinWords words and are not too unbalanced, else by
// remyoudompheng/bigfft (Schönhage–Strassen above about 1800 words, math/big's
// Karatsuba below). The thresholds come from BenchmarkMul on this project's
// 2-core reference machine: the NTT is 1.5–2.8× faster from 2000 words up.
func mul(a, b *big.Int) *big.Int {
	if nttFits(len(a.Bits()), len(b.Bits())) {
		return nttMul(a, b)
	}
	return bigfft.Mul(a, b)
}

const nttMinWords = 1500

// nttFits reports whether a product of operands of na and nb words goes to
// the NTT: on a 64-bit platform (nttWords), both long enough and neither
// more than 8 times the other.
func nttFits(na, nb int) bool {
	return nttWords && min(na, nb) >= nttMinWords && max(na, nb) <= 8*min(na, nb)
}

// directBits is the size below which math/big's own division is used.
const directBits = 1 << 17

// recip returns an approximation x of 2^(n+p)/d, n = bitlen(d) (d > 0),
// good to a few units in its last place, by Newton's iteration with
// precision doubling (Brent & Zimmermann, Modern Computer Arithmetic, §3.4):
// X ≈ 2^(n+h)/d at h = p/2 + 32 bits from d's top bits, then
//
//	E = 2^(n+h) − d·X,   x = X·2^(p−h) + X·E·2^(p−h)/2^(n+h),
//
// which squares the relative error. Only the bits that reach the result are
// multiplied: d's top p+64 bits in d·X, E's top p−h+64 bits in X·E.
func recip(d *big.Int, p uint) *big.Int {
	n := uint(d.BitLen())
	if p+n <= 2*directBits {
		x := new(big.Int).Lsh(one, n+p)
		return x.Quo(x, d)
	}
	h := p/2 + 32
	keep := min(n, h+32)
	X := recip(new(big.Int).Rsh(d, n-keep), h) // ≈ 2^(keep+h)/dt ≈ 2^(n+h)/d
	var s1 uint
	if n > p+64 {
		s1 = n - (p + 64)
	}
	E := new(big.Int).Lsh(one, n+h-s1)
	E.Sub(E, mul(new(big.Int).Rsh(d, s1), X)) // ≈ (2^(n+h) − d·X)/2^s1
	var s2 uint
	if b := uint(E.BitLen()); b > p-h+64 {
		s2 = b - (p - h + 64)
	}
	E.Rsh(E, s2)
	c := mul(X, E) // correction · 2^(n+2h−p−s1−s2)
	if sh := int(n+2*h) - int(p) - int(s1+s2); sh >= 0 {
		c.Rsh(c, uint(sh))
	} else {
		c.Lsh(c, uint(-sh))
	}
	X.Lsh(X, p-h)
	return X.Add(X, c)
}

// quo returns floor(a/b) for a ≥ 0, b > 0: by a Newton reciprocal and two
// multiplications for large operands, corrected exactly by the remainder.
func quo(a, b *big.Int) *big.Int {
	q, _ := quoRem(a, b, nil, 0)
	return q
}

// quoRem returns floor(a/b) and a mod b. inv, when given, is recip(b, p)
// with p at least the quotient's bit length + 32 (a cached reciprocal).
func quoRem(a, b, inv *big.Int, p uint) (*big.Int, *big.Int) {
	n := uint(b.BitLen())
	if n < directBits || a.BitLen() < int(n)+directBits/2 {
		q, r := new(big.Int).QuoRem(a, b, new(big.Int))
		return q, r
	}
	m := uint(a.BitLen()) - n + 1
	if inv == nil || p < m+32 {
		p = m + 32
		inv = recip(b, p)
	}
	// Only a's top m+64 bits reach the quotient; the few units this and
	// the reciprocal are off by are corrected exactly below.
	var q *big.Int
	if sa := uint(a.BitLen()); sa > m+64 {
		s := sa - (m + 64)
		q = mul(new(big.Int).Rsh(a, s), inv)
		q.Rsh(q, n+p-s)
	} else {
		q = mul(a, inv)
		q.Rsh(q, n+p)
	}
	r := new(big.Int).Sub(a, mul(q, b))
	for r.Sign() < 0 {
		q.Sub(q, one)
		r.Add(r, b)
	}
	for r.Cmp(b) >= 0 {
		q.Add(q, one)
		r.Sub(r, b)
	}
	return q, r
}

// pow returns base^e by repeated squaring with FFT multiplication.
func pow(base int64, e int) *big.Int {
	result := big.NewInt(1)
	sq := big.NewInt(base)
	for e > 0 {
		if e&1 == 1 {
			result = mul(result, sq)
		}
		e >>= 1
		if e > 0 {
			sq = mul(sq, sq)
		}
	}
	return result
}

// leafDigits is the digit count below which conversion uses big.Int.Text.
const leafDigits = 4096

// powerCache holds base^(leaf·2^j) and their reciprocals for conversion.
type powerCache struct {
	base  int64
	mu    sync.Mutex
	pows  map[int]*big.Int
	invs  map[int]*big.Int
	prec  map[int]uint
	spec  map[[2]int]*spectrum // spectra of powers: (h, transform length)
	meter *meter               // progress of the conversion, by digits written
}

func newPowerCache(base int) *powerCache {
	return &powerCache{base: int64(base), pows: map[int]*big.Int{}, invs: map[int]*big.Int{},
		prec: map[int]uint{}, spec: map[[2]int]*spectrum{}}
}

// pow returns base^h, cached: from the square of base^(h/2) for even h
// above the leaf size (the conversions use h = leaf·2^j), else directly.
func (c *powerCache) pow(h int) *big.Int {
	c.mu.Lock()
	p, ok := c.pows[h]
	c.mu.Unlock()
	if ok {
		return p
	}
	if h > leafDigits && h%2 == 0 {
		half := c.pow(h / 2)
		p = mul(half, half)
	} else {
		p = new(big.Int).Exp(big.NewInt(c.base), big.NewInt(int64(h)), nil)
	}
	c.mu.Lock()
	if q, ok := c.pows[h]; ok {
		p = q
	} else {
		c.pows[h] = p
	}
	c.mu.Unlock()
	return p
}

// mulPow returns v·base^h. Large balanced products reuse the transform of
// base^h: a conversion or parse multiplies every node of a level by the
// same power, so one of the three transforms per product is saved.
func (c *powerCache) mulPow(v *big.Int, h int) *big.Int {
	p := c.pow(h)
	nv, np := len(v.Bits()), len(p.Bits())
	if !nttFits(nv, np) {
		return mul(v, p)
	}
	n := nttLen(nv + np)
	if 24*n > maxCachedSpectrum {
		return nttMul(v, p)
	}
	key := [2]int{h, n}
	c.mu.Lock()
	s, ok := c.spec[key]
	c.mu.Unlock()
	if !ok {
		s = newSpectrum(p, n)
		c.mu.Lock()
		c.spec[key] = s
		c.mu.Unlock()
	}
	sv := newSpectrum(v, n)
	sv.spent = true
	return sumOfProducts(product{sv, s})
}

// maxCachedSpectrum is the size in bytes (three residues of n words) above
// which mulPow does not keep a power's transform: the largest powers serve
// the top levels of a tree, one or two products each, and their transforms
// held to the end were most of the peak memory (at 10^8 decimals rebased,
// 290 MB of about 1.6 GB).
const maxCachedSpectrum = 64 << 20

// get returns base^h with its reciprocal for quotients of up to h digits.
func (c *powerCache) get(h int) (*big.Int, *big.Int, uint) {
	p := c.pow(h)
	c.mu.Lock()
	inv, ok := c.invs[h]
	prec := c.prec[h]
	c.mu.Unlock()
	if ok {
		return p, inv, prec
	}
	prec = uint(p.BitLen()) + 64
	if p.BitLen() >= directBits {
		inv = recip(p, prec)
	}
	c.mu.Lock()
	c.invs[h], c.prec[h] = inv, prec
	c.mu.Unlock()
	return p, inv, prec
}

// warm computes base^(leaf·2^j) for every leaf·2^j < n in order, so that
// parallel conversions find them instead of squaring twice.
func (c *powerCache) warm(n int) {
	for h := leafDigits; h < n; h *= 2 {
		c.pow(h)
	}
}

// convert writes v (0 ≤ v < base^len(out)) as len(out) base-b digits into
// out: split at h = leaf·2^j digits (the largest below len(out)), divide by
// base^h with a cached reciprocal, convert both halves (the two largest on
// separate goroutines). O(M(n) log n) with FFT multiplication.
func convert(v *big.Int, out []byte, base int, c *powerCache, depth int) {
	n := len(out)
	if n <= 2*leafDigits {
		writeDigits(v, out, base)
		c.meter.add(float64(n))
		return
	}
	h := leafDigits
	for 2*h < n {
		h *= 2
	}
	p, inv, prec := c.get(h)
	q, r := quoRem(v, p, inv, prec)
	if depth < 2 {
		var wg sync.WaitGroup
		wg.Add(1)
		go func() { defer wg.Done(); convert(q, out[:n-h], base, c, depth+1) }()
		convert(r, out[n-h:], base, c, depth+1)
		wg.Wait()
		return
	}
	convert(q, out[:n-h], base, c, depth+1)
	convert(r, out[n-h:], base, c, depth+1)
}
