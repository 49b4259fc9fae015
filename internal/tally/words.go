package tally

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math/bits"
	"slices"

	"github.com/borel-audit/borel/stats/gf2"
)

// WordSpec asks for one word-level record of a raw byte stream (base 256)
// read as words of Word bits (8, 16, 24, 32 or 64; BigEndian: the first
// byte is the most significant). Every word-level statistic is formed on
// items — consecutive runs of a fixed number of words aligned to global
// word positions (a matrix, a sample of birthdays, a segment of a bit
// view) — and a record holds, besides its counters, the bytes of the
// partial items at its two ends, so that tallies of consecutive stretches
// merge exactly (an item cut by a shard boundary is completed in the
// merge). Test names the statistic:
//
//	lincomp   linear complexity of bit 0 and bit Word−1 over segments of
//	          SegmentWords words: per bit, a histogram of L − ⌊n/2⌋
//	          (clamped to ±lincompClamp) and the smallest L; segments
//	          j < 8 and every 32nd are tested (a quadratic statistic)
//	rank      GF(2) rank of Word×Word matrices, one word per row: counts
//	          of rank Word, Word−1 and less
//	rowrank   GF(2) rank of 31×31 matrices whose rows are consecutive 31-bit
//	          pieces of the bit stream (most significant bit of each byte
//	          first), across word boundaries: 8 matrices in 961 bytes
//	birthday  birthday spacings of the top 24 bits of 512 words, in the
//	          first BirthdaySamples samples: a histogram of repeated
//	          spacings R (0..15, 16 and more) and ΣR
//	wordcoll  collisions of the top min(Word, 32) bits in blocks of
//	          2^(h/2) words: blocks and Σ collisions, and a histogram
//	hamming   Hamming weights of aligned pairs of words, 5 × 5 classes
//	perm      the relative order of 5 consecutive words: 120 orderings and
//	          one cell for groups with a tie
type WordSpec struct {
	Test      string `json:"test"`
	Word      int    `json:"word_bits"`
	BigEndian bool   `json:"big_endian"`
	// Segment is lincomp's segment length in words (0: SegmentWords).
	Segment int `json:"segment_words,omitempty"`
}

// segment is lincomp's segment length.
func (s *WordSpec) segment() int {
	if s.Segment > 0 {
		return s.Segment
	}
	return SegmentWords
}

// The word tests, with their record kinds.
const (
	LinComp  = "lincomp"
	Rank     = "rank"
	RowRank  = "rowrank"
	Birthday = "birthday"
	WordColl = "wordcoll"
	Hamming  = "hamming"
	Perm     = "perm"
)

// WordTests lists the word tests in report order.
var WordTests = []string{LinComp, Rank, RowRank, Birthday, WordColl, Hamming, Perm}

// RowBits is the row length of rowrank's matrices: rows of 31 bits never
// line up with 8-, 16-, 32- or 64-bit words.
const RowBits = 31

func init() {
	for _, k := range WordTests {
		kind := k
		registerKind(kind, func() RecordSpec { return &WordSpec{Test: kind} })
	}
}

// Parameters of the word tests.
const (
	// SegmentWords is the length of a linear-complexity segment: 10^5
	// words, so that one bit position of MT19937 (L = 19937) is far below
	// n/2 and a random one about n/2 = 50 000.
	SegmentWords = 100_000
	lincompClamp = 12 // histogram of L − ⌊n/2⌋ over −12..12
	// BirthdayDays and BirthdayCount: 512 birthdays in a year of 2^24 days
	// (the top 24 bits), λ = m³/(4n) = 2 repeated spacings per sample.
	BirthdayBits  = 24
	BirthdayCount = 512
	// BirthdaySamples: only the first 2048 samples are tested (4 MB of
	// 32-bit words): the law of R is Poisson only to about 0.1 % of its
	// mean, which a sum over many more samples would turn into false
	// alarms; 2048 samples catch the generators it is for many times over.
	BirthdaySamples = 2048
	birthdayCells   = 17 // R = 0..15, ≥ 16, then ΣR
	permSize        = 5
	permCells       = 120 + 1
	// HammingClasses: weights w ≤ W/2−2, W/2−1, W/2, W/2+1, ≥ W/2+2.
	HammingClasses = 5
)

// LincompSelected reports whether segment j is tested: the first 8 and
// every 32nd after them (at 10^8 bytes of 32-bit words, 15 of 250).
func LincompSelected(j int64) bool { return j < 8 || j%32 == 0 }

