package expand

import (
	"fmt"
	"math"
	"math/big"
)

// Each constant is computed in binary fixed point and then checked by a
// method that does not share its series: π and ln 2 by digit extraction
// near the end of the computed bits, e by a term-by-term evaluation of its
// binary-splitting sums modulo a prime, square roots by squaring back, and
// Stoneham's terms by multiplying back. A value that fails its check is an
// error: its digits are never returned.

// perturbTerm, when set (by tests only), may change the integers of term k
// of the named series ("pi", "e", "atanh(1/26)", …) before binary
// splitting sees them: the way to prove that a wrong series is caught.
var perturbTerm func(series string, k int64, a, b, p, q *big.Int)

// hooked returns term, routed through perturbTerm when a test set it.
func hooked(series string, term bsTerm) bsTerm {
	if perturbTerm == nil {
		return term
	}
	return func(k int64) (a, b, p, q *big.Int) {
		a, b, p, q = term(k)
		perturbTerm(series, k, a, b, p, q)
		return a, b, p, q
	}
}

// checkError reports a value that failed its independent check.
func checkError(constant, what string) error {
	return fmt.Errorf("the computed value of %s failed its independent check (%s), so its digits are not given: this is a defect in borel; please report it with the command line", constant, what)
}

// windowBits returns the 64 bits of v after its first pos fractional bits
// (v = floor(x·2^prec) within errUnits units): floor(2^64·frac(2^pos·x))
// to within errUnits+2 units of 2^-64, for pos + 64 ≤ prec.
func windowBits(v *big.Int, prec uint, pos uint64) uint64 {
	w := new(big.Int).Rsh(v, prec-uint(pos)-64)
	return w.And(w, mask64).Uint64()
}

// checkExtraction compares the bits of v after pos with an extraction F
// good to bound units, and says what agreed. The window's top bits agree
// when the distance is within the bounds; a wrong value passes with
// probability about 2(bound+slack)/2^64.
func checkExtraction(constant, method string, v *big.Int, errUnits int64, prec uint, pos, F, bound uint64) (string, error) {
	G := windowBits(v, prec, pos)
	tol := bound + uint64(errUnits) + 2
	dist := min(F-G, G-F)
	agree := 64 - bitLen64(tol)
	if dist > tol {
		return "", checkError(constant, fmt.Sprintf("binary digits %d to %d after the point differ from %s by %d units of 2^-%d, beyond its bound of %d", pos+1, pos+64, method, dist, pos+64, tol))
	}
	return fmt.Sprintf("%s agrees at binary digits %d–%d, the end of the computation", method, pos+1, pos+uint64(agree)), nil
}

func bitLen64(x uint64) int {
	n := 0
	for ; x > 0; x >>= 1 {
		n++
	}
	return n
}

// extractionPos returns the bit position of the extraction window: its 64
// bits end 24 or more bits before the last computed bit, and its agreeing
// top bits (about 34 of them at 10^8 decimals) reach past the 72 guard bits
// that follow the requested digits, so the check covers every bit they
// depend on. For π the position is a multiple of 4 (a hexadecimal digit).
func extractionPos(prec uint, align uint64) uint64 {
	if prec < 88+64 {
		return 0
	}
	return uint64(prec-88) / align * align
}

// piFixed: Chudnovsky's series
//
//	1/π = 12 Σ_k (-1)^k (6k)! (13591409 + 545140134k) / ((3k)! (k!)³ 640320^(3k+3/2)),
//
// summed by binary splitting (14.18 digits per term), then
// π = 426880 √10005 · Q / T. The fractional part π - 3 is returned, checked
// by digit extraction (Bellard's formula, of the Bailey–Borwein–Plouffe
// family) of the hexadecimal digits at the end of the precision (piExtract).
func piFixed(prec uint, mt *meter) (fixedValue, error) {
	terms := int64(float64(prec)/47.11) + 2 // log2(640320³/1728) ≈ 47.11 bits per term
	mt.begin("series", splitCost(terms))
	r := binarySplit(hooked("pi", chudnovskyTerm), 0, terms, 0, false, mt)
	mt.begin("division", 0)
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
	const errUnits = 2
	if v.Sign() < 0 || v.BitLen() > int(prec) {
		return fixedValue{}, checkError("π", "the value is not between 3 and 4")
	}
	pos := extractionPos(prec, 4)
	mt.begin("value check", 0)
	F, bound := piExtract(pos / 4)
	check, err := checkExtraction("π", "digit extraction by Bellard's formula (of the Bailey–Borwein–Plouffe family)", v, errUnits, prec, pos, F, bound)
	return fixedValue{V: v, Err: errUnits, Check: check}, err
}

