package tally

import (
	"sort"
	"sync"
	"sync/atomic"
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
	ks := []kernel{{"digits", 0.7, t.addDigits}}
	if s.MaxBlock > 1 { // at K = 1 the windows are the digits: Cyclic reads Digits
		ks = append(ks, kernel{"overlap", 1 + big(len(t.Overlap)), t.addOverlap})
	}
	for k := 2; k <= s.blocksMax(); k++ {
		if s.blocksSource(k) > 0 || t.windowBlocks() {
			continue // derived from a longer block length at the end, or counted with the windows
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
// one after another on the first digits, timing each; then, on each chunk,
// its workers take kernels from a shared list, costliest first (re-sorted
// now and then on the times they take side by side), until none is left,
// and the tally advances when all are done. Every kernel is the same code
// Add runs, on the same chunk, writing fields no other kernel touches, so
// the tally is identical, bit for bit, whatever the number of workers; only
// the speed depends on who ran what.
type Runner struct {
	t       *Tally
	workers int
	ks      []kernel
	spent   []time.Duration // per kernel: alone (calibration), then side by side
	seen    int
	order   []int // indices into ks, costliest first
	steps   int   // concurrent steps so far
	next    int   // step at which to regroup on the times measured in groups
}

// NewRunner returns a Runner for t with up to workers goroutines.
func NewRunner(t *Tally, workers int) *Runner {
	ks := t.kernels()
	return &Runner{t: t, workers: max(1, min(workers, len(ks))), ks: ks, spent: make([]time.Duration, len(ks))}
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
	r.t.prepare()
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
			r.sortByCost()
			clear(r.spent)
			r.next = 4
		}
		return
	}
	// The workers take kernels from a shared list, costliest first (as last
	// measured), until none is left: each step balances itself, whatever
	// the kernels cost beside each other.
	var next atomic.Int32
	work := func() {
		for {
			j := int(next.Add(1)) - 1
			if j >= len(r.order) {
				return
			}
			i := r.order[j]
			t0 := time.Now()
			r.ks[i].run(d)
			r.spent[i] += time.Since(t0) // one worker per kernel per step
		}
	}
	var wg sync.WaitGroup
	for range r.workers - 1 {
		wg.Add(1)
		go func() { defer wg.Done(); work() }()
	}
	work()
	wg.Wait()
	r.t.advance(d)
	r.steps++
	if r.steps == r.next { // re-sort on recent times, at steps 4, 12, 28, …
		r.sortByCost()
		clear(r.spent)
		r.next = 2*r.next + 4
	}
}

// sortByCost orders the kernels by measured cost, largest first.
func (r *Runner) sortByCost() {
	r.order = r.order[:0]
	for i := range r.ks {
		r.order = append(r.order, i)
	}
	sort.SliceStable(r.order, func(a, b int) bool { return r.spent[r.order[a]] > r.spent[r.order[b]] })
}
