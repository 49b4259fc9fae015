package expand

import (
	"bytes"
	"math"
	"math/big"
	"math/bits"
	"math/rand/v2"
	"testing"
)

func TestParseDigitsMatchesSetString(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, base := range []int{2, 3, 10, 16, 36, 256} {
		for _, n := range []int{1, 7, 255, 256, 257, 5000} {
			d := make([]byte, n)
			for i := range d {
				d[i] = byte(rng.IntN(base))
			}
			got := parseDigits(d, base)
			want := new(big.Int)
			for _, x := range d {
				want.Mul(want, big.NewInt(int64(base))).Add(want, big.NewInt(int64(x)))
			}
			if got.Cmp(want) != 0 {
				t.Fatalf("base %d, %d digits: value differs", base, n)
			}
		}
	}
}

// Rebase agrees with the digits computed directly in the target base (every
// determined digit is right) and determines nearly all it can: n digits in
// base A carry n·log A / log B base-B digits, less a few at the boundary.
func TestRebaseAgreesWithDigits(t *testing.T) {
	pi, _ := ParseSource("pi")
	for _, c := range []struct{ from, to int }{{10, 3}, {10, 2}, {16, 10}, {3, 7}, {2, 256}, {10, 36}} {
		d, err := pi.Digits(20_000, 0, c.from)
		if err != nil {
			t.Fatal(err)
		}
		got := Rebase(d, c.from, c.to)
		capacity := 20_000 * math.Log(float64(c.from)) / math.Log(float64(c.to))
		if float64(len(got)) < capacity-8 || float64(len(got)) > capacity+1 {
			t.Errorf("%d→%d: %d digits determined, capacity %.1f", c.from, c.to, len(got), capacity)
		}
		want, _ := pi.Digits(len(got), 0, c.to)
		if !bytes.Equal(got, want) {
			t.Errorf("%d→%d: the determined digits differ from π's", c.from, c.to)
		}
	}
}

// Round trip 10 → 3 → 10 recovers the determined prefix of the original,
// and never a wrong digit.
func TestRebaseRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := 0; trial < 50; trial++ {
		n := 1 + rng.IntN(3000)
		d := make([]byte, n)
		for i := range d {
			d[i] = byte(rng.IntN(10))
		}
		three := Rebase(d, 10, 3)
		back := Rebase(three, 3, 10)
		if !bytes.Equal(back, d[:len(back)]) {
			t.Fatalf("trial %d: round trip changed a digit", trial)
		}
		// Each conversion drops the digits an end-of-interval run of 0s or
		// (b-1)s leaves undetermined: a few, rarely more.
		if len(back) < n-8 {
			t.Errorf("trial %d: round trip kept %d of %d digits", trial, len(back), n)
		}
	}
}

// An interval that straddles a base-B boundary determines nothing there:
// 0.5 in base 10 with one digit is [0.5, 0.6], whose binary expansions are
// 0.1000… and 0.1001… — the first three binary digits are shared.
func TestRebaseStopsAtBoundary(t *testing.T) {
	if got := Rebase([]byte{5}, 10, 2); !bytes.Equal(got, []byte{1, 0, 0}) {
		t.Errorf("0.5 → base 2: %v", got)
	}
	if got := Rebase([]byte{0}, 10, 10); len(got) != 0 { // [0, 0.1]: 0.0… vs 0.1
		t.Errorf("0.0 → base 10: %v", got)
	}
}

// isqrt is the exact floor of the square root: r² ≤ n < (r+1)², checked
// against big.Int.Sqrt on random numbers of many sizes.
func TestIsqrt(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	for trial := 0; trial < 300; trial++ {
		bits := 1 + rng.IntN(20000)
		n := new(big.Int)
		for i := 0; i < bits; i += 32 {
			n.Lsh(n, 32).Or(n, big.NewInt(int64(rng.Uint32())))
		}
		if trial%7 == 0 { // perfect squares and neighbours
			n.Mul(n, n)
			n.Add(n, big.NewInt(int64(rng.IntN(3))-1))
			if n.Sign() < 0 {
				n.SetInt64(0)
			}
		}
		if got, want := isqrt(n), new(big.Int).Sqrt(n); got.Cmp(want) != 0 {
			t.Fatalf("isqrt of a %d-bit number differs", n.BitLen())
		}
	}
}

// invSqrt against the exact floor(√(4^p/a)) = floor(2^p/√a) from isqrt
// (itself checked against math/big above), at precisions that take several
// Newton levels.
func TestInvSqrt(t *testing.T) {
	for _, a := range []int64{2, 3, 5, 10005, 999999} {
		for _, p := range []uint{100, 300, 1000, 4321, 20000, 70001} {
			n := new(big.Int).Lsh(one, 2*p)
			want := isqrt(n.Quo(n, big.NewInt(a)))
			got := invSqrt(a, p)
			d := new(big.Int).Sub(got, want)
			if d.CmpAbs(big.NewInt(invSqrtErr)) > 0 {
				t.Fatalf("invSqrt(%d, %d) is off by %v units (bound %d)", a, p, d, invSqrtErr)
			}
		}
	}
}