// CollisionBits is the number of top bits the collision test reads, and
// CollisionBlock the words per block (2^(h/2): about half a collision per
// block).
func CollisionBits(word int) int  { return min(word, 32) }
func CollisionBlock(word int) int { return 1 << (CollisionBits(word) / 2) }

func (s *WordSpec) Kind() string { return s.Test }

func (s *WordSpec) validate(b int) error {
	if b != 256 {
		return fmt.Errorf("word records read bytes (base 256), not base %d", b)
	}
	switch s.Word {
	case 8, 16, 24, 32, 64:
	default:
		return fmt.Errorf("word size %d bits is not 8, 16, 24, 32 or 64", s.Word)
	}
	if !slices.Contains(WordTests, s.Test) {
		return fmt.Errorf("unknown word test %q", s.Test)
	}
	if s.Test == Birthday && s.Word < BirthdayBits {
		return fmt.Errorf("birthday spacings read %d bits of each word; words have %d", BirthdayBits, s.Word)
	}
	if s.Test == WordColl && s.Word < 16 {
		return fmt.Errorf("collisions need words of 16 bits or more")
	}
	if s.Segment != 0 && (s.Test != LinComp || s.Segment < 64 || s.Segment > 1<<24) {
		return fmt.Errorf("segment length %d is out of range", s.Segment)
	}
	return nil
}

// ItemWords is the number of words in one item of the test.
func (s *WordSpec) ItemWords() int {
	switch s.Test {
	case LinComp:
		return s.segment()
	case Rank:
		return s.Word
	case Birthday:
		return BirthdayCount
	case WordColl:
		return CollisionBlock(s.Word)
	case Hamming:
		return 2
	default:
		return permSize
	}
}

func (s *WordSpec) itemBytes() int64 {
	if s.Test == RowRank {
		return RowBits * RowBits // 8 matrices of 31 × 31 bits
	}
	return int64(s.ItemWords() * s.Word / 8)
}

// Cells is the number of counters of the record.
func (s *WordSpec) Cells() int {
	switch s.Test {
	case LinComp:
		return 2 * (2*lincompClamp + 2) // per bit: histogram, then min L + 1
	case Rank, RowRank:
		return 3
	case Birthday:
		return birthdayCells
	case WordColl:
		return 2 + 16 // blocks, Σ collisions, histogram 0..15
	case Hamming:
		return HammingClasses * HammingClasses
	default:
		return permCells
	}
}

func (s *WordSpec) span() int { return 1 }

// cells counts the counters only: the partial items at the two ends (at
// most 2 × 400 KB, lincomp's segments of 32-bit words) are bytes a decoded
// shard carries itself, and negligible beside the budget.
func (s *WordSpec) cells(int) float64 { return float64(s.Cells()) }
func (s *WordSpec) newRecord(sp *Spec, offset int64) record {
	return &Words{WordSpec: *s, Counts: s.emptyCounts(), bufStart: offset}
}

func (s *WordSpec) emptyCounts() []int64 { return make([]int64, s.Cells()) }

// Words is a word-level record: Counts (laid out as WordSpec says), Head
// the bytes of the item the stretch starts inside of (from its start to the
// first item boundary; empty when the stretch starts on one), Tail the
// bytes after the last item boundary; a stretch with no item boundary
// inside holds all its bytes in Tail (and none in Head).
type Words struct {
	WordSpec
	Counts []int64
	Head   []byte
	Tail   []byte

	bufStart int64 // global position of Tail[0] during the pass
	wbuf     []uint64
	seen     []uint64 // wordcoll's open-addressing table, reused
}

// Words returns the word record of the given test, or nil.
func (t *Tally) Words(test string) *Words { t.settle(); r, _ := t.find(test).(*Words); return r }

func (r *Words) kind() string { return r.Test }

func (r *Words) kernels(t *Tally) []kernel {
	cost := map[string]float64{LinComp: 0.5, Rank: 1, RowRank: 1, Birthday: 3, WordColl: 4, Hamming: 1, Perm: 2}[r.Test]
	return []kernel{{name: r.Test, cost: cost, run: func(d []byte) { r.add(d, t.Offset+t.N) }}}
}

