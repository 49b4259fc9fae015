package seq

import (
	"bytes"
	"compress/gzip"
	"io"
	"strings"
	"testing"
)

// readAll collects every digit of a source, copying out of the reused buffer.
func readAll(t *testing.T, in io.Reader, opt Options) ([]byte, *Reader, error) {
	t.Helper()
	r, err := NewReader(in, opt)
	if err != nil {
		return nil, nil, err
	}
	var all []byte
	for r.Scan() {
		all = append(all, r.Digits()...)
	}
	return all, r, r.Err()
}

func TestTextDigits(t *testing.T) {
	got, r, err := readAll(t, strings.NewReader("01 23\n45\t67\r\n89 aB zZ\n"), Options{Source: "t", Base: 36})
	if err != nil {
		t.Fatal(err)
	}
	want := []byte{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 35, 35}
	if !bytes.Equal(got, want) {
		t.Errorf("digits = %v, want %v", got, want)
	}
	if r.IntegerPart() != "" || r.Count() != int64(len(want)) {
		t.Errorf("integer part %q, count %d", r.IntegerPart(), r.Count())
	}
}

func TestIntegerPartDropped(t *testing.T) {
	got, r, err := readAll(t, strings.NewReader("3.14159\n26535"), Options{Source: "pi", Base: 10})
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, []byte{1, 4, 1, 5, 9, 2, 6, 5, 3, 5}) || r.IntegerPart() != "3" {
		t.Errorf("got %v, integer part %q", got, r.IntegerPart())
	}
	// Hex, with a byte-order mark and upper case.
	got, r, err = readAll(t, strings.NewReader("\xEF\xBB\xBF3.243F6A88"), Options{Source: "h", Base: 16})
	if err != nil || !bytes.Equal(got, []byte{2, 4, 3, 15, 6, 10, 8, 8}) || r.IntegerPart() != "3" {
		t.Errorf("hex: %v %q %v", got, r.IntegerPart(), err)
	}
}

// Chunks are 64 KiB: make the input span several, with the error in a later
// one, to check offsets and line numbers across chunk boundaries.
func TestErrorPositionAcrossChunks(t *testing.T) {
	line := strings.Repeat("0123456789", 7) + "\n" // 71 bytes
	var b strings.Builder
	for b.Len() < 200_000 {
		b.WriteString(line)
	}
	lines := b.Len() / len(line)
	b.WriteString("0123x5\n")
	_, _, err := readAll(t, strings.NewReader(b.String()), Options{Source: "big.txt", Base: 10})
	if err == nil {
		t.Fatal("no error for 'x'")
	}
	ie, ok := err.(*InputError)
	if !ok {
		t.Fatalf("error %T %v", err, err)
	}
	wantOff := int64(lines*len(line) + 4)
	if ie.Offset != wantOff || ie.Line != int64(lines+1) || ie.Column != 5 || ie.Char != `'x'` {
		t.Errorf("got offset %d line %d col %d char %s, want %d %d 5 'x'", ie.Offset, ie.Line, ie.Column, ie.Char, wantOff, lines+1)
	}
}

func TestBadText(t *testing.T) {
	cases := []struct {
		name, in string
		base     int
		want     string
	}{
		{"letter", "0123\n45x6", 10, `t: byte 7 (line 2, column 3): 'x' is digit value 33, not below base 10`},
		{"symbol", "01#1", 2, `t: byte 2 (line 1, column 3): '#' is not a digit of base 2`},
		{"too big", "0126", 6, `t: byte 3 (line 1, column 4): '6' is digit value 6, not below base 6`},
		{"two points", "3.14.15", 10, `'.' is a second radix point`},
		{"late point", "1415 9.2", 10, `'.' is a radix point after the start of the digits`},
		{"sign", "-0.5", 10, `'-' is a sign`},
		{"unprintable", "12\x0734", 10, `'\a' is not a digit of base 10`},
		{"utf8", "12é", 10, `'é' is not a digit of base 10 (digits are`},
		// Raw output read as text: a byte no text holds points to Raw.
		{"binary", "12\x92\x13", 10, `is not a digit of base 10, nor text: if the input holds raw bytes, use Raw (or Bits for bits)`},
		{"control", "12\x0734", 10, `nor text: if the input holds raw bytes, use Raw`},
		{"empty", "", 10, "t: the input is empty"},
		{"whitespace", " \n\t\n", 10, "t: the input holds no digits (only whitespace)"},
		{"only integer part", "3.\n", 10, "no digits after the radix point"},
		{"utf16", "\xFF\xFE3\x00.\x001\x00", 10, "UTF-16"},
		{"nul", "12\x0034", 10, "NUL byte"},
	}
	for _, c := range cases {
		_, _, err := readAll(t, strings.NewReader(c.in), Options{Source: "t", Base: c.base})
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want it to contain %q", c.name, err, c.want)
		}
	}
}

func TestRawAndBits(t *testing.T) {
	in := []byte{0x00, 0xA5, 0xFF}
	got, r, err := readAll(t, bytes.NewReader(in), Options{Format: Raw})
	if err != nil || !bytes.Equal(got, in) || r.Base() != 256 {
		t.Errorf("raw: %v base %d err %v", got, r.Base(), err)
	}
	got, r, err = readAll(t, bytes.NewReader(in), Options{Format: Bits})
	want := []byte{0, 0, 0, 0, 0, 0, 0, 0, 1, 0, 1, 0, 0, 1, 0, 1, 1, 1, 1, 1, 1, 1, 1, 1}
	if err != nil || !bytes.Equal(got, want) || r.Base() != 2 {
		t.Errorf("bits (MSB first): %v base %d err %v", got, r.Base(), err)
	}
}

func gz(t *testing.T, data []byte) []byte {
	var b bytes.Buffer
	w := gzip.NewWriter(&b)
	w.Write(data)
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

func TestGzipTransparent(t *testing.T) {
	text := []byte(strings.Repeat("31415926535897932384626433832795", 5000))
	got, r, err := readAll(t, bytes.NewReader(gz(t, text)), Options{Source: "z", Base: 10})
	if err != nil || len(got) != len(text) || !r.Compressed() {
		t.Fatalf("gzip: %d digits, compressed=%v, err %v", len(got), r.Compressed(), err)
	}
	for i := range got {
		if got[i] != text[i]-'0' {
			t.Fatalf("digit %d differs", i)
		}
	}
}

func TestGzipTruncated(t *testing.T) {
	text := []byte(strings.Repeat("271828182845904523536", 20000))
	z := gz(t, text)
	_, _, err := readAll(t, bytes.NewReader(z[:len(z)/2]), Options{Source: "z.gz", Base: 10})
	if err == nil || !strings.Contains(err.Error(), "z.gz: the gzip stream is damaged or truncated") {
		t.Errorf("truncated gzip: err %v", err)
	}
	// Trailer cut: all data there, checksum missing.
	_, _, err = readAll(t, bytes.NewReader(z[:len(z)-4]), Options{Source: "z.gz", Base: 10})
	if err == nil {
		t.Errorf("gzip without its trailer was accepted")
	}
}

func TestBaseRange(t *testing.T) {
	for _, b := range []int{0, 1, 37} {
		if _, err := NewReader(strings.NewReader("0"), Options{Base: b}); err == nil {
			t.Errorf("base %d accepted for text", b)
		}
	}
}
