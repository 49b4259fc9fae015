package tally

import (
	"math"
	"slices"
)

// TracePoint is the digit counts of the first Pos digits of the whole
// sequence, relative to the stretch (a merge adds the earlier counts).
type TracePoint struct {
	Pos    int64
	Counts []int64
}

// traceNext returns the smallest checkpoint position greater than pos. The
// checkpoints are ⌈2^(j/8)⌉, j = 0, 1, …: eight per octave, fixed global
// positions, so stretches record the same points whatever the cut.
func traceNext(pos int64) int64 {
	j := 0.0
	if pos >= 1 {
		j = math.Floor(8 * math.Log2(float64(pos)))
	}
	for {
		c := int64(math.Ceil(math.Pow(2, j/8)))
		if c > pos {
			return c
		}
		j++
	}
}

// mergeTrace appends b's checkpoints, shifted by a's counts.
func (t *Tally) mergeTrace(a, b *Tally) {
	for _, tp := range b.Trace {
		c := slices.Clone(tp.Counts)
		addInto(c, a.Digits)
		t.Trace = append(t.Trace, TracePoint{Pos: tp.Pos, Counts: c})
	}
}
