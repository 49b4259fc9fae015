package tally

import "math/bits"

// Counting into a byte table that is larger than the core's own caches.
// An increment of a random cell of a 10 MB table waits on the shared
// last-level cache or, when other programs crowd it out, on memory; the
// plain loop leaves only as many of those waits in flight as the
// processor's window holds. On amd64 the cells are counted from a list of
// indices, with the cache line of the cell prefetchAhead places further
// down the list requested ahead of time (count_amd64.s): measured on this
// project's two-core machine, 2.4–3.3 ns a window instead of 3–4 ns with
// the last-level cache to ourselves, and instead of 8–16 ns when it was
// crowded. Elsewhere countBytesGo is used.

// prefetchAhead is how far down the index list the prefetch reaches (the
// constant 64 in count_amd64.s, 256 bytes of uint32 indices).
const prefetchAhead = 64

// windowBatch is the number of indices computed and counted at a time
// (16 KiB of indices: they stay in the first-level cache).
const windowBatch = 4096

// countBytes adds one to hot[w] for each w in idx; a byte that wraps to
// zero adds 256 to cold[w] (hot.go). It panics if an index is out of range,
// before counting anything: the assembly does not check.
func countBytes(hot []uint8, cold []int64, idx []uint32) {
	if len(cold) < len(hot) {
		panic("tally: byte table larger than its 64-bit table")
	}
	var t0, t1, t2, t3 uint32 // four chains: one max a cycle each
	i := 0
	for ; i+4 <= len(idx); i += 4 {
		t0, t1, t2, t3 = max(t0, idx[i]), max(t1, idx[i+1]), max(t2, idx[i+2]), max(t3, idx[i+3])
	}
	for _, w := range idx[i:] {
		t0 = max(t0, w)
	}
	if top := max(t0, t1, t2, t3); len(idx) > 0 && int(top) >= len(hot) {
		panic("tally: window value outside its table")
	}
	countBytesFast(hot, cold, idx)
}

// countBytesGo is the plain loop.
func countBytesGo(hot []uint8, cold []int64, idx []uint32) {
	for _, w := range idx {
		v := hot[w] + 1
		hot[w] = v
		if v == 0 {
			cold[w] += 256
		}
	}
}

// windowBlocks reports whether the counted non-overlapping blocks are taken
// from the overlap kernel's batches of window values instead of their own
// kernels: the k-block (k ≤ K) that ends where a K-window ends is the
// window's value mod b^k, which costs two multiplications instead of k
// multiply-adds over the digits (measured 1.3 against 3.0–3.3 ns a digit for
// k = 4, 5, 6 together). Only with batched windows, whose values stay below
// 2^32.
func (t *Tally) windowBlocks() bool {
	return t.MaxBlock > 1 && len(t.Overlap) >= hotMinCells && uint64(len(t.Overlap)) <= 1<<32
}

// countedBlockLengths returns the k whose non-overlapping blocks the pass
// counts (the others are derived at the end, hot.go).
func (s Spec) countedBlockLengths() []int {
	var ks []int
	for k := 2; k <= s.blocksMax(); k++ {
		if s.blocksSource(k) == 0 {
			ks = append(ks, k)
		}
	}
	return ks
}

// blockCounter counts the aligned k-blocks among a batch of window values.
type blockCounter struct {
	k    int
	m, M uint64 // b^k and ⌊(2^64 − 1)/b^k⌋ + 1: x mod m = ⌊(M·x mod 2^64)·m / 2^64⌋ for x, m < 2^32 (Lemire, Kaser & Kurz 2019, "Faster remainder by direct computation")
	hot  []uint8
	cnt  []int64
}

func (t *Tally) blockCounter(k int) blockCounter {
	m := uint64(ipow(t.Base, k))
	return blockCounter{k: k, m: m, M: ^uint64(0)/m + 1, hot: t.hotTable(&t.hotBlocks[k], len(t.Blocks[k])), cnt: t.Blocks[k]}
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
