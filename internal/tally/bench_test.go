package tally

import (
	"math/rand/v2"
	"testing"
)

// Benchmarks of each kernel of the pass, in the configuration an audit of
// 10^8 random decimal digits uses (K = 7 windows, blocks up to 6, poker of
// 5, up/down values of 18 digits, lags up to 5, coupon classes of single
// digits). Each kernel runs over a rotation of 64 distinct 64 KiB chunks,
// as the reader delivers them, so that the large tables are touched as in a
// real pass; digits/s via b.ReportMetric. The whole pass is
// BenchmarkAddAll; bench/compare.sh times the command against the numpy
// reference.

func auditSpec() Spec {
	return Spec{Base: 10, MaxBlock: 7, BlocksMax: 6, Records: []RecordSpec{&GapSpec{}, &HandSpec{Size: 5},
		&CouponSpec{Classes: 10, Class: []int{0, 1, 2, 3, 4, 5, 6, 7, 8, 9}, Cap: 235}, &UpDownSpec{Digits: 18},
		&LagSpec{Max: 5}, &RunSpec{Digit: 9}, &WalkSpec{}}}
}

func benchChunks() [][]byte {
	rng := rand.New(rand.NewPCG(1, 1))
	chunks := make([][]byte, 64)
	for i := range chunks {
		chunks[i] = randomDigits(rng, 1<<16, 10)
	}
	return chunks
}

func BenchmarkKernels(b *testing.B) {
	chunks := benchChunks()
	names := map[string]bool{}
	probe, _ := New(auditSpec(), 0)
	for _, k := range probe.kernels() {
		names[k.name] = true
	}
	for name := range names {
		b.Run(name, func(b *testing.B) {
			t, err := New(auditSpec(), 0)
			if err != nil {
				b.Fatal(err)
			}
			var run []func([]byte)
			for _, k := range t.kernels() {
				if k.name == name {
					run = append(run, k.run)
				}
			}
			for i := range 64 { // warm the tables
				for _, f := range run {
					f(chunks[i])
				}
				t.advance(chunks[i])
			}
			b.ResetTimer()
			for i := range b.N {
				d := chunks[i%len(chunks)]
				for _, f := range run {
					f(d)
				}
				t.advance(d)
			}
			b.ReportMetric(float64(b.N)*float64(1<<16)/b.Elapsed().Seconds(), "digits/s")
		})
	}
}

func BenchmarkAddAll(b *testing.B) {
	for _, workers := range []int{1, 2} {
		b.Run(map[int]string{1: "1worker", 2: "2workers"}[workers], func(b *testing.B) {
			chunks := benchChunks()
			t, err := New(auditSpec(), 0)
			if err != nil {
				b.Fatal(err)
			}
			r := NewRunner(t, workers)
			for i := range 64 {
				r.Add(chunks[i])
			}
			b.ResetTimer()
			for i := range b.N {
				r.Add(chunks[i%len(chunks)])
			}
			b.ReportMetric(float64(b.N)*float64(1<<16)/b.Elapsed().Seconds(), "digits/s")
		})
	}
}

// The byte counters' fold and the derived records, once per audit.
func BenchmarkSettle(b *testing.B) {
	chunks := benchChunks()
	t, _ := New(auditSpec(), 0)
	for _, d := range chunks {
		t.Add(d)
	}
	b.ResetTimer()
	for range b.N {
		t.settled = false
		t.settle()
		t.win.hot = make([]uint8, len(t.win.Counts)) // as if the pass went on
	}
}
