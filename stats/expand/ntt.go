package expand

import (
	"math/big"
	"math/bits"
	"sync"
)

// Multiplication of large integers by number-theoretic transforms (NTT).
//
// The 64-bit words of the operands are the coefficients of two polynomials;
// their product (the convolution of the coefficients, each below N·2^128 for
// transform length N) is computed modulo three primes p_i = c_i·2^32 + 1 in
// (2^61, 2^62) and recovered exactly by the Chinese remainder theorem
// (Garner's method), since p_1 p_2 p_3 > 2^183 > N·2^128 for every N < 2^55.
// Lengths are 2^k or 3·2^k (nttLen). Power-of-two transforms are decimation
// in frequency forward (natural order in, bit-reversed out) and decimation
// in time inverse (bit-reversed in, natural out), so no permutation pass is
// needed, done two stages per pass (radix 4) and, for large lengths, top
// stages first and then each quarter in cache (the quarters of the largest
// on their own goroutines); a length 3·2^k adds one radix-3 pass. Butterflies
// keep values lazily in [0, 2p) or [0, 4p) (Harvey, "Faster arithmetic for
// number-theoretic transforms", J. Symbolic Comput. 60, 2014) and multiply by
// a fixed twiddle w with Shoup's precomputed w' = floor(w·2^64/p): one high
// and two low products, no division. Pointwise products use Montgomery
// reduction. The three primes run on their own goroutines.
//
// Cost: 3 transforms per prime (2 for a square) of length N ≥ len(a)+len(b)
// words; operands that recur are transformed once (spectrum). The checks are
// TestNTTMul and TestSumOfProducts against math/big.

// nttPrime holds one prime and its twiddle tables: tw[m+j] = w_{2m}^j for
// the stage of half-length m (w_{2m} a primitive 2m-th root of unity), j < m,
// with twp the Shoup companions. One table serves every length up to its size.
type nttPrime struct {
	p, g     uint64
	pinv     uint64 // p^-1 mod 2^64 (Montgomery)
	r2       uint64 // 2^128 mod p
	mu       sync.Mutex
	tw, twp  []uint64
	tableLen int
}

// The primes are c·2^32 + 1 with 3 | c, so that lengths 3·2^k exist too;
// found with math/big's ProbablyPrime (40 rounds) and each generator checked
// against every prime factor of p − 1 (listed).
var nttPrimes = [3]*nttPrime{
	newNTTPrime(4611685692009873409, 19), // c = 1073741748 = 2²·3·277·323027
	newNTTPrime(4611685318347718657, 5),  // c = 1073741661 = 3·19·41·153151
	newNTTPrime(4611685125074190337, 5),  // c = 1073741616 = 2⁴·3·2485513 (2485513 prime)
}

func newNTTPrime(p, g uint64) *nttPrime {
	inv := p // Newton for p^-1 mod 2^64: each step doubles the correct bits (p·p ≡ 1 mod 8)
	for range 5 {
		inv *= 2 - p*inv
	}
	_, r1 := bits.Div64(1, 0, p) // 2^64 mod p
	hi, lo := bits.Mul64(r1, r1)
	_, r2 := bits.Div64(hi, lo, p)
	return &nttPrime{p: p, g: g, pinv: inv, r2: r2}
}

func mulMod(a, b, p uint64) uint64 {
	hi, lo := bits.Mul64(a, b)
	_, r := bits.Div64(hi, lo, p)
	return r
}

func powMod(a, e, p uint64) uint64 {
	r := uint64(1)
	for ; e > 0; e >>= 1 {
		if e&1 == 1 {
			r = mulMod(r, a, p)
		}
		a = mulMod(a, a, p)
	}
	return r
}

// shoup returns x·w mod p in [0, 2p), for any x < 2^64, w < p, wp = floor(w·2^64/p).
func shoup(x, w, wp, p uint64) uint64 {
	q, _ := bits.Mul64(x, wp)
	return x*w - q*p
}

