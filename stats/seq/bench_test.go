package seq

import (
	"bytes"
	"testing"
)

// BenchmarkTextDecode measures decoding of text digits with line breaks.
func BenchmarkTextDecode(b *testing.B) {
	line := []byte("1415926535897932384626433832795028841971693993751058209749445923078164062862\n")
	data := bytes.Repeat(line, (4<<20)/len(line))
	digits := float64(len(data) / len(line) * (len(line) - 1))
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	for range b.N {
		r, err := NewReader(bytes.NewReader(data), Options{Base: 10})
		if err != nil {
			b.Fatal(err)
		}
		for r.Scan() {
		}
		if r.Err() != nil {
			b.Fatal(r.Err())
		}
	}
	b.ReportMetric(float64(b.N)*digits/b.Elapsed().Seconds(), "digits/s")
}
