package tally

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
