package tally

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"
)

func randomDigits(rng *rand.Rand, n, base int) []byte {
	d := make([]byte, n)
	for i := range d {
		d[i] = byte(rng.IntN(base))
	}
	return d
}

func mustNew(t *testing.T, spec Spec, off int64) *Tally {
	t.Helper()
	tl, err := New(spec, off)
	if err != nil {
		t.Fatal(err)
	}
	return tl
}

// randomCuts splits n into pieces, often shorter than K-1.
func randomCuts(rng *rand.Rand, n int) []int {
	cuts := []int{0}
	for pos := 0; pos < n; {
		step := 1 + rng.IntN(7)
		if rng.IntN(3) == 0 {
			step = 1 + rng.IntN(n)
		}
		pos = min(n, pos+step)
		cuts = append(cuts, pos)
	}
	return cuts
}

// Property: merge(tally(a), tally(b)) == tally(a‖b), for random chunkings,
// merged left to right and as a balanced tree.
func TestMergeEqualsWhole(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 200; trial++ {
		base := 2 + rng.IntN(9)
		K := 1 + rng.IntN(5)
		spec := randomSpec(rng, base, K)
		n := 1 + rng.IntN(400)
		d := randomDigits(rng, n, base)
		whole := mustNew(t, spec, 0)
		whole.Add(d)

		cuts := randomCuts(rng, n)
		var parts []*Tally
		for i := 1; i < len(cuts); i++ {
			p := mustNew(t, spec, int64(cuts[i-1]))
			p.Add(d[cuts[i-1]:cuts[i]])
			parts = append(parts, p)
		}
		left := mergeLeft(t, parts)
		if !same(left, whole) {
			t.Fatalf("trial %d (base %d, K %d, n %d, cuts %v): left-fold merge differs from the whole", trial, base, K, n, cuts)
		}
		if tree := mergeTree(t, parts); !same(tree, whole) {
			t.Fatalf("trial %d: tree merge differs from the whole", trial)
		}
		// The in-place fold (Append) gives the same, from either end of
		// the cuts: a later stretch folds too (a tree's inner merge).
		acc := parts[0].Clone()
		for _, p := range parts[1:] {
			if err := acc.Append(p); err != nil {
				t.Fatal(err)
			}
		}
		if !same(acc, whole) {
			t.Fatalf("trial %d: in-place fold differs from the whole", trial)
		}
		// Folding shards (AppendShard: their large tables decoded straight
		// into the fold's) gives the same, and leaves no table behind.
		fold := mustNew(t, spec, 0)
		for _, p := range parts {
			var buf bytes.Buffer
			if err := WriteShard(&buf, &Shard{Null: ShardNull{Kind: "uniform"}, Tally: p}); err != nil {
				t.Fatal(err)
			}
			if s, err := fold.AppendShard(bytes.NewReader(buf.Bytes()), "part"); err != nil || s.Tally != nil {
				t.Fatalf("trial %d: AppendShard: %v", trial, err)
			}
		}
		if !same(fold, whole) {
			t.Fatalf("trial %d: a fold of shards differs from the whole", trial)
		}
		if len(parts) > 2 {
			inner := parts[1].Clone()
			for _, p := range parts[2:] {
				if err := inner.Append(p); err != nil {
					t.Fatal(err)
				}
			}
			outer := parts[0].Clone()
			if err := outer.Append(inner); err != nil || !same(outer, whole) {
				t.Fatalf("trial %d: a folded later stretch merged after the first differs from the whole (%v)", trial, err)
			}
		}
		// Streaming in several Add calls is the same as one.
		inc := mustNew(t, spec, 0)
		for i := 1; i < len(cuts); i++ {
			inc.Add(d[cuts[i-1]:cuts[i]])
		}
		if !same(inc, whole) {
			t.Fatalf("trial %d: incremental Add differs from one Add", trial)
		}
	}
}

// mergeLeft merges the parts left to right.
func mergeLeft(t *testing.T, parts []*Tally) *Tally {
	t.Helper()
	left := parts[0]
	for _, p := range parts[1:] {
		var err error
		if left, err = Merge(left, p); err != nil {
			t.Fatal(err)
		}
	}
	return left
}

