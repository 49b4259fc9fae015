package tally

import (
	"bytes"
	"math/bits"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/borel-audit/borel/stats/gf2"
)

// wordSpec is a base-256 spec with every word record for W-bit words
// (lincomp on segments of 96 words, so that short streams hold several).
func wordSpec(W int, big bool) Spec {
	s := Spec{Base: 256, MaxBlock: 1}
	for _, test := range WordTests {
		if (test == Birthday && W < BirthdayBits) || (test == WordColl && W < 16) {
			continue
		}
		ws := &WordSpec{Test: test, Word: W, BigEndian: big}
		if test == LinComp {
			ws.Segment = 96
		}
		s.Records = append(s.Records, ws)
	}
	return s
}

// Word records merge exactly: a stream cut anywhere (inside words, inside
// items, stretches inside one item) and merged left to right, as a tree,
// in place and through shards, gives the one-pass tally; every part and
// every merge passes the record's own validation.
func TestWordRecordsMergeExactly(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	for trial := 0; trial < 60; trial++ {
		W := []int{16, 24, 32, 64}[trial%4]
		spec := wordSpec(W, trial%3 == 0)
		n := 1 + rng.IntN(60000)
		if trial%5 == 0 {
			n = 1 + rng.IntN(300)
		}
		d := randomDigits(rng, n, 256)
		off := int64(rng.IntN(3)) * int64(W/8) * 7 // shards start anywhere on the word grid
		whole := mustNew(t, spec, off)
		whole.Add(d)
		if err := whole.wellFormed(); err != nil {
			t.Fatalf("trial %d: the whole fails its check: %v", trial, err)
		}
		var cuts []int
		for pos := 0; pos < n; {
			step := 1 + rng.IntN(9)
			if rng.IntN(2) == 0 {
				step = 1 + rng.IntN(n/3+1)
			}
			cuts = append(cuts, pos)
			pos = min(n, pos+step)
		}
		cuts = append(cuts, n)
		var parts []*Tally
		for i := 1; i < len(cuts); i++ {
			p := mustNew(t, spec, off+int64(cuts[i-1]))
			p.Add(d[cuts[i-1]:cuts[i]])
			if err := p.wellFormed(); err != nil {
				t.Fatalf("trial %d: part %d fails its check: %v", trial, i, err)
			}
			parts = append(parts, p)
		}
		left := mergeLeft(t, parts)
		if !same(left, whole) {
			t.Fatalf("trial %d (W %d, n %d, %d parts): the merge differs from the whole", trial, W, n, len(parts))
		}
		if tree := mergeTree(t, parts); !same(tree, whole) {
			t.Fatalf("trial %d: tree merge differs", trial)
		}
		fold := mustNew(t, spec, off)
		for _, p := range parts {
			var buf bytes.Buffer
			if err := WriteShard(&buf, &Shard{Null: ShardNull{Kind: "uniform"}, Tally: p}); err != nil {
				t.Fatal(err)
			}
			if _, err := fold.AppendShard(bytes.NewReader(buf.Bytes()), "part"); err != nil {
				t.Fatalf("trial %d: AppendShard: %v", trial, err)
			}
		}
		if !same(fold, whole) {
			t.Fatalf("trial %d: a fold of shards differs", trial)
		}
	}
}

