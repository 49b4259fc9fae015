package expand

import (
	"math"
	"math/big"
	"strings"
	"testing"
)

func bigInt(v int64) *big.Int { return big.NewInt(v) }

// prodBig multiplies in big integers from the start: the reference for the
// term functions.
func prodBig(fs ...int64) *big.Int {
	r := big.NewInt(1)
	for _, f := range fs {
		r.Mul(r, bigInt(f))
	}
	return r
}

// The term functions against their definitions in big-integer arithmetic,
// at indices where machine-word products wrap: k³ passes 2^63 at k = 2^21
// (π to 2.97·10^7 decimals, where the defect began), and k = 2^22 made
// k³ ≡ 0 mod 2^64; 545140134·k passes 2^63 near k = 1.7·10^10.
func TestTermsAtLargeIndices(t *testing.T) {
	c3 := new(big.Int).Exp(bigInt(640320), bigInt(3), nil)
	c3.Quo(c3, bigInt(24))
	for _, k := range []int64{1, 2, 1<<21 - 1, 1 << 21, 1<<21 + 1, 1 << 22, 3_000_000_007, 1<<32 + 5, 1 << 34, 1<<40 + 3} {
		a, b, p, q := chudnovskyTerm(k)
		wantA := new(big.Int).Add(prodBig(545140134, k), bigInt(13591409))
		wantP := new(big.Int).Neg(prodBig(6*k-5, 2*k-1, 6*k-1))
		wantQ := new(big.Int).Mul(prodBig(k, k, k), c3)
		if a.Cmp(wantA) != 0 || b.Cmp(bigInt(1)) != 0 || p.Cmp(wantP) != 0 || q.Cmp(wantQ) != 0 {
			t.Errorf("Chudnovsky term %d: a=%v p=%v q=%v, want a=%v p=%v q=%v", k, a, p, q, wantA, wantP, wantQ)
		}
		if q.Sign() <= 0 {
			t.Errorf("Chudnovsky term %d: q = %v is not positive", k, q)
		}
		_, _, _, qe := expTerm(k)
		if qe.Cmp(bigInt(k)) != 0 {
			t.Errorf("e term %d: q = %v", k, qe)
		}
		for _, m := range []int64{26, 4801, 8749} {
			_, _, pa, qa := atanhInvTerm(m)(k)
			if pa.Cmp(bigInt(2*k-1)) != 0 || qa.Cmp(prodBig(2*k+1, m, m)) != 0 {
				t.Errorf("atanh(1/%d) term %d: p=%v q=%v", m, k, pa, qa)
			}
		}
	}
	// intProduct where the word product wraps and where a sign flips.
	if got, want := intProduct(1<<40, 1<<40, -3), new(big.Int).Neg(prodBig(1<<40, 1<<40, 3)); got.Cmp(want) != 0 {
		t.Errorf("intProduct: %v, want %v", got, want)
	}
	if got := intProduct(); got.Cmp(bigInt(1)) != 0 {
		t.Errorf("empty product %v", got)
	}
}

// Binary splitting across the former overflow: the product of q(k) over
// 64 terms around k = 2^21 equals the big-integer product of k³·640320³/24,
// and the combined T matches a direct sum of the terms' contributions.
func TestBinarySplitAcrossOverflow(t *testing.T) {
	lo, hi := int64(1<<21-32), int64(1<<21+32)
	r := binarySplit(chudnovskyTerm, lo, hi, 0, true, nil)
	c3 := new(big.Int).Exp(bigInt(640320), bigInt(3), nil)
	c3.Quo(c3, bigInt(24))
	P, Q, T := big.NewInt(1), big.NewInt(1), new(big.Int)
	// T = Σ_k a(k) · P(lo..k) · Q(k+1..hi), built left to right:
	// T_(k+1) = T_k·q(k) + a(k)·P(lo..k).
	for k := lo; k < hi; k++ {
		p := new(big.Int).Neg(prodBig(6*k-5, 2*k-1, 6*k-1))
		q := new(big.Int).Mul(prodBig(k, k, k), c3)
		a := new(big.Int).Add(prodBig(545140134, k), bigInt(13591409))
		P.Mul(P, p)
		T.Mul(T, q).Add(T, new(big.Int).Mul(a, P))
		Q.Mul(Q, q)
	}
	if r.P.Cmp(P) != 0 || r.Q.Cmp(Q) != 0 || r.T.Cmp(T) != 0 {
		t.Error("binary splitting over k = 2^21 ± 32 differs from the direct products")
	}
}