// tables returns the twiddle tables for transforms of length up to n.
func (q *nttPrime) tables(n int) ([]uint64, []uint64) {
	q.mu.Lock()
	defer q.mu.Unlock()
	if q.tableLen >= n {
		return q.tw, q.twp
	}
	tw, twp := make([]uint64, n), make([]uint64, n)
	p := q.p
	// Top stage (m = n/2) by a chain of exact products; each lower stage is
	// every other entry of the one above: w_{2m}^j = w_{4m}^{2j}.
	m := n / 2
	w := powMod(q.g, (p-1)/uint64(n), p)
	x := uint64(1)
	for j := range m {
		tw[m+j] = x
		x = mulMod(x, w, p)
	}
	for m /= 2; m >= 1; m /= 2 {
		for j := range m {
			tw[m+j] = tw[2*m+2*j]
		}
	}
	for i := 1; i < n; i++ {
		twp[i], _ = bits.Div64(tw[i], 0, p)
	}
	q.tw, q.twp, q.tableLen = tw, twp, n
	return tw, twp
}

// quarters applies f to the four quarters of x, concurrently when they are
// large: three primes on two cores would otherwise leave one core idle for
// the third prime's transforms.
func quarters(x []uint64, f func([]uint64)) {
	q := len(x) / 4
	if q < nttParallel {
		for i := 0; i < len(x); i += q {
			f(x[i : i+q])
		}
		return
	}
	var wg sync.WaitGroup
	for i := 0; i < len(x); i += q {
		wg.Add(1)
		go func() { defer wg.Done(); f(x[i : i+q]) }()
	}
	wg.Wait()
}

// nttParallel is the quarter length from which quarters run concurrently.
const nttParallel = 1 << 16

// nttWords reports whether the transforms can be used: they read and write
// 64-bit words. On 32-bit platforms every product goes to bigfft.
const nttWords = bits.UintSize == 64

// nttBlock is the length below which a transform finishes in cache.
const nttBlock = 1 << 14

// forward is the decimation-in-frequency transform: x in [0, 2p) natural
// order → [0, 2p) bit-reversed order. Large lengths do their top two stages
// over the whole array, then recurse on the quarters, so that small blocks
// stay in cache.
func forward(x, tw, twp []uint64, p uint64) {
	n := len(x)
	if n > nttBlock {
		difStage2(x, n/2, tw, twp, p)
		quarters(x, func(y []uint64) { forward(y, tw, twp, p) })
		return
	}
	m := n / 2
	for ; m >= 2; m /= 4 {
		difStage2(x, m, tw, twp, p)
	}
	if m == 1 {
		lastStage(x, p)
	}
}

// lastStage is the stage of half-length 1, whose twiddle is 1:
// (a, b) → (a + b, a − b), [0, 2p) → [0, 2p) (the DIT first stage is the
// same map; its outputs in [0, 2p) suit ditStage2).
func lastStage(x []uint64, p uint64) {
	p2 := 2 * p
	for i := 0; i+1 < len(x); i += 2 {
		a, b := x[i], x[i+1]
		if a >= p2 {
			a -= p2
		}
		if b >= p2 {
			b -= p2
		}
		t := a + b
		if t >= p2 {
			t -= p2
		}
		u := a + p2 - b
		if u >= p2 {
			u -= p2
		}
		x[i], x[i+1] = t, u
	}
}

// difStage2 does the stages of half-lengths m and m/2 of each block of 2m in
// one pass (radix 4): half the loads and stores of two radix-2 stages.
func difStage2(x []uint64, m int, tw, twp []uint64, p uint64) {
	if m == 2 {
		difQuads(x, tw[3], twp[3], p)
		return
	}
	p2 := 2 * p
	h := m / 2
	wa, wap := tw[m:m+h], twp[m:m+h]     // w_{2m}^j
	wb, wbp := tw[m+h:2*m], twp[m+h:2*m] // w_{2m}^(j+h)
	wc, wcp := tw[h:m], twp[h:m]         // w_m^j
	for s := 0; s+2*m <= len(x); s += 2 * m {
		x0, x1, x2, x3 := x[s:s+h], x[s+h:s+m], x[s+m:s+m+h], x[s+m+h:s+2*m]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		wa, wap, wb, wbp := wa[:len(x0)], wap[:len(x0)], wb[:len(x0)], wbp[:len(x0)]
		wc, wcp := wc[:len(x0)], wcp[:len(x0)]
		for j := range x0 {
			a, b, c, d := x0[j], x1[j], x2[j], x3[j]
			// stage m: (a, c) with w_{2m}^j, (b, d) with w_{2m}^(j+h)
			t := a + c
			if t >= p2 {
				t -= p2
			}
			c = shoup(a+p2-c, wa[j], wap[j], p)
			a = t
			t = b + d
			if t >= p2 {
				t -= p2
			}
			d = shoup(b+p2-d, wb[j], wbp[j], p)
			b = t
			// stage m/2: (a, b) and (c, d) with w_m^j
			t = a + b
			if t >= p2 {
				t -= p2
			}
			x1[j] = shoup(a+p2-b, wc[j], wcp[j], p)
			x0[j] = t
			t = c + d
			if t >= p2 {
				t -= p2
			}
			x3[j] = shoup(c+p2-d, wc[j], wcp[j], p)
			x2[j] = t
		}
	}
}