// add takes the bytes d at global position pos: whole items are counted,
// the bytes before the first boundary become Head, the rest wait in Tail.
func (r *Words) add(d []byte, pos int64) {
	ib := r.itemBytes()
	if len(r.Tail) > 0 { // the waiting bytes end where d starts (also after a merge or a decoded shard)
		r.bufStart = pos - int64(len(r.Tail))
	}
	for len(d) > 0 {
		if len(r.Tail) == 0 && pos%ib == 0 && int64(len(d)) >= ib { // whole items in place
			n := int64(len(d)) / ib
			for k := int64(0); k < n; k++ {
				r.item(d[k*ib:(k+1)*ib], pos/ib+k)
			}
			pos += n * ib
			d = d[n*ib:]
			continue
		}
		if len(r.Tail) == 0 {
			r.bufStart = pos
		}
		end := (r.bufStart/ib + 1) * ib // the next item boundary
		take := min(int64(len(d)), end-pos)
		if len(r.Tail) == 0 && take == ib && pos%ib == 0 {
			r.item(d[:take], pos/ib) // a whole item in place: no copy
		} else {
			r.Tail = append(r.Tail, d[:take]...)
			if pos+take == end {
				if r.bufStart%ib == 0 {
					r.item(r.Tail, r.bufStart/ib)
				} else { // only the stretch's first item can start before it
					r.Head = slices.Clone(r.Tail)
				}
				r.Tail = r.Tail[:0]
			}
		}
		pos += take
		d = d[take:]
	}
}

// hasBoundary reports whether an item boundary lies in [off, off+n], i.e.
// the stretch is not inside one item.
func (s *WordSpec) hasBoundary(off, n int64) bool {
	ib := s.itemBytes()
	first := (off + ib - 1) / ib * ib
	return first <= off+n
}

// merge joins next (the following stretch) onto r: the bytes of the item
// cut between them, r's Tail and next's first fragment, are counted when
// they make the whole item, else they become the merged Head or Tail.
func (r *Words) merge(nx record, sm *seam) {
	next := nx.(*Words)
	r.mergeCounts(next.Counts)
	a, b := sm.a, sm.b
	ib := r.itemBytes()
	aBound, bBound := r.hasBoundary(a.Offset, a.N), r.hasBoundary(b.Offset, b.N)
	tailStart := a.Offset
	if aBound {
		tailStart = (a.Offset + a.N) / ib * ib
	}
	bFirst := next.Tail // b inside one item: all its bytes
	if bBound {
		bFirst = next.Head
	}
	joined := append(slices.Clone(r.Tail), bFirst...)
	switch {
	case !bBound:
		r.Tail = joined // still waiting for the item's end
	case tailStart%ib == 0:
		if len(joined) > 0 {
			r.item(joined, tailStart/ib)
		}
		r.Tail = slices.Clone(next.Tail)
	default: // a lies inside the item that b completes: the merged Head
		r.Head = joined
		r.Tail = slices.Clone(next.Tail)
	}
	r.bufStart = tailStart
	if bBound {
		r.bufStart = (b.Offset + b.N) / ib * ib
	}
}

// mergeCounts adds counters, except lincomp's smallest L (min, 0 = none).
func (r *Words) mergeCounts(c []int64) {
	for i, v := range c {
		if r.Test == LinComp && i%(2*lincompClamp+2) == 2*lincompClamp+1 {
			if v != 0 && (r.Counts[i] == 0 || v < r.Counts[i]) {
				r.Counts[i] = v
			}
			continue
		}
		r.Counts[i] += v
	}
}

func (r *Words) clone() record {
	c := *r
	c.Counts, c.Head, c.Tail = slices.Clone(r.Counts), slices.Clone(r.Head), slices.Clone(r.Tail)
	return &c
}

func (r *Words) settle(*Tally) {}

// words decodes an item's bytes into words (in a buffer the next item
// reuses).
func (r *Words) words(b []byte) []uint64 {
	per := r.Word / 8
	if cap(r.wbuf) < len(b)/per {
		r.wbuf = make([]uint64, len(b)/per)
	}
	out := r.wbuf[:len(b)/per]
	switch {
	case per == 4 && !r.BigEndian:
		for i := range out {
			out[i] = uint64(binary.LittleEndian.Uint32(b[4*i:]))
		}
		return out
	case per == 8 && !r.BigEndian:
		for i := range out {
			out[i] = binary.LittleEndian.Uint64(b[8*i:])
		}
		return out
	case per == 4:
		for i := range out {
			out[i] = uint64(binary.BigEndian.Uint32(b[4*i:]))
		}
		return out
	case per == 8:
		for i := range out {
			out[i] = binary.BigEndian.Uint64(b[8*i:])
		}
		return out
	}
	for i := range out {
		w := b[i*per : (i+1)*per]
		var v uint64
		if r.BigEndian {
			for _, x := range w {
				v = v<<8 | uint64(x)
			}
		} else {
			for k := per - 1; k >= 0; k-- {
				v = v<<8 | uint64(w[k])
			}
		}
		out[i] = v
	}
	return out
}

