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
	cost float64        // rough ns per digit, for grouping
	run  func(d []byte) // nil: another kernel does its work on digits spread out
	// packed, when set, does run's work on the same digits packed (see
	// packed.go); the tally's base is then 2, 4 or 16.
	packed func(p []byte)
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
	r.step(len(d), func(k kernel) {
		if k.run != nil {
			k.run(d)
		}
	}, func() { r.t.advance(d) })
}

// AddPacked tallies the next digits of the stretch, packed (Tally.AddPacked).
func (r *Runner) AddPacked(p []byte) {
	if r.workers == 1 {
		r.t.AddPacked(p)
		return
	}
	s := r.t.packedFor(p)
	if s == 0 {
		return
	}
	c := &packedChunk{p: p, s: s, t: r.t}
	r.step(len(p)*(8/s), c.run, func() { r.t.advancePacked(p, s) })
}

// step runs every kernel on a chunk of n digits through run, then advances
// the tally.
func (r *Runner) step(n int, run func(kernel), advance func()) {
	if r.seen < calibrationDigits {
		for i, k := range r.ks {
			t0 := time.Now()
			run(k)
			if r.seen >= warmupDigits {
				r.spent[i] += time.Since(t0)
			}
		}
		advance()
		r.seen += n
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
			run(r.ks[i])
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
	advance()
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
