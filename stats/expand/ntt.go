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
// The transforms are radix 2: decimation in frequency forward (natural order
// in, bit-reversed out), decimation in time inverse (bit-reversed in, natural
// out), so no permutation pass is needed. Butterflies keep values lazily in
// [0, 2p) or [0, 4p) (Harvey, "Faster arithmetic for number-theoretic
// transforms", J. Symbolic Comput. 60, 2014) and multiply by a fixed twiddle
// w with Shoup's precomputed w' = floor(w·2^64/p): one high and two low
// products, no division. Pointwise products use Montgomery reduction. The
// three primes run on their own goroutines.
//
// Cost: 3 transforms per prime (2 for a square) of length N, the least power
// of two ≥ len(a)+len(b) words. The check is TestNTTMul against math/big.

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

var nttPrimes = [3]*nttPrime{
	newNTTPrime(4611685941117976577, 3),  // 1073741805·2^32 + 1 (found with math/big ProbablyPrime; generator checked against the factors of p-1)
	newNTTPrime(4611685692009873409, 19), // 1073741747·2^32 + 1
	newNTTPrime(4611685606110527489, 3),  // 1073741727·2^32 + 1
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

// nttBlock is the length below which a transform finishes in cache.
const nttBlock = 1 << 14

// forward is the decimation-in-frequency transform: x in [0, 2p) natural
// order → [0, 2p) bit-reversed order. Large lengths do their top stage over
// the whole array, then recurse on halves so that small blocks stay cached.
func forward(x, tw, twp []uint64, p uint64) {
	n := len(x)
	if n > nttBlock {
		difStage2(x, n/2, tw, twp, p)
		q := n / 4
		for i := 0; i < n; i += q {
			forward(x[i:i+q], tw, twp, p)
		}
		return
	}
	for m := n / 2; m >= 1; m /= 2 {
		difStage(x, m, tw, twp, p)
	}
}

func difStage(x []uint64, m int, tw, twp []uint64, p uint64) {
	p2 := 2 * p
	w, wp := tw[m:2*m], twp[m:2*m]
	for s := 0; s+2*m <= len(x); s += 2 * m {
		lo, hi := x[s:s+m], x[s+m:s+2*m]
		hi, w, wp := hi[:len(lo)], w[:len(lo)], wp[:len(lo)]
		for j := range lo {
			a, b := lo[j], hi[j]
			t := a + b
			if t >= p2 {
				t -= p2
			}
			lo[j] = t
			u := a + p2 - b
			q, _ := bits.Mul64(u, wp[j])
			hi[j] = u*w[j] - q*p
		}
	}
}

// difStage2 does the stages of half-lengths m and m/2 of one block of 2m in
// one pass (radix 4), so that large transforms read memory half as often.
func difStage2(x []uint64, m int, tw, twp []uint64, p uint64) {
	p2 := 2 * p
	h := m / 2
	x0, x1, x2, x3 := x[:h], x[h:m], x[m:m+h], x[m+h:2*m]
	x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
	wa, wap := tw[m:m+h], twp[m:m+h]     // w_{2m}^j
	wb, wbp := tw[m+h:2*m], twp[m+h:2*m] // w_{2m}^(j+h)
	wc, wcp := tw[h:m], twp[h:m]         // w_m^j
	wa, wap, wb, wbp = wa[:len(x0)], wap[:len(x0)], wb[:len(x0)], wbp[:len(x0)]
	wc, wcp = wc[:len(x0)], wcp[:len(x0)]
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

// ditStage2 undoes difStage2: the stages of half-lengths m/2 then m in one
// pass; inputs in [0, 2p)... [0, 4p), outputs in [0, 4p).
func ditStage2(x []uint64, m int, tw, twp []uint64, p uint64) {
	ditStage(x, m/2, tw, twp, p)
	ditStage(x, m, tw, twp, p)
}

// inverse is the decimation-in-time transform without the 1/n factor:
// x in [0, 2p) bit-reversed → [0, 4p) natural order.
func inverse(x, tw, twp []uint64, p uint64) {
	n := len(x)
	if n > nttBlock {
		q := n / 4
		for i := 0; i < n; i += q {
			inverse(x[i:i+q], tw, twp, p)
		}
		ditStage2(x, n/2, tw, twp, p)
		return
	}
	for m := 1; m < n; m *= 2 {
		ditStage(x, m, tw, twp, p)
	}
}

// ditStage: (a, b) → (a + b·w^-j, a − b·w^-j) with w^-j = −w_{2m}^{m−j}
// = −tw[2m−j] for j ≥ 1.
func ditStage(x []uint64, m int, tw, twp []uint64, p uint64) {
	p2 := 2 * p
	w, wp := tw[m:2*m], twp[m:2*m]
	for s := 0; s+2*m <= len(x); s += 2 * m {
		lo, hi := x[s:s+m], x[s+m:s+2*m]
		a, b := lo[0], hi[0]
		if a >= p2 {
			a -= p2
		}
		if b >= p2 {
			b -= p2
		}
		lo[0], hi[0] = a+b, a+p2-b
		for j := 1; j < len(lo); j++ {
			a := lo[j]
			if a >= p2 {
				a -= p2
			}
			t := shoup(hi[j], w[m-j], wp[m-j], p) // b·w^(m−j) = −b·w^−j
			lo[j] = a + p2 - t
			hi[j] = a + t
		}
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

// convolveMod computes the cyclic convolution of a and b (length n) modulo
// q.p, scaled to natural order, into a new slice with values in [0, p).
func convolveMod(q *nttPrime, a, b []big.Word, n int, square bool) []uint64 {
	tw, twp := q.tables(n)
	p := q.p
	x := make([]uint64, n)
	load(x, a, p)
	forward(x, tw, twp, p)
	y := x
	if !square {
		y = make([]uint64, n)
		load(y, b, p)
		forward(y, tw, twp, p)
	}
	// Pointwise x·y·2^-64 (Montgomery), then × 2^64/n (Shoup) = x·y/n.
	cMont := mulMod(powMod(2, 64, p), powMod(uint64(n), p-2, p), p) // 2^64/n mod p
	cMontP, _ := bits.Div64(cMont, 0, p)
	pinv := q.pinv
	for i := range x {
		hi, lo := bits.Mul64(x[i], y[i])
		m := lo * pinv
		mh, _ := bits.Mul64(m, p)
		t := hi - mh
		if hi < mh {
			t += p
		}
		x[i] = shoup(t, cMont, cMontP, p)
	}
	inverse(x, tw, twp, p)
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
)

// nttMulWords returns the product of the natural numbers with words a and b.
func nttMulWords(a, b []big.Word) []big.Word {
	out := len(a) + len(b)
	n := 1
	for n < out {
		n *= 2
	}
	square := len(a) == len(b) && &a[0] == &b[0]
	var r [3][]uint64
	var wg sync.WaitGroup
	for i := range nttPrimes {
		wg.Add(1)
		go func() {
			defer wg.Done()
			r[i] = convolveMod(nttPrimes[i], a, b, n, square)
		}()
	}
	wg.Wait()
	z := make([]big.Word, out)
	r1, r2, r3 := r[0], r[1], r[2]
	var a0, a1, a2 uint64 // pending sum at positions i, i+1, i+2
	for i := range z {
		var x0, x1, x2 uint64
		if i < n {
			v1 := r1[i]
			// v2 = (r2 - v1)·p1^-1 mod p2
			t := v1
			if t >= p2 {
				t -= p2
			}
			t = r2[i] + p2 - t
			v2 := shoup(t, inv12, inv12p, p2)
			if v2 >= p2 {
				v2 -= p2
			}
			// v3 = (r3 - v1 - p1·v2)·(p1 p2)^-1 mod p3
			u := v1
			if u >= p3 {
				u -= p3
			}
			s := shoup(v2, p1m3, p1m3p, p3) // [0, 2p3)
			s += u                          // [0, 3p3)
			for s >= p3 {
				s -= p3
			}
			v3 := shoup(r3[i]+p3-s, inv123, inv123p, p3)
			if v3 >= p3 {
				v3 -= p3
			}
			// x = v1 + p1·v2 + p1 p2·v3
			h, l := bits.Mul64(p1, v2)
			var c uint64
			x0, c = bits.Add64(l, v1, 0)
			x1 = h + c
			bh, bl := bits.Mul64(v3, p12lo)
			ch, cl := bits.Mul64(v3, p12hi)
			x0, c = bits.Add64(x0, 0, 0)
			var c2 uint64
			x1, c = bits.Add64(x1, bh, 0)
			x1, c2 = bits.Add64(x1, cl, 0)
			x2 = ch + c + c2
			x0, c = bits.Add64(x0, bl, 0)
			x1, c = bits.Add64(x1, 0, c)
			x2 += c
		}
		var c uint64
		a0, c = bits.Add64(a0, x0, 0)
		a1, c = bits.Add64(a1, x1, c)
		a2, _ = bits.Add64(a2, x2, c)
		z[i] = big.Word(a0)
		a0, a1, a2 = a1, a2, 0
	}
	return z
}

// nttMul returns a·b by nttMulWords, with signs.
func nttMul(a, b *big.Int) *big.Int {
	z := new(big.Int).SetBits(nttMulWords(a.Bits(), b.Bits()))
	if a.Sign()*b.Sign() < 0 {
		z.Neg(z)
	}
	return z
}