// difQuads is difStage2 for m = 2, blocks of four, where three of the four
// twiddles are 1 and the fourth is w = w_4 (w' its Shoup companion).
func difQuads(x []uint64, w, wp, p uint64) {
	p2 := 2 * p
	for i := 0; i+3 < len(x); i += 4 {
		q := x[i : i+4 : i+4]
		a, b, c, d := q[0], q[1], q[2], q[3]
		t := a + c
		if t >= p2 {
			t -= p2
		}
		c = a + p2 - c
		if c >= p2 {
			c -= p2
		}
		a = t
		t = b + d
		if t >= p2 {
			t -= p2
		}
		d = shoup(b+p2-d, w, wp, p)
		b = t
		t = a + b
		if t >= p2 {
			t -= p2
		}
		u := a + p2 - b
		if u >= p2 {
			u -= p2
		}
		q[0], q[1] = t, u
		t = c + d
		if t >= p2 {
			t -= p2
		}
		u = c + p2 - d
		if u >= p2 {
			u -= p2
		}
		q[2], q[3] = t, u
	}
}

// ditQuads is ditStage2 for m = 2: the pairs (0,1), (2,3) with twiddle 1,
// then (0,2) with 1 and (1,3) with w_4^-1 = −w_4 (w = tw[3]).
func ditQuads(x []uint64, w, wp, p uint64) {
	p2 := 2 * p
	for i := 0; i+3 < len(x); i += 4 {
		q := x[i : i+4 : i+4]
		a, b, c, d := q[0], q[1], q[2], q[3]
		if a >= p2 {
			a -= p2
		}
		if b >= p2 {
			b -= p2
		}
		if c >= p2 {
			c -= p2
		}
		if d >= p2 {
			d -= p2
		}
		a, b = a+b, a+p2-b // [0, 4p)
		c, d = c+d, c+p2-d
		if a >= p2 {
			a -= p2
		}
		if b >= p2 {
			b -= p2
		}
		if c >= p2 {
			c -= p2
		}
		td := shoup(d, w, wp, p) // −d·w_4^-1
		q[0], q[2] = a+c, a+p2-c
		q[1], q[3] = b+p2-td, b+td
	}
}

// ditStage2 undoes difStage2: the stages of half-lengths m/2 and m in one
// pass over each block of 2m; inputs below 2^64 with the first of each pair
// in [0, 4p), outputs in [0, 4p). Inverse twiddles come from the forward
// table: w_{2m}^-j = −tw[2m−j] (j ≥ 1), so products by tw[2m−j] enter with
// the opposite sign.
func ditStage2(x []uint64, m int, tw, twp []uint64, p uint64) {
	if m == 2 {
		ditQuads(x, tw[3], twp[3], p)
		return
	}
	p2 := 2 * p
	h := m / 2
	for s := 0; s+2*m <= len(x); s += 2 * m {
		x0, x1, x2, x3 := x[s:s+h], x[s+h:s+m], x[s+m:s+m+h], x[s+m+h:s+2*m]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		for j := range x0 {
			a, b, c, d := x0[j], x1[j], x2[j], x3[j]
			if a >= p2 {
				a -= p2
			}
			if c >= p2 {
				c -= p2
			}
			// stage h: (a, b) and (c, d) with w_m^-j
			var tb, td uint64
			if j == 0 {
				if b >= p2 {
					b -= p2
				}
				if d >= p2 {
					d -= p2
				}
				tb, td = p2-b, p2-d // −b, −d in (0, 2p]
			} else {
				k := m - j
				tb = shoup(b, tw[k], twp[k], p) // −b·w_m^-j
				td = shoup(d, tw[k], twp[k], p)
			}
			a, b = a+p2-tb, a+tb // [0, 4p)
			c, d = c+p2-td, c+td
			if a >= p2 {
				a -= p2
			}
			if b >= p2 {
				b -= p2
			}
			// stage m: (a, c) with w_{2m}^-j, (b, d) with w_{2m}^-(j+h)
			var tc uint64
			if j == 0 {
				if c >= p2 {
					c -= p2
				}
				tc = p2 - c
			} else {
				k := 2*m - j
				tc = shoup(c, tw[k], twp[k], p)
			}
			k := 2*m - j - h
			tdd := shoup(d, tw[k], twp[k], p)
			x0[j], x2[j] = a+p2-tc, a+tc
			x1[j], x3[j] = b+p2-tdd, b+tdd
		}
	}
}

