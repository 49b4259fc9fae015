package expand

import (
	"math/big"
	"math/bits"
)

// The terms of the series that binary splitting sums (fixed.go). Each
// returns the integers a(k), b(k), p(k), q(k) of term k. Products of term
// indices are formed by intProduct, which never wraps: a term index is an
// int64, and k³ already passes 2^63 at k = 2^21 (π to 3·10^7 decimals).

// chudnovskyC3 is 640320³/24 = 10 939 058 860 032 000.
var chudnovskyC3 = big.NewInt(10939058860032000)

// chudnovskyTerm is term k of Chudnovsky's series (piFixed):
//
//	a(k) = 13591409 + 545140134·k,  b(k) = 1,
//	p(k) = −(6k−5)(2k−1)(6k−1),    q(k) = k³·640320³/24   (k ≥ 1),
//
// with p(0) = q(0) = 1, so that p(k)/q(k) is the ratio of consecutive
// terms of Σ (−1)^k (6k)! / ((3k)! (k!)³ 640320^(3k)).
func chudnovskyTerm(k int64) (a, b, p, q *big.Int) {
	a = intProduct(545140134, k)
	a.Add(a, big.NewInt(13591409))
	if k == 0 {
		return a, big.NewInt(1), big.NewInt(1), big.NewInt(1)
	}
	p = intProduct(6*k-5, 2*k-1, 6*k-1)
	p.Neg(p)
	q = intProduct(k, k, k)
	q.Mul(q, chudnovskyC3)
	return a, big.NewInt(1), p, q
}

// expTerm is term k of Σ_{k≥0} 1/k! (eFixed): a = b = p = 1, q(k) = k
// (q(0) = 1).
func expTerm(k int64) (a, b, p, q *big.Int) {
	if k == 0 {
		return big.NewInt(1), big.NewInt(1), big.NewInt(1), big.NewInt(1)
	}
	return big.NewInt(1), big.NewInt(1), big.NewInt(1), big.NewInt(k)
}

// atanhInvTerm returns term k of atanh(1/m) = Σ_k 1/((2k+1) m^(2k+1)) as a
// series with b = 1: t_0 = 1/m, t_k/t_(k−1) = (2k−1)/((2k+1) m²), that is
// p(k) = 2k−1 and q(k) = (2k+1)·m² (p(0) = 1, q(0) = m).
func atanhInvTerm(m int64) bsTerm {
	return func(k int64) (a, b, p, q *big.Int) {
		if k == 0 {
			return big.NewInt(1), big.NewInt(1), big.NewInt(1), big.NewInt(m)
		}
		return big.NewInt(1), big.NewInt(1), big.NewInt(2*k - 1), intProduct(2*k+1, m, m)
	}
}

// intProduct returns the product of its factors exactly. Factors are each
// within int64 (the callers' factors are linear in a term index, far from
// the int64 limits); the product is formed in machine words while it fits
// and in big integers after that.
func intProduct(factors ...int64) *big.Int {
	acc, neg := uint64(1), false
	var big_ *big.Int
	for _, f := range factors {
		if f < 0 {
			neg = !neg
			f = -f
		}
		if big_ != nil {
			big_.Mul(big_, new(big.Int).SetUint64(uint64(f)))
			continue
		}
		hi, lo := bits.Mul64(acc, uint64(f))
		if hi == 0 && lo <= 1<<63-1 {
			acc = lo
			continue
		}
		big_ = new(big.Int).SetUint64(acc)
		big_.Mul(big_, new(big.Int).SetUint64(uint64(f)))
	}
	if big_ == nil {
		big_ = new(big.Int).SetUint64(acc)
	}
	if neg {
		big_.Neg(big_)
	}
	return big_
}
