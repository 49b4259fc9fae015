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

// invSqrt returns X ≈ 2^p/√a for a small integer a ≥ 2, with
// |X − 2^p/√a| ≤ invSqrtErr units, by Newton's iteration for the inverse
// square root, x ← x + x(1 − a x²)/2, with precision doubling (Brent &
// Zimmermann, Modern Computer Arithmetic, §4.2.3): only multiplications, no
// division. From X_h good to h = p/2 + 32 bits,
//
//	E = 2^(2h) − a·X_h²,   X = X_h·2^(p−h) + X_h·E / 2^(3h+1−p),
//
// whose error is (3/2)ε² relative (ε ≤ 2^-(h-3)) plus two truncations: a few
// units. Small p is exact: floor(√floor(4^p/a)) = floor(2^p/√a).
func invSqrt(a int64, p uint) *big.Int {
	if p <= 256 {
		n := new(big.Int).Lsh(one, 2*p)
		return isqrt(n.Quo(n, big.NewInt(a)))
	}
	h := p/2 + 32
	x := invSqrt(a, h)
	e := new(big.Int).Lsh(one, 2*h)
	e.Sub(e, new(big.Int).Mul(mul(x, x), big.NewInt(a)))
	c := mul(x, e)
	c.Rsh(c, 3*h+1-p)
	x.Lsh(x, p-h)
	return x.Add(x, c)
}

// invSqrtErr bounds invSqrt's error in units of 2^-p (TestInvSqrt checks it
// against the exact floor).
const invSqrtErr = 4