// The independent check at the size of the defect: hexadecimal digits
// 25 000 000 to 25 000 011 of π are 0a306cfa7cdf (Debian's python3-mpmath
// 1.2.1: libelefun.pi_fixed(4·25000011 + 64) >> 64, low 12 hex digits), and
// the next four 45b3 (the Bailey–Borwein–Plouffe sum at position 25 000 003
// evaluated separately in C with 128-bit fractions: 6cfa7cdf45b356ec, good
// to about 2^15 units). The value stated in the issue, …7cde, is one unit
// low in its last digit: its twelfth digit is beyond what an extraction at
// position 24 999 999 with 64-bit fractions determines.
func TestPiExtractionAtFormerOverflow(t *testing.T) {
	F, bound := piExtract(24999999)
	const want = 0x0a306cfa7cdf45b3
	if dist := circularDist(F, want); dist > bound+1<<16 {
		t.Errorf("hex digits 25000000..: %016x, want %016x within %d units", F, uint64(want), bound+1<<16)
	}
}

// withPerturbation runs f with perturbTerm set to double p(k) of the named
// series: term k and every later one double, so the value moves by about
// the size of term k.
func withPerturbation(series string, k int64, f func()) {
	perturbTerm = func(s string, i int64, a, b, p, q *big.Int) {
		if s == series && i == k {
			p.Lsh(p, 1)
		}
	}
	defer func() { perturbTerm = nil }()
	f()
}

// A deliberately broken series is caught by the constant's own check, at
// its first terms and at the last term whose size still reaches the digits
// asked for (above 2^-(prec−80), prec−72 being where the digits end), and no
// digits are returned.
func TestBrokenSeriesIsCaught(t *testing.T) {
	const n = 20000 // decimals
	last := float64(bitsFor(n, 10) - 80)
	eLast := int64(1) // the largest k with log2 k! ≤ last
	for lg := 0.0; lg+math.Log2(float64(eLast+1)) <= last; eLast++ {
		lg += math.Log2(float64(eLast + 1))
	}
	cases := []struct {
		source, series string
		late           int64 // the last term whose size is above 2^-(prec−80)
	}{
		{"pi", "pi", int64(last / 47.11)},
		{"e", "e", eLast},
		{"ln2", "atanh(1/26)", int64((last/math.Log2(26) - 1) / 2)},
		{"ln2", "atanh(1/4801)", int64((last/math.Log2(4801) - 1) / 2)},
		{"ln2", "atanh(1/8749)", int64((last/math.Log2(8749) - 1) / 2)},
	}
	for _, c := range cases {
		src, err := ParseSource(c.source)
		if err != nil {
			t.Fatal(err)
		}
		for _, k := range []int64{0, 1, 3, c.late} {
			withPerturbation(c.series, k, func() {
				d, err := src.Digits(n, 0, 10)
				if err == nil || !strings.Contains(err.Error(), "failed its independent check") {
					t.Errorf("%s with term %d of %s doubled: %d digits, error %v", c.source, k, c.series, len(d), err)
				}
				if d != nil {
					t.Errorf("%s: digits returned with a failed check", c.source)
				}
			})
		}
	}
	// Unperturbed, the checks pass and say what they did.
	for _, name := range []string{"pi", "e", "ln2", "sqrt2", "phi", "stoneham:2,3", "stoneham:3,2"} {
		src, _ := ParseSource(name)
		_, checks, err := src.CheckedDigits(n, 0, 10)
		if err != nil || len(checks) != 2 || checks[0] == "" {
			t.Errorf("%s: checks %q, error %v", name, checks, err)
		}
	}
}

