// Package seq reads digit sequences: text digits in any base 2..36, raw bytes
// as base-256 digits, and raw bytes as bits (most significant bit first),
// from any io.Reader, transparently decompressing gzip. It streams: memory
// does not grow with the input.
//
// A byte that is not a digit of the base is an error that names the source,
// the byte offset and line:column, and shows the byte; nothing is skipped or
// guessed, because dropping one digit shifts every block after it. The
// package knows nothing of checks.
package seq

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"strconv"
	"unicode/utf8"
)

// Format says how the bytes of a source encode digits.
type Format int

const (
	// Text: one character per digit, 0-9 then a-z (case-insensitive);
	// whitespace is ignored; an optional integer part and radix point may
	// open the input.
	Text Format = iota
	// Raw: every byte is one base-256 digit.
	Raw
	// Bits: every byte is eight base-2 digits, most significant bit first.
	Bits
)

// String names the format as reports do: text, raw or bits.
func (f Format) String() string {
	switch f {
	case Raw:
		return "raw"
	case Bits:
		return "bits"
	default:
		return "text"
	}
}

// MaxTextBase is the largest base that text digits 0-9a-z can spell.
const MaxTextBase = 36

// IntegerPartWindow is how far into a text input a radix point may stand:
// the integer part before it must fit in the first IntegerPartWindow bytes.
const IntegerPartWindow = 4096

const chunkSize = 1 << 16

// Table codes for text decoding; digit values are 0..35.
const (
	codeSpace   = 0x40 + iota // whitespace, ignored
	codeRadix                 // '.'
	codeTooBig                // a digit character whose value is not below the base
	codeInvalid               // anything else
)

// InputError is a reader error at a known place in the input.
type InputError struct {
	Source string // file name, or "stdin"
	Offset int64  // byte offset from the start of the (decompressed) input
	Line   int64  // 1-based line, 0 when not meaningful (raw input)
	Column int64  // 1-based byte column within the line
	Char   string // the offending character, quoted
	Reason string // what is wrong and what to do
}

// Error is the one-line message: where (byte, line, column), the character, and why.
func (e *InputError) Error() string {
	where := fmt.Sprintf("byte %d", e.Offset)
	if e.Line > 0 {
		where += fmt.Sprintf(" (line %d, column %d)", e.Line, e.Column)
	}
	if e.Char != "" {
		return fmt.Sprintf("%s: %s: %s %s", e.Source, where, e.Char, e.Reason)
	}
	return fmt.Sprintf("%s: %s: %s", e.Source, where, e.Reason)
}

// Options configures a Reader.
type Options struct {
	Source string // name used in messages
	Format Format
	Base   int // text digits only; Raw implies 256 and Bits 2
	// Gzip says whether the input is gzip-compressed: GzipAuto (the zero
	// value) decides from a valid gzip header (LooksGzip), GzipYes always
	// decompresses, GzipNo never does.
	Gzip Gzip
	// OptionName, when set, names in messages the options a program
	// offers for "Base", "Raw" and "Bits" (the base, and reading bytes as
	// raw digits or as bits); by default those words are used.
	OptionName func(option string) string
	// Live hands over the digits of each read at once instead of filling
	// the buffer first: a slow producer's digits reach the caller as they
	// come (a live audit).
	Live bool
}

func (o Options) name(opt string) string {
	if o.OptionName != nil {
		return o.OptionName(opt)
	}
	return opt
}

// Reader reads a digit sequence in chunks, in the manner of bufio.Scanner:
//
//	r, err := seq.NewReader(f, seq.Options{Source: "pi.txt", Base: 10})
//	for r.Scan() {
//		use(r.Digits()) // digit values 0..base-1, valid until the next Scan
//	}
//	if err := r.Err(); err != nil { … }
//
// Digits returns a buffer the Reader owns and reuses: callers copy what
// they keep.
type Reader struct {
	opt        Options
	in         *bufio.Reader
	closer     io.Closer // gzip reader, if any
	compressed bool
	table      [256]byte
	buf        []byte // raw bytes read
	out        []byte // decoded digits
	digits     []byte // what Digits returns
	packed     []byte // Bits: the chunk's bytes, spread out into digits only when Digits asks
	nDigits    int    // the digits of the last chunk
	offset     int64  // bytes consumed before buf
	lines      int64  // newlines before buf
	lineStart  int64  // offset of the byte after the last newline before buf
	count      int64
	intPart    string
	radixSeen  bool
	err        error
	done       bool
	eof        bool
}

// Gzip is whether an input is gzip-compressed.
type Gzip int

const (
	GzipAuto Gzip = iota // decided from the first bytes (LooksGzip)
	GzipYes              // always decompress
	GzipNo               // never: bytes 1f 8b are data
)