// fracDigits (the scaled remainder tree) against the exact integer
// conversion of floor(F·b^n/2^Q) by big.Int.Text, on random fractions and on
// fractions built to sit just above and below digit boundaries, where the
// guard-bit tests must either give the exact digits or report failure.
func TestFracDigits(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := range 40 {
		base := []int{2, 3, 7, 10, 16, 36}[trial%6]
		n := 1 + rng.IntN(40000)
		Q := fracBits(n, base) + uint(rng.IntN(100))
		F := randomInt(rng, int(Q+bits.UintSize-1)/bits.UintSize)
		F.Mod(F, new(big.Int).Lsh(one, Q))
		if trial%4 == 1 { // just below a boundary at digit n/3: ...d999...
			k := n/3 + 1
			bk := new(big.Int).Exp(big.NewInt(int64(base)), big.NewInt(int64(k)), nil)
			m := new(big.Int).Lsh(one, Q)
			m.Mul(m, big.NewInt(int64(rng.IntN(1000)+1))).Quo(m, bk) // a multiple of b^-k, rounded down
			F.Set(m)
		}
		want := new(big.Int).Mul(F, new(big.Int).Exp(big.NewInt(int64(base)), big.NewInt(int64(n)), nil))
		want.Rsh(want, Q)
		wantDigits := make([]byte, n)
		writeDigits(want, wantDigits, base)
		got := make([]byte, n)
		c := newPowerCache(base)
		c.warm(n)
		if _, ok := fracDigits(F, Q, got, base, c, 0); ok {
			if !bytes.Equal(got, wantDigits) {
				t.Fatalf("trial %d (base %d, %d digits): fracDigits differs from the exact digits", trial, base, n)
			}
		} else if testing.Verbose() && trial%4 == 1 {
			t.Logf("trial %d: near a boundary, reported failure", trial)
		} else if trial%4 != 1 {
			t.Fatalf("trial %d: fracDigits failed on a random fraction (probability about 2^-60)", trial)
		}
	}
}

// The fast rebase (one conversion, prefix from the digits) against the
// exact one (both interval ends converted as integers), on random digit
// strings and on strings whose interval ends sit on or near boundaries of
// the target base: decimals that are dyadic (…5, …25, …0625 to base 2 and
// 4-free bases), runs of 9s and 0s, and 1/3-like runs for base 3.
func TestRebaseFastMatchesExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	type tc struct {
		d        []byte
		from, to int
	}
	var cases []tc
	randomDigits := func(n, base int) []byte {
		d := make([]byte, n)
		for i := range d {
			d[i] = byte(rng.IntN(base))
		}
		return d
	}
	for range 12 {
		from := []int{10, 3, 7, 16, 36}[rng.IntN(5)]
		to := []int{3, 10, 6, 7, 36}[rng.IntN(5)]
		if from == to {
			to = 5
		}
		cases = append(cases, tc{randomDigits(9000+rng.IntN(30000), from), from, to})
	}
	// 0.3333…3 (n digits) in base 10 to base 3: the upper end 0.333…34 is
	// just above 1/3 = 0.1 (base 3), the lower end just below.
	thirds := bytes.Repeat([]byte{3}, 20000)
	cases = append(cases, tc{thirds, 10, 3})
	// 0.5 followed by zeros: the lower end is exactly 1/2 = 0.111… in base 3.
	half := make([]byte, 20000)
	half[0] = 5
	cases = append(cases, tc{half, 10, 3})
	nines := bytes.Repeat([]byte{9}, 20000)
	cases = append(cases, tc{nines, 10, 7})
	zeros := make([]byte, 20000)
	cases = append(cases, tc{zeros, 10, 7})
	// Base 3 digits of a number then re-read: ends near base-3 boundaries.
	tern := append(bytes.Repeat([]byte{2}, 15000), 1)
	cases = append(cases, tc{tern, 3, 9 - 3})
	for i, c := range cases {
		n := len(c.d)
		M := parseDigits(c.d, c.from)
		j := int(math.Floor(float64(n)*math.Log(float64(c.from))/math.Log(float64(c.to)))) + 2
		want := rebaseExact(M, n, c.from, c.to, j)
		got, ok := rebaseFast(M, n, c.from, c.to, j)
		if !ok {
			if i < 12 { // random digits: declining has a probability near 2^-60
				t.Fatalf("case %d (%d→%d, %d random digits): the fast path declined", i, c.from, c.to, n)
			}
			t.Logf("case %d (%d→%d, %d digits): fast path declined (exact path used)", i, c.from, c.to, n)
			continue
		}
		if !bytes.Equal(got, want) {
			t.Fatalf("case %d (%d→%d, %d digits): fast rebase gives %d digits, exact %d (first difference at %d)",
				i, c.from, c.to, n, len(got), len(want), firstDiff(got, want))
		}
	}
}

func firstDiff(a, b []byte) int {
	i := 0
	for i < len(a) && i < len(b) && a[i] == b[i] {
		i++
	}
	return i
}

// 0.999 (base 10) stands for [0.999, 1): the upper end is 1, which used to
// overflow the digit buffer. By hand: 0.999·7 = 6.993, ·7 = 6.951, ·7 =
// 6.657, ·7 = 4.599, so 0.999 = 0.6664… in base 7 and the numbers just
// below 1 read 0.6666…: three digits are determined.
func TestRebaseAllNines(t *testing.T) {
	if got := Rebase([]byte{9, 9, 9}, 10, 7); !bytes.Equal(got, []byte{6, 6, 6}) {
		t.Fatalf("rebase of 0.999 to base 7 = %v, want [6 6 6]", got)
	}
}

// quoRem (Newton reciprocal, truncated operands, exact correction) against
// math/big's QuoRem on operands large enough for the fast path, including
// quotients longer than the divisor and divisors longer than the quotient.
func TestQuoRemLarge(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for _, s := range [][2]int{{9000, 4000}, {12000, 3000}, {9000, 6000}, {20000, 5000}, {7000, 3500}} {
		a, b := randomInt(rng, s[0]), randomInt(rng, s[1])
		q, r := quoRem(a, b, nil, 0)
		wq, wr := new(big.Int).QuoRem(a, b, new(big.Int))
		if q.Cmp(wq) != 0 || r.Cmp(wr) != 0 {
			t.Fatalf("%d/%d words: quoRem differs from math/big", s[0], s[1])
		}
	}
}