func mergeTree(t *testing.T, parts []*Tally) *Tally {
	if len(parts) == 1 {
		return parts[0]
	}
	mid := len(parts) / 2
	m, err := Merge(mergeTree(t, parts[:mid]), mergeTree(t, parts[mid:]))
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// Brute-force references computed directly from the definition.
func TestCountsAgainstDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := 0; trial < 50; trial++ {
		base := 2 + rng.IntN(6)
		K := 1 + rng.IntN(4)
		n := K + rng.IntN(300)
		d := randomDigits(rng, n, base)
		tl := mustNew(t, Spec{Base: base, MaxBlock: K, Records: []RecordSpec{&GapSpec{Cap: 5}}}, 0)
		tl.Add(d)
		cyc, err := tl.Cyclic()
		if err != nil {
			t.Fatal(err)
		}
		for k := 1; k <= K; k++ {
			want := make([]int64, ipow(base, k))
			for i := 0; i < n; i++ {
				w := 0
				for j := 0; j < k; j++ {
					w = w*base + int(d[(i+j)%n])
				}
				want[w]++
			}
			if !slices.Equal(cyc[k], want) {
				t.Fatalf("cyclic k=%d differs from the definition", k)
			}
		}
		for k := 2; k <= K; k++ {
			want := make([]int64, ipow(base, k))
			for i := 0; i+k <= n; i += k {
				want[value(d[i:i+k], base)]++
			}
			if !slices.Equal(tl.BlockCounts(k), want) {
				t.Fatalf("blocks k=%d differ from the definition", k)
			}
		}
		for c := 0; c < base; c++ {
			want := make([]int64, 6)
			last := -1
			for i, x := range d {
				if int(x) == c {
					if last >= 0 {
						want[min(i-last-1, 5)]++
					}
					last = i
				}
			}
			if got := tl.Gaps().Classes[c].Hist; !slices.Equal(got, want) {
				t.Fatalf("gaps of %d: %v, want %v", c, got, want)
			}
		}
	}
}

func TestMergeRejectsGapsAndOverlaps(t *testing.T) {
	spec := Spec{Base: 10, MaxBlock: 2}
	a := mustNew(t, spec, 0)
	a.Add([]byte{1, 2, 3})
	b := mustNew(t, spec, 4) // digit 3 is missing
	b.Add([]byte{4})
	if _, err := Merge(a, b); err == nil {
		t.Error("merge across a missing digit accepted")
	}
	c := mustNew(t, spec, 2) // overlaps a
	c.Add([]byte{3})
	if _, err := Merge(a, c); err == nil {
		t.Error("merge of overlapping stretches accepted")
	}
	d := mustNew(t, Spec{Base: 10, MaxBlock: 3}, 3)
	if _, err := Merge(a, d); err == nil {
		t.Error("merge of different specs accepted")
	}
}

// randomSpec switches every record on, with random parameters.
func randomSpec(rng *rand.Rand, base, K int) Spec {
	g := &GapSpec{Cap: 1 + rng.IntN(12)}
	hands := &HandSpec{Size: 2 + rng.IntN(4)}
	ud := &UpDownSpec{Digits: 1 + rng.IntN(3)}
	lags := &LagSpec{Max: 1 + rng.IntN(4)}
	runs := &RunSpec{Digit: rng.IntN(base)}
	walk := &WalkSpec{Hull: rng.IntN(2) == 0}
	c := &CouponSpec{Classes: min(base, 2+rng.IntN(3)), Cap: 12, Every: 5 + rng.IntN(40)}
	c.Class = make([]int, base)
	for i := range c.Class {
		c.Class[i] = i % c.Classes
	}
	if rng.IntN(2) == 0 {
		g.Class = make([]int, base)
		for i := range g.Class {
			g.Class[i] = i % 3
		}
	}
	return Spec{Base: base, MaxBlock: K, Records: []RecordSpec{g, hands, ud, lags, runs, walk, c}}
}

