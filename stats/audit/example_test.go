package audit_test

import (
	"bytes"
	"context"
	"encoding/binary"
	"fmt"
	"math/rand/v2"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/expand"
)

// Output of Go's ChaCha8, a megabyte of it, is consistent with independent
// uniform bytes.
func ExampleGenerator() {
	r, err := audit.Generator(rand.NewChaCha8([32]byte{'d', 'o', 'c'}), 1<<20, audit.Options{})
	if err != nil {
		panic(err)
	}
	fmt.Println(r.Verdict)
	// Output: consistent
}

// Decimal digits in memory (one byte a digit, values 0..9): a source that
// repeats the previous digit 2% of the time is caught.
func ExampleDigits() {
	d := expand.Sticky(200_000, 10, 0.02, rand.New(rand.NewPCG(2, 2026)))
	r, err := audit.Digits(d, 10, audit.Source{Name: "sticky"}, audit.Options{})
	if err != nil {
		panic(err)
	}
	fmt.Println(r.Verdict)
	fmt.Println(r.Findings[r.Decisive().Index].Label())
	// Output:
	// not consistent
	// serial d2psi2 k=2
}

// A stream of text digits (here from a strings.Reader; a file or a pipe
// alike).
func ExampleReader() {
	rng := rand.New(rand.NewPCG(7, 7))
	var b strings.Builder
	for range 50_000 {
		b.WriteByte('0' + byte(rng.IntN(10)))
	}
	r, err := audit.Reader(context.Background(), strings.NewReader(b.String()), 10, audit.Options{})
	if err != nil {
		panic(err)
	}
	fmt.Println(r.Digits, r.Verdict)
	// Output: 50000 consistent
}

// Raw bytes read as 32-bit words: the Mersenne Twister fails on the linear
// complexity of its bits.
func ExampleBytes() {
	mt := expand.NewMT19937(5489)
	var buf bytes.Buffer
	for range 250_000 {
		binary.Write(&buf, binary.LittleEndian, mt.Uint32())
	}
	r, err := audit.Bytes(context.Background(), &buf, audit.Options{Word: 32})
	if err != nil {
		panic(err)
	}
	fmt.Println(r.Verdict)
	fmt.Println(r.Findings[r.Decisive().Index].Label())
	// Output:
	// not consistent
	// lincomp Lmin bit=0
}
