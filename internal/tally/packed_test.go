package tally

import (
	"encoding/json"
	"math/rand/v2"
	"slices"
	"testing"
)

// pack packs digits of s bits, 8/s to a byte, most significant first (the
// reader's raw bytes read as bits, bit pairs or nibbles).
func pack(d []byte, s int) []byte {
	m := 8 / s
	p := make([]byte, len(d)/m)
	for i := range p {
		for j := range m {
			p[i] = p[i]<<s | d[i*m+j]
		}
	}
	return p
}

func TestUnpack(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, s := range []int{1, 2, 4} {
		d := randomDigits(rng, 8*1000, 1<<s)
		p := pack(d, s)
		if got := unpack(nil, p, s); !slices.Equal(got, d) {
			t.Fatalf("s=%d: unpack differs", s)
		}
		for range 200 {
			a := rng.IntN(len(d))
			b := a + rng.IntN(len(d)-a+1)
			if got := digitsOf(p, s, a, b); !slices.Equal(got, d[a:b]) && (len(got) > 0 || b > a) {
				t.Fatalf("s=%d: digitsOf(%d, %d) differs", s, a, b)
			}
		}
	}
}

// Packed chunks give the tally of their digits added one a byte, record for
// record, whatever the chunking, the offset, the worker count and the byte
// counters: random specs in bases 2, 4 and 16, skewed and uniform digits
// (long runs and gaps reach the caps), and a stretch that starts inside a
// byte (added the long way).
func TestPackedEqualsDigits(t *testing.T) {
	defer func(w, c, h int) { warmupDigits, calibrationDigits, hotMinCells = w, c, h }(warmupDigits, calibrationDigits, hotMinCells)
	warmupDigits, calibrationDigits = 4096, 3*4096
	rng := rand.New(rand.NewPCG(11, 12))
	for trial := range 120 {
		s := []int{1, 2, 4}[trial%3]
		base, m := 1<<s, 8/s
		hotMinCells = []int{1 << 16, 16}[rng.IntN(2)]
		spec := randomSpec(rng, base, 1+rng.IntN(12/s+1))
		if rng.IntN(3) == 0 {
			spec.Records = append(spec.Records[:0:0], &GapSpec{}, &CouponSpec{Classes: base, Class: identity(base), Cap: 40}, &UpDownSpec{Digits: 64 / s}, &RunSpec{Digit: base - 1}, &WalkSpec{}, &LagSpec{Max: 5}, &HandSpec{Size: 2 + rng.IntN(3)})
		}
		n := m * (3000 + rng.IntN(30_000))
		var d []byte
		if rng.IntN(2) == 0 {
			d = randomDigits(rng, n, base)
		} else { // skewed: long runs of the top digit
			d = make([]byte, n)
			for i := range d {
				if rng.IntN(10) != 0 {
					d[i] = byte(base - 1)
				} else {
					d[i] = byte(rng.IntN(base))
				}
			}
		}
		offset := int64(m * rng.IntN(1000))
		if trial%10 == 9 {
			offset++ // not at a byte of the whole sequence
		}
		want := mustNew(t, spec, offset)
		want.Add(d)
		p := pack(d, s)
		for _, w := range []int{1, 2} {
			got := mustNew(t, spec, offset)
			r := NewRunner(got, w)
			for i := 0; i < len(p); {
				j := min(len(p), i+1+rng.IntN(3000))
				if rng.IntN(20) == 0 {
					j = i + 1 + rng.IntN(3)
				}
				r.AddPacked(p[i:j])
				i = j
			}
			if !same(got, want) {
				for i := range got.recs {
					if !same1(got.recs[i], want.recs[i]) {
						t.Errorf("record %s differs", got.recs[i].kind())
					}
				}
				t.Fatalf("trial %d (base %d, %d workers, spec %+v): packed chunks give a different tally", trial, base, w, spec)
			}
		}
	}
}

func identity(n int) []int {
	c := make([]int, n)
	for i := range c {
		c[i] = i
	}
	return c
}

func same1(a, b record) bool {
	ea, _ := json.Marshal(a.entry(nil))
	eb, _ := json.Marshal(b.entry(nil))
	return string(ea) == string(eb)
}

// The longest run can lie inside one byte, touching neither of its ends:
// the byte tables' own longest runs must count (random digits rarely show
// it).
func TestPackedRunInsideByte(t *testing.T) {
	for _, s := range []int{1, 2} {
		m := 8 / s
		d := make([]byte, 800*m)
		for i := range d {
			d[i] = byte(i % 2) // runs of one
		}
		at, top := 500*m, byte(1<<s-1) // a later chunk: the first goes through add
		d[at], d[at+m-1] = 0, 0
		for j := 1; j < m-1; j++ {
			d[at+j] = top // top, top, … between two zeros
		}
		spec := Spec{Base: 1 << s, MaxBlock: 1, Records: []RecordSpec{&RunSpec{Digit: int(top)}}}
		want := mustNew(t, spec, 0)
		want.Add(d)
		got := mustNew(t, spec, 0)
		p := pack(d, s)
		got.AddPacked(p[:100])
		got.AddPacked(p[100:])
		if w, g := want.Runs(), got.Runs(); w.Any != g.Any || w.Dig != g.Dig || w.Any.Max != int64(m-2) || w.Dig.Max != int64(m-2) {
			t.Fatalf("s=%d: packed runs %+v, digits %+v (longest %d inside one byte)", s, g, w, m-2)
		}
	}
}

// Chunks shorter than a 64-bit load (a file's last few bytes): every
// packed kernel must read them without running off the end.
func TestPackedShortChunks(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, s := range []int{1, 2, 4} {
		base, m := 1<<s, 8/s
		spec := Spec{Base: base, MaxBlock: 24 / s, Records: []RecordSpec{&GapSpec{}, &UpDownSpec{Digits: 32 / s},
			&RunSpec{Digit: 0}, &WalkSpec{}, &CouponSpec{Classes: base, Class: identity(base), Cap: 40}}}
		d := randomDigits(rng, m*4000, base)
		want := mustNew(t, spec, 0)
		want.Add(d)
		got := mustNew(t, spec, 0)
		p := pack(d, s)
		for i := 0; i < len(p); {
			j := min(len(p), i+1+rng.IntN(7)) // 1 to 7 bytes
			got.AddPacked(p[i:j])
			i = j
		}
		if !same(got, want) {
			t.Fatalf("base %d: short packed chunks give a different tally", base)
		}
	}
}

// A byte that is not a digit of the base makes Add panic in the gap
// record, with gap classes given or not (the reader never sends one; Add's
// contract), rather than being counted as some class.
func TestGapsRefuseNonDigits(t *testing.T) {
	for _, classes := range [][]int{nil, {0, 1, 1, 0}} {
		tl := mustNew(t, Spec{Base: 4, MaxBlock: 1, Records: []RecordSpec{&GapSpec{Class: classes}}}, 0)
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("classes %v: digit 7 in base 4 did not panic", classes)
				}
			}()
			tl.Add([]byte{0, 1, 2, 3, 0, 1, 2, 3, 7, 0, 1, 2, 3})
		}()
	}
}

// Add panics on a byte that is not a digit of the base even when no
// record but the digit counts reads it (windows of one digit, no extras).
func TestDigitCountsRefuseNonDigits(t *testing.T) {
	tl := mustNew(t, Spec{Base: 4, MaxBlock: 1}, 0)
	defer func() {
		if recover() == nil {
			t.Error("digit 7 in base 4 did not panic")
		}
	}()
	tl.Add([]byte{0, 1, 2, 3, 7, 0})
}