// eFixed: e - 2 = Σ_{k≥2} 1/k!, by binary splitting of Σ_{k≥0} 1/k! over
// k < N, then checked twice: the root's Q = (N−1)! and T = Σ_{k<N} (N−1)!/k!
// against a term-by-term evaluation modulo the prime 2^62 − 57, and the
// quotient by multiplying it back (checkedQuo).
func eFixed(prec uint, mt *meter) (fixedValue, error) {
	n := int64(2)
	for lg := 0.0; lg < float64(prec)+4; n++ {
		lg += math.Log2(float64(n))
	}
	mt.begin("series", splitCost(n))
	r := binarySplit(hooked("e", expTerm), 0, n, 0, false, mt)
	mt.begin("division", 0)
	if q, t := expSumsMod(n); modP(r.Q) != q || modP(r.T) != t || !isOne(r.B) {
		return fixedValue{}, checkError("e", fmt.Sprintf("the binary-splitting sums of Σ_{k<%d} 1/k! differ from a term-by-term evaluation modulo %s", n, checkPrimeName))
	}
	v, err := seriesQuo(r, prec, "e")
	if err != nil {
		return fixedValue{}, err
	}
	v.Sub(v, new(big.Int).Lsh(big.NewInt(2), prec))
	check := fmt.Sprintf("Σ_{k<%d} 1/k! re-evaluated term by term modulo the prime %s agrees with the binary splitting, and the quotient multiplied back lies within one divisor", n, checkPrimeName)
	return fixedValue{V: v, Err: 3, Check: check}, nil // seriesQuo's two units and the tail's one
}

// expSumsMod returns (N−1)! and Σ_{k<N} (N−1)!/k! modulo checkPrime, term by
// term: Σ_k Π_{j=k+1}^{N−1} j, from k = N−1 down.
func expSumsMod(n int64) (q, t uint64) {
	prod, sum := uint64(1), uint64(1) // the k = N−1 term
	for k := n - 2; k >= 0; k-- {
		prod = mulMod(prod, uint64(k+1)%checkPrime, checkPrime)
		sum = addMod(sum, prod)
	}
	return prod, sum
}

// atanhInvFixed returns floor(atanh(1/m)·2^prec) within three units (the
// quotient's two and the tail's one), by binary splitting of
// atanh(1/m) = Σ_k 1/((2k+1) m^(2k+1)).
func atanhInvFixed(m int64, prec uint, mt *meter) (*big.Int, error) {
	n := atanhTerms(m, prec)
	r := binarySplit(hooked(fmt.Sprintf("atanh(1/%d)", m), atanhInvTerm(m)), 0, n, 0, false, mt)
	return seriesQuo(r, prec, "ln 2")
}

// atanhTerms is the number of terms of atanh(1/m) that 2^-prec needs:
// each term is m² times smaller than the one before.
func atanhTerms(m int64, prec uint) int64 {
	return int64(float64(prec)/(2*math.Log2(float64(m)))) + 2
}

// ln2Fixed: ln 2 = 18 atanh(1/26) - 2 atanh(1/4801) + 8 atanh(1/8749)
// (a Machin-like formula, as used by record computations of ln 2), checked
// by extracting the binary digits at the end of the precision from
// ln 2 = Σ 1/(k·2^k) (ln2Extract), a series it does not share.
func ln2Fixed(prec uint, mt *meter) (fixedValue, error) {
	w := prec + 8
	var parts [3]*big.Int
	ms := [3]int64{26, 4801, 8749}
	total := 0.0
	for _, m := range ms {
		total += splitCost(atanhTerms(m, w))
	}
	mt.begin("series", total) // the three series, their divisions not measured
	for i, m := range ms {
		p, err := atanhInvFixed(m, w, mt)
		if err != nil {
			return fixedValue{}, err
		}
		parts[i] = p
	}
	v := new(big.Int).Mul(parts[0], big.NewInt(18))
	v.Sub(v, new(big.Int).Mul(parts[1], big.NewInt(2)))
	v.Add(v, new(big.Int).Mul(parts[2], big.NewInt(8)))
	// Each series is within 3 units of 2^-w; weighted by 18 + 2 + 8 that is
	// 84 units of 2^-w, a third of a unit after the shift, plus its floor.
	v.Rsh(v, 8)
	const errUnits = 2
	pos := extractionPos(prec, 1)
	mt.begin("value check", 0)
	F, bound := ln2Extract(pos)
	check, err := checkExtraction("ln 2", "digit extraction from ln 2 = Σ 1/(k·2^k)", v, errUnits, prec, pos, F, bound)
	return fixedValue{V: v, Err: errUnits, Check: check}, err
}