// LooksGzip reports whether the first 10 bytes of an input are a valid gzip
// member header (RFC 1952 §2.3): ID1 ID2 = 1f 8b, CM = 8 (deflate), no
// reserved FLG bit set, XFL 0, 2 or 4, and an OS code of 0..13 or 255.
// Random bytes pass with a chance of about 10^-11, where the bare magic
// number 1f 8b took one raw stream in 65 536 for gzip.
func LooksGzip(h []byte) bool {
	return len(h) >= 10 && h[0] == 0x1f && h[1] == 0x8b && h[2] == 8 && h[3]&0xe0 == 0 &&
		(h[8] == 0 || h[8] == 2 || h[8] == 4) && (h[9] <= 13 || h[9] == 255)
}

// NewReader returns a Reader over r. It inspects the first bytes: a gzip
// header switches on decompression (Options.Gzip); a UTF-16 byte-order mark is an error for
// text input; a UTF-8 byte-order mark is skipped. For text it also reads an
// integer part and radix point if one opens the input ("3.14159…").
func NewReader(r io.Reader, opt Options) (*Reader, error) {
	switch opt.Format {
	case Raw:
		opt.Base = 256
	case Bits:
		opt.Base = 2
	default:
		if opt.Base < 2 || opt.Base > MaxTextBase {
			return nil, fmt.Errorf("text digits need a base from 2 to %d, not %d", MaxTextBase, opt.Base)
		}
	}
	if opt.Source == "" {
		opt.Source = "input"
	}
	sr := &Reader{opt: opt, buf: make([]byte, chunkSize)}
	br := bufio.NewReaderSize(r, chunkSize)
	header, _ := br.Peek(10)
	if opt.Gzip == GzipYes || (opt.Gzip == GzipAuto && LooksGzip(header)) {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, fmt.Errorf("%s: gzip header cannot be read: %v", opt.Source, err)
		}
		sr.closer = zr
		sr.compressed = true
		br = bufio.NewReaderSize(zr, chunkSize)
	}
	sr.in = br
	if opt.Format == Text {
		sr.buildTable()
		if err := sr.readPreamble(); err != nil {
			return nil, err
		}
	}
	return sr, nil
}

func (r *Reader) buildTable() {
	for i := range r.table {
		r.table[i] = codeInvalid
	}
	set := func(c byte, v byte) {
		if int(v) < r.opt.Base {
			r.table[c] = v
		} else {
			r.table[c] = codeTooBig
		}
	}
	for c := byte('0'); c <= '9'; c++ {
		set(c, c-'0')
	}
	for c := byte('a'); c <= 'z'; c++ {
		set(c, c-'a'+10)
		set(c-'a'+'A', c-'a'+10)
	}
	for _, c := range []byte(" \t\n\r\v\f") {
		r.table[c] = codeSpace
	}
	r.table['.'] = codeRadix
}

// readPreamble handles byte-order marks and the optional integer part.
func (r *Reader) readPreamble() error {
	head, _ := r.in.Peek(IntegerPartWindow)
	switch {
	case bytes.HasPrefix(head, []byte{0xEF, 0xBB, 0xBF}):
		r.discard(3)
		head = head[3:]
	case bytes.HasPrefix(head, []byte{0xFF, 0xFE}), bytes.HasPrefix(head, []byte{0xFE, 0xFF}):
		return &InputError{Source: r.opt.Source, Offset: 0, Line: 1, Column: 1,
			Reason: "the input is UTF-16 text (byte-order mark); convert it to ASCII or UTF-8 first, e.g. with iconv -f UTF-16 -t UTF-8"}
	}
	dot := bytes.IndexByte(head, '.')
	if dot < 0 {
		return nil
	}
	// The integer part is one run of digits right before the point, after
	// optional leading whitespace; anything else is left to the main decoder,
	// which reports a misplaced point where it stands.
	start := 0
	for start < dot && r.table[head[start]] == codeSpace {
		start++
	}
	ip := head[start:dot]
	for _, c := range ip {
		if r.table[c] >= codeSpace {
			return nil
		}
	}
	if len(ip) == 0 {
		ip = []byte("0")
	}
	r.intPart = string(bytes.ToLower(ip))
	r.radixSeen = true
	r.discard(dot + 1)
	return nil
}

// discard consumes n bytes already peeked, keeping line accounting.
func (r *Reader) discard(n int) {
	b, _ := r.in.Peek(n)
	r.account(b)
	r.in.Discard(n)
}

