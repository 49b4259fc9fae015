package seq

import (
	"bytes"
	"compress/gzip"
	"math/rand/v2"
	"os/exec"
	"testing"
)

// Real gzip members are recognised (Go's writer at every level; the gzip
// program's output when it is installed); raw bytes that merely start with
// 1f 8b are data (they were taken for gzip and failed: "gzip header cannot
// be read"); GzipYes and GzipNo override the guess.
func TestGzipDetection(t *testing.T) {
	payload := []byte("0123456789")
	for _, level := range []int{gzip.NoCompression, gzip.BestSpeed, gzip.DefaultCompression, gzip.BestCompression, gzip.HuffmanOnly} {
		var buf bytes.Buffer
		zw, _ := gzip.NewWriterLevel(&buf, level)
		zw.Write(payload)
		zw.Close()
		if !LooksGzip(buf.Bytes()) {
			t.Errorf("level %d: a gzip member is not recognised (header % x)", level, buf.Bytes()[:10])
		}
		r, err := NewReader(bytes.NewReader(buf.Bytes()), Options{Base: 10})
		if err != nil || !r.Compressed() {
			t.Errorf("level %d: %v", level, err)
		}
	}
	if out, err := exec.Command("sh", "-c", "printf 0123456789 | gzip -c").Output(); err == nil && !LooksGzip(out) {
		t.Errorf("the gzip program's output is not recognised (header % x)", out[:10])
	}
	rng := rand.New(rand.NewPCG(1, 2))
	taken := 0
	for range 10000 {
		raw := make([]byte, 64)
		for i := range raw {
			raw[i] = byte(rng.Uint32())
		}
		raw[0], raw[1] = 0x1f, 0x8b
		r, err := NewReader(bytes.NewReader(raw), Options{Format: Raw})
		if err != nil {
			t.Fatalf("raw bytes starting 1f 8b refused: %v", err)
		}
		if r.Compressed() {
			taken++
			continue
		}
		var got []byte
		for r.Scan() {
			got = append(got, r.Digits()...)
		}
		if !bytes.Equal(got, raw) {
			t.Fatal("raw bytes starting 1f 8b not read as they are")
		}
	}
	if taken > 0 {
		t.Errorf("%d of 10000 random streams starting 1f 8b taken for gzip", taken)
	}
	var buf bytes.Buffer
	zw := gzip.NewWriter(&buf)
	zw.Write(payload)
	zw.Close()
	r, _ := NewReader(bytes.NewReader(buf.Bytes()), Options{Format: Raw, Gzip: GzipNo})
	var got []byte
	for r.Scan() {
		got = append(got, r.Digits()...)
	}
	if r.Compressed() || !bytes.Equal(got, buf.Bytes()) {
		t.Error("GzipNo decompressed")
	}
	if _, err := NewReader(bytes.NewReader([]byte("0123")), Options{Base: 10, Gzip: GzipYes}); err == nil {
		t.Error("GzipYes on plain text did not fail")
	}
}
