package expand

import (
	"fmt"
	"math/big"
	"math/bits"
	"runtime"
	"slices"
	"sync"
)

// Digits far out: the binary digits of π and ln 2 at any position, without
// the digits before it (Bailey, Borwein & Plouffe, "On the rapid
// computation of various polylogarithmic constants", Math. Comp. 66 (1997)
// 903–913), to any number of digits and each one certified.
//
// The sums are those of piExtract and ln2Extract (extract.go), carried in
// W-word binary fractions instead of one word: a term frac(2^E/m) = r/m
// with r = 2^E mod m is written as floor(2^(64W)·r/m), exact but for its
// truncation, by W successive 128-by-64-bit divisions; the sum is kept mod
// 2^(64W), which is arithmetic mod 1. The error of the sum is a count of
// truncations (a few units of 2^-64W a term, bounded below), so the digits
// are certified when every value within the bound shares them; when one
// does not (the digits end next to a run of 0s or 1s), the sum is redone
// with another word, until they are.
//
// Cost: one modular power a term, and d terms at position d (4 of them a
// hexadecimal position for π): about d·log2(d) modular squarings, spread
// over the cores, in memory that does not grow with d.

// maxFarWords bounds the extension: 16 words (1024 bits) of fraction.
const maxFarWords = 16

// wideSum is a W-word binary fraction mod 1, most significant word first.
type wideSum []uint64

// addWords adds (sign +1) or subtracts (−1) the W-word fraction q.
func (s wideSum) addWords(q []uint64, neg bool) {
	var c uint64
	for i := len(s) - 1; i >= 0; i-- {
		if neg {
			s[i], c = bits.Sub64(s[i], q[i], c)
		} else {
			s[i], c = bits.Add64(s[i], q[i], c)
		}
	}
}

// addUnits adds the signed integer u units of the last word.
func (s wideSum) addUnits(u int64) {
	q := make([]uint64, len(s))
	if u < 0 {
		q[len(q)-1] = uint64(-u)
		s.addWords(q, true)
		return
	}
	q[len(q)-1] = uint64(u)
	s.addWords(q, false)
}

// addFrac adds or subtracts floor(2^(64W)·frac(2^E/m)), the W words of
// the fraction truncated, given t = 2^(E+64) mod m and inv = m^-1 mod
// 2^64: the first word is −t·inv mod 2^64 (an exact division, see
// pow2Mod4), t is what remains of 2^64·frac(2^E/m) after it, and each
// further word is one 128-by-64-bit division of the remainder.
func (s wideSum) addFrac(t, inv, m uint64, neg bool, q []uint64) {
	q[0] = -t * inv
	for i := 1; i < len(q); i++ {
		q[i], t = bits.Div64(t, 0, m)
	}
	s.addWords(q, neg)
}

// addTail adds or subtracts floor(c·2^(64W+sh)/m) mod 2^(64W), formed
// exactly in big integers: a term at or past the extraction position.
func (s wideSum) addTail(c int64, sh int, m uint64, neg bool) {
	W := len(s)
	if 64*W+sh < 0 {
		return
	}
	num := new(big.Int).Lsh(big.NewInt(c), uint(64*W+sh))
	num.Quo(num, new(big.Int).SetUint64(m))
	q := make([]uint64, W)
	for i := W - 1; i >= 0; i-- {
		q[i] = num.Uint64()
		num.Rsh(num, 64)
	}
	s.addWords(q, neg)
}

// pow2Mod returns 2^E mod m for odd m ≥ 1.
func pow2Mod(E, m uint64) uint64 {
	if m == 1 {
		return 0
	}
	return powMod(2%m, E, m)
}

// redc64 returns (hi·2^64 + lo)·2^-64 mod m for a value below m·2^64, m odd
// and below 2^62, neg = −m^-1 mod 2^64 (Montgomery's reduction with
// R = 2^64): lo + lo(u·m) is 0 or 2^64, so the carry is lo ≠ 0.
func redc64(hi, lo, m, neg uint64) uint64 {
	u := lo * neg
	h, _ := bits.Mul64(u, m)
	var c uint64
	if lo != 0 {
		c = 1
	}
	r := hi + h + c
	if r >= m {
		r -= m
	}
	return r
}

