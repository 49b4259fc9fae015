package audit

import (
	"context"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"math/rand/v2"

	"github.com/borel-audit/borel/stats/seq"
)

// The entry points for Go programs: a stream of text digits or raw bytes,
// digits in memory (Digits), and output drawn from a Go generator. Each
// takes Options whose zero value works (DefaultOptions fills what is left
// zero) and returns one Result: its Verdict, the Findings with their marks,
// and Summary for a one-line account.

// Reader audits the text digits of base b (2..36) read from r: digits 0-9
// then a-z in either case, whitespace ignored, an integer part such as "3."
// dropped. The pass stops with ErrStopped when ctx is cancelled.
func Reader(ctx context.Context, r io.Reader, base int, opts Options) (*Result, error) {
	return stream(ctx, r, seq.Options{Format: seq.Text, Base: base, Source: "reader"}, Source{Name: "reader", Kind: "stdin", Format: "text", Bytes: -1}, opts)
}

// Bytes audits the bytes read from r as base-256 digits; with opts.Word set
// (8, 16, 24, 32 or 64) it also runs the word-level checks on them read as
// words (little-endian unless opts.BigEndian).
func Bytes(ctx context.Context, r io.Reader, opts Options) (*Result, error) {
	return stream(ctx, r, seq.Options{Format: seq.Raw, Base: 256, Source: "reader"}, Source{Name: "reader", Kind: "stdin", Format: "raw", Bytes: -1}, opts)
}

// Generator audits n bytes of a Go generator's output: its Uint64 values
// written little-endian, 8 bytes each (the last one cut to make n), as
// Bytes does. With opts.Word 64 the word-level checks read those values.
func Generator(src rand.Source, n int64, opts Options) (*Result, error) {
	if n < 1 {
		return nil, fmt.Errorf("generator: %d bytes; give at least 1", n)
	}
	d := make([]byte, n)
	var w [8]byte
	for i := int64(0); i < n; i += 8 {
		binary.LittleEndian.PutUint64(w[:], src.Uint64())
		copy(d[i:], w[:])
	}
	return Digits(d, 256, Source{Name: "generator", Kind: "built-in", Format: "raw", Bytes: n,
		Parameters: fmt.Sprintf("%d bytes of a Go rand.Source's Uint64 output, little-endian", n)}, opts)
}

func stream(ctx context.Context, r io.Reader, so seq.Options, src Source, opts Options) (*Result, error) {
	p, err := NewPlan(so.Base, -1, opts)
	if err != nil {
		return nil, err
	}
	sr, err := seq.NewReader(r, so)
	if err != nil {
		return nil, err
	}
	t, err := p.TallyAt(ctx, sr, 0)
	if err != nil {
		return nil, err
	}
	src.IntegerPart = sr.IntegerPart()
	return p.Finish(t, src)
}

// Summary is a one-line account of a result: the verdict, and the finding
// it rests on with its adjusted p-value.
func (r *Result) Summary() string {
	s := fmt.Sprintf("%s in base %d, %d digits: %s", r.Source.Name, r.Base, r.Digits, r.Verdict)
	if d := r.Decisive(); d.Index >= 0 {
		f := r.Findings[d.Index]
		p := fmt.Sprintf("%.3g", math.Exp(d.LogAdj))
		if d.LogAdj < math.Log(1e-300) {
			p = fmt.Sprintf("10^%.1f", d.LogAdj/math.Ln10)
		}
		s += fmt.Sprintf(" (smallest adjusted p %s: %s)", p, f.Label())
	}
	return s
}
