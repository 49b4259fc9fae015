// Package expand produces digits: the fractional decimal digits of
// constants, computed exactly in integer arithmetic. It knows nothing of
// checks. Every digit it returns is correct: series are summed in fixed
// point with guard digits and a bound on the accumulated error, and a result
// whose guard digits lie within that bound of a digit boundary is computed
// again with more guard digits.
package expand

import (
	"fmt"
	"math/big"
)

// MaxDigits bounds a request; these quadratic-time routines are meant for
// built-in sequences and tests, up to a few hundred thousand digits.
const MaxDigits = 2_000_000

// series computes floor(x·10^(n+guard)) for a fixed-point approximation of
// x and an error bound, in units of the last place.
type series func(scale *big.Int) (value *big.Int, errBound int64)

// digitsOf returns the first n fractional decimal digits of the constant
// approximated by f, retrying with more guard digits when the approximation
// is too close to a digit boundary to decide the last digit.
func digitsOf(n int, f series) ([]byte, error) {
	if n < 0 || n > MaxDigits {
		return nil, fmt.Errorf("digit count %d outside 0..%d", n, MaxDigits)
	}
	for guard := 20; guard <= 200; guard *= 2 {
		scale := new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(n+guard)), nil)
		v, eb := f(scale)
		g := new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(guard)), nil)
		q, rem := new(big.Int).QuoRem(v, g, new(big.Int))
		// The true value lies in [v - eb, v + eb]: the digits are decided
		// when that interval does not cross a multiple of 10^guard.
		if rem.Cmp(big.NewInt(eb)) < 0 || new(big.Int).Sub(g, rem).Cmp(big.NewInt(eb+1)) < 0 {
			continue
		}
		return fractionalDigits(q, n), nil
	}
	return nil, fmt.Errorf("could not decide the last of %d digits", n)
}

// fractionalDigits returns the last n decimal digits of q (the digits after
// the integer part), as values 0..9.
func fractionalDigits(q *big.Int, n int) []byte {
	s := q.Text(10)
	if len(s) < n {
		s = fmt.Sprintf("%0*s", n, s)
	}
	s = s[len(s)-n:]
	d := make([]byte, n)
	for i := range d {
		d[i] = s[i] - '0'
	}
	return d
}

// arctanInv returns floor-ish(scale·arctan(1/x)) by its Taylor series
// Σ (-1)^k / ((2k+1) x^(2k+1)), and the number of truncating divisions
// (each off by less than one unit).
func arctanInv(x int64, scale *big.Int) (*big.Int, int64) {
	sum := new(big.Int)
	pow := new(big.Int).Quo(scale, big.NewInt(x)) // scale/x^(2k+1)
	x2 := big.NewInt(x * x)
	term := new(big.Int)
	var ops int64 = 1
	for k := int64(0); pow.Sign() != 0; k++ {
		term.Quo(pow, big.NewInt(2*k+1))
		if k%2 == 0 {
			sum.Add(sum, term)
		} else {
			sum.Sub(sum, term)
		}
		pow.Quo(pow, x2)
		ops += 2
	}
	return sum, ops
}

// Pi returns the first n decimals of π after the point (3.14159… → 1, 4, 1,
// 5, 9, …), by Machin's formula π = 16 arctan(1/5) - 4 arctan(1/239).
func Pi(n int) ([]byte, error) {
	return digitsOf(n, func(scale *big.Int) (*big.Int, int64) {
		a, ea := arctanInv(5, scale)
		b, eb := arctanInv(239, scale)
		v := new(big.Int).Sub(new(big.Int).Mul(a, big.NewInt(16)), new(big.Int).Mul(b, big.NewInt(4)))
		return v, 16*ea + 4*eb
	})
}

// E returns the first n decimals of e = Σ 1/k! after the point.
func E(n int) ([]byte, error) {
	return digitsOf(n, func(scale *big.Int) (*big.Int, int64) {
		sum := new(big.Int).Mul(scale, big.NewInt(2)) // 1/0! + 1/1!
		term := new(big.Int).Set(scale)
		var ops int64
		for k := int64(2); term.Sign() != 0; k++ {
			term.Quo(term, big.NewInt(k))
			sum.Add(sum, term)
			ops++
		}
		// Truncation error of the tail is below one unit once term is 0.
		return sum, ops + 1
	})
}

// Sqrt returns the first n decimals of √m after the point, for a positive
// integer m that is not a perfect square. The integer square root is exact,
// so no guard digits are needed.
func Sqrt(m int64, n int) ([]byte, error) {
	if m <= 0 {
		return nil, fmt.Errorf("sqrt needs a positive integer, not %d", m)
	}
	r := new(big.Int).Sqrt(big.NewInt(m))
	if new(big.Int).Mul(r, r).Cmp(big.NewInt(m)) == 0 {
		return nil, fmt.Errorf("%d is a perfect square: its square root has no fractional digits", m)
	}
	if n < 0 || n > MaxDigits {
		return nil, fmt.Errorf("digit count %d outside 0..%d", n, MaxDigits)
	}
	scale := new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(2*n)), nil)
	v := new(big.Int).Sqrt(new(big.Int).Mul(big.NewInt(m), scale))
	return fractionalDigits(v, n), nil
}
