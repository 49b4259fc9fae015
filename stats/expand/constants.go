package expand

import (
	"math"
	"math/big"
)

// piFixed: Chudnovsky's series
//
//	1/π = 12 Σ_k (-1)^k (6k)! (13591409 + 545140134k) / ((3k)! (k!)³ 640320^(3k+3/2)),
//
// summed by binary splitting (14.18 digits per term), then
// π = 426880 √10005 · Q / T. The fractional part π - 3 is returned.
func piFixed(prec uint) (*big.Int, int64) {
	terms := int64(float64(prec)/47.11) + 2 // log2(640320³/1728) ≈ 47.11 bits per term
	c3 := new(big.Int).Exp(big.NewInt(640320), big.NewInt(3), nil)
	c3.Quo(c3, big.NewInt(24))
	term := func(k int64) (a, b, p, q *big.Int) {
		a = big.NewInt(13591409 + 545140134*k)
		b = big.NewInt(1)
		if k == 0 {
			return a, b, big.NewInt(1), big.NewInt(1)
		}
		p = big.NewInt(-(6*k - 5))
		p.Mul(p, big.NewInt(2*k-1)).Mul(p, big.NewInt(6*k-1))
		q = new(big.Int).Mul(big.NewInt(k*k*k), c3)
		return a, b, p, q
	}
	r := binarySplit(term, 0, terms, 0, false)
	// π = 426880 √10005 Q / T, all scaled by 2^prec.
	// √10005 = 10005/√10005 from the division-free inverse square root:
	// |10005·X − √10005·2^wide| ≤ 10005·invSqrtErr, which becomes at most
	// π/√10005 · 10005·invSqrtErr + 1 ≈ 1300 units of 2^-wide in the quotient,
	// below one unit once the 64 guard bits are dropped.
	wide := prec + 64
	sqrt := invSqrt(10005, wide)
	sqrt.Mul(sqrt, big.NewInt(10005))
	// Q and T have about 2.3 times the bits the precision needs; only their
	// ratio matters, so both drop the same low bits, keeping wide+64 bits
	// of T: a relative error below 2^-(wide+62), under one more unit.
	q, den := new(big.Int).Abs(r.Q), new(big.Int).Abs(r.T)
	if sh := den.BitLen() - int(wide+64); sh > 0 {
		q.Rsh(q, uint(sh))
		den.Rsh(den, uint(sh))
	}
	num := mul(sqrt, q)
	num.Mul(num, big.NewInt(426880))
	v := quo(num, den)
	v.Rsh(v, 64)
	v.Sub(v, new(big.Int).Lsh(big.NewInt(3), prec))
	return v, 2
}

// eFixed: e - 2 = Σ_{k≥2} 1/k!, by binary splitting of Σ_{k≥0} 1/k!.
func eFixed(prec uint) (*big.Int, int64) {
	n := int64(2)
	for lg := 0.0; lg < float64(prec)+4; n++ {
		lg += math.Log2(float64(n))
	}
	term := func(k int64) (a, b, p, q *big.Int) {
		if k == 0 {
			return big.NewInt(1), big.NewInt(1), big.NewInt(1), big.NewInt(1)
		}
		return big.NewInt(1), big.NewInt(1), big.NewInt(1), big.NewInt(k)
	}
	v := seriesFixed(term, n, prec)
	v.Sub(v, new(big.Int).Lsh(big.NewInt(2), prec))
	return v, 3 // seriesFixed's two units and the tail's one
}

// atanhInvFixed returns floor(atanh(1/m)·2^prec) by binary splitting of
// atanh(1/m) = Σ_k 1/((2k+1) m^(2k+1)).
func atanhInvFixed(m int64, prec uint) *big.Int {
	n := int64(float64(prec)/(2*math.Log2(float64(m)))) + 2
	// As a hypergeometric series with b = 1 (so binary splitting multiplies
	// in the transform domain): t_0 = 1/m, t_k/t_(k-1) = (2k-1)/((2k+1) m²).
	m2 := big.NewInt(m * m)
	term := func(k int64) (a, b, p, q *big.Int) {
		if k == 0 {
			return big.NewInt(1), big.NewInt(1), big.NewInt(1), big.NewInt(m)
		}
		return big.NewInt(1), big.NewInt(1), big.NewInt(2*k - 1), new(big.Int).Mul(big.NewInt(2*k+1), m2)
	}
	return seriesFixed(term, n, prec)
}

// ln2Fixed: ln 2 = 18 atanh(1/26) - 2 atanh(1/4801) + 8 atanh(1/8749)
// (a Machin-like formula, as used by record computations of ln 2).
func ln2Fixed(prec uint) (*big.Int, int64) {
	w := prec + 8
	v := new(big.Int).Mul(atanhInvFixed(26, w), big.NewInt(18))
	v.Sub(v, new(big.Int).Mul(atanhInvFixed(4801, w), big.NewInt(2)))
	v.Add(v, new(big.Int).Mul(atanhInvFixed(8749, w), big.NewInt(8)))
	// Each series is within 3 units of 2^-w; weighted by 18 + 2 + 8 that is
	// 84 units of 2^-w, a third of a unit after the shift, plus its floor.
	return v.Rsh(v, 8), 2
}

// sqrtFixed: frac(√n), exact: floor(√n·2^prec) = isqrt(n·4^prec).
func sqrtFixed(n int64) fixedFunc {
	return func(prec uint) (*big.Int, int64) {
		v := isqrt(new(big.Int).Lsh(big.NewInt(n), 2*prec))
		ip := new(big.Int).Sqrt(big.NewInt(n))
		return v.Sub(v, ip.Lsh(ip, prec)), 0
	}
}

// phiFixed: frac(φ) = (√5 - 1)/2, exact.
func phiFixed(prec uint) (*big.Int, int64) {
	v := isqrt(new(big.Int).Lsh(big.NewInt(5), 2*prec)) // floor(√5 · 2^prec)
	v.Sub(v, new(big.Int).Lsh(one, prec))
	return v.Rsh(v, 1), 1 // floor((√5 - 1)/2 · 2^prec), off by at most 1 unit
}

// stonehamFixed: α_{b,c} = Σ_{k≥1} 1 / (c^k · b^(c^k)) (Stoneham 1973;
// Bailey & Crandall 2002), term by term: only about log_c(prec) terms are
// not below 2^-prec, each a power of b divided exactly, then truncated.
func stonehamFixed(b, c int64) fixedFunc {
	return func(prec uint) (*big.Int, int64) {
		sum := new(big.Int)
		var terms int64
		ck := new(big.Int).SetInt64(c) // c^k
		for k := 1; ; k++ {
			// b^(c^k) has c^k·log2 b bits; stop once the term is below 2^-prec-1.
			if float64(ck.Int64())*math.Log2(float64(b)) > float64(prec)+2 || ck.BitLen() > 40 {
				break
			}
			den := new(big.Int).Exp(big.NewInt(b), ck, nil)
			den.Mul(den, ck)
			t := new(big.Int).Lsh(one, prec)
			sum.Add(sum, t.Quo(t, den))
			terms++
			ck.Mul(ck, big.NewInt(c))
		}
		return sum, terms + 1 // truncations, plus the tail (< 1 unit)
	}
}