func (r *Reader) account(b []byte) {
	if nl := bytes.Count(b, []byte{'\n'}); nl > 0 {
		r.lines += int64(nl)
		r.lineStart = r.offset + int64(bytes.LastIndexByte(b, '\n')) + 1
	}
	r.offset += int64(len(b))
}

// IntegerPart returns the integer part that preceded the radix point, in
// lower case, or "" when the input had none. It is not part of the sequence.
func (r *Reader) IntegerPart() string { return r.intPart }

// Base returns the base of the digits.
func (r *Reader) Base() int { return r.opt.Base }

// Compressed reports whether the input was gzip-compressed.
func (r *Reader) Compressed() bool { return r.compressed }

// Count returns the number of digits returned so far.
func (r *Reader) Count() int64 { return r.count }

// Offset returns the number of (decompressed) input bytes consumed so far.
func (r *Reader) Offset() int64 { return r.offset }

// Digits returns the digits decoded by the last Scan. The slice is reused.
func (r *Reader) Digits() []byte {
	if r.packed != nil && r.digits == nil {
		r.spread()
	}
	return r.digits
}

// PackedWidth returns 1 when the reader reads bytes as bits (Bits), whose
// chunks Packed returns as the bytes they are, else 0.
func (r *Reader) PackedWidth() int {
	if r.opt.Format == Bits {
		return 1
	}
	return 0
}

// Packed returns the bytes of the last Scan's chunk when the reader reads
// bits (PackedWidth 1): its digits are their bits, most significant first,
// without spreading them out one a byte as Digits does. The slice is
// reused.
func (r *Reader) Packed() []byte { return r.packed }

// spread writes the bits of the packed chunk into the digit buffer.
func (r *Reader) spread() {
	chunk := r.packed
	if cap(r.out) < 8*len(chunk) {
		r.out = make([]byte, 8*chunkSize)
	}
	out := r.out[:8*len(chunk)]
	for i, c := range chunk {
		o := out[8*i : 8*i+8 : 8*i+8]
		o[0], o[1], o[2], o[3] = c>>7, c>>6&1, c>>5&1, c>>4&1
		o[4], o[5], o[6], o[7] = c>>3&1, c>>2&1, c>>1&1, c&1
	}
	r.digits = out
}

// Err returns the first error met, or nil at a clean end of input. An input
// with no digits at all is an error.
func (r *Reader) Err() error { return r.err }

// Scan decodes the next chunk of digits. It returns false at the end of
// input or on an error; Err tells which.
func (r *Reader) Scan() bool {
	for !r.done {
		if r.eof {
			r.finish()
			return false
		}
		n, err := r.fill()
		if n > 0 {
			chunk := r.buf[:n]
			if derr := r.decode(chunk); derr != nil {
				r.fail(derr)
				return false
			}
			r.account(chunk)
		}
		switch {
		case err == io.EOF:
			r.eof = true
		case err != nil:
			r.fail(r.readError(err))
			return false
		}
		if n > 0 && r.nDigits > 0 {
			r.count += int64(r.nDigits)
			return true
		}
	}
	return false
}

// fill reads until the buffer is full, the input ends (io.EOF) or a read
// fails; unlike io.ReadFull it keeps a truncated gzip stream
// (io.ErrUnexpectedEOF from the decompressor) apart from a clean end.
func (r *Reader) fill() (int, error) {
	n := 0
	for n < len(r.buf) {
		k, err := r.in.Read(r.buf[n:])
		n += k
		if err != nil {
			return n, err
		}
		if r.opt.Live && n > 0 {
			return n, nil
		}
	}
	return n, nil
}

func (r *Reader) readError(err error) error {
	if r.compressed && (errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, gzip.ErrChecksum) || errors.Is(err, gzip.ErrHeader)) {
		return fmt.Errorf("%s: the gzip stream is damaged or truncated after %d decompressed bytes (%v); nothing was written", r.opt.Source, r.offset, err)
	}
	return fmt.Errorf("%s: read failed after %d bytes: %v", r.opt.Source, r.offset, err)
}

func (r *Reader) finish() {
	r.done = true
	r.digits, r.packed, r.nDigits = nil, nil, 0
	if r.count == 0 && r.err == nil {
		what := "the input is empty"
		switch {
		case r.intPart != "":
			what = "the input holds an integer part but no digits after the radix point"
		case r.offset > 0:
			what = "the input holds no digits (only whitespace)"
		}
		r.err = fmt.Errorf("%s: %s; a sequence needs at least one digit", r.opt.Source, what)
	}
	if r.closer != nil {
		r.closer.Close()
	}
}

func (r *Reader) fail(err error) {
	r.done = true
	r.digits, r.packed, r.nDigits = nil, nil, 0
	r.err = err
	if r.closer != nil {
		r.closer.Close()
	}
}