// The extra records against their definitions, computed naively.
func TestExtrasAgainstDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := 0; trial < 300; trial++ {
		base := 2 + rng.IntN(6)
		spec := randomSpec(rng, base, 1+rng.IntN(3))
		n := 1 + rng.IntN(300)
		d := randomDigits(rng, n, base)
		if rng.IntN(4) == 0 { // long runs now and then
			for i := range d {
				if rng.IntN(3) > 0 && i > 0 {
					d[i] = d[i-1]
				}
			}
		}
		tl := mustNew(t, spec, 0)
		tl.Add(d)
		hs := spec.Record("poker").(*HandSpec)
		cs := spec.Record("coupon").(*CouponSpec)
		h := hs.Size
		poker := make([]int64, h+1)
		for i := 0; i+h <= n; i += h {
			seen := map[byte]bool{}
			for _, x := range d[i : i+h] {
				seen[x] = true
			}
			poker[len(seen)]++
		}
		if got := tl.Hands().Counts; !slices.Equal(got, poker) {
			t.Fatalf("trial %d: poker %v, want %v", trial, got, poker)
		}

		L := spec.Record("updown").(*UpDownSpec).Digits
		var vals []uint64
		for i := 0; i+L <= n; i += L {
			vals = append(vals, udValue(d[i:i+L], base))
		}
		var turns, ties int64
		for i := range vals {
			if i+1 < len(vals) && vals[i] == vals[i+1] {
				ties++
			}
			if i+2 < len(vals) {
				a, b, c := vals[i], vals[i+1], vals[i+2]
				if (b > a && b > c) || (b < a && b < c) {
					turns++
				}
			}
		}
		if ud := tl.UpDown(); ud.Values != int64(len(vals)) || ud.Turns != turns || ud.Ties != ties {
			t.Fatalf("trial %d: up/down %d %d %d, want %d %d %d", trial, ud.Values, ud.Turns, ud.Ties, len(vals), turns, ties)
		}

		for lag := 1; lag <= spec.Record("lags").(*LagSpec).Max; lag++ {
			var s int64
			for i := 0; i+lag < n; i++ {
				s += int64(d[i]) * int64(d[i+lag])
			}
			if got := tl.Lags().Products[lag]; got != s {
				t.Fatalf("trial %d: lag %d sum %d, want %d", trial, lag, got, s)
			}
		}

		// Walk: max over k of T_k - kμ for a few μ, from the hull or the extremes.
		var sum int64
		umax, umin := int64(0), int64(0)
		for k, x := range d {
			sum += int64(x)
			u := 2*sum - int64(k+1)*int64(base-1)
			umax, umin = max(umax, u), min(umin, u)
		}
		walk := tl.Walk()
		if walk.Sum != sum {
			t.Fatalf("walk sum")
		}
		if !walk.Hull && (walk.UMax != umax || walk.UMin != umin) {
			t.Fatalf("trial %d: walk extremes %d %d, want %d %d", trial, walk.UMax, walk.UMin, umax, umin)
		}
		if walk.Hull {
			for _, mu := range []float64{0, 0.5, float64(base-1) / 2, 1.37} {
				hi, lo := 0.0, 0.0
				var s int64
				for k, x := range d {
					s += int64(x)
					v := float64(s) - float64(k+1)*mu
					hi, lo = math.Max(hi, v), math.Min(lo, v)
				}
				hHi, hLo := math.Inf(-1), math.Inf(1)
				for _, p := range walk.Upper {
					hHi = math.Max(hHi, float64(p.T)-float64(p.K)*mu)
				}
				for _, p := range walk.Lower {
					hLo = math.Min(hLo, float64(p.T)-float64(p.K)*mu)
				}
				if math.Abs(hHi-hi) > 1e-9 || math.Abs(hLo-lo) > 1e-9 {
					t.Fatalf("trial %d μ=%g: hull extremes %g %g, want %g %g", trial, mu, hHi, hLo, hi, lo)
				}
			}
		}

		// Coupon segments: one starts at s only if s + Cap reaches neither
		// the next restart R nor the end; it counts as its length, or as
		// Cap once it has Cap digits, and the next starts where it
		// completes (at R if it does not complete before).
		hist := make([]int64, cs.Cap+1)
		for s := 0; s < n; {
			R := (s/cs.Every + 1) * cs.Every
			if s+cs.Cap > min(R, n) {
				s = R
				continue
			}
			var seen uint32
			length, j, done := 0, s, false
			for ; j < min(R, n) && !done; j++ {
				seen |= 1 << cs.Class[d[j]]
				length++
				if length == cs.Cap {
					hist[cs.Cap]++
				}
				if seen == 1<<cs.Classes-1 {
					if length < cs.Cap {
						hist[length]++
					}
					done = true
				}
			}
			if done {
				s = j
			} else {
				s = R
			}
		}
		if got := tl.Coupons().Counted(); !slices.Equal(got, hist) {
			t.Fatalf("trial %d: coupon %v, want %v", trial, got, hist)
		}
	}
}

