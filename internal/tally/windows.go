package tally

import (
	"encoding/json"
	"fmt"
	"slices"
)

// Windows is the record of the overlapping K-windows that lie inside the
// stretch, indexed by block value (at K = 1 the windows are the digits and
// the table stays empty: Cyclic reads the digit counts).
//
// Large tables are counted in bytes first. At 10^8 decimal digits the
// windows go to 10^7 cells: as 64-bit counters that is 80 MB, far beyond
// the caches, and every increment waited on memory (about 13 ns a digit
// here); as bytes it is 10 MB, which the last-level cache holds (about
// 2.2 ns; measured on this project's two-core machine, where 16-bit
// counters, 20 MB, gained little). A byte that wraps to zero adds 256 to
// its 64-bit cell, so nothing is lost; the tally folds the bytes into the
// 64-bit table before anything reads it.
type Windows struct {
	K      int
	Counts []int64

	base int
	hot  []uint8  // byte counters: the true count of cell w is Counts[w] + hot[w]
	raw  rawTable // a shard being folded: the table still encoded (Counts nil)
}

// hotMinCells is the table size from which a byte table is kept (a
// variable so that tests can send every table through the byte path).
var hotMinCells = 1 << 16

// hotTable returns the byte table at *p for a table of n cells, making it
// on first use, or nil for small tables (counted directly).
func hotTable(p *[]uint8, n int) []uint8 {
	if n < hotMinCells {
		return nil
	}
	if *p == nil {
		*p = make([]uint8, n)
	}
	return *p
}

// fold adds byte counters into their 64-bit cells.
func fold(cold []int64, hot []uint8) {
	for w, v := range hot {
		if v != 0 {
			cold[w] += int64(v)
		}
	}
}

func newWindows(b, K int) *Windows { return &Windows{K: K, base: b, Counts: make([]int64, ipow(b, K))} }

// Windows returns the counts of the overlapping K-windows inside the
// stretch (no wrap-around; see Cyclic).
func (t *Tally) Windows() []int64 { t.settle(); return t.win.Counts }

func (r *Windows) kind() string { return "windows" }

// batched reports whether the windows are counted a batch of values at a
// time through byte counters (tables of at least hotMinCells cells whose
// values stay below 2^32); the aligned blocks are then counted from the
// same batches (blocks.go).
func (r *Windows) batched() bool {
	return r.K > 1 && len(r.Counts) >= hotMinCells && uint64(len(r.Counts)) <= 1<<32
}

func (r *Windows) kernels(t *Tally) []kernel {
	if r.K == 1 {
		return nil
	}
	cost := 2.0
	if len(r.Counts) > 1<<18 { // random access into a table beyond the caches
		cost = 16
	}
	if !r.packable() {
		return []kernel{{name: "windows", cost: cost, run: func(d []byte) { r.add(t, d) }}}
	}
	return []kernel{{name: "windows", cost: cost, run: func(d []byte) { r.add(t, d) }, packed: func(p []byte) { r.addPacked(t, p) }}}
}

// packable reports whether packed chunks are counted by addPacked: bits,
// bit pairs or nibbles, a batched table and window values of more than a
// byte and at most 32 bits. The aligned blocks are then counted by their
// own kernels (Blocks.addPacked).
func (r *Windows) packable() bool {
	s := packWidth(r.base)
	return s > 0 && r.batched() && r.K*s <= 32 && r.K*s > 8
}