// inverse is the decimation-in-time transform without the 1/n factor:
// x in [0, 2p) bit-reversed → [0, 4p) natural order.
func inverse(x, tw, twp []uint64, p uint64) {
	n := len(x)
	if n > nttBlock {
		quarters(x, func(y []uint64) { inverse(y, tw, twp, p) })
		ditStage2(x, n/2, tw, twp, p)
		return
	}
	m := 1
	if bits.TrailingZeros(uint(n))%2 == 1 {
		lastStage(x, p)
		m = 2
	}
	for ; m < n; m *= 4 {
		ditStage2(x, 2*m, tw, twp, p)
	}
}

// load writes the words of v into x (zero-padded) reduced to [0, 2p).
func load(x []uint64, v []big.Word, p uint64) {
	p2, p4 := 2*p, 4*p
	for i, w := range v {
		u := uint64(w)
		if u >= p4 {
			u -= p4
		}
		if u >= p2 {
			u -= p2
		}
		x[i] = u
	}
	clear(x[len(v):])
}

// A spectrum is the forward transform of |v| modulo each of the three
// primes, at length n (bit-reversed order, values in [0, 2p)). Products are
// formed from spectra, so an operand used twice is transformed once.
type spectrum struct {
	n     int
	words int
	neg   bool
	r     [3][]uint64
	// spent: the caller gives the spectrum up to the one product it is the
	// first operand of, which then overwrites it with the result's residues
	// instead of allocating three more arrays of n words.
	spent bool
}

// nttLen is the transform length for a product of w words: the least
// 2^k or 3·2^k (k ≥ 2) not below w, which wastes at most a third of the
// transform on padding where powers of two alone waste up to half.
func nttLen(w int) int {
	n := 1
	for n < w {
		n *= 2
	}
	if t := 3 * n / 4; n >= 16 && t >= w {
		return t
	}
	return n
}

// montMul returns a·b·2^-64 mod p in [0, p) for a < 2^64, b < p.
func (q *nttPrime) montMul(a, b uint64) uint64 {
	hi, lo := bits.Mul64(a, b)
	mh, _ := bits.Mul64(lo*q.pinv, q.p)
	t := hi - mh
	if hi < mh {
		t += q.p
	}
	return t
}