// The value checks that do not come from a series: a root one unit off,
// and a quotient one unit off, are refused; so are digits that are not
// the value's.
func TestChecksRefuseWrongValues(t *testing.T) {
	N := new(big.Int).Lsh(bigInt(2), 2*4000)
	r := isqrt(N)
	if err := checkRoot("√2", r, N); err != nil {
		t.Fatalf("the exact root was refused: %v", err)
	}
	for _, bad := range []*big.Int{new(big.Int).Add(r, one), new(big.Int).Sub(r, one)} {
		if err := checkRoot("√2", bad, N); err == nil {
			t.Error("a root one unit off passed")
		}
	}
	a, b := new(big.Int).Lsh(one, 9000), new(big.Int).Exp(bigInt(3), bigInt(2000), nil)
	q := new(big.Int).Quo(a, b)
	if err := checkQuotient(q, a, b, "x"); err != nil {
		t.Fatalf("the exact quotient was refused: %v", err)
	}
	if err := checkQuotient(new(big.Int).Add(q, one), a, b, "x"); err == nil {
		t.Error("a quotient one unit high passed")
	}
	// Digits: 20 000 decimals of √2 (the scaled remainder tree's path), then
	// one digit changed, anywhere.
	const n = 20000
	prec := bitsFor(n, 10)
	fv, err := sqrtFixed(2)(prec, nil)
	if err != nil {
		t.Fatal(err)
	}
	d, ok := fastDigits(fv.V, fv.Err, prec, n, 10, nil)
	if !ok {
		t.Fatal("fast path not taken")
	}
	if err := checkDigits("√2", fv, prec, d, 10); err != nil {
		t.Fatalf("right digits refused: %v", err)
	}
	for _, i := range []int{0, n / 2, n - 1} {
		d[i] = (d[i] + 1) % 10
		if err := checkDigits("√2", fv, prec, d, 10); err == nil {
			t.Errorf("digit %d changed and passed", i+1)
		}
		d[i] = (d[i] + 9) % 10
	}
	// A value whose error interval straddles a digit boundary is refused
	// even with the digits of its lower end.
	half := fixedValue{V: new(big.Int).Lsh(one, prec-1), Err: 1}
	lowEnd := make([]byte, n)
	lowEnd[0] = 4
	for i := 1; i < len(lowEnd); i++ {
		lowEnd[i] = 9
	}
	if err := checkDigits("1/2", half, prec, lowEnd, 10); err == nil {
		t.Error("undecided digits passed")
	}
	// The extraction check refuses a value one unit off at the end of its
	// window's agreeing bits.
	fp, err := piFixed(prec, nil)
	if err != nil {
		t.Fatal(err)
	}
	pos := extractionPos(prec, 4)
	F, bound := piExtract(pos / 4)
	wrong := new(big.Int).Add(fp.V, new(big.Int).Lsh(one, prec-uint(pos)-30))
	if _, err := checkExtraction("π", "BBP", wrong, fp.Err, prec, pos, F, bound); err == nil {
		t.Error("π wrong in bit", pos+30, "passed the extraction check")
	}
}

// Stoneham constants with B a power of two take the shift path; their
// digits against the exact rational partial sum Σ_{k≤K} 1/(C^k B^(C^k)) in
// math/big (the tail beyond K is below 10^-n·2^-64), at lengths where the
// last term sits right at the working precision.
func TestStonehamAgainstRationalSum(t *testing.T) {
	for _, bc := range [][2]int64{{2, 3}, {4, 3}, {8, 5}, {3, 2}, {16, 7}} {
		b, c := bc[0], bc[1]
		src, err := ParseSource("stoneham:" + big.NewInt(b).String() + "," + big.NewInt(c).String())
		if err != nil {
			t.Fatal(err)
		}
		for n := 1; n <= 400; n += 1 + n/8 {
			sum := new(big.Rat)
			ck := big.NewInt(c)
			for k := int64(1); float64(ck.Int64())*math.Log2(float64(b)) < float64(n)*math.Log2(10)+128; k++ {
				den := new(big.Int).Exp(big.NewInt(b), ck, nil)
				den.Mul(den, ck)
				sum.Add(sum, new(big.Rat).SetFrac(one, den))
				ck.Mul(ck, big.NewInt(c))
			}
			scaled := new(big.Int).Mul(sum.Num(), new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(n)), nil))
			scaled.Quo(scaled, sum.Denom())
			want := scaled.Text(10)
			want = strings.Repeat("0", n-len(want)) + want
			d, err := src.Digits(n, 0, 10)
			if err != nil || text(d) != want {
				t.Fatalf("α_{%d,%d} to %d decimals: %s (%v), want %s", b, c, n, text(d), err, want)
			}
		}
	}
}