// windowRun shifts the bytes of p into reg and writes their window values
// (8/s a byte) to buf from k on, which has room for them; it returns the
// next k and the register. A loop of its own, with its values in
// registers (in the caller the index lived on the stack).
//
//go:noinline
func windowRun(buf *[2 * windowBatch]uint32, k int, p []byte, reg, mask uint64, s int) (int, uint64) {
	switch s {
	case 1:
		for _, v := range p {
			reg = reg<<8 | uint64(v)
			b := buf[k&(2*windowBatch-1):][:8]
			b[0], b[1], b[2], b[3] = uint32(reg>>7&mask), uint32(reg>>6&mask), uint32(reg>>5&mask), uint32(reg>>4&mask)
			b[4], b[5], b[6], b[7] = uint32(reg>>3&mask), uint32(reg>>2&mask), uint32(reg>>1&mask), uint32(reg&mask)
			k += 8
		}
	case 2:
		for _, v := range p {
			reg = reg<<8 | uint64(v)
			b := buf[k&(2*windowBatch-1):][:4]
			b[0], b[1], b[2], b[3] = uint32(reg>>6&mask), uint32(reg>>4&mask), uint32(reg>>2&mask), uint32(reg&mask)
			k += 4
		}
	default:
		for _, v := range p {
			reg = reg<<8 | uint64(v)
			b := buf[k&(2*windowBatch-1):][:2]
			b[0], b[1] = uint32(reg>>4&mask), uint32(reg&mask)
			k += 2
		}
	}
	return k, reg
}

// addPacked counts the K-windows that end inside a packed chunk
// (packed.go): a window of s-bit digits is the K·s-bit field that ends at
// its last digit, read from a register the bytes are shifted into.
func (r *Windows) addPacked(t *Tally, p []byte) {
	s := packWidth(r.base)
	m, K, W := 8/s, r.K, r.K*s
	n := len(p) * m
	cnt := r.Counts
	lead := digitsOf(p, s, 0, min(n, K))
	y := append(slices.Clip(t.Tail), lead[:min(len(lead), K-1)]...)
	for end := len(t.Tail); end < len(y); end++ {
		if end+1 >= K {
			cnt[value(y[end+1-K:end+1], r.base)]++
		}
	}
	if n < K {
		return
	}
	cnt[value(lead, r.base)]++
	if n == K {
		return
	}
	hot := hotTable(&r.hot, len(cnt))
	if len(cnt) != 1<<W || len(hot) != len(cnt) {
		panic("tally: packed windows need a byte table of 2^(K·s) cells")
	}
	mask := uint64(1)<<W - 1
	// The digits from K on; byte q holds digits q·m … q·m+m−1.
	q0 := K / m
	var reg uint64
	for q := max(0, q0-8); q < q0; q++ {
		reg = reg<<8 | uint64(p[q])
	}
	var buf [2 * windowBatch]uint32
	k := 0
	reg = reg<<8 | uint64(p[q0])
	for j := K % m; j < m; j++ {
		buf[k] = uint32(reg >> (8 - s*(j+1)) & mask)
		k++
	}
	for q := q0 + 1; q < len(p); {
		take := min(len(p)-q, (windowBatch-k)/m)
		k, reg = windowRun(&buf, k, p[q:q+take], reg, mask, s)
		q += take
		if k > windowBatch-m {
			countBytesFast(hot, cnt, buf[:k]) // every value is masked below len(hot)
			k = 0
		}
	}
	countBytesFast(hot, cnt, buf[:k])
}

// add counts the K-windows that end inside d, and, when batched, the
// counted non-overlapping blocks too: those that end before the first
// batched window by the blocks' own loop, the others from the batches.
func (r *Windows) add(t *Tally, d []byte) {
	K, b := r.K, r.base
	cnt := r.Counts
	var blocks []blockCounter
	if r.batched() {
		for _, k := range t.blk.countedLengths() {
			t.blk.add(t, k, d[:min(len(d), K)])
			blocks = append(blocks, t.blk.counter(k))
		}
	}
	// Windows that begin in the tail: at most K-1 of them.
	lead := min(len(d), K-1)
	y := append(slices.Clip(t.Tail), d[:lead]...)
	for end := len(t.Tail); end < len(y); end++ {
		if end+1 >= K {
			cnt[value(y[end+1-K:end+1], b)]++
		}
	}
	if len(d) < K {
		return
	}
	// Windows inside d, rolling: w' = (w - d[i-K]·b^(K-1))·b + d[i].
	pow := ipow(b, K-1)
	w := value(d[:K], b)
	cnt[w]++
	if hot := hotTable(&r.hot, len(cnt)); hot != nil {
		// Window values first, then counted a batch at a time (count.go).
		var buf [windowBatch]uint32
		for i := K; i < len(d); {
			idx := buf[:min(windowBatch, len(d)-i)]
			w = rollWindows(idx, d[i-K:i+len(idx)], w, pow, b, K)
			countBytes(hot, cnt, idx)
			for bc := range blocks {
				blocks[bc].count(idx, t.Offset+t.N+int64(i))
			}
			i += len(idx)
		}
		return
	}
	for i := K; i < len(d); i++ {
		w = (w-int(d[i-K])*pow)*b + int(d[i])
		cnt[w]++
	}
}

