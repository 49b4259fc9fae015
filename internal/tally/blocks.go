package tally

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math/bits"
	"slices"
)

// Blocks is the record of the non-overlapping k-blocks, k = 2..BlocksMax,
// aligned to global digit positions: blocks start at multiples of k counted
// from the start of the whole sequence, so a shard cut anywhere gives the
// same blocks. Counts[k] is indexed by block value (nil for k not counted).
//
// Not every length costs a loop. With batched windows the k-blocks are the
// window values mod b^k (windows.go). A length k whose multiple m ≤
// BlocksMax is counted is derived from the m-blocks when the record
// settles: every aligned m-block is m/k aligned k-blocks, so only the
// k-blocks near the stretch's ends need the digits, which Head and Tail
// hold.
type Blocks struct {
	Counts [][]int64

	spec *Spec
	hot  [][]uint8  // byte counters of the large tables (see Windows)
	raw  []rawTable // a shard being folded: the tables still encoded
}

func newBlocks(s *Spec) *Blocks {
	r := &Blocks{spec: s, Counts: make([][]int64, s.MaxBlock+1), hot: make([][]uint8, s.MaxBlock+1)}
	for k := 2; k <= s.blocksMax(); k++ {
		r.Counts[k] = make([]int64, ipow(s.Base, k))
	}
	return r
}

// BlockCounts returns the aligned k-block counts (nil when k-blocks are
// not counted: HasBlocks).
func (t *Tally) BlockCounts(k int) []int64 {
	t.settle()
	if k < 0 || k >= len(t.blk.Counts) {
		return nil
	}
	return t.blk.Counts[k]
}

func (r *Blocks) kind() string { return "blocks" }

// source returns the block length whose counts give those of length k:
// the largest multiple m of k that is counted, or 0 when the k-blocks are
// counted in the pass.
func (s Spec) blocksSource(k int) int {
	if m := s.blocksMax() / k * k; m > k {
		return m
	}
	return 0
}

// countedLengths returns the k whose blocks the pass counts (the others are
// derived when the record settles).
func (r *Blocks) countedLengths() []int {
	var ks []int
	for k := 2; k <= r.spec.blocksMax(); k++ {
		if r.spec.blocksSource(k) == 0 {
			ks = append(ks, k)
		}
	}
	return ks
}

func (r *Blocks) kernels(t *Tally) []kernel {
	if t.win.packable() {
		// Spread out, the windows' kernel counts them from its batches.
		var ks []kernel
		for _, k := range r.countedLengths() {
			ks = append(ks, kernel{name: "blocks", cost: 2 / float64(k), packed: func(p []byte) { r.addPacked(t, k, p) }})
		}
		return ks
	}
	if t.win.batched() {
		return nil // counted from the window batches
	}
	var ks []kernel
	for _, k := range r.countedLengths() {
		cost := 2.0
		if len(r.Counts[k]) > 1<<18 {
			cost = 16
		}
		ks = append(ks, kernel{name: "blocks", cost: cost / float64(k), run: func(d []byte) { r.add(t, k, d) }})
	}
	return ks
}

// add counts the aligned k-blocks that end inside d.
func (r *Blocks) add(t *Tally, k int, d []byte) {
	b := t.Base
	cnt := r.Counts[k]
	pos := t.Offset + t.N // global position of d[0]
	have := int(pos % int64(k))
	cur, skip := 0, 0
	if have > 0 {
		if int64(have) <= t.N {
			cur = value(t.Tail[len(t.Tail)-have:], b)
		} else { // the block began before this stretch: not ours to count
			skip = k - have
			have = 0
		}
	}
	i := 0
	for ; i < len(d) && skip > 0; i++ {
		skip--
	}
	for ; i < len(d) && have > 0; i++ {
		cur = cur*b + int(d[i])
		have++
		if have == k {
			cnt[cur]++
			have, cur = 0, 0
		}
	}
	// Straight into the 64-bit table, byte table or not (the count of a cell
	// is the sum of both): with large tables the blocks come from the
	// window batches and only the few at a chunk's start come here.
	for ; i+k <= len(d); i += k {
		cnt[value(d[i:i+k], b)]++
	}
}

