package expand

import "math/big"

// isqrt returns floor(√n) for n ≥ 0, exactly, by precision doubling: the
// root of n's top half (shifted by 2s bits, s = bitlen/4) is already within
// about 2^s of √n; one Newton step r ← (r + n/r)/2 then leaves an error of
// a few units, removed by an exact correction. The cost is about two full
// divisions, where big.Int.Sqrt iterates Newton at full precision from the
// start (20 and more full divisions at a million digits).
func isqrt(n *big.Int) *big.Int {
	if n.BitLen() <= 128 {
		return new(big.Int).Sqrt(n)
	}
	s := uint(n.BitLen() / 4)
	r := isqrt(new(big.Int).Rsh(n, 2*s))
	r.Lsh(r, s)
	q := quo(n, r)
	r.Add(r, q).Rsh(r, 1)
	// Newton from above overshoots by at most a few units; settle exactly.
	sq := new(big.Int)
	for sq.Set(mul(r, r)).Cmp(n) > 0 {
		r.Sub(r, one)
	}
	next := new(big.Int)
	for {
		next.Add(r, one)
		if sq.Set(mul(next, next)).Cmp(n) > 0 {
			return r
		}
		r.Set(next)
	}
}