// rollWindows sets idx[j] to the value of the K-window of x that ends at
// x[K+j] (x holds the K digits before the batch, then the batch), given w,
// the value of the window that ends at x[K−1], and returns the last value.
// Two halves of the batch roll side by side, the second started from its
// own first window: each step of a roll waits for the one before (a
// multiply and an add), and two chains keep the multiplier busy.
func rollWindows(idx []uint32, x []byte, w, pow, b, K int) int {
	h := len(idx) / 2
	if h < K {
		for j := range idx {
			w = (w-int(x[j])*pow)*b + int(x[j+K])
			idx[j] = uint32(w)
		}
		return w
	}
	v := value(x[h:h+K], b) // the window that ends where the second half starts
	a, c := x[:h+K], x[h:2*h+K]
	lo, hi := idx[:h], idx[h:2*h]
	for j := range lo {
		w = (w-int(a[j])*pow)*b + int(a[j+K])
		v = (v-int(c[j])*pow)*b + int(c[j+K])
		lo[j], hi[j] = uint32(w), uint32(v)
	}
	for j := 2 * h; j < len(idx); j++ { // an odd batch's last window
		v = (v-int(x[j])*pow)*b + int(x[j+K])
		idx[j] = uint32(v)
	}
	return v
}

// merge adds next's windows and counts those that cross the cut.
func (r *Windows) merge(next record, sm *seam) {
	if n := next.(*Windows); n.raw != nil {
		n.raw.addTo(r.Counts)
	} else {
		addInto(r.Counts, n.Counts)
	}
	K := r.K
	if K == 1 {
		return
	}
	for s := max(0, sm.cut-K+1); s < sm.cut && s+K <= len(sm.x); s++ {
		r.Counts[value(sm.x[s:s+K], r.base)]++
	}
}

func (r *Windows) clone() record {
	return &Windows{K: r.K, base: r.base, Counts: slices.Clone(r.Counts)}
}

// settle folds the byte counters, in halves on two goroutines (the largest
// table), and drops them (the next Add makes new ones).
func (r *Windows) settle(*Tally) {
	if h := r.hot; h != nil {
		m := len(h) / 2
		parallel(func() { fold(r.Counts[:m], h[:m]) }, func() { fold(r.Counts[m:], h[m:]) })
	}
	r.hot = nil
}

// windowsEntry holds the table inline, or its index in the shard's table
// section.
type windowsEntry struct {
	Counts table `json:"counts,omitempty"`
	Table  *int  `json:"table,omitempty"`
}

func (r *Windows) entry(b *blobs) any {
	if b == nil {
		return windowsEntry{Counts: r.Counts}
	}
	i := b.put(r.Counts)
	return windowsEntry{Table: &i}
}

func (r *Windows) decode(data json.RawMessage, b *blobs) error {
	var e windowsEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Counts = e.Counts
	if e.Table != nil && b.fold {
		var err error
		r.raw, err = b.raw(*e.Table)
		return err
	}
	if e.Table != nil {
		var err error
		if r.Counts, err = b.get(*e.Table); err != nil {
			return err
		}
	}
	return nil
}