// addPacked counts the aligned k-blocks that end inside a packed chunk
// (packed.go): the one begun in the tail through add, the others as the
// k·s-bit fields they are.
func (r *Blocks) addPacked(t *Tally, k int, p []byte) {
	s := packWidth(t.Base)
	n := len(p) * (8 / s)
	a := int((int64(k) - (t.Offset+t.N)%int64(k)) % int64(k)) // the first block that starts in p
	if a > 0 {
		r.add(t, k, digitsOf(p, s, 0, min(a, n)))
	}
	if a+k > n {
		return
	}
	cnt := r.Counts[k]
	hot := hotTable(&r.hot[k], len(cnt))
	if hot != nil && len(hot) != 1<<(k*s) {
		panic("tally: packed blocks need a table of 2^(k·s) cells")
	}
	// The blocks are fields of k·s bits, each read by a 64-bit load of its
	// own (fields); the last few, within 8 bytes of the end, bit by bit.
	w := k * s
	fast := 0 // blocks whose load stays inside p: bit a·s+i·w ≤ 8·(len(p)−8)
	if room := 8*(len(p)-8) - a*s; room >= 0 {
		fast = room/w + 1
	}
	var buf [windowBatch]uint32
	for left := (n - a) / k; left > 0; {
		j := min(left, windowBatch)
		if fast > 0 {
			j = min(j, fast)
			fields(buf[:j], p, a*s, w)
			fast -= j
		} else {
			for i := range buf[:j] {
				buf[i] = uint32(bitField(p, (a+i*k)*s, w))
			}
		}
		a += j * k
		left -= j
		if hot != nil {
			countBytesFast(hot, cnt, buf[:j]) // fields of k·s bits are below len(hot)
		} else {
			countInto(cnt, buf[:j])
		}
	}
}

// countInto adds one to cnt[v] for each v in vals (a loop of its own: in
// the caller its index would live on the stack).
//
//go:noinline
func countInto(cnt []int64, vals []uint32) {
	for _, v := range vals {
		cnt[v]++
	}
}

// fields sets buf[i] to the w-bit field (w ≤ 56) of p at bit+i·w, reading 8
// bytes for each: each must be inside p. A loop of its own, with its few
// values in registers.
//
//go:noinline
func fields(buf []uint32, p []byte, bit, w int) {
	sh := uint(64-w) & 63
	for i := range buf {
		x := binary.BigEndian.Uint64(p[bit>>3:]) << (uint(bit) & 7)
		buf[i] = uint32(x >> sh)
		bit += w
	}
}

// blockCounter counts the aligned k-blocks among a batch of window values.
type blockCounter struct {
	k    int
	m, M uint64 // b^k and ⌊(2^64 − 1)/b^k⌋ + 1: x mod m = ⌊(M·x mod 2^64)·m / 2^64⌋ for x, m < 2^32 (Lemire, Kaser & Kurz 2019, "Faster remainder by direct computation")
	hot  []uint8
	cnt  []int64
}

func (r *Blocks) counter(k int) blockCounter {
	m := uint64(ipow(r.spec.Base, k))
	return blockCounter{k: k, m: m, M: ^uint64(0)/m + 1, hot: hotTable(&r.hot[k], len(r.Counts[k])), cnt: r.Counts[k]}
}

// count counts the k-blocks that end where the windows of idx end: idx[j]
// ends at global position g0+j, and a block ends there when g0+j+1 is a
// multiple of k.
func (c *blockCounter) count(idx []uint32, g0 int64) {
	j := int((int64(c.k) - (g0+1)%int64(c.k)) % int64(c.k))
	if c.hot == nil {
		for ; j < len(idx); j += c.k {
			v, _ := bits.Mul64(c.M*uint64(idx[j]), c.m)
			c.cnt[v]++
		}
		return
	}
	var vals [windowBatch/2 + 1]uint32
	n := 0
	for ; j < len(idx); j += c.k {
		v, _ := bits.Mul64(c.M*uint64(idx[j]), c.m)
		vals[n] = uint32(v)
		n++
	}
	countBytes(c.hot, c.cnt, vals[:n])
}

// merge adds next's blocks and counts the aligned blocks that cross the cut.
func (r *Blocks) merge(next record, sm *seam) {
	n := next.(*Blocks)
	for k := 2; k <= r.spec.blocksMax(); k++ {
		if n.raw != nil {
			n.raw[k].addTo(r.Counts[k])
		} else {
			addInto(r.Counts[k], n.Counts[k])
		}
		for s := 0; s < sm.cut && s+k <= len(sm.x); s++ {
			if (sm.xs+int64(s))%int64(k) == 0 && s+k > sm.cut {
				r.Counts[k][value(sm.x[s:s+k], r.spec.Base)]++
			}
		}
	}
}

func (r *Blocks) clone() record {
	u := &Blocks{spec: r.spec, Counts: make([][]int64, len(r.Counts)), hot: make([][]uint8, len(r.Counts))}
	for k, c := range r.Counts {
		u.Counts[k] = slices.Clone(c)
	}
	return u
}

// settle folds the byte counters and derives the lengths not counted in
// the pass from their longest counted multiple, longest first.
func (r *Blocks) settle(t *Tally) {
	var tasks []func()
	for k, h := range r.hot {
		if h != nil {
			tasks = append(tasks, func() { fold(r.Counts[k], h) })
		}
	}
	if len(tasks) > 0 {
		parallel(tasks...)
	}
	r.hot = make([][]uint8, len(r.Counts))
	for k := r.spec.blocksMax(); k >= 2; k-- {
		if m := r.spec.blocksSource(k); m > 0 {
			r.derive(t, k, m)
		}
	}
}

