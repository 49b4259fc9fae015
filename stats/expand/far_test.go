package expand

import (
	"math/big"
	"strings"
	"testing"
)

// Hexadecimal digits of π and binary digits of ln 2 after the first d of
// their fractions, from Debian's python3-mpmath 1.2.1 (gmpy backend):
// libelefun.pi_fixed(4d+224) and ln2_fixed(d+320), the bits after the first
// d (π: 4d) of the fraction, 40 hexadecimal digits (π) and 64 (ln 2).
var mpmathFar = []struct {
	src  string
	d    uint64
	want string // hexadecimal
}{
	{"pi", 0, "243f6a8885a308d313198a2e03707344a4093822"},
	{"pi", 999999, "26c65e52cb459350050e4bb178f4c67a0fcf7bf2"},
	{"pi", 9999999, "17af5863efed8de97033cd0f6b80a3d2616ec719"},
	{"ln2", 0, "b17217f7d1cf79abc9e3b39803f2f6af40f343267298b62d8a0d175b8baafa2b"},
	{"ln2", 1000000, "a923f30077196e375da88844e4cac47b5af01829abf202395de77fba53bafc84"},
	{"ln2", 10000000, "b96656358fdf9037a37a837f62d72fdbf308b09188285fd733d317f2c72683b4"},
}

// hexBits writes a hexadecimal string as binary digits, one a byte.
func hexBits(h string) []byte {
	var out []byte
	for _, c := range h {
		v := strings.IndexRune("0123456789abcdef", c)
		for j := 3; j >= 0; j-- {
			out = append(out, byte(v>>uint(j)&1))
		}
	}
	return out
}

// Every base that extraction serves, at bit positions that are and are not
// multiples of 4 (all at 10^6, two far out), against mpmath: the digits are the bits of the reference
// grouped by the base's width, skipped to the offset.
func TestExtractDigitsAgainstMpmath(t *testing.T) {
	for _, c := range mpmathFar {
		src, _ := ParseSource(c.src)
		ref := hexBits(c.want)
		start := c.d // the reference's first bit position
		if c.src == "pi" {
			start *= 4
		}
		for _, j := range []int{1, 2, 3, 4} {
			base := 1 << j
			for skip := 0; skip < 4; skip++ {
				if c.d > 5000000 && !(j == 4 && skip == 0 || j == 3 && skip == 1) {
					continue // far out, two widths are enough (each costs a second)
				}
				// the first offset whose bit position j·offset is start + skip or more
				offset := (start + uint64(skip) + uint64(j) - 1) / uint64(j)
				lead := int(offset*uint64(j) - start)
				count := (len(ref) - lead - 8) / j
				got, how, err := src.ExtractDigits(base, offset, count)
				if err != nil {
					t.Fatalf("%s base %d offset %d: %v", c.src, base, offset, err)
				}
				for i, g := range got {
					var want byte
					for _, b := range ref[lead+i*j : lead+(i+1)*j] {
						want = want<<1 | b
					}
					if g != want {
						t.Fatalf("%s base %d offset %d: digit %d is %d, mpmath %d (%s)", c.src, base, offset, i+1, g, want, how)
					}
				}
			}
		}
	}
}

// The published table of hexadecimal digits of π at positions 10^6 and
// 10^7 (Bailey, Borwein & Plouffe 1997, the table of hex digits of π
// beginning at position 10^d + 1, as recalled from the paper; mpmath
// agrees above): 26C65E52CB4593 and 17AF5863EFED8D are the digits after
// the first 999 999 and 9 999 999. Positions 10^8 to 10^10 are checked by
// bench/far.sh.
func TestExtractPublishedTable(t *testing.T) {
	src, _ := ParseSource("pi")
	for _, c := range []struct {
		offset uint64
		want   string
	}{{999999, "26c65e52cb4593"}, {9999999, "17af5863efed8d"}} {
		got, _, err := src.ExtractDigits(16, c.offset, len(c.want))
		if err != nil {
			t.Fatal(err)
		}
		var b strings.Builder
		for _, g := range got {
			b.WriteByte("0123456789abcdef"[g])
		}
		if b.String() != c.want {
			t.Errorf("hex digits of π after %d: %s, published %s", c.offset, b.String(), c.want)
		}
	}
}

// The error bounds hold in every width: each extraction is within its
// bound of the truncated reference (mpmath's bits, to 160 and 256 bits).
func TestWideErrorBounds(t *testing.T) {
	for _, c := range mpmathFar {
		wide, at := piWide, 4*c.d // piWide takes a bit position
		if c.src == "ln2" {
			wide, at = ln2Wide, c.d
		}
		ref, _ := new(big.Int).SetString(c.want, 16)
		refBits := 4 * len(c.want)
		for W := 1; 64*W <= refBits; W++ {
			F, e := wide(at, W, nil)
			got := new(big.Int)
			for _, w := range F {
				got.Lsh(got, 64)
				got.Or(got, new(big.Int).SetUint64(w))
			}
			want := new(big.Int).Rsh(ref, uint(refBits-64*W))
			mod := new(big.Int).Lsh(big.NewInt(1), uint(64*W))
			dist := new(big.Int).Sub(got, want)
			dist.Mod(dist, mod)
			if alt := new(big.Int).Sub(mod, dist); alt.Cmp(dist) < 0 {
				dist = alt
			}
			if dist.Cmp(new(big.Int).SetUint64(e+1)) > 0 {
				t.Errorf("%s at %d in %d words: %d units from mpmath, bound %d", c.src, c.d, W, dist, e)
			}
		}
	}
}