// The parallel runner gives the same tally, bit for bit, as one goroutine,
// for 1, 2, 3 and 8 workers.
func TestRunnerIdenticalForAnyWorkers(t *testing.T) {
	// Calibrate on the first few chunks so that the concurrent groups run.
	defer func(w, c int) { warmupDigits, calibrationDigits = w, c }(warmupDigits, calibrationDigits)
	warmupDigits, calibrationDigits = 4096, 3*4096
	rng := rand.New(rand.NewPCG(7, 8))
	for trial := 0; trial < 20; trial++ {
		base := 2 + rng.IntN(15)
		spec := randomSpec(rng, base, 1+rng.IntN(4))
		d := randomDigits(rng, 20_000+rng.IntN(20_000), base)
		want := mustNew(t, spec, 0)
		want.Add(d)
		for _, w := range []int{1, 2, 3, 8} {
			got := mustNew(t, spec, 0)
			r := NewRunner(got, w)
			for i := 0; i < len(d); i += 4096 {
				r.Add(d[i:min(len(d), i+4096)])
			}
			if !same(got, want) {
				t.Fatalf("trial %d: %d workers give a different tally", trial, w)
			}
		}
	}
}

// A shard written and read back is the same tally; damage is reported.
func TestShardRoundTripAndDamage(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 13))
	spec := randomSpec(rng, 10, 3)
	tl := mustNew(t, spec, 1234)
	tl.Add(randomDigits(rng, 5000, 10))
	var buf bytes.Buffer
	if err := WriteShard(&buf, &Shard{Null: ShardNull{Kind: "uniform"}, Tally: tl}); err != nil {
		t.Fatal(err)
	}
	good := buf.Bytes()
	s, err := ReadShard(bytes.NewReader(good), "s1")
	if err != nil {
		t.Fatal(err)
	}
	if !same(s.Tally, tl) {
		t.Error("the shard's tally differs after the round trip")
	}
	damaged := append([]byte(nil), good...)
	damaged[len(damaged)-10] ^= 0x40
	future := []byte(strings.Replace(string(good), "borel-tally 4 ", "borel-tally 5 ", 1))
	old := []byte(strings.Replace(string(good), "borel-tally 4 ", "borel-tally 1 ", 1))
	format2 := []byte(strings.Replace(string(good), "borel-tally 4 ", "borel-tally 2 ", 1))
	format3 := []byte(strings.Replace(string(good), "borel-tally 4 ", "borel-tally 3 ", 1))
	cases := map[string][]byte{
		"corrupted": damaged, "truncated": good[:len(good)-100], "shard format 5 was written by a newer borel": future,
		"shard format 3 was written by an earlier borel":                                       format3,
		"shard format 2 counts coupon segments by an earlier rule that biased them short":      format2,
		"shard format 1 was written by borel 0.1.0 before its tallies were split into records": old,
		"not a borel shard": []byte("hello\nworld"),
		// A damaged header that claims a terabyte must not allocate it
		// (FuzzReadShard hung on this before the payload was read incrementally).
		"the 1000000000000 bytes the header states": []byte("borel-tally 4 sha256:00 bytes:1000000000000\nabc"),
	}
	for want, data := range cases {
		if _, err := ReadShard(bytes.NewReader(data), "s1"); err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("%s: err %v", want, err)
		}
	}
}

// CyclicInPlace gives the same counts as Cyclic, and finishes the tally.
func TestCyclicInPlace(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 21))
	tl := mustNew(t, Spec{Base: 7, MaxBlock: 4}, 0)
	tl.Add(randomDigits(rng, 3000, 7))
	want, _ := tl.Cyclic()
	got, err := tl.CyclicInPlace()
	if err != nil || !reflect.DeepEqual(got, want) {
		t.Fatalf("in-place cyclic counts differ (%v)", err)
	}
	defer func() {
		if recover() == nil {
			t.Error("Add after CyclicInPlace did not panic")
		}
	}()
	tl.Add([]byte{1})
}

// mergedHalves tallies d[:cut] and d[cut:] as two stretches, the first at
// global position offset, and merges them.
func mergedHalves(t *testing.T, spec Spec, offset int64, d []byte, cut int) (*Tally, error) {
	t.Helper()
	a, b := mustNew(t, spec, offset), mustNew(t, spec, offset+int64(cut))
	a.Add(d[:cut])
	b.Add(d[cut:])
	return Merge(a, b)
}