func (r *Reader) decode(chunk []byte) error {
	switch r.opt.Format {
	case Raw:
		r.digits, r.nDigits = chunk, len(chunk)
		return nil
	case Bits:
		r.packed, r.digits, r.nDigits = chunk, nil, 8*len(chunk)
		return nil
	}
	if cap(r.out) < len(chunk) {
		r.out = make([]byte, chunkSize)
	}
	out := r.out[:len(chunk)]
	j := 0
	tab := &r.table
	fast := r.opt.Base >= 10 // then every ASCII '0'..'9' is a digit of the base
	for i := 0; i < len(chunk); {
		if fast && i+8 <= len(chunk) && j+8 <= len(out) {
			// Eight bytes at a time when all are '0'..'9' (SWAR): x - '0' per
			// byte borrows into a high bit for a byte below '0', and x + 0x46
			// per byte sets it for a byte above '9'.
			x := binary.LittleEndian.Uint64(chunk[i:])
			lo := x - 0x3030303030303030
			hi := x + 0x4646464646464646
			if (x|lo|hi)&0x8080808080808080 == 0 {
				binary.LittleEndian.PutUint64(out[j:], lo)
				i += 8
				j += 8
				continue
			}
		}
		c := chunk[i]
		v := tab[c]
		switch {
		case v < codeSpace:
			out[j] = v
			j++
		case v == codeSpace:
		default:
			return r.textError(chunk, i, v)
		}
		i++
	}
	r.digits, r.nDigits = out[:j], j
	return nil
}

func (r *Reader) textError(chunk []byte, i int, code byte) error {
	e := &InputError{Source: r.opt.Source, Offset: r.offset + int64(i)}
	if r.compressed {
		e.Source += " (decompressed)"
	}
	e.Line = r.lines + int64(bytes.Count(chunk[:i], []byte{'\n'})) + 1
	lineStart := r.lineStart
	if k := bytes.LastIndexByte(chunk[:i], '\n'); k >= 0 {
		lineStart = r.offset + int64(k) + 1
	}
	e.Column = e.Offset - lineStart + 1
	c := chunk[i]
	e.Char = showByte(chunk[i:])
	switch {
	case code == codeTooBig:
		e.Reason = fmt.Sprintf("is digit value %d, not below base %d; give the right %s", digitValue(c), r.opt.Base, r.opt.name("Base"))
	case code == codeRadix && r.radixSeen:
		e.Reason = "is a second radix point; a sequence has one at most"
	case code == codeRadix:
		e.Reason = fmt.Sprintf("is a radix point after the start of the digits; one is accepted only after an integer part within the first %d bytes", IntegerPartWindow)
	case c == '-' || c == '+':
		e.Reason = "is a sign, which a digit sequence cannot have; give the digits after the radix point"
	case c == 0:
		e.Reason = fmt.Sprintf("is a NUL byte, not a digit; is this UTF-16 or binary data? Use %s or %s for bytes", r.opt.name("Raw"), r.opt.name("Bits"))
	case binaryByte(chunk[i:]):
		e.Reason = fmt.Sprintf("is not a digit of base %d, nor text: if the input holds raw bytes, use %s (or %s for bits)", r.opt.Base, r.opt.name("Raw"), r.opt.name("Bits"))
	default:
		e.Reason = fmt.Sprintf("is not a digit of base %d (digits are 0-9 then a-z; whitespace is ignored)", r.opt.Base)
	}
	return e
}

// binaryByte reports whether b starts with what no text holds: a control
// character other than whitespace, or a byte that starts no valid UTF-8.
func binaryByte(b []byte) bool {
	c := b[0]
	if c < 0x20 || c == 0x7f {
		return true
	}
	if c < utf8.RuneSelf {
		return false
	}
	r, size := utf8.DecodeRune(b)
	return r == utf8.RuneError && size <= 1 && utf8.FullRune(b)
}

func digitValue(c byte) int {
	switch {
	case c >= '0' && c <= '9':
		return int(c - '0')
	case c >= 'a' && c <= 'z':
		return int(c-'a') + 10
	default:
		return int(c-'A') + 10
	}
}

// showByte renders the character at the start of b for a message: quoted,
// escaped when unprintable, the whole rune when it is valid UTF-8.
func showByte(b []byte) string {
	if b[0] >= utf8.RuneSelf {
		if ru, size := utf8.DecodeRune(b); ru != utf8.RuneError && size > 1 {
			return strconv.QuoteRune(ru)
		}
		return fmt.Sprintf("byte 0x%02X", b[0])
	}
	return strconv.QuoteRune(rune(b[0]))
}