// forwardAny transforms x (values in [0, 2p)) at length 2^k or 3·2^k.
// For 3m, a radix-3 pass first maps blocks (a, b, c) at j, j+m, j+2m to
//
//	(a + b + c,  (a + ω b + ω² c)·w^j,  (a + ω² b + ω c)·w^(2j)),
//
// w a primitive 3m-th root and ω = w^m, with one product for the 3-point
// DFT (ω b + ω² c = ω(b − c) − c, ω² b + ω c = −b − ω(b − c)); twiddles are
// kept in Montgomery form and advanced by one product per j. Each third is
// then a power-of-two transform: outputs in [0, 2p), in an order that the
// inverse undoes.
func (q *nttPrime) forwardAny(x []uint64) {
	n := len(x)
	if n&(n-1) == 0 {
		tw, twp := q.tables(n)
		forward(x, tw, twp, q.p)
		return
	}
	m, p := n/3, q.p
	r, omR, w1R, w2R := q.radix3(n, false)
	c1, c2 := r, r // w^j·R, w^(2j)·R
	x0, x1, x2 := x[:m], x[m:2*m], x[2*m:3*m]
	x1, x2 = x1[:len(x0)], x2[:len(x0)]
	for j := range x0 {
		a, b, c := x0[j], x1[j], x2[j]
		if a >= p {
			a -= p
		}
		if b >= p {
			b -= p
		}
		if c >= p {
			c -= p
		}
		y0 := a + b + c // < 3p
		if y0 >= 2*p {
			y0 -= 2 * p
		}
		t := q.montMul(b+p-c, omR) // ω(b − c), [0, p)
		x0[j] = y0
		x1[j] = q.montMul(a+(p-c)+t, c1)     // (a − c + ω(b − c))·w^j
		x2[j] = q.montMul(a+(p-b)+(p-t), c2) // (a − b − ω(b − c))·w^(2j)
		c1, c2 = q.montMul(c1, w1R), q.montMul(c2, w2R)
	}
	tw, twp := q.tables(m)
	forward(x0, tw, twp, p)
	forward(x1, tw, twp, p)
	forward(x2, tw, twp, p)
}

// inverseAny undoes forwardAny without the 1/n factor: [0, 2p) in, [0, 4p)
// out. For 3m: power-of-two inverses of each third, then with
// u1 = Y1·w^-j, u2 = Y2·w^-(2j), ω' = ω^-1 and t = ω'(u1 − u2),
//
//	x_j = Y0 + u1 + u2,  x_(j+m) = Y0 − u2 + t,  x_(j+2m) = Y0 − u1 − t.
func (q *nttPrime) inverseAny(x []uint64) {
	n := len(x)
	if n&(n-1) == 0 {
		tw, twp := q.tables(n)
		inverse(x, tw, twp, q.p)
		return
	}
	m, p := n/3, q.p
	tw, twp := q.tables(m)
	x0, x1, x2 := x[:m], x[m:2*m], x[2*m:3*m]
	x1, x2 = x1[:len(x0)], x2[:len(x0)]
	inverse(x0, tw, twp, p)
	inverse(x1, tw, twp, p)
	inverse(x2, tw, twp, p)
	r, omR, w1R, w2R := q.radix3(n, true)
	c1, c2 := r, r
	for j := range x0 {
		y0 := x0[j] // [0, 4p) → [0, p)
		if y0 >= 2*p {
			y0 -= 2 * p
		}
		if y0 >= p {
			y0 -= p
		}
		u1 := q.montMul(x1[j], c1)
		u2 := q.montMul(x2[j], c2)
		t := q.montMul(u1+p-u2, omR)
		x0[j] = y0 + u1 + u2
		x1[j] = y0 + (p - u2) + t
		x2[j] = y0 + (p - u1) + (p - t)
		c1, c2 = q.montMul(c1, w1R), q.montMul(c2, w2R)
	}
}

// radix3 returns the constants of the radix-3 pass at length n = 3m, in
// Montgomery form (times R = 2^64 mod p): R itself, ω·R, w·R and w²·R, for
// w the primitive n-th root g^((p−1)/n), or for w^-1 when inverse.
func (q *nttPrime) radix3(n int, inverse bool) (r, omR, w1R, w2R uint64) {
	p := q.p
	w := powMod(q.g, (p-1)/uint64(n), p)
	if inverse {
		w = powMod(w, p-2, p)
	}
	_, r = bits.Div64(1, 0, p)
	omR = mulMod(powMod(w, uint64(n/3), p), r, p)
	return r, omR, mulMod(w, r, p), mulMod(mulMod(w, w, p), r, p)
}

// newSpectrum transforms v at length n (the three primes in parallel).
func newSpectrum(v *big.Int, n int) *spectrum {
	s := &spectrum{n: n, words: len(v.Bits()), neg: v.Sign() < 0}
	w := v.Bits()
	var wg sync.WaitGroup
	for i, q := range nttPrimes {
		wg.Add(1)
		go func() {
			defer wg.Done()
			x := make([]uint64, n)
			load(x, w, q.p)
			q.forwardAny(x)
			s.r[i] = x
		}()
	}
	wg.Wait()
	return s
}

