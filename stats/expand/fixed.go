package expand

import (
	"fmt"
	"math"
	"math/big"
	"sync"
)

// A fixedValue is a constant x in [0, 1) in binary fixed point: the true
// value lies in [V - Err, V + Err] · 2^-prec. Check says, for reports, how
// the value was confirmed by a method independent of its computation.
type fixedValue struct {
	V     *big.Int
	Err   int64
	Check string
}

// A fixedFunc computes a constant at a binary precision and checks it; an
// error means the check failed and the value must not be used.
type fixedFunc func(prec uint, m *meter) (fixedValue, error)

// guardBits are added to the precision a request needs; a result too close
// to a digit boundary doubles them and tries again.
const guardBits = 64

// bitsFor returns the binary precision that n base-b digits need.
func bitsFor(n int, base int) uint {
	return uint(math.Ceil(float64(n)*math.Log2(float64(base)))) + guardBits + 8 // + 8: fracBits's margin
}

// digitsFrom returns the first n base-b digits after the point of the
// constant computed by f, and the checks they passed. It evaluates
// floor(x·b^n) at both ends of f's error interval; when they differ (the
// value is within the error bound of a digit boundary) it retries with more
// precision. The value itself is checked by f; the digits are then
// confirmed against the value by checkDigits, so every digit it returns is
// correct, and a defect in any step is an error instead of a wrong digit.
func digitsFrom(constant string, f fixedFunc, n, base int, m *meter) ([]byte, []string, error) {
	if n < 0 {
		return nil, nil, fmt.Errorf("digit count %d is negative", n)
	}
	if n == 0 {
		return []byte{}, nil, nil
	}
	var scale *big.Int
	for extra := uint(0); extra <= 4096; extra = 2*extra + guardBits {
		prec := bitsFor(n, base) + extra
		fv, err := f(prec, m)
		if err != nil {
			return nil, nil, err
		}
		v, e := fv.V, fv.Err
		m.begin("digits", float64(n))
		d, ok := fastDigits(v, e, prec, n, base, m)
		if !ok {
			if scale == nil {
				scale = pow(int64(base), n)
			}
			lo := mul(new(big.Int).Sub(v, big.NewInt(e)), scale)
			lo.Rsh(lo, prec)
			hi := mul(new(big.Int).Add(v, big.NewInt(e+1)), scale) // floor truncates: true value < v + e + 1
			hi.Sub(hi, big.NewInt(1)).Rsh(hi, prec)                // the upper end is excluded
			if lo.Cmp(hi) != 0 {
				continue
			}
			d = toDigits(lo, n, base, m)
		}
		m.begin("digit check", 0)
		if err := checkDigits(constant, fv, prec, d, base); err != nil {
			return nil, nil, err
		}
		return d, []string{fv.Check, digitCheck(n, base)}, nil
	}
	return nil, nil, fmt.Errorf("could not decide the digits of %s to %d places", constant, n)
}

// fastDigits is digitsFrom's usual path: the digits of the lower end
// V = v − e of the error interval by the scaled remainder tree, which also
// bounds frac(V·b^n/2^prec) from above; the upper end (V + 2e + 1) is at
// most (2e+1)·b^n·2^-prec ≤ 2e+1 units of 2^-64 higher (prec ≥ n·log2 b +
// 64), so both ends have the same n digits when the bound plus 2e+1 stays
// below 1. Otherwise (or for powers of two, or a value too close to 0) it
// reports false and digitsFrom takes the exact integer path.
func fastDigits(v *big.Int, e int64, prec uint, n, base int, m *meter) ([]byte, bool) {
	if base&(base-1) == 0 || prec < fracBits(n, base) || n <= 2*leafDigits {
		return nil, false
	}
	V := new(big.Int).Sub(v, big.NewInt(e))
	if V.Sign() < 0 || V.BitLen() > int(prec) {
		return nil, false
	}
	d := make([]byte, n)
	c := newPowerCache(base)
	c.meter = m
	c.warm(n)
	left, ok := fracDigits(V, prec, d, base, c, 0)
	if !ok || left >= math.MaxUint64-uint64(2*e+1) {
		return nil, false
	}
	return d, true
}

// toDigits writes v (0 ≤ v < base^n) as exactly n base-b digits.
func toDigits(v *big.Int, n, base int, m *meter) []byte {
	d := make([]byte, n)
	if base == 256 {
		b := v.Bytes()
		copy(d[n-len(b):], b)
		return d
	}
	if base&(base-1) == 0 { // powers of two: read bit fields of the byte image
		shift := int(math.Log2(float64(base)))
		bits := n * shift
		buf := v.FillBytes(make([]byte, (bits+7)/8))
		off := 8*len(buf) - bits
		for i := range d {
			var x byte
			for j := 0; j < shift; j++ {
				pos := off + i*shift + j
				x = x<<1 | buf[pos>>3]>>(7-pos&7)&1
			}
			d[i] = x
		}
		return d
	}
	c := newPowerCache(base)
	c.meter = m
	convert(v, d, base, c, 0)
	return d
}