// mont64Max bounds the moduli of the 64-bit Montgomery path (the sum in
// redc64 stays below 2^64).
const mont64Max = 1 << 62

// pow2Mod4 sets r[i] = 2^(E[i]+64) mod m[i] and inv[i] = m[i]^-1 mod 2^64
// for four odd moduli, in lock step so that the four squarings overlap:
// Montgomery arithmetic with R = 2^32 when every modulus is in [montMin,
// montMax), with R = 2^64 when every one is odd in [3, mont64Max), else
// one modulus at a time. The 64 extra powers of 2 give the fraction's
// first word by an exact division (frac64x4): floor(2^64·frac(2^E/m)) =
// −(2^(E+64) mod m)·m^-1 mod 2^64.
func pow2Mod4(E, m, r, inv *[4]uint64) {
	lo, hi := min(m[0], m[1], m[2], m[3]), max(m[0], m[1], m[2], m[3])
	switch {
	case lo >= montMin && hi < montMax:
		r[0], r[1], r[2], r[3], inv[0], inv[1], inv[2], inv[3] = pow2Mont32x4(E[0]+64, E[1]+64, E[2]+64, E[3]+64, m[0], m[1], m[2], m[3])
	case lo >= 3 && hi < mont64Max:
		// Any odd moduli below 2^62, mixed ranges too (π's lanes 2k+1 and
		// 8k+5 straddle 2^31 for k from 2.7·10^8 to 10^9: one at a time,
		// with a division a squaring, they took 3 times the rest).
		r[0], r[1], r[2], r[3], inv[0], inv[1], inv[2], inv[3] = pow2Mont64x4(E[0]+64, E[1]+64, E[2]+64, E[3]+64, m[0], m[1], m[2], m[3])
	default:
		for i := range 4 {
			r[i], inv[i] = pow2Mod(E[i]+64, m[i]), montInv(m[i])
		}
	}
}

// pow2Mont32x4 returns 2^L_i mod m_i and m_i^-1 mod 2^64 for moduli in
// [montMin, montMax) (R = 2^32), by left-to-right binary powering in
// Montgomery form: a squaring a bit and a doubling a set bit.
func pow2Mont32x4(L0, L1, L2, L3, m0, m1, m2, m3 uint64) (r0, r1, r2, r3, i0, i1, i2, i3 uint64) {
	nb := bits.Len64(L0 | L1 | L2 | L3)
	s := uint(nb - 5) // the top bits (below 2^5) start the powering; L ≥ 64
	i0, i1, i2, i3 = montInv(m0), montInv(m1), montInv(m2), montInv(m3)
	n0, n1, n2, n3 := -i0&0xffffffff, -i1&0xffffffff, -i2&0xffffffff, -i3&0xffffffff
	x0 := pow2Init(L0>>s+32, m0) // Montgomery form of 2^top is 2^(top+32) mod m
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
	return redc(x0, m0, n0), redc(x1, m1, n1), redc(x2, m2, n2), redc(x3, m3, n3), i0, i1, i2, i3
}