// Certification widens the fraction until the digits are determined: a
// sum whose bound straddles a digit boundary in one width and not in the
// next is extended, and one that never settles is an error.
func TestCertificationExtends(t *testing.T) {
	var widths []int
	// The value 0.0111…1 (then a 1 after 64W−40 ones): with W words the
	// error bound of 16 units reaches across 0.1 until the value sits far
	// enough below it, which it does from W = 3 on.
	fake := func(d uint64, W int, _ *meter) (wideSum, uint64) {
		widths = append(widths, W)
		F := make(wideSum, W)
		for i := range F {
			F[i] = ^uint64(0)
		}
		F[0] = 0x7fffffffffffffff
		if W >= 3 {
			F[W-1] = 0 // far below the boundary: 2^64 units of room
		}
		return F, 16
	}
	bits, how, err := certifiedBits("x", "", 0, 8, nil, fake)
	if err != nil || string(bits) != string([]byte{0, 1, 1, 1, 1, 1, 1, 1}) || widths[len(widths)-1] != 3 || !strings.Contains(how, "192-bit") {
		t.Errorf("extension: bits %v, widths %v, %q, %v", bits, widths, how, err)
	}
	never := func(d uint64, W int, _ *meter) (wideSum, uint64) {
		F := make(wideSum, W)
		F[0] = 1 << 63 // exactly on the boundary: never determined
		return F, 1
	}
	if _, _, err := certifiedBits("x", "", 0, 8, nil, never); err == nil || !strings.Contains(err.Error(), "not determined") {
		t.Errorf("a value on a boundary: %v", err)
	}
}

// bbpWide returns F ≈ 2^(64W)·frac(16^d·π) in W words and its error bound in
// units of 2^-64W: hexadecimal digits d+1, d+2, … of π, by the Bailey–Borwein–Plouffe formula
// (the formula production used before Bellard's; kept here as a second,
// independent extraction to check it against). A head term k < d (e = d−k ≥ 1) is frac(2^(4e+2)/(8k+1)) −
// frac(2^(4e−1)/(2k+1)) − frac(2^(4e)/(8k+5)) − frac(2^(4e−1)/(4k+3)); the
// terms from k = d to d+16W are formed exactly, and those after add less
// than one unit. A k's four truncations leave the sum short by
// ε0 − ε1 − ε2 − ε3 ∈ (−3, 1); centred by one unit a k, the error is below
// 2 units a k, plus the rest: errUnits = 2·(d+16W+1) + 1.
func bbpWide(d uint64, W int, mt *meter) (wideSum, uint64) {
	head := func(lo, hi uint64, s wideSum) {
		q := make([]uint64, W)
		var E, m, r, inv [4]uint64
		for k := lo; k < hi; k++ {
			e := d - k
			E = [4]uint64{4*e + 2, 4*e - 1, 4 * e, 4*e - 1}
			m = [4]uint64{8*k + 1, 2*k + 1, 8*k + 5, 4*k + 3}
			pow2Mod4(&E, &m, &r, &inv)
			s.addFrac(r[0], inv[0], m[0], false, q)
			s.addFrac(r[1], inv[1], m[1], true, q)
			s.addFrac(r[2], inv[2], m[2], true, q)
			s.addFrac(r[3], inv[3], m[3], true, q)
		}
	}
	F := parallelWide(0, d, W, mt, head)
	last := d + 16*uint64(W)
	for k := d; k <= last; k++ {
		sh := -4 * int(k-d)
		F.addTail(4, sh, 8*k+1, false)
		F.addTail(2, sh, 8*k+4, true)
		F.addTail(1, sh, 8*k+5, true)
		F.addTail(1, sh, 8*k+6, true)
	}
	n := last + 1 // the k's whose terms were truncated
	F.addUnits(-int64(n))
	return F, 2*n + 1
}

// Bellard's formula (production) and the Bailey–Borwein–Plouffe formula
// (bbpWide) agree within their bounds at hexadecimal positions near and
// far, in one and three words: two extractions that share no term.
func TestBellardAgreesWithBBP(t *testing.T) {
	for _, d := range []uint64{0, 1, 2, 3, 7, 100, 12345, 1 << 20, 3_000_001} {
		for _, W := range []int{1, 3} {
			a, ea := piWide(4*d, W, nil)
			b, eb := bbpWide(d, W, nil)
			diff := make(wideSum, W)
			copy(diff, a)
			diff.addWords(b, true)
			// |a − b| ≤ ea + eb circularly: the difference or its negation is small.
			small := func(x wideSum) bool {
				for _, w := range x[:W-1] {
					if w != 0 {
						return false
					}
				}
				return x[W-1] <= ea+eb
			}
			neg := make(wideSum, W)
			neg.addWords(diff, true)
			if !small(diff) && !small(neg) {
				t.Errorf("hex position %d, %d words: Bellard %x, BBP %x (bounds %d, %d)", d, W, a, b, ea, eb)
			}
		}
	}
}