// bsTerm gives the integers of term k of a hypergeometric-type series
// S = Σ_{k<N} a(k)/b(k) · Π_{j≤k} p(j)/q(j).
type bsTerm func(k int64) (a, b, p, q *big.Int)

type bsResult struct{ P, Q, B, T *big.Int }

// binarySplit sums the series over [n1, n2) by binary splitting
// (Haible & Papanikolaou, "Fast multiprecision evaluation of series of
// rational numbers", 1997): with P, Q, B the products of p, q, b and
// T = B·Q·S, two halves combine as
//
//	P = P_l P_r, Q = Q_l Q_r, B = B_l B_r, T = B_r Q_r T_l + B_l P_l T_r.
//
// P is not formed where no caller needs it (the root, and right children of
// nodes that do not need it). The top two levels run on separate
// goroutines. Large nodes of series with b = 1 (π, e) multiply in the
// transform domain: P_l and Q_r are transformed once for their two uses
// and T's two products are added before one inverse transform (9
// transforms where separate products take 12).
func binarySplit(term bsTerm, n1, n2 int64, depth int, needP bool, mt *meter) bsResult {
	if n2-n1 == 1 {
		a, b, p, q := term(n1)
		mt.add(nodeCost(1))
		return bsResult{P: p, Q: q, B: b, T: new(big.Int).Mul(a, p)}
	}
	defer mt.add(nodeCost(n2 - n1))
	m := (n1 + n2) / 2
	var l, r bsResult
	if depth < 2 {
		var wg sync.WaitGroup
		wg.Add(1)
		go func() { defer wg.Done(); l = binarySplit(term, n1, m, depth+1, true, mt) }()
		r = binarySplit(term, m, n2, depth+1, needP, mt)
		wg.Wait()
	} else {
		l = binarySplit(term, n1, m, depth+1, true, mt)
		r = binarySplit(term, m, n2, depth+1, needP, mt)
	}
	if nttWords && isOne(l.B) && isOne(r.B) && min(len(l.T.Bits()), len(r.T.Bits()), len(l.Q.Bits()), len(r.Q.Bits()), len(l.P.Bits())) >= nttMinWords {
		return fusedNode(l, r, needP)
	}
	if isOne(l.B) && isOne(r.B) && min(len(r.Q.Bits()), len(l.T.Bits()), len(l.Q.Bits())) >= nttMinWords {
		// Large nodes whose P stays small (e: P = 1), which the fused
		// node does not take: the transforms for the large products,
		// where math/big's Karatsuba would take O(n^1.58).
		t1 := mul(r.Q, l.T)
		t2 := mul(l.P, r.T)
		res := bsResult{Q: mul(l.Q, r.Q), B: l.B, T: t1.Add(t1, t2)}
		if needP {
			res.P = mul(l.P, r.P)
		}
		return res
	}
	if isOne(l.B) && isOne(r.B) {
		// Small nodes of b = 1 series: math/big's products, in place where
		// an operand is not needed again (the leaves are most of the nodes,
		// and allocation showed in profiles).
		t1 := new(big.Int).Mul(r.Q, l.T)
		t2 := l.T.Mul(l.P, r.T)
		res := bsResult{Q: l.Q.Mul(l.Q, r.Q), B: l.B, T: t1.Add(t1, t2)}
		if needP {
			res.P = l.P.Mul(l.P, r.P)
		}
		return res
	}
	t1 := mul(mul(r.B, r.Q), l.T)
	t2 := mul(mul(l.B, l.P), r.T)
	res := bsResult{Q: mul(l.Q, r.Q), B: mul(l.B, r.B), T: t1.Add(t1, t2)}
	if needP {
		res.P = mul(l.P, r.P)
	}
	return res
}

func isOne(v *big.Int) bool { return v.BitLen() == 1 && v.Sign() > 0 }

// fusedNode combines two halves with b = 1 in the transform domain.
func fusedNode(l, r bsResult, needP bool) bsResult {
	w := func(v *big.Int) int { return len(v.Bits()) }
	words := max(w(r.Q)+w(l.T), w(l.P)+w(r.T), w(l.Q)+w(r.Q))
	ops := []*big.Int{l.P, r.T, r.Q, l.T, l.Q}
	if needP {
		words = max(words, w(l.P)+w(r.P))
		ops = append(ops, r.P)
	}
	s := spectra(nttLen(words+1), ops...)
	// l.T, l.Q and r.P enter one product each: as its first operand, their
	// transforms take the product's residues (spent), and the three
	// products allocate none. r.Q and l.P, read by two products running
	// side by side, stay.
	s[3].spent, s[4].spent = true, true
	if needP {
		s[5].spent = true
	}
	res := bsResult{B: one}
	var wg sync.WaitGroup
	wg.Add(2)
	go func() { defer wg.Done(); res.T = sumOfProducts(product{s[3], s[2]}, product{s[1], s[0]}) }()
	go func() { defer wg.Done(); res.Q = sumOfProducts(product{s[4], s[2]}) }()
	if needP {
		res.P = sumOfProducts(product{s[5], s[0]})
	}
	wg.Wait()
	return res
}

var one = big.NewInt(1)