// sqrtFixed: frac(√n), exact: floor(√n·2^prec) = isqrt(n·4^prec), checked
// by squaring back (checkedRoot).
func sqrtFixed(n int64) fixedFunc {
	return func(prec uint, mt *meter) (fixedValue, error) {
		name := fmt.Sprintf("√%d", n)
		mt.begin("square root", 0)
		N := new(big.Int).Lsh(big.NewInt(n), 2*prec)
		v := isqrt(N)
		if err := checkRoot(name, v, N); err != nil {
			return fixedValue{}, err
		}
		ip := new(big.Int).Sqrt(big.NewInt(n))
		return fixedValue{V: v.Sub(v, ip.Lsh(ip, prec)), Err: 0, Check: rootCheck(n)}, nil
	}
}

func rootCheck(n int64) string {
	return fmt.Sprintf("squared back: r² ≤ %d·4^p < (r+1)² for r = floor(√%d·2^p), r² checked modulo the prime %s", n, n, checkPrimeName)
}

// phiFixed: frac(φ) = (√5 - 1)/2, from the exact floor(√5·2^prec), checked
// by squaring back.
func phiFixed(prec uint, mt *meter) (fixedValue, error) {
	mt.begin("square root", 0)
	N := new(big.Int).Lsh(big.NewInt(5), 2*prec)
	v := isqrt(N) // floor(√5 · 2^prec)
	if err := checkRoot("φ", v, N); err != nil {
		return fixedValue{}, err
	}
	v.Sub(v, new(big.Int).Lsh(one, prec))
	return fixedValue{V: v.Rsh(v, 1), Err: 1, Check: rootCheck(5)}, nil // floor((√5 - 1)/2 · 2^prec), off by at most 1 unit
}

// stonehamFixed: α_{b,c} = Σ_{k≥1} 1 / (c^k · b^(c^k)) (Stoneham 1973;
// Bailey & Crandall 2002), term by term: only about log_c(prec) terms are
// not below 2^-prec, each the exact rational 1/(c^k b^(c^k)), truncated to
// floor(2^prec/(c^k b^(c^k))). Each truncation is checked by multiplying it
// back, and each denominator modulo a prime, so the sum is exact to one
// unit a term.
func stonehamFixed(b, c int64) fixedFunc {
	return func(prec uint, mt *meter) (fixedValue, error) {
		name := fmt.Sprintf("α_{%d,%d}", b, c)
		mt.begin("series", 0)
		sum := new(big.Int)
		var terms int64
		ck := new(big.Int).SetInt64(c) // c^k
		ckMod := uint64(1)
		unit := new(big.Int).Lsh(one, prec)
		j := 0 // b = 2^j: each term is a shift divided by c^k, one word
		if b&(b-1) == 0 {
			j = bitsOf(int(b))
		}
		for k := 1; ; k++ {
			// b^(c^k) has c^k·log2 b bits; stop once the term is below 2^-prec-1.
			if float64(ck.Int64())*math.Log2(float64(b)) > float64(prec)+2 || ck.BitLen() > 40 {
				break
			}
			ckMod = mulMod(ckMod, uint64(c), checkPrime)
			if modP(ck) != ckMod {
				return fixedValue{}, checkError(name, fmt.Sprintf("%d^%d differs from its residue modulo %s", c, k, checkPrimeName))
			}
			var t *big.Int
			if j > 0 {
				// floor(2^prec/(c^k·2^(j·c^k))) = floor(2^(prec−j·c^k)/c^k).
				if uint64(j)*ck.Uint64() > uint64(prec) {
					break // the term is below 2^-prec
				}
				num := new(big.Int).Lsh(one, prec-uint(j)*uint(ck.Uint64()))
				var err error
				if t, err = checkedQuo(num, ck, name); err != nil {
					return fixedValue{}, err
				}
			} else {
				den := new(big.Int).Exp(big.NewInt(b), ck, nil)
				den.Mul(den, ck)
				bMod := powMod(uint64(b)%checkPrime, ck.Uint64(), checkPrime)
				if modP(den) != mulMod(bMod, ckMod, checkPrime) {
					return fixedValue{}, checkError(name, fmt.Sprintf("the denominator of term %d differs from %d^%d·%d^(%d^%d) modulo %s", k, c, k, b, c, k, checkPrimeName))
				}
				// math/big's division: faster here than quo's Newton
				// reciprocal, which would work to the full precision.
				t = new(big.Int).Quo(unit, den)
				if err := checkQuotient(t, unit, den, name); err != nil {
					return fixedValue{}, err
				}
			}
			sum.Add(sum, t)
			terms++
			ck.Mul(ck, big.NewInt(c))
		}
		check := fmt.Sprintf("each of the %d terms 1/(%d^k·%d^(%d^k)), truncated, multiplied back to within one denominator, the denominators checked modulo the prime %s", terms, c, b, c, checkPrimeName)
		return fixedValue{V: sum, Err: terms + 1, Check: check}, nil // truncations, plus the tail (< 1 unit)
	}
}
