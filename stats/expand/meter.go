package expand

import (
	"sync"
	"time"
)

// Meter receives the progress of a digit computation: the phase ("series",
// "division", "square root", "value check", "digits", "digit check") and
// the fraction of it done, in [0, 1] (0 only, for a phase not measured).
// It is called from the computing goroutines, one call at a time and at
// most about ten times a second, and must return quickly.
type Meter func(phase string, done float64)

// meterInterval is the least time between two reports of a phase.
var meterInterval = 100 * time.Millisecond

// meter is a computation's progress: a phase with a total amount of work
// and the work done, reported through Meter. The nil meter does nothing.
type meter struct {
	report Meter
	mu     sync.Mutex
	phase  string
	total  float64
	done   float64
	last   time.Time
}

func newMeter(m Meter) *meter {
	if m == nil {
		return nil
	}
	return &meter{report: m}
}

// begin starts a phase of total units of work (0: not measured, reported
// once as 0).
func (m *meter) begin(phase string, total float64) {
	if m == nil {
		return
	}
	m.mu.Lock()
	m.phase, m.total, m.done = phase, total, 0
	m.last = time.Now()
	m.mu.Unlock()
	m.report(phase, 0)
}

// add records w units of the phase done.
func (m *meter) add(w float64) {
	if m == nil {
		return
	}
	m.mu.Lock()
	m.done += w
	now := time.Now()
	if now.Sub(m.last) < meterInterval || m.total <= 0 {
		m.mu.Unlock()
		return
	}
	m.last = now
	m.report(m.phase, min(1, m.done/m.total)) // under the lock: in order
	m.mu.Unlock()
}

// splitCost is the work binarySplit does over n terms, in the units its
// nodes report (nodeCost): the same halving, with the cost of each size
// computed once.
func splitCost(n int64) float64 {
	memo := map[int64]float64{}
	var rec func(s int64) float64
	rec = func(s int64) float64 {
		if s <= 1 {
			return nodeCost(1)
		}
		if v, ok := memo[s]; ok {
			return v
		}
		v := rec(s/2) + rec(s-s/2) + nodeCost(s)
		memo[s] = v
		return v
	}
	return rec(n)
}

// nodeCost is a binary-splitting node over s terms: its numbers have O(s)
// words and their products cost about s·log s.
func nodeCost(s int64) float64 {
	l := 1.0
	for v := s; v > 1; v >>= 1 {
		l++
	}
	return float64(s) * l
}