// The word records count what their definitions say, item by item from
// the words themselves.
func TestWordRecordsAgainstDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	const W = 32
	d := randomDigits(rng, 4*3000, 256)
	words := make([]uint64, len(d)/4)
	for i := range words {
		words[i] = uint64(d[4*i]) | uint64(d[4*i+1])<<8 | uint64(d[4*i+2])<<16 | uint64(d[4*i+3])<<24
	}
	tl := mustNew(t, wordSpec(W, false), 0)
	tl.Add(d)
	rank := make([]int64, 3)
	for i := 0; i+W <= len(words); i += W {
		rank[min(2, W-gf2.Rank(slices.Clone(words[i:i+W]), W))]++
	}
	if got := tl.Words(Rank).Counts; !slices.Equal(got, rank) {
		t.Errorf("rank counts %v, by definition %v", got, rank)
	}
	// rowrank: 31-bit rows read bit by bit, most significant bit of each
	// byte first, 8 matrices to every 961 bytes.
	bit := func(i int) uint64 { return uint64(d[i/8] >> (7 - i%8) & 1) }
	rr := make([]int64, 3)
	for m := 0; (m+1)*31*31 <= len(d)/961*961*8; m++ {
		rows := make([]uint64, 31)
		for i := range rows {
			for k := 0; k < 31; k++ {
				rows[i] = rows[i]<<1 | bit((m*31+i)*31+k)
			}
		}
		rr[min(2, 31-gf2.Rank(rows, 31))]++
	}
	if got := tl.Words(RowRank).Counts; !slices.Equal(got, rr) {
		t.Errorf("rowrank counts %v, by definition %v", got, rr)
	}
	ham := make([]int64, 25)
	for i := 0; i+2 <= len(words); i += 2 {
		ham[HammingClass(bits.OnesCount64(words[i]), W)*5+HammingClass(bits.OnesCount64(words[i+1]), W)]++
	}
	if got := tl.Words(Hamming).Counts; !slices.Equal(got, ham) {
		t.Errorf("hamming counts %v, by definition %v", got, ham)
	}
	lc := tl.Words(LinComp).Counts
	var segs int64
	minL := int64(1 << 40)
	for j := 0; (j+1)*96 <= len(words); j++ {
		if !LincompSelected(int64(j)) {
			continue
		}
		s := gf2.NewBits(96)
		for i := 0; i < 96; i++ {
			s.Set(i, words[j*96+i])
		}
		minL = min(minL, int64(gf2.LinearComplexity(s)))
		segs++
	}
	var got int64
	for _, v := range lc[:25] {
		got += v
	}
	if got != segs || lc[25] != minL+1 {
		t.Errorf("lincomp bit 0: %d segments, smallest L %d; by definition %d, %d", got, lc[25]-1, segs, minL)
	}
}

// The order index is a bijection of the 120 orderings of 5 distinct
// words; ties go to cell 120. Birthday spacings of a small sample by hand.
func TestPermIndexAndSpacings(t *testing.T) {
	seen := map[int]bool{}
	var perm func(p []uint64, k int)
	perm = func(p []uint64, k int) {
		if k == len(p) {
			seen[permIndex(p)] = true
			return
		}
		for i := k; i < len(p); i++ {
			p[k], p[i] = p[i], p[k]
			perm(p, k+1)
			p[k], p[i] = p[i], p[k]
		}
	}
	perm([]uint64{10, 20, 30, 40, 50}, 0)
	if len(seen) != 120 || seen[120] {
		t.Errorf("%d distinct order indices", len(seen))
	}
	for i := 0; i < 120; i++ {
		if !seen[i] {
			t.Errorf("index %d never made", i)
		}
	}
	if permIndex([]uint64{1, 2, 2, 3, 4}) != 120 {
		t.Error("a tie is not cell 120")
	}
	// Birthdays 1, 3, 5, 10 (top 24 of 32-bit words): spacings 2, 2, 5 and
	// the wrap-around 2^24 − 9; one spacing repeats.
	w := []uint64{1 << 8, 3 << 8, 5 << 8, 10 << 8}
	if R := birthdaySpacings(w, 32); R != 1 {
		t.Errorf("R = %d, want 1", R)
	}
}

// BenchmarkWordRecords is each word record's kernel over 4 MB of 32-bit
// words (lincomp over the first 8 segments' worth).
func BenchmarkWordRecords(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	d := randomDigits(rng, 4<<20, 256)
	for _, test := range []string{Rank, Birthday, WordColl, Hamming, Perm} {
		b.Run(test, func(b *testing.B) {
			spec := Spec{Base: 256, MaxBlock: 1, Records: []RecordSpec{&WordSpec{Test: test, Word: 32}}}
			b.SetBytes(int64(len(d)))
			for b.Loop() {
				tl, _ := New(spec, 0)
				tl.Add(d)
			}
		})
	}
}
