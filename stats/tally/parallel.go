package tally

import (
	"sort"
	"sync"
	"time"
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
	ks := []kernel{{"digits", 0.7, func(d []byte) { t.addTrace(d, t.Offset+t.N); t.addDigits(d) }}}
	if s.MaxBlock > 1 { // at K = 1 the windows are the digits: Cyclic reads Digits
		ks = append(ks, kernel{"overlap", 1 + big(len(t.Overlap)), t.addOverlap})
	}
	for k := 2; k <= s.blocksMax(); k++ {
		if s.blocksSource(k) > 0 {
			continue // derived from a longer block length at the end
		}
		k := k
		ks = append(ks, kernel{"blocks", 1 + big(len(t.Blocks[k]))/float64(k), func(d []byte) { t.addBlocks(k, d) }})
	}
	if !s.SkipGaps {
		ks = append(ks, kernel{"gaps", 2, t.addGaps})
	}
	pos := func() int64 { return t.Offset + t.N }
	if h := s.PokerHand; h > 0 && !s.pokerDerived() {
		ks = append(ks, kernel{"poker", 3, func(d []byte) { forWindows(t.Tail, d, pos(), h, h, t.countHand) }})
	}
	if s.UpDownDigits > 0 {
		ks = append(ks, kernel{"updown", 5, t.addUpDown})
	}
	if s.Lags > 0 && !s.lagsDerived() {
		ks = append(ks, kernel{"lags", 3, t.addLags})
	}
	if !s.SkipRuns {
		ks = append(ks, kernel{"runs", 2.5, t.addRuns})
	}
	if !s.SkipWalk {
		ks = append(ks, kernel{"walk", 1.2, t.addWalk})
	}
	if s.CouponClasses > 0 {
		ks = append(ks, kernel{"coupon", 4.5, func(d []byte) { t.addCoupon(d, pos()) }})
	}
	return ks
}

// The Runner runs the kernels one after another on the first
// calibrationDigits digits and times them on all but the first warmupDigits
// (whose first touches of the large tables cost page faults, not work),
// then groups the kernels by measured cost. Counted in digits, not chunks:
// callers hand over chunks of any size, and this stretch runs on one core.
// (Variables so that tests can reach the concurrent path on short inputs.)
var (
	warmupDigits      = 1 << 19
	calibrationDigits = 1 << 21
)

// Runner feeds a tally from several goroutines: it first runs the kernels
// one after another on a few chunks, timing each; then it splits them into
// groups of about equal measured cost (largest first onto the least loaded
// group), runs the groups concurrently on each chunk, and advances the tally
// when all are done. Every kernel is the same code Add runs, on the same
// chunk, writing fields no other kernel touches, so the tally is identical,
// bit for bit, whatever the number of workers; only the speed depends on the
// grouping.
type Runner struct {
	t       *Tally
	workers int
	ks      []kernel
	spent   []time.Duration // per kernel: alone (calibration), then in groups
	seen    int
	groups  [][]int // indices into ks, in sequential order
	steps   int     // concurrent steps so far
	next    int     // step at which to regroup on the times measured in groups
}

// NewRunner returns a Runner for t with up to workers goroutines.
func NewRunner(t *Tally, workers int) *Runner {
	ks := t.kernels()
	return &Runner{t: t, workers: max(1, min(workers, len(ks))), ks: ks, spent: make([]time.Duration, len(ks))}
}

// group splits the kernels by measured cost (estimated cost before any
// measurement), keeping each group in the sequential order.
func (r *Runner) group() {
	measured := false
	for _, d := range r.spent {
		measured = measured || d > 0
	}
	cost := make([]float64, len(r.ks))
	for i, k := range r.ks {
		cost[i] = k.cost
		if measured {
			cost[i] = float64(r.spent[i])
		}
	}
	order := make([]int, len(r.ks))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return cost[order[a]] > cost[order[b]] })
	members := make([][]int, r.workers)
	load := make([]float64, r.workers)
	for _, i := range order {
		g := 0
		for j := range load {
			if load[j] < load[g] {
				g = j
			}
		}
		members[g] = append(members[g], i)
		load[g] += cost[i]
	}
	r.groups = r.groups[:0]
	for _, m := range members {
		sort.Ints(m)
		if len(m) > 0 {
			r.groups = append(r.groups, m)
		}
	}
}

// Add tallies the next digits of the stretch.
func (r *Runner) Add(d []byte) {
	if len(d) == 0 {
		return
	}
	if r.workers == 1 {
		r.t.Add(d)
		return
	}
	if r.seen < calibrationDigits {
		for i, k := range r.ks {
			t0 := time.Now()
			k.run(d)
			if r.seen >= warmupDigits {
				r.spent[i] += time.Since(t0)
			}
		}
		r.t.advance(d)
		r.seen += len(d)
		if r.seen >= calibrationDigits {
			r.group()
			clear(r.spent)
			r.next = 4
		}
		return
	}
	run := func(g []int) {
		for _, i := range g {
			t0 := time.Now()
			r.ks[i].run(d)
			r.spent[i] += time.Since(t0) // each kernel is in one group: no race
		}
	}
	var wg sync.WaitGroup
	for _, g := range r.groups[1:] {
		wg.Add(1)
		go func() { defer wg.Done(); run(g) }()
	}
	run(r.groups[0])
	wg.Wait()
	r.t.advance(d)
	// Kernels slow down beside each other (they share the last-level cache
	// and the memory bus), so the groups are rebalanced on the times they
	// take together, at steps 4, 12, 28, … (doubling intervals).
	r.steps++
	if r.steps == r.next {
		r.group()
		clear(r.spent)
		r.next = 2*r.next + 4
	}
}
