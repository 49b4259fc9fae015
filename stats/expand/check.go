package expand

import (
	"fmt"
	"math"
	"math/big"
)

// Modular checks. A product of big integers computed by the transforms
// (ntt.go, bigfft) is checked against the product of its factors' residues
// modulo a prime: a wrong product passes only when its error is a multiple
// of the prime, which no defect of a multiplication routine makes on
// purpose. The prime is not of a special form (2^61 − 1 would let an error
// of one 61-bit shift through).

// checkPrime is 2^62 − 57, a prime (pari-gp 2.15: isprime(2^62-57) = 1).
const checkPrime = 1<<62 - 57

var checkPrimeBig = new(big.Int).SetUint64(checkPrime)

// checkPrimeName is how messages and reports write it.
const checkPrimeName = "2^62 − 57"

// modP returns v mod checkPrime in [0, checkPrime), for v of either sign.
func modP(v *big.Int) uint64 {
	return new(big.Int).Mod(v, checkPrimeBig).Uint64()
}

func addMod(a, b uint64) uint64 {
	s := a + b // both below 2^62: no wrap
	if s >= checkPrime {
		s -= checkPrime
	}
	return s
}

// checkedProduct reports whether ab = a·b modulo checkPrime.
func checkedProduct(a, b, ab *big.Int) bool {
	return modP(ab) == mulMod(modP(a), modP(b), checkPrime)
}

// checkedQuo returns floor(a/b) for a ≥ 0, b > 0 by quo, multiplied back
// (checkQuotient). constant names the value for the error.
func checkedQuo(a, b *big.Int, constant string) (*big.Int, error) {
	q := quo(a, b)
	return q, checkQuotient(q, a, b, constant)
}

// checkQuotient checks q = floor(a/b) by multiplying back: q·b ≤ a <
// (q+1)·b, with q·b checked modulo checkPrime.
func checkQuotient(q, a, b *big.Int, constant string) error {
	qb := mul(q, b)
	if !checkedProduct(q, b, qb) {
		return checkError(constant, fmt.Sprintf("a quotient multiplied back (%d by %d bits) differs from the product of the residues modulo %s", q.BitLen(), b.BitLen(), checkPrimeName))
	}
	r := qb.Sub(a, qb)
	if r.Sign() < 0 || r.Cmp(b) >= 0 {
		return checkError(constant, fmt.Sprintf("a quotient of %d bits multiplied back is not within one divisor of its dividend", q.BitLen()))
	}
	return nil
}

// seriesQuo returns S·2^prec for a series summed by binary splitting, within
// two units (the caller bounds the tail by one more): floor, and the
// truncation of T and B·Q — which have several times the bits the
// precision needs, and only their ratio matters — to prec+64 bits of the
// denominator, a relative error below 2^-(prec+58) for the positive series
// here (0 < S < 4). The quotient is checked by multiplying back.
func seriesQuo(r bsResult, prec uint, constant string) (*big.Int, error) {
	num, den := new(big.Int).Set(r.T), mul(r.B, r.Q)
	if sh := den.BitLen() - int(prec+64); sh > 0 {
		num.Rsh(num, uint(sh))
		den.Rsh(den, uint(sh))
	}
	return checkedQuo(num.Lsh(num, prec), den, constant)
}

// checkRoot checks r = floor(√N) by squaring back: r² ≤ N < (r+1)², that is
// 0 ≤ N − r² ≤ 2r, with r² checked modulo checkPrime.
func checkRoot(constant string, r, N *big.Int) error {
	sq := mul(r, r)
	if !checkedProduct(r, r, sq) {
		return checkError(constant, fmt.Sprintf("the root squared back differs from the square of its residue modulo %s", checkPrimeName))
	}
	d := sq.Sub(N, sq)
	if d.Sign() < 0 || d.Cmp(new(big.Int).Lsh(r, 1)) > 0 {
		return checkError(constant, "the root squared back is not within 2r of the radicand")
	}
	return nil
}

// digitCheck says what checkDigits confirmed, for reports.
func digitCheck(n, base int) string {
	return fmt.Sprintf("the %d digits equal floor(x·%d^%d) at both ends of the error bound: one exact product, checked modulo the prime %s", n, base, n, checkPrimeName)
}

// checkDigits confirms that the n base-b digits d are floor(x·b^n) for every
// x in the value's error interval [V, V + W)·2^-prec, V = v − errUnits,
// W = 2·errUnits + 1: with P = V·b^n (checked modulo checkPrime), the digits'
// integer must be P >> prec, and P's low prec bits plus W·b^n must stay
// below 2^prec (the upper end floors to the same integer). The conversion
// to digits (fraction.go, fast.go) is thereby checked by a route that does
// not share it.
func checkDigits(constant string, fv fixedValue, prec uint, d []byte, base int) error {
	n := len(d)
	V := new(big.Int).Sub(fv.V, big.NewInt(fv.Err))
	if V.Sign() < 0 || V.BitLen() > int(prec) {
		return checkError(constant, "the value's error interval leaves [0, 1)")
	}
	var B *big.Int
	if base&(base-1) == 0 {
		B = new(big.Int).Lsh(one, uint(n*bitsOf(base)))
	} else {
		B = pow(int64(base), n)
	}
	if modP(B) != powMod(uint64(base), uint64(n), checkPrime) {
		return checkError(constant, fmt.Sprintf("%d^%d differs from its residue modulo %s", base, n, checkPrimeName))
	}
	P := mul(V, B)
	if !checkedProduct(V, B, P) {
		return checkError(constant, fmt.Sprintf("the product of the value and %d^%d differs from the product of the residues modulo %s", base, n, checkPrimeName))
	}
	X := new(big.Int).Rsh(P, prec)
	low := P.Sub(P, new(big.Int).Lsh(X, prec))
	low.Add(low, B.Mul(B, big.NewInt(2*fv.Err+1)))
	if low.BitLen() > int(prec) {
		return checkError(constant, "the digits are not decided within the error bound")
	}
	if modP(X) != digitsMod(d, base) {
		return checkError(constant, fmt.Sprintf("the %d base-%d digits differ from the floor of the value times %d^%d modulo %s", n, base, base, n, checkPrimeName))
	}
	return nil
}

func bitsOf(base int) int { return int(math.Round(math.Log2(float64(base)))) }

// digitsMod returns the integer Σ d_i b^(n−1−i) modulo checkPrime, by Horner's
// rule over chunks of digits that fit in 31 bits.
func digitsMod(d []byte, base int) uint64 {
	c := int(31 / math.Log2(float64(base))) // digits a chunk: base^c < 2^31
	bc := uint64(math.Pow(float64(base), float64(c)))
	acc := uint64(0)
	for len(d) > 0 {
		m := min(c, len(d))
		scale := bc
		if m < c {
			scale = uint64(math.Pow(float64(base), float64(m)))
		}
		chunk := uint64(0)
		for _, x := range d[:m] {
			chunk = chunk*uint64(base) + uint64(x)
		}
		acc = addMod(mulMod(acc, scale, checkPrime), chunk)
		d = d[m:]
	}
	return acc
}