// pow2Mont64x4 is pow2Mont32x4 for odd moduli in [3, mont64Max), with
// R = 2^64 and 128-bit products.
func pow2Mont64x4(L0, L1, L2, L3, m0, m1, m2, m3 uint64) (r0, r1, r2, r3, i0, i1, i2, i3 uint64) {
	nb := bits.Len64(L0 | L1 | L2 | L3)
	s := uint(nb - 5)
	i0, i1, i2, i3 = montInv(m0), montInv(m1), montInv(m2), montInv(m3)
	n0, n1, n2, n3 := -i0, -i1, -i2, -i3
	// 2^top·2^64 mod m, from 2^top mod m (below m, as Div64 needs).
	_, x0 := bits.Div64((1<<(L0>>s))%m0, 0, m0)
	_, x1 := bits.Div64((1<<(L1>>s))%m1, 0, m1)
	_, x2 := bits.Div64((1<<(L2>>s))%m2, 0, m2)
	_, x3 := bits.Div64((1<<(L3>>s))%m3, 0, m3)
	for i := int(s) - 1; i >= 0; i-- {
		h0, l0 := bits.Mul64(x0, x0)
		h1, l1 := bits.Mul64(x1, x1)
		h2, l2 := bits.Mul64(x2, x2)
		h3, l3 := bits.Mul64(x3, x3)
		x0 = redc64(h0, l0, m0, n0)
		x1 = redc64(h1, l1, m1, n1)
		x2 = redc64(h2, l2, m2, n2)
		x3 = redc64(h3, l3, m3, n3)
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
	return redc64(0, x0, m0, n0), redc64(0, x1, m1, n1), redc64(0, x2, m2, n2), redc64(0, x3, m3, n3), i0, i1, i2, i3
}

// parallelWide splits [lo, hi) into pieces for the available cores and adds
// what f sums for each piece into a W-word fraction.
func parallelWide(lo, hi uint64, W int, mt *meter, f func(lo, hi uint64, s wideSum)) wideSum {
	total := make(wideSum, W)
	if hi <= lo {
		return total
	}
	workers := uint64(runtime.GOMAXPROCS(0))
	pieces := uint64(1)
	switch {
	case hi-lo >= 1<<24:
		pieces = 64 * workers // long sums: fine steps for the progress line too
	case hi-lo >= 1<<16:
		pieces = 8 * workers // more pieces than workers, so that a slow core does not hold the rest
	}
	mt.begin("digit extraction", float64(hi-lo))
	step := (hi - lo + pieces - 1) / pieces
	sums := make([]wideSum, pieces)
	next := make(chan uint64, pieces)
	for p := range pieces {
		next <- p
	}
	close(next)
	var wg sync.WaitGroup
	for range min(workers, pieces) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for p := range next {
				a := lo + p*step
				b := min(a+step, hi)
				if a < b {
					sums[p] = make(wideSum, W)
					f(a, b, sums[p])
					mt.add(float64(b - a))
				}
			}
		}()
	}
	wg.Wait()
	for _, s := range sums {
		if s != nil {
			total.addWords(s, false)
		}
	}
	return total
}

// bellard's seven terms of n: π = 2^-6 Σ_{n≥0} (−1)^n 2^(-10n) Σ_t s_t·2^(e_t)/(a_t·n + b_t)
// (Bellard 1997, the faster variant of the Bailey–Borwein–Plouffe formula):
// −2^5/(4n+1) − 1/(4n+3) + 2^8/(10n+1) − 2^6/(10n+3) − 2^2/(10n+5) − 2^2/(10n+7) + 1/(10n+9).
var bellard = [7]struct {
	e    uint64 // the power of 2 in the numerator
	a, b uint64 // the denominator a·n + b
	neg  bool   // subtracted (before (−1)^n)
}{{5, 4, 1, true}, {0, 4, 3, true}, {8, 10, 1, false}, {6, 10, 3, true}, {2, 10, 5, true}, {2, 10, 7, true}, {0, 10, 9, false}}

// piVia names the formula in what ExtractDigits says.
const piVia = "; Bellard's formula"