// same reports whether two tallies hold the same stretch and the same
// values in every record (what a merge must reproduce).
func same(a, b *Tally) bool {
	a.settle()
	b.settle()
	if !a.Spec.Equal(b.Spec) || a.Offset != b.Offset || a.N != b.N ||
		!slices.Equal(a.Head, b.Head) || !slices.Equal(a.Tail, b.Tail) || len(a.recs) != len(b.recs) {
		return false
	}
	for i := range a.recs {
		ea, _ := json.Marshal(a.recs[i].entry(nil))
		eb, _ := json.Marshal(b.recs[i].entry(nil))
		if string(ea) != string(eb) {
			return false
		}
	}
	return true
}

// Every table through the byte counters (windows.go, blocks.go), including wrap-arounds
// past 255: merges, worker counts and shards must give the same tallies as
// with 64-bit counting only.
func TestHotCountersExact(t *testing.T) {
	defer func(v int) { hotMinCells = v }(hotMinCells)
	defer func(w, c int) { warmupDigits, calibrationDigits = w, c }(warmupDigits, calibrationDigits)
	warmupDigits, calibrationDigits = 777, 3*777
	rng := rand.New(rand.NewPCG(31, 32))
	for trial := range 40 {
		base := 2 + rng.IntN(9)
		spec := randomSpec(rng, base, 1+rng.IntN(5))
		spec.BlocksMax = rng.IntN(spec.MaxBlock + 1) // some block lengths left out
		n := 2000 + rng.IntN(30000)
		d := randomDigits(rng, n, base)
		if trial%3 == 0 { // long constant runs: single cells pass 255 many times
			for i := range d[:n/2] {
				d[i] = 1
			}
		}
		hotMinCells = math.MaxInt
		want := mustNew(t, spec, 0)
		want.Add(d)
		hotMinCells = 1
		got := mustNew(t, spec, 0)
		r := NewRunner(got, 1+trial%3)
		cut := rng.IntN(n)
		step := []int{777, windowBatch + 5, 3*windowBatch + prefetchAhead}[trial%3] // one batch or several
		for i := 0; i < n; i += step {
			r.Add(d[i:min(n, i+step)])
		}
		if !same(got, want) {
			t.Fatalf("trial %d (base %d, K %d, chunks of %d): byte counters change the tally", trial, base, spec.MaxBlock, step)
		}
		if m, err := mergedHalves(t, spec, 0, d, cut); err != nil || !same(m, want) {
			t.Fatalf("trial %d: merge of byte-counted halves differs (%v)", trial, err)
		}
	}
}

// TestDerived: lag products from the K-windows and poker hands from the
// block counts (settle: blocks.go, hands.go, lags.go) equal the definitions, for stretches at any
// offset, shorter than K or not, and after merges.
func TestDerived(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	for trial := range 200 {
		base := 2 + rng.IntN(4)
		H := 1 + rng.IntN(4)
		h := 2 + rng.IntN(3)
		spec := Spec{Base: base, MaxBlock: max(H+1, h) + rng.IntN(4), Records: []RecordSpec{&LagSpec{Max: H}, &HandSpec{Size: h}}}
		n := 1 + rng.IntN(400)
		offset := int64(rng.IntN(50))
		d := randomDigits(rng, n, base)
		tl := mustNew(t, spec, offset)
		tl.Add(d)
		if !tl.Lags().derived() || !tl.Hands().derived() {
			t.Fatalf("spec %+v does not derive both records", spec)
		}
		for lag := 1; lag <= H; lag++ {
			var want int64
			for i := 0; i+lag < n; i++ {
				want += int64(d[i]) * int64(d[i+lag])
			}
			if got := tl.Lags().Products[lag]; got != want {
				t.Fatalf("trial %d (n %d, K %d): lag %d product %d, want %d", trial, n, spec.MaxBlock, lag, got, want)
			}
		}
		for k := 2; k <= spec.MaxBlock; k++ {
			want := make([]int64, ipow(base, k))
			for i := 0; i+k <= n; i++ {
				if (offset+int64(i))%int64(k) == 0 {
					want[value(d[i:i+k], base)]++
				}
			}
			if !slices.Equal(tl.BlockCounts(k), want) {
				t.Fatalf("trial %d (n %d, offset %d, K %d): blocks of %d differ from the definition (source %d)",
					trial, n, offset, spec.MaxBlock, k, spec.blocksSource(k))
			}
		}
		poker := make([]int64, h+1)
		for i := 0; i+h <= n; i++ {
			if (offset+int64(i))%int64(h) == 0 {
				poker[distinct(d[i:i+h])]++
			}
		}
		if got := tl.Hands().Counts; !slices.Equal(got, poker) {
			t.Fatalf("trial %d (n %d, offset %d): poker %v, want %v", trial, n, offset, got, poker)
		}
		if n > 2 {
			cut := 1 + rng.IntN(n-1)
			if m, err := mergedHalves(t, spec, offset, d, cut); err != nil || !same(m, tl) {
				t.Fatalf("trial %d: merged halves differ from the whole (%v)", trial, err)
			}
		}
	}
}