// spectra transforms several operands at length n concurrently.
func spectra(n int, vs ...*big.Int) []*spectrum {
	out := make([]*spectrum, len(vs))
	var wg sync.WaitGroup
	for i, v := range vs {
		wg.Add(1)
		go func() { defer wg.Done(); out[i] = newSpectrum(v, n) }()
	}
	wg.Wait()
	return out
}

// A product term of a sum of products.
type product struct{ a, b *spectrum }

// sumOfProducts returns Σ a_k·b_k (signed) from spectra of a common
// length n, which must be at least the words of every product (the caller
// chooses n = nttLen(max words)). Up to three terms.
func sumOfProducts(terms ...product) *big.Int {
	n := terms[0].a.n
	words := 0
	negative := make([]bool, len(terms))
	mixed := false
	for k, t := range terms {
		words = max(words, t.a.words+t.b.words)
		negative[k] = t.a.neg != t.b.neg
		mixed = mixed || negative[k] != negative[0]
	}
	if words > n {
		panic("expand: transform too short for the product")
	}
	var r [3][]uint64
	var wg sync.WaitGroup
	for i, q := range nttPrimes {
		wg.Add(1)
		go func() {
			defer wg.Done()
			r[i] = pointwiseInverse(q, terms, negative, n)
		}()
	}
	wg.Wait()
	z := garner(r, words+1, mixed)
	if negative[0] {
		z.Neg(z) // all terms shared the first one's sign: magnitudes were added
	}
	return z
}

// pointwiseInverse forms Σ ±a_k·b_k / n pointwise (Montgomery products, then
// a Shoup product by 2^64/n) and inverts the transform: values in [0, p).
// When the signs differ the terms of the first sign are added and the
// others subtracted, so coefficients are taken as signed by garner.
func pointwiseInverse(q *nttPrime, terms []product, negative []bool, n int) []uint64 {
	p, pinv := q.p, q.pinv
	k := 0
	for i, q := range nttPrimes {
		if q.p == p {
			k = i
		}
	}
	c := mulMod(powMod(2, 64, p), powMod(uint64(n), p-2, p), p) // 2^64/n mod p
	cp, _ := bits.Div64(c, 0, p)
	var x []uint64
	if terms[0].a.spent {
		x = terms[0].a.r[k][:n] // read and written at the same index
	} else {
		x = make([]uint64, n)
	}
	for t, term := range terms {
		a, b := term.a.r[k], term.b.r[k]
		a, b = a[:n], b[:n]
		sub := negative[t] != negative[0]
		first := uint64(b2u(t > 0)) // 0: the first term sets x
		for i := range x {
			hi, lo := bits.Mul64(a[i], b[i])
			mh, _ := bits.Mul64(lo*pinv, p)
			v := hi - mh // a·b·2^-64 in (−p, p)
			if hi < mh {
				v += p
			}
			if sub {
				v = p - v // [1, p]
			}
			x[i] = x[i]*first + v // at most 3 terms: below 3p < 2^64
		}
	}
	for i, v := range x {
		x[i] = shoup(v, c, cp, p)
	}
	q.inverseAny(x)
	p2 := 2 * p
	for i, v := range x {
		if v >= p2 {
			v -= p2
		}
		if v >= p {
			v -= p
		}
		x[i] = v
	}
	return x
}

// b2u is 1 for true, 0 for false.
func b2u(v bool) uint {
	if v {
		return 1
	}
	return 0
}

// Garner constants for the three primes.
var (
	p1, p2, p3   = nttPrimes[0].p, nttPrimes[1].p, nttPrimes[2].p
	inv12        = powMod(p1%p2, p2-2, p2)                    // p1^-1 mod p2
	inv123       = powMod(mulMod(p1%p3, p2%p3, p3), p3-2, p3) // (p1 p2)^-1 mod p3
	inv12p, _    = bits.Div64(inv12, 0, p2)
	inv123p, _   = bits.Div64(inv123, 0, p3)
	p1m3         = p1 % p3
	p1m3p, _     = bits.Div64(p1m3, 0, p3)
	p12hi, p12lo = bits.Mul64(p1, p2)
	// p1 p2 p3 and half of it, three words, least significant first.
	p123, p123half = func() ([3]uint64, [3]uint64) {
		h, l := p12hi, p12lo
		h1, l1 := bits.Mul64(l, p3)
		h2, l2 := bits.Mul64(h, p3)
		w1, c := bits.Add64(h1, l2, 0)
		full := [3]uint64{l1, w1, h2 + c}
		half := [3]uint64{full[0]>>1 | full[1]<<63, full[1]>>1 | full[2]<<63, full[2] >> 1}
		return full, half
	}()
)

