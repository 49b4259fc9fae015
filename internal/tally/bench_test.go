package tally

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"strconv"
	"testing"
	"time"
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

// BenchmarkFoldShards is the thousand-machine simulation of bench/shards.sh:
// BOREL_FOLD_SHARDS shards (default 1000) of 10^6 random decimal digits at
// K = 7 (the window and block tables of any shard at K = 7: 2.1·10^7
// cells), each tallied, written and folded into one tally by AppendShard,
// as `borel merge` does. It reports the fold's time a shard (reading,
// checking and adding one shard, its tally and writing excluded) and the
// largest heap in use. Counts of 10^9-digit shards take two varint bytes a
// cell instead of one; BenchmarkRawTableWidths measures what that costs.
func BenchmarkFoldShards(b *testing.B) {
	shards := 1000
	if v, err := strconv.Atoi(os.Getenv("BOREL_FOLD_SHARDS")); err == nil && v > 0 {
		shards = v
	}
	const n, K = 1_000_000, 7
	spec := auditSpec()
	spec.MaxBlock = K
	rng := rand.New(rand.NewPCG(1, 1))
	for range b.N {
		var fold *Tally
		var folding time.Duration
		var peak uint64
		var ms runtime.MemStats
		for i := range shards {
			tl, _ := New(spec, int64(i)*n)
			tl.Add(randomDigits(rng, n, 10))
			var buf bytes.Buffer
			if err := WriteShard(&buf, &Shard{Null: ShardNull{Kind: "uniform"}, Tally: tl}); err != nil {
				b.Fatal(err)
			}
			tl = nil
			t0 := time.Now()
			if fold == nil {
				s, err := ReadShard(bytes.NewReader(buf.Bytes()), "s")
				if err != nil {
					b.Fatal(err)
				}
				fold = s.Tally
			} else if _, err := fold.AppendShard(bytes.NewReader(buf.Bytes()), "s"); err != nil {
				b.Fatal(err)
			}
			folding += time.Since(t0)
			if i%50 == 0 {
				runtime.ReadMemStats(&ms)
				peak = max(peak, ms.HeapInuse)
			}
		}
		b.ReportMetric(float64(folding.Milliseconds())/float64(shards), "ms/shard")
		b.ReportMetric(float64(peak)/(1<<20), "MiB-heap")
	}
}

// BenchmarkRawTableWidths: checking and adding a table of 10^7 cells whose
// counts take one varint byte (counts near 1, as in shards of 10^7 digits
// at K = 7) or two (counts near 100 ± 10, as in shards of 10^9).
func BenchmarkRawTableWidths(b *testing.B) {
	for _, mean := range []int64{1, 100} {
		b.Run(fmt.Sprintf("mean-%d", mean), func(b *testing.B) {
			rng := rand.New(rand.NewPCG(2, 2))
			var raw []byte
			for range 10_000_000 {
				spread := int64(math.Sqrt(float64(mean)))
				raw = binary.AppendVarint(raw, mean-spread+rng.Int64N(2*spread+1))
			}
			dst := make([]int64, 10_000_000)
			b.SetBytes(int64(len(raw)))
			b.ResetTimer()
			for range b.N {
				if _, _, err := rawTable(raw).scan("t"); err != nil {
					b.Fatal(err)
				}
				rawTable(raw).addTo(dst)
			}
		})
	}
}

// The packed kernels of a raw base-2 view (K = 22, blocks 12…22 counted,
// as an audit of 10^8 bytes plans them) over 1 MiB chunks of random bytes.
func BenchmarkPackedBits(b *testing.B) {
	spec := Spec{Base: 2, MaxBlock: 22, Records: []RecordSpec{&GapSpec{}, &CouponSpec{Classes: 2, Class: []int{0, 1}, Cap: 40},
		&UpDownSpec{Digits: 64}, &RunSpec{Digit: 1}, &WalkSpec{}}}
	rng := rand.New(rand.NewPCG(1, 2))
	chunks := make([][]byte, 8)
	for i := range chunks {
		chunks[i] = make([]byte, 1<<20)
		for j := range chunks[i] {
			chunks[i][j] = byte(rng.Uint32())
		}
	}
	probe, _ := New(spec, 0)
	names := map[string]bool{}
	for _, k := range probe.kernels() {
		names[k.name] = true
	}
	for name := range names {
		b.Run(name, func(b *testing.B) {
			t, _ := New(spec, 0)
			t.AddPacked(chunks[0])
			var run []func([]byte)
			for _, k := range t.kernels() {
				if k.name == name && k.packed != nil {
					run = append(run, k.packed)
				}
			}
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				for _, f := range run {
					f(chunks[i%len(chunks)])
				}
				t.N += 8 << 20 // the kernels read positions from N
			}
			b.ReportMetric(float64(8<<20)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mbit/s")
		})
	}
}

// Counting random cells of byte tables of 2^k cells, a batch of indices at
// a time (count.go), per increment.
func BenchmarkCountBytesTable(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, k := range []int{16, 18, 20, 21, 22} {
		b.Run(strconv.Itoa(k), func(b *testing.B) {
			hot, cold := make([]uint8, 1<<k), make([]int64, 1<<k)
			idx := make([]uint32, 1<<16)
			for i := range idx {
				idx[i] = uint32(rng.IntN(1 << k))
			}
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				for j := 0; j < len(idx); j += windowBatch {
					countBytesFast(hot, cold, idx[j:j+windowBatch])
				}
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/float64(len(idx)), "ns/cell")
		})
	}
}