// item counts one whole item, the j-th of the stream.
func (r *Words) item(b []byte, j int64) {
	if r.Test == LinComp && !LincompSelected(j) || r.Test == Birthday && j >= BirthdaySamples {
		return
	}
	if r.Test == RowRank {
		var rows [RowBits]uint64
		for m := 0; m < 8; m++ {
			for i := range rows {
				rows[i] = bitsAt(b, (m*RowBits+i)*RowBits, RowBits)
			}
			r.Counts[min(2, RowBits-gf2.Rank(rows[:], RowBits))]++
		}
		return
	}
	w := r.words(b)
	W := r.Word
	switch r.Test {
	case LinComp:
		stride := 2*lincompClamp + 2
		for p, bit := range []int{0, W - 1} {
			s := gf2.NewBits(len(w))
			for i, v := range w {
				s.Set(i, v>>bit)
			}
			L := int64(gf2.LinearComplexity(s))
			d := L - int64(len(w)/2)
			d = max(-lincompClamp, min(lincompClamp, d))
			r.Counts[p*stride+int(d)+lincompClamp]++
			if m := &r.Counts[p*stride+stride-1]; *m == 0 || L+1 < *m {
				*m = L + 1
			}
		}
	case Rank:
		rk := gf2.Rank(w, W)
		r.Counts[min(2, W-rk)]++
	case Birthday:
		R := birthdaySpacings(w, W)
		r.Counts[min(16, R)]++
		r.Counts[birthdayCells-1] += int64(R)
	case WordColl:
		c := r.collisions(w)
		r.Counts[0]++
		r.Counts[1] += int64(c)
		r.Counts[2+min(15, c)]++
	case Hamming:
		r.Counts[HammingClass(bits.OnesCount64(w[0]), W)*HammingClasses+HammingClass(bits.OnesCount64(w[1]), W)]++
	default:
		r.Counts[permIndex(w)]++
	}
}

// collisions counts the words of a block whose top h bits an earlier word
// of the block had, with an open-addressing table of twice the block's
// size (keys below 2^32 are stored with bit 63 set; 0 is empty).
func (r *Words) collisions(w []uint64) int {
	h := CollisionBits(r.Word)
	size := 2 * len(w)
	if len(r.seen) != size {
		r.seen = make([]uint64, size)
	} else {
		clear(r.seen)
	}
	mask := uint64(size - 1)
	c := 0
	for _, v := range w {
		k := v>>(r.Word-h) | 1<<63
		i := (k * 0x9E3779B97F4A7C15) >> 32 & mask
		for {
			switch r.seen[i] {
			case 0:
				r.seen[i] = k
			case k:
				c++
			default:
				i = (i + 1) & mask
				continue
			}
			break
		}
	}
	return c
}

// bitsAt returns the n ≤ 57 bits of b from bit position p on, most
// significant bit of each byte first, as the low n bits of the result.
func bitsAt(b []byte, p, n int) uint64 {
	var v uint64
	k := p >> 3
	for i := 0; i < 8 && k+i < len(b); i++ {
		v |= uint64(b[k+i]) << (56 - 8*i)
	}
	return v << (p & 7) >> (64 - n)
}

// HammingClass pools a weight of a W-bit word: ≤ W/2−2, W/2−1, W/2,
// W/2+1, ≥ W/2+2.
func HammingClass(weight, W int) int { return max(0, min(4, weight-W/2+2)) }