// garner recovers each coefficient from its three residues (Garner's
// mixed-radix form x = v1 + p1·v2 + p1 p2·v3) and adds the coefficients,
// each shifted by its index in words, into a number of `words` words. When
// signed, a coefficient above (p1 p2 p3)/2 stands for itself minus p1 p2 p3
// (the true coefficients are below N·2^128 in absolute value).
func garner(r [3][]uint64, words int, signed bool) *big.Int {
	r1, r2, r3 := r[0], r[1], r[2]
	n := len(r1)
	r2, r3 = r2[:n], r3[:n]
	z := make([]big.Word, words)
	var a0, a1, a2, a3 uint64 // pending sum at positions i..i+3 (two's complement)
	for i := range z {
		var x0, x1, x2, x3 uint64
		if i < n {
			v1 := r1[i]
			t := v1 // v2 = (r2 − v1)·p1^-1 mod p2
			if t >= p2 {
				t -= p2
			}
			v2 := shoup(r2[i]+p2-t, inv12, inv12p, p2)
			if v2 >= p2 {
				v2 -= p2
			}
			u := v1 // v3 = (r3 − v1 − p1·v2)·(p1 p2)^-1 mod p3
			if u >= p3 {
				u -= p3
			}
			s := shoup(v2, p1m3, p1m3p, p3) + u // [0, 3p3)
			if s >= 2*p3 {
				s -= 2 * p3
			}
			if s >= p3 {
				s -= p3
			}
			v3 := shoup(r3[i]+p3-s, inv123, inv123p, p3)
			if v3 >= p3 {
				v3 -= p3
			}
			// x = v1 + p1·v2 + (p1 p2)·v3, three words.
			h, l := bits.Mul64(p1, v2)
			var c uint64
			x0, c = bits.Add64(l, v1, 0)
			x1 = h + c
			bh, bl := bits.Mul64(v3, p12lo)
			ch, cl := bits.Mul64(v3, p12hi)
			x0, c = bits.Add64(x0, bl, 0)
			x1, c = bits.Add64(x1, bh, c)
			x2 = ch + c
			x1, c = bits.Add64(x1, cl, 0)
			x2 += c
			if signed && (x2 > p123half[2] || x2 == p123half[2] && (x1 > p123half[1] || x1 == p123half[1] && x0 > p123half[0])) {
				var b uint64
				x0, b = bits.Sub64(x0, p123[0], 0)
				x1, b = bits.Sub64(x1, p123[1], b)
				x2, _ = bits.Sub64(x2, p123[2], b)
				x3 = ^uint64(0)
			}
		}
		var c uint64
		a0, c = bits.Add64(a0, x0, 0)
		a1, c = bits.Add64(a1, x1, c)
		a2, c = bits.Add64(a2, x2, c)
		a3, _ = bits.Add64(a3, x3, c)
		z[i] = big.Word(a0)
		a0, a1, a2, a3 = a1, a2, a3, uint64(int64(a3)>>63)
	}
	if int64(a0) < 0 { // the sum is negative: z holds its two's complement
		for i := range z {
			z[i] = ^z[i]
		}
		v := new(big.Int).SetBits(z)
		v.Add(v, one)
		return v.Neg(v)
	}
	return new(big.Int).SetBits(z)
}

// nttMul returns a·b (signed) by the transforms.
func nttMul(a, b *big.Int) *big.Int {
	n := nttLen(len(a.Bits()) + len(b.Bits()))
	if a == b {
		s := newSpectrum(a, n)
		s.spent = true
		return sumOfProducts(product{s, s})
	}
	s := spectra(n, a, b)
	s[0].spent = true
	return sumOfProducts(product{s[0], s[1]})
}