// derive fills Counts[k] from Counts[m], m = blocksSource(k): the m-block
// table, seen as m/k axes of b^k values each, is summed over all axes but
// one, for each axis in turn (streaming passes, no decoding).
func (r *Blocks) derive(t *Tally, k, m int) {
	b := t.Base
	cnt := r.Counts[k]
	clear(cnt)
	src, mid := r.Counts[m], ipow(b, k)
	for j := 0; j < m/k; j++ {
		outer, inner := ipow(b, k*j), ipow(b, m-k-k*j)
		for o := 0; o < outer; o++ {
			for x := 0; x < mid; x++ {
				start := (o*mid + x) * inner
				var s int64
				for _, v := range src[start : start+inner] {
					s += v
				}
				cnt[x] += s
			}
		}
	}
	// Aligned k-blocks inside the stretch but outside its complete aligned
	// m-blocks: before the first m-aligned position, or after the last
	// complete m-block. (m-aligned positions are k-aligned, so no k-block
	// straddles one.)
	n := t.N
	first := (int64(m) - t.Offset%int64(m)) % int64(m) // local position of the first m-aligned start
	end := first
	if first+int64(m) <= n {
		end = first + (n-first)/int64(m)*int64(m)
	}
	block := make([]byte, k)
	for i := (int64(k) - t.Offset%int64(k)) % int64(k); i+int64(k) <= n; i += int64(k) {
		if i >= first && i+int64(k) <= end {
			i = end - int64(k) // skip the covered stretch
			continue
		}
		for j := range block {
			block[j] = t.digitAt(i + int64(j))
		}
		cnt[value(block, b)]++
	}
}

// blocksEntry holds the tables inline (Counts), or their indices in the
// shard's table section (Tables, −1 for k not counted).
type blocksEntry struct {
	Counts []table `json:"counts,omitempty"` // index k; empty for k not counted
	Tables []int   `json:"tables,omitempty"`
}

func (r *Blocks) entry(b *blobs) any {
	if b == nil {
		e := blocksEntry{Counts: make([]table, len(r.Counts))}
		for k, c := range r.Counts {
			e.Counts[k] = c
		}
		return e
	}
	e := blocksEntry{Tables: make([]int, len(r.Counts))}
	for k, c := range r.Counts {
		e.Tables[k] = -1
		if len(c) > 0 {
			e.Tables[k] = b.put(c)
		}
	}
	return e
}

func (r *Blocks) decode(data json.RawMessage, b *blobs) error {
	var e blocksEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	if e.Tables != nil && b.fold {
		r.Counts, r.raw = make([][]int64, len(e.Tables)), make([]rawTable, len(e.Tables))
		for k, i := range e.Tables {
			if i >= 0 {
				var err error
				if r.raw[k], err = b.raw(i); err != nil {
					return err
				}
			}
		}
	} else if e.Tables != nil {
		r.Counts = make([][]int64, len(e.Tables))
		for k, i := range e.Tables {
			if i >= 0 {
				c, err := b.get(i)
				if err != nil {
					return err
				}
				r.Counts[k] = c
			}
		}
	} else {
		r.Counts = make([][]int64, len(e.Counts))
		for k, c := range e.Counts {
			if len(c) > 0 {
				r.Counts[k] = c
			}
		}
	}
	r.hot = make([][]uint8, len(r.Counts))
	return nil
}

// check: one table of b^k cells for each counted k, counting the aligned
// k-blocks inside the stretch.
func (r *Blocks) check(t *Tally) error {
	K := t.MaxBlock
	if len(r.Counts) != K+1 {
		return fmt.Errorf("%d block tables for block length %d", len(r.Counts), K)
	}
	for k := range r.Counts {
		want := 0
		if t.HasBlocks(k) {
			want = ipow(t.Base, k)
		}
		cells, sum, err := len(r.Counts[k]), int64(0), error(nil)
		if r.raw != nil {
			cells, sum, err = r.raw[k].scan("a block table")
		}
		if cells != want {
			return fmt.Errorf("block table %d has %d cells, want %d", k, cells, want)
		}
		if want == 0 {
			continue
		}
		if r.raw == nil {
			sum, err = nonNegative("a block table", r.Counts[k])
		}
		if err != nil {
			return err
		} else if sum != aligned(t.Offset, t.N, k) {
			return fmt.Errorf("block table %d counts %d blocks, not the %d inside the stretch", k, sum, aligned(t.Offset, t.N, k))
		}
	}
	return nil
}