// birthdaySpacings returns Knuth's R for one sample: the birthdays are the
// top 24 bits of the words, sorted; the spacings between neighbours (the
// last one wrapping around the year) are sorted, and R counts the spacings
// equal to the one before them (TAOCP vol. 2, 3rd ed., §3.3.2 J).
func birthdaySpacings(w []uint64, W int) int {
	const n = 1 << BirthdayBits
	y := make([]uint64, len(w))
	for i, v := range w {
		y[i] = v >> (W - BirthdayBits)
	}
	slices.Sort(y)
	s := make([]uint64, len(y))
	for i := 1; i < len(y); i++ {
		s[i-1] = y[i] - y[i-1]
	}
	s[len(y)-1] = y[0] + n - y[len(y)-1]
	slices.Sort(s)
	R := 0
	for i := 1; i < len(s); i++ {
		if s[i] == s[i-1] {
			R++
		}
	}
	return R
}

// permIndex returns the index (0..119) of the relative order of 5 words,
// or 120 when two are equal: the Lehmer code Σ c_i (4−i)!, c_i the number
// of later words smaller than word i, a bijection of the 120 orders.
func permIndex(w []uint64) int {
	code := 0
	for i := 0; i < 5; i++ {
		c := 0
		for j := i + 1; j < 5; j++ {
			switch {
			case w[j] < w[i]:
				c++
			case w[j] == w[i]:
				return 120
			}
		}
		code = code*(5-i) + c
	}
	return code
}

type wordsEntry struct {
	Counts table  `json:"counts"`
	Head   []byte `json:"head"`
	Tail   []byte `json:"tail"`
}

func (r *Words) entry(*blobs) any {
	e := wordsEntry{Counts: r.Counts}
	if len(r.Head) > 0 { // empty fragments are written as none, however they were made
		e.Head = r.Head
	}
	if len(r.Tail) > 0 {
		e.Tail = r.Tail
	}
	return e
}

func (r *Words) decode(data json.RawMessage, _ *blobs) error {
	var e wordsEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Counts, r.Head, r.Tail = e.Counts, e.Head, e.Tail
	return nil
}

// check: the counters' length, their sums against the items inside the
// stretch, and the partial items' lengths against its ends.
func (r *Words) check(t *Tally) error {
	if len(r.Counts) != r.Cells() {
		return fmt.Errorf("%s table of %d cells, not %d", r.Test, len(r.Counts), r.Cells())
	}
	for i, v := range r.Counts {
		if v < 0 {
			return fmt.Errorf("the %s table holds a negative count at %d", r.Test, i)
		}
	}
	ib := r.itemBytes()
	first := (t.Offset + ib - 1) / ib
	last := (t.Offset + t.N) / ib
	items := max(0, last-first)
	if r.Test == LinComp {
		items = 0
		for j := first; j < last; j++ {
			if LincompSelected(j) {
				items++
			}
		}
	}
	if r.Test == Birthday {
		items = max(0, min(last, BirthdaySamples)-first)
	}
	if r.Test == RowRank {
		items *= 8 // matrices
	}
	var counted int64
	switch r.Test {
	case LinComp:
		stride := 2*lincompClamp + 2
		for p := 0; p < 2; p++ {
			var s int64
			for _, v := range r.Counts[p*stride : p*stride+stride-1] {
				s += v
			}
			if p == 0 {
				counted = s
			} else if s != counted {
				return fmt.Errorf("lincomp counts %d segments for one bit and %d for the other", counted, s)
			}
			if m := r.Counts[p*stride+stride-1]; (s == 0) != (m == 0) || m > int64(r.segment())+1 {
				return fmt.Errorf("lincomp's smallest complexity %d does not fit %d segments", m-1, s)
			}
		}
	case Birthday:
		for _, v := range r.Counts[:birthdayCells-1] {
			counted += v
		}
	case WordColl:
		counted = r.Counts[0]
		var h int64
		for _, v := range r.Counts[2:] {
			h += v
		}
		if h != counted {
			return fmt.Errorf("wordcoll's histogram counts %d blocks, not %d", h, counted)
		}
	default:
		for _, v := range r.Counts {
			counted += v
		}
	}
	if counted != items {
		return fmt.Errorf("the %s table counts %d items, not the %d inside the stretch", r.Test, counted, items)
	}
	head, tail := int64(0), t.N
	if r.hasBoundary(t.Offset, t.N) {
		head = ((t.Offset+ib-1)/ib*ib - t.Offset)
		tail = t.Offset + t.N - (t.Offset+t.N)/ib*ib
	}
	if int64(len(r.Head)) != head || int64(len(r.Tail)) != tail {
		return fmt.Errorf("the %s record keeps %d and %d bytes of partial items, not %d and %d", r.Test, len(r.Head), len(r.Tail), head, tail)
	}
	return nil
}