// check: b^K cells counting the N−K+1 windows inside the stretch.
func (r *Windows) check(t *Tally) error {
	b, K, N := t.Base, t.MaxBlock, t.N
	cells, sum, err := len(r.Counts), int64(0), error(nil)
	if r.raw != nil {
		cells, sum, err = r.raw.scan("the window table")
	}
	if cells != ipow(b, K) {
		return fmt.Errorf("window table of %d cells, want %d", cells, ipow(b, K))
	}
	if r.raw == nil {
		sum, err = nonNegative("the window table", r.Counts)
	}
	if err != nil {
		return err
	} else if K > 1 && sum != max(0, N-int64(K)+1) {
		return fmt.Errorf("the window table counts %d windows, not the %d inside the stretch", sum, max(0, N-int64(K)+1))
	}
	return nil
}

// CyclicInPlace is Cyclic without the copy of the largest table: the K-1
// wrap-around windows are added to the window table itself, which then
// holds the cyclic order-K counts. It saves b^K counters (80 MB at b = 10,
// K = 7) at the end of an audit. The tally is finished: Add, Merge and
// Clone panic afterwards.
func (t *Tally) CyclicInPlace() ([][]int64, error) {
	t.settle()
	K, b := t.MaxBlock, t.Base
	if t.N < int64(K) {
		return nil, fmt.Errorf("tally: %d digits are too few for blocks of length %d", t.N, K)
	}
	t.finished = true
	if K == 1 {
		return lowerOrders(slices.Clone(t.dig.Counts), 1, b), nil
	}
	wrap := append(slices.Clone(t.Tail[len(t.Tail)-(K-1):]), t.Head[:K-1]...)
	for s := 0; s < K-1; s++ {
		t.win.Counts[value(wrap[s:s+K], b)]++
	}
	return lowerOrders(t.win.Counts, K, b), nil
}

// lowerOrders returns cyclic counts of orders 1..K from the order-K table,
// summing out the last digit.
func lowerOrders(top []int64, K, b int) [][]int64 {
	out := make([][]int64, K+1)
	out[K] = top
	for k := K - 1; k >= 1; k-- {
		hi := out[k+1]
		lo := make([]int64, len(hi)/b)
		for w := range lo {
			var s int64
			for _, v := range hi[w*b : w*b+b] {
				s += v
			}
			lo[w] = s
		}
		out[k] = lo
	}
	return out
}

// Cyclic returns the overlapping k-block counts of the cyclic sequence
// (d_1..d_n followed by d_1..d_{k-1}), for 1 ≤ k ≤ K: exactly n windows,
// with consistent marginals Σ_a N_{wa} = Σ_a N_{aw} = N_w (docs/derivations.md).
// The order-K table adds the K-1 wrap-around windows to the inside counts;
// lower orders follow by summing out the last digit. It needs N ≥ K-1, and
// the stretch must be the whole sequence (a shard has no wrap-around).
func (t *Tally) Cyclic() ([][]int64, error) {
	if t.finished { // the window table already holds the cyclic counts
		return nil, fmt.Errorf("tally: Cyclic of a finished tally (after CyclicInPlace)")
	}
	t.settle()
	K, b := t.MaxBlock, t.Base
	if t.N < int64(K) {
		return nil, fmt.Errorf("tally: %d digits are too few for blocks of length %d", t.N, K)
	}
	if K == 1 {
		return lowerOrders(slices.Clone(t.dig.Counts), 1, b), nil
	}
	top := slices.Clone(t.win.Counts)
	// The wrap-around windows start in the last K-1 positions.
	wrap := append(slices.Clone(t.Tail[len(t.Tail)-(K-1):]), t.Head[:K-1]...)
	for s := 0; s < K-1; s++ {
		top[value(wrap[s:s+K], b)]++
	}
	return lowerOrders(top, K, b), nil
}
