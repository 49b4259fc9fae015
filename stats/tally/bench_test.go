package tally

import (
	"math/rand/v2"
	"testing"
)

// Benchmarks of each tally kernel over one 64 KiB digit buffer, as the
// reader delivers them; digits/s is reported with b.ReportMetric.

func benchKernel(b *testing.B, base, K int, kernel func(t *Tally, d []byte)) {
	d := randomDigits(rand.New(rand.NewPCG(1, 1)), 1<<16, base)
	t, err := New(Spec{Base: base, MaxBlock: K}, 0)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for range b.N {
		kernel(t, d)
	}
	b.ReportMetric(float64(b.N)*float64(len(d))/b.Elapsed().Seconds(), "digits/s")
}

func BenchmarkDigits(b *testing.B) {
	benchKernel(b, 10, 5, func(t *Tally, d []byte) { t.addDigits(d) })
}

func BenchmarkOverlapK5(b *testing.B) {
	benchKernel(b, 10, 5, func(t *Tally, d []byte) { t.addOverlap(d) })
}

func BenchmarkOverlapK7(b *testing.B) {
	benchKernel(b, 10, 7, func(t *Tally, d []byte) { t.addOverlap(d) })
}

func BenchmarkBlocksK2toK5(b *testing.B) {
	benchKernel(b, 10, 5, func(t *Tally, d []byte) {
		for k := 2; k <= 5; k++ {
			t.addBlocks(k, d)
		}
	})
}

func BenchmarkGaps(b *testing.B) {
	benchKernel(b, 10, 5, func(t *Tally, d []byte) {
		t.addGaps(d)
		t.N += int64(len(d)) // gap positions are relative to n
	})
}

func BenchmarkAddAllK5(b *testing.B) {
	benchKernel(b, 10, 5, func(t *Tally, d []byte) { t.Add(d) })
}