// piWide returns F ≈ 2^(64W)·frac(2^P·π) in W words and its error bound in
// units of 2^-64W: binary digits P+1, P+2, … of π, by Bellard's formula
// (bellard): 2^P·π = Σ_n Σ_t ±2^(P−6−10n+e_t)/(a_t·n + b_t), with odd
// denominators throughout. A term of exponent E ≥ 0 is frac(2^E/m), one
// modular power (four lanes at a time, across n); the terms of the n past
// (P−6)/10 are formed exactly, up to the n where they fall below 2^-(64W+9)
// (each n's seven terms weigh at most 362·2^E/m), and the rest add less
// than one unit. About 0.7 modular powers a bit position against BBP's 1.
// Each term is truncated once: an added one leaves the sum short by [0, 1)
// units, a subtracted one long by [0, 1); centred by half their difference,
// the error is at most half their number plus 2 (the rest and the centring's
// rounding).
func piWide(P uint64, W int, mt *meter) (wideSum, uint64) {
	var nHead uint64 // the n with every exponent ≥ 0: P − 6 − 10n ≥ 0
	if P >= 6 {
		nHead = (P-6)/10 + 1
	}
	head := func(lo, hi uint64, s wideSum) {
		q := make([]uint64, W)
		var E, m, r, inv [4]uint64
		var neg [4]bool
		lanes := 0
		for n := lo; n < hi; n++ {
			base, odd := P-6-10*n, n&1 == 1
			for ti := range bellard {
				t := &bellard[ti]
				E[lanes], m[lanes], neg[lanes] = base+t.e, t.a*n+t.b, t.neg != odd
				if lanes++; lanes == 4 {
					pow2Mod4(&E, &m, &r, &inv)
					s.addFrac(r[0], inv[0], m[0], neg[0], q)
					s.addFrac(r[1], inv[1], m[1], neg[1], q)
					s.addFrac(r[2], inv[2], m[2], neg[2], q)
					s.addFrac(r[3], inv[3], m[3], neg[3], q)
					lanes = 0
				}
			}
		}
		if lanes > 0 {
			for i := lanes; i < 4; i++ { // unused lanes: 2^0 mod 1
				E[i], m[i] = 0, 1
			}
			pow2Mod4(&E, &m, &r, &inv)
			for i := range lanes {
				s.addFrac(r[i], inv[i], m[i], neg[i], q)
			}
		}
	}
	F := parallelWide(0, nHead, W, mt, head)
	last := (P+uint64(64*W)+9)/10 + 2
	for n := nHead; n <= last; n++ {
		for _, t := range bellard {
			sh := int64(P) - 6 - 10*int64(n) + int64(t.e)
			F.addTail(1, int(sh), t.a*n+t.b, t.neg != (n%2 == 1))
		}
	}
	// Added and subtracted truncations: 2 and 5 of the seven for even n, 5
	// and 2 for odd n.
	terms := 7 * (last + 1)
	evens := last/2 + 1
	added := 2*evens + 5*(last+1-evens)
	subtracted := terms - added
	F.addUnits((int64(added) - int64(subtracted)) / 2)
	return F, terms/2 + 2
}

// ln2Wide returns F ≈ 2^(64W)·frac(2^d·ln 2) in W words and its error
// bound in units of 2^-64W: binary digits d+1, d+2, … of ln 2, from the sum
// of ln2Extract, frac(2^d ln 2) = Σ_k frac(2^(d−k)/k). With k = 2^v·m (m
// odd) and k ≤ d−70 a term is frac(2^(d−k−v)/m); the terms from there to
// k = d+64W+6 are formed exactly, and the rest add less than 2^-(64W+6).
// Each of the n truncations leaves the sum short by [0, 1) units: centred
// by n/2, the error is at most n/2 + 1 units.
func ln2Wide(d uint64, W int, mt *meter) (wideSum, uint64) {
	var split uint64 = 1
	if d > 70 {
		split = d - 69
	}
	head := func(lo, hi uint64, s wideSum) {
		q := make([]uint64, W)
		var E, m, r, inv [4]uint64
		k := lo
		for ; k < hi; k += 4 {
			for i := range uint64(4) {
				kk := min(k+i, hi-1)
				v := uint64(bits.TrailingZeros64(kk))
				E[i], m[i] = d-kk-v, kk>>v
			}
			pow2Mod4(&E, &m, &r, &inv)
			for i := range uint64(4) {
				if k+i < hi {
					s.addFrac(r[i], inv[i], m[i], false, q)
				}
			}
		}
	}
	F := parallelWide(1, split, W, mt, head)
	last := d + 64*uint64(W) + 6
	for k := split; k <= last; k++ {
		F.addTail(1, int(d)-int(k), k, false)
	}
	n := last // the k's from 1 to last
	F.addUnits(int64(n / 2))
	return F, n/2 + 1
}

