package tally

import "sync"

// Large count tables are counted in bytes first. At 10^8 decimal digits the
// overlapping 7-windows go to 10^7 cells: as 64-bit counters that is 80 MB,
// far beyond the caches, and every increment waited on memory (about 13 ns
// a digit here); as bytes it is 10 MB, which the last-level cache holds
// (about 2.2 ns; measured on this project's two-core machine, where 16-bit
// counters, 20 MB, gained little). A byte that wraps to zero adds 256 to
// its 64-bit cell, so nothing is lost; Settle folds the bytes into the
// 64-bit tables, which are exact only after it. Everything that reads or
// copies the tables (Merge, Clone, Cyclic, shards, the checks via the
// audit) settles first.

// hotMinCells is the table size from which a byte table is kept (a
// variable so that tests can send every table through the byte path).
var hotMinCells = 1 << 16

// prepare makes the slots of the block byte tables, before kernels run
// (each kernel then writes only its own slot, so concurrent kernels never
// grow the shared slice). Add and Runner.Add call it.
func (t *Tally) prepare() {
	if len(t.hotBlocks) <= t.MaxBlock {
		t.hotBlocks = make([][]uint8, t.MaxBlock+1)
	}
}

// hotTable returns the byte table at *p for a table of n cells, making it
// on first use, or nil for small tables (counted directly).
func (t *Tally) hotTable(p *[]uint8, n int) []uint8 {
	if n < hotMinCells {
		return nil
	}
	if *p == nil {
		*p = make([]uint8, n)
	}
	return *p
}

// Settle folds the byte counters into the 64-bit tables and drops them (a
// later Add makes new ones), then fills the records derived from the tables
// (derive). It is idempotent (a tally with no digits added since is left
// alone: Finish and CyclicInPlace both ask), does nothing to a finished
// tally, and must not run concurrently with Add.
func (t *Tally) Settle() {
	if t.finished || t.settled {
		return
	}
	defer func() { t.derive(); t.settled = true }()
	fold := func(cold []int64, hot []uint8) {
		for w, v := range hot {
			if v != 0 {
				cold[w] += int64(v)
			}
		}
	}
	var tasks []func()
	if h := t.hotOverlap; h != nil { // in halves: the largest table
		m := len(h) / 2
		tasks = append(tasks, func() { fold(t.Overlap[:m], h[:m]) }, func() { fold(t.Overlap[m:], h[m:]) })
	}
	for k, hot := range t.hotBlocks {
		if hot != nil {
			tasks = append(tasks, func() { fold(t.Blocks[k], hot) })
		}
	}
	parallel(tasks...)
	t.hotOverlap, t.hotBlocks, t.udScratch = nil, nil, nil
}

// parallel runs fns on their own goroutines and waits for all of them
// (each must write only its own data).
func parallel(fns ...func()) {
	if len(fns) == 1 {
		fns[0]()
		return
	}
	var wg sync.WaitGroup
	for _, f := range fns {
		wg.Add(1)
		go func() { defer wg.Done(); f() }()
	}
	wg.Wait()
}

// Two records follow from the count tables at the end instead of costing a
// loop per digit in the pass:
//
//   - the lag products Σ x_i x_{i+h} (h ≤ H) of the pairs inside the stretch,
//     from the overlapping K-windows when K > H: each pair whose first digit
//     starts a K-window inside the stretch is that window's first and
//     (h+1)-th digit; the pairs starting in the last K−1 positions lie in
//     Tail;
//   - the poker hands, which are exactly the aligned non-overlapping
//     h-blocks, when those are counted.
//
// The values are the same as counting them digit by digit (TestDerived), so
// merges, shards and the checks see no difference.

// lagsDerived reports whether the lag products come from the K-windows.
func (s Spec) lagsDerived() bool { return s.Lags > 0 && s.MaxBlock > s.Lags }

// pokerDerived reports whether the poker hands come from the block counts.
func (s Spec) pokerDerived() bool { return s.PokerHand > 0 && s.HasBlocks(s.PokerHand) }

// blocksSource returns the block length whose counts give those of length
// k: the largest multiple m of k that is counted (m ≤ blocksMax), or 0 when
// the k-blocks are counted in the pass. Every aligned m-block is m/k aligned
// k-blocks, so only the k-blocks near the stretch's ends (outside every
// complete m-block) need the digits, which Head and Tail hold.
func (s Spec) blocksSource(k int) int {
	if m := s.blocksMax() / k * k; m > k {
		return m
	}
	return 0
}

// deriveBlocks fills Blocks[k] from Blocks[m], m = blocksSource(k): the
// m-block table, seen as m/k axes of b^k values each, is summed over all
// axes but one, for each axis in turn (streaming passes, no decoding).
func (t *Tally) deriveBlocks(k, m int) {
	b := t.Base
	cnt := t.Blocks[k]
	clear(cnt)
	src, mid := t.Blocks[m], ipow(b, k)
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

// digitAt returns local digit i of the stretch from Head or Tail (the
// derivations only ask for digits near the ends).
func (t *Tally) digitAt(i int64) byte {
	if i < int64(len(t.Head)) {
		return t.Head[i]
	}
	return t.Tail[i-(t.N-int64(len(t.Tail)))]
}

// derive fills the derived records; the lag products (one task per lag)
// and the block and poker derivations run concurrently.
func (t *Tally) derive() {
	s := t.Spec
	var tasks []func()
	tasks = append(tasks, func() {
		for k := s.blocksMax(); k >= 2; k-- {
			if m := s.blocksSource(k); m > 0 {
				t.deriveBlocks(k, m)
			}
		}
		if s.pokerDerived() {
			t.derivePoker()
		}
	})
	if s.lagsDerived() {
		tasks = append(tasks, func() {
			// The window table summed down to its first H+1 digits.
			heads := lowerOrders(t.Overlap, s.MaxBlock, s.Base)[s.Lags+1]
			for h := 1; h <= s.Lags; h++ {
				t.LagProd[h] = t.lagProduct(h, heads)
			}
		})
	}
	parallel(tasks...)
}

// lagProduct returns Σ x_i x_{i+h} over the pairs inside the stretch, from
// the K-windows (first and (h+1)-th digit) and Tail. heads is the window
// table summed over its digits after the (H+1)-th (lowerOrders).
func (t *Tally) lagProduct(h int, heads []int64) int64 {
	b, H := t.Base, t.Lags
	n, L := t.N, int64(len(t.Tail))
	var sum int64
	inner, mid := ipow(b, H-h), ipow(b, h-1)
	for a := 1; a < b; a++ {
		for m := 0; m < mid; m++ {
			row := ((a*mid + m) * b) * inner
			for c := 1; c < b; c++ {
				var rs int64
				for _, v := range heads[row+c*inner : row+(c+1)*inner] {
					rs += v
				}
				sum += int64(a*c) * rs
			}
		}
	}
	// Pairs whose first digit is past the last K-window's start.
	K := t.MaxBlock
	for i := max(0, n-int64(K)+1); i+int64(h) < n; i++ {
		sum += int64(t.Tail[i-(n-L)]) * int64(t.Tail[i+int64(h)-(n-L)])
	}
	return sum
}

// derivePoker fills the poker hands from the aligned h-blocks.
func (t *Tally) derivePoker() {
	h, b := t.PokerHand, t.Base
	clear(t.Poker)
	w := make([]byte, h)
	for v, c := range t.Blocks[h] {
		if c == 0 {
			continue
		}
		for j, x := h-1, v; j >= 0; j, x = j-1, x/b {
			w[j] = byte(x % b)
		}
		t.Poker[distinct(w)] += c
	}
}