// TestCountBytes: the prefetching count (count_amd64.s on amd64) equals
// the plain loop for index lists shorter and longer than the prefetch
// distance, with cells that wrap their byte many times; an index outside
// the table panics before anything is counted.
func TestCountBytes(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	const cells = 50
	for _, n := range []int{0, 1, prefetchAhead - 1, prefetchAhead, prefetchAhead + 1, 5000, 70000} {
		idx := make([]uint32, n)
		for i := range idx {
			idx[i] = uint32(rng.IntN(cells))
			if i%2 == 0 {
				idx[i] = 7 // one cell wraps n/512 times
			}
		}
		// Bytes start anywhere, many one short of wrapping, so wraps
		// happen in the prefetching loop and in its last 64 indices.
		hot1, cold1 := make([]uint8, cells), make([]int64, cells)
		var start int64
		for w := range hot1 {
			hot1[w] = uint8(255 - rng.IntN(3)*rng.IntN(256))
			start += int64(hot1[w])
		}
		hot2, cold2 := slices.Clone(hot1), make([]int64, cells)
		countBytesGo(hot1, cold1, idx)
		countBytes(hot2, cold2, idx)
		if !slices.Equal(hot1, hot2) || !slices.Equal(cold1, cold2) {
			t.Fatalf("%d indices: prefetching count differs from the plain loop", n)
		}
		var total int64
		for w := range hot2 {
			total += cold2[w] + int64(hot2[w])
		}
		if want := int64(n) + start; total != want {
			t.Fatalf("%d indices: %d counted, want %d", n, total, want)
		}
	}
	hot, cold := make([]uint8, 10), make([]int64, 10)
	func() {
		defer func() {
			if recover() == nil {
				t.Fatal("an index outside the table did not panic")
			}
		}()
		countBytes(hot, cold, []uint32{1, 2, 10})
	}()
	if hot[1] != 0 || hot[2] != 0 {
		t.Fatal("counted before refusing an index outside the table")
	}
}

// TestTraceDefinition: the trace holds, for every checkpoint ⌈2^(j/8)⌉
// inside the stretch, the counts of the stretch's digits before it (its
// definition in trace.go), whatever the chunking and the stretch's offset.
func TestTraceDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(51, 52))
	for trial := range 12 {
		n := 1 + rng.IntN(40000)
		offset := []int64{0, 1, int64(rng.IntN(5000))}[trial%3]
		d := randomDigits(rng, n, 10)
		tl := mustNew(t, Spec{Base: 10, MaxBlock: 2}, offset)
		for i := 0; i < n; {
			step := 1 + rng.IntN(3000)
			tl.Add(d[i:min(n, i+step)])
			i += step
		}
		var want []int64
		for j := 0.0; ; j++ {
			p := int64(math.Ceil(math.Pow(2, j/8)))
			if p > offset+int64(n) {
				break
			}
			if p > offset && (len(want) == 0 || p != want[len(want)-1]) {
				want = append(want, p)
			}
		}
		if len(tl.Trace()) != len(want) {
			t.Fatalf("trial %d: %d checkpoints, want %d", trial, len(tl.Trace()), len(want))
		}
		for i, tp := range tl.Trace() {
			counts := make([]int64, 10)
			for _, x := range d[:tp.Pos-offset] {
				counts[x]++
			}
			if tp.Pos != want[i] || !slices.Equal(tp.Counts, counts) {
				t.Fatalf("trial %d: checkpoint %d at %d (want %d) counts %v, want %v", trial, i, tp.Pos, want[i], tp.Counts, counts)
			}
		}
	}
}
