package tally

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
// later Add makes new ones). It is idempotent and must not run concurrently
// with Add.
func (t *Tally) Settle() {
	fold := func(cold []int64, hot []uint8) {
		for w, v := range hot {
			if v != 0 {
				cold[w] += int64(v)
			}
		}
	}
	if t.hotOverlap != nil {
		fold(t.Overlap, t.hotOverlap)
	}
	for k, hot := range t.hotBlocks {
		if hot != nil {
			fold(t.Blocks[k], hot)
		}
	}
	t.hotOverlap, t.hotBlocks = nil, nil
}
