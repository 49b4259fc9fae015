package tally

import (
	"sort"
	"sync"
)

// kernel is one loop of the pass. It reads the new digits, the stretch's
// tail, offset and n (all unchanged until advance) and writes only the
// fields it owns, so kernels can run concurrently on the same chunk.
type kernel struct {
	name string
	cost float64 // rough ns per digit, for grouping
	run  func(d []byte)
}

// kernels lists the pass's loops in their sequential order.
func (t *Tally) kernels() []kernel {
	s := t.Spec
	big := func(cells int) float64 { // random access into a table beyond the caches
		if cells > 1<<18 {
			return 15
		}
		return 1
	}
	ks := []kernel{
		{"digits", 0.7, func(d []byte) { t.addTrace(d, t.Offset+t.N); t.addDigits(d) }},
		{"overlap", 1 + big(len(t.Overlap)), t.addOverlap},
	}
	for k := 2; k <= s.MaxBlock; k++ {
		k := k
		ks = append(ks, kernel{"blocks", 1 + big(len(t.Blocks[k]))/float64(k), func(d []byte) { t.addBlocks(k, d) }})
	}
	ks = append(ks, kernel{"gaps", 2, t.addGaps})
	pos := func() int64 { return t.Offset + t.N }
	if h := s.PokerHand; h > 0 {
		ks = append(ks, kernel{"poker", 3, func(d []byte) { forWindows(t.Tail, d, pos(), h, h, t.countHand) }})
	}
	if L := s.UpDownDigits; L > 0 {
		ks = append(ks, kernel{"updown", 5, func(d []byte) {
			forWindows(t.Tail, d, pos(), L, L, t.countValue)
			forWindows(t.Tail, d, pos(), L, 2*L, t.countTie)
			forWindows(t.Tail, d, pos(), L, 3*L, t.countTurn)
		}})
	}
	if s.Lags > 0 {
		ks = append(ks, kernel{"lags", 3, t.addLags})
	}
	ks = append(ks, kernel{"runs", 2.5, t.addRuns}, kernel{"walk", 1.2, t.addWalk})
	if s.CouponClasses > 0 {
		ks = append(ks, kernel{"coupon", 4.5, func(d []byte) { t.addCoupon(d, pos()) }})
	}
	return ks
}

// Runner feeds a tally from several goroutines: the kernels are split into
// groups of about equal cost (largest first onto the least loaded group),
// the groups run concurrently on each chunk, and the tally advances when
// all are done. Every kernel is the same code Add runs, on the same chunk,
// writing fields no other kernel touches, so the tally is identical, bit
// for bit, whatever the number of workers.
type Runner struct {
	t      *Tally
	groups [][]kernel
}

// NewRunner returns a Runner for t with up to workers goroutines.
func NewRunner(t *Tally, workers int) *Runner {
	ks := t.kernels()
	workers = max(1, min(workers, len(ks)))
	order := make([]int, len(ks))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return ks[order[a]].cost > ks[order[b]].cost })
	groups := make([][]kernel, workers)
	load := make([]float64, workers)
	for _, i := range order {
		g := 0
		for j := range load {
			if load[j] < load[g] {
				g = j
			}
		}
		groups[g] = append(groups[g], ks[i])
		load[g] += ks[i].cost
	}
	// Within a group keep the sequential order (digits before anything else).
	for _, g := range groups {
		sort.SliceStable(g, func(a, b int) bool { return kernelRank(ks, g[a]) < kernelRank(ks, g[b]) })
	}
	return &Runner{t: t, groups: groups}
}

func kernelRank(ks []kernel, k kernel) int {
	for i := range ks {
		if ks[i].name == k.name && ks[i].cost == k.cost {
			return i
		}
	}
	return 0
}

// Add tallies the next digits of the stretch.
func (r *Runner) Add(d []byte) {
	if len(d) == 0 {
		return
	}
	if len(r.groups) == 1 {
		r.t.Add(d)
		return
	}
	var wg sync.WaitGroup
	for _, g := range r.groups[1:] {
		wg.Add(1)
		go func(g []kernel) {
			defer wg.Done()
			for _, k := range g {
				k.run(d)
			}
		}(g)
	}
	for _, k := range r.groups[0] {
		k.run(d)
	}
	wg.Wait()
	r.t.advance(d)
}