// topBits returns the first nb bits of the W-word fraction F, one a byte.
func topBits(F wideSum, nb int) []byte {
	out := make([]byte, nb)
	for i := range out {
		out[i] = byte(F[i/64] >> (63 - uint(i%64)) & 1)
	}
	return out
}

// certifiedBits returns the nb binary digits of a constant after bit
// position pos of its fraction (bits pos+1 … pos+nb), from an extraction
// wide(pos, W) of the bits after pos, and says how they were determined.
// It widens the fraction until every value within the error bound shares
// the bits.
func certifiedBits(name, via string, pos uint64, nb int, mt *meter, wide func(pos uint64, W int, mt *meter) (wideSum, uint64)) ([]byte, string, error) {
	W := (nb + bits.Len64(4*pos+1024) + 8 + 63) / 64
	for ; W <= maxFarWords; W++ {
		F, e := wide(pos, W, mt)
		lo, hi := slices.Clone(F), slices.Clone(F)
		lo.addUnits(-int64(e))
		hi.addUnits(int64(e))
		a, b := topBits(lo, nb), topBits(hi, nb)
		if string(a) == string(b) {
			return a, fmt.Sprintf("binary digits %d to %d of %s by digit extraction (Bailey, Borwein & Plouffe 1997%s) with %d-bit fractions: the sum is within %d units of 2^-%d, and every value within that bound has these digits",
				pos+1, pos+uint64(nb), name, via, 64*W, e, 64*W), nil
		}
	}
	return nil, "", fmt.Errorf("the binary digits %d to %d of %s are not determined by digit extraction with %d-bit fractions (a run of equal digits follows them); ask for fewer digits", pos+1, pos+uint64(nb), name, 64*maxFarWords)
}

// MaxExtractPosition is the farthest binary position extraction serves:
// 2^40 keeps every modulus (8k+5 for π) and exponent far inside the
// 64-bit lanes, and the error bound's count of terms within a word.
const MaxExtractPosition = 1 << 40

// MaxExtractDigits bounds the digits of one extraction: 1024 bits less the
// error's words at the largest positions.
const MaxExtractDigits = 896

// CanExtract reports whether digits of the source in base b can be computed
// at any offset by digit extraction: π and ln 2 in bases 2, 4, 8 and 16.
func (s Source) CanExtract(base int) bool {
	if base != 2 && base != 4 && base != 8 && base != 16 {
		return false
	}
	return s.Name == "pi" || s.Name == "ln2"
}

// ExtractDigits returns count base-b digits of the source after its first
// offset fractional digits, by digit extraction (CanExtract), each digit
// certified, and a sentence saying how they were determined. It needs no
// memory of the digits before them.
func (s Source) ExtractDigits(base int, offset uint64, count int) ([]byte, string, error) {
	if !s.CanExtract(base) {
		return nil, "", fmt.Errorf("digit extraction gives π and ln 2 in bases 2, 4, 8 and 16, not %s in base %d", s.Name, base)
	}
	j := bits.TrailingZeros(uint(base)) // bits a digit
	if count < 1 || count*j > MaxExtractDigits {
		return nil, "", fmt.Errorf("digit extraction gives 1 to %d binary digits at a time (%d base-%d digits); asked for %d", MaxExtractDigits, MaxExtractDigits/j, base, count)
	}
	if offset*uint64(j) > MaxExtractPosition {
		return nil, "", fmt.Errorf("digit extraction reaches binary position 2^40 here; offset %d in base %d is beyond it", offset, base)
	}
	var b []byte
	var how string
	var err error
	if s.Name == "ln2" {
		b, how, err = certifiedBits("ln 2", "", offset*uint64(j), count*j, newMeter(s.meter), ln2Wide)
	} else {
		b, how, err = certifiedBits("π", piVia, offset*uint64(j), count*j, newMeter(s.meter), piWide)
	}
	if err != nil {
		return nil, "", err
	}
	out := make([]byte, count)
	for i := range out {
		var v byte
		for _, bit := range b[i*j : (i+1)*j] {
			v = v<<1 | bit
		}
		out[i] = v
	}
	return out, how, nil
}
