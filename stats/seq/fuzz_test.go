package seq

import (
	"bytes"
	"compress/gzip"
	"testing"
)

// FuzzReader: any input either reads as digits below the base, whose count
// Count reports, or fails with an error; it never panics. Text that reads
// cleanly reads the same once re-encoded.
func FuzzReader(f *testing.F) {
	var z bytes.Buffer
	zw := gzip.NewWriter(&z)
	zw.Write([]byte("3.14159 26535\n"))
	zw.Close()
	for _, seed := range [][]byte{[]byte("3.14159\n26535"), []byte("0101 1101"), []byte("zZ09."), {0xEF, 0xBB, 0xBF, '1'},
		{0xFF, 0xFE, '1', 0}, []byte("1.2.3"), []byte("-5"), z.Bytes(), z.Bytes()[:10], {0, 1, 2, 255}} {
		f.Add(seed, uint8(10), uint8(0))
	}
	f.Fuzz(func(t *testing.T, data []byte, b, format uint8) {
		opt := Options{Base: int(b%35) + 2, Format: Format(format % 3), Source: "fuzz"}
		r, err := NewReader(bytes.NewReader(data), opt)
		if err != nil {
			return
		}
		var all []byte
		for r.Scan() {
			for _, x := range r.Digits() {
				if int(x) >= r.Base() {
					t.Fatalf("digit %d not below base %d", x, r.Base())
				}
			}
			all = append(all, r.Digits()...)
		}
		if r.Err() != nil {
			return
		}
		if int64(len(all)) != r.Count() || len(all) == 0 {
			t.Fatalf("%d digits, Count %d", len(all), r.Count())
		}
		if opt.Format == Text {
			enc := make([]byte, len(all))
			for i, x := range all {
				enc[i] = "0123456789abcdefghijklmnopqrstuvwxyz"[x]
			}
			r2, err := NewReader(bytes.NewReader(enc), opt)
			if err != nil {
				t.Fatal(err)
			}
			var again []byte
			for r2.Scan() {
				again = append(again, r2.Digits()...)
			}
			if r2.Err() != nil || !bytes.Equal(again, all) {
				t.Fatalf("re-encoded text reads differently: %v", r2.Err())
			}
		}
	})
}
