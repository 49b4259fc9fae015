package tally

import (
	"encoding/binary"
	"math/rand/v2"
	"testing"
)

// rawTable's scan and addTo against a plain decode: random tables of small
// counts (the one-byte, eight-at-a-time path), large ones, a negative count
// anywhere (refused), and lengths around multiples of eight.
func TestRawTable(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	for trial := range 2000 {
		n := rng.IntN(70)
		v := make([]int64, n)
		for i := range v {
			switch rng.IntN(10) {
			case 0:
				v[i] = rng.Int64N(1 << 40)
			case 1:
				v[i] = 64 + rng.Int64N(1000)
			default:
				v[i] = rng.Int64N(64)
			}
		}
		neg := n > 0 && trial%5 == 0
		if neg {
			v[rng.IntN(n)] = -1 - rng.Int64N(100)
		}
		var buf []byte
		var want int64
		for _, x := range v {
			buf = binary.AppendVarint(buf, x)
			want += x
		}
		cells, sum, err := rawTable(buf).scan("t")
		if neg {
			if err == nil {
				t.Fatalf("trial %d: a negative count passed", trial)
			}
			continue
		}
		if err != nil || cells != n || sum != want {
			t.Fatalf("trial %d: scan %d cells, sum %d, %v; want %d, %d", trial, cells, sum, err, n, want)
		}
		dst := make([]int64, n)
		for i := range dst {
			dst[i] = int64(i)
		}
		rawTable(buf).addTo(dst)
		for i := range dst {
			if dst[i] != int64(i)+v[i] {
				t.Fatalf("trial %d: addTo cell %d is %d, want %d", trial, i, dst[i], int64(i)+v[i])
			}
		}
	}
	if _, _, err := rawTable([]byte{0x80}).scan("t"); err == nil {
		t.Error("a cut varint passed")
	}
}
