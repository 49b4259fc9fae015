package tally

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
)

// DigitCounts is the record every tally has: the occurrences of each digit
// in the stretch, and the trace of those counts at fixed global
// checkpoints (for the plots of the running deviation).
type DigitCounts struct {
	Counts []int64 // Counts[d]: occurrences of digit d
	// Trace holds the counts at each checkpoint inside the stretch,
	// relative to the stretch's start (a merge adds the earlier counts).
	Trace []TracePoint
}

// TracePoint is the digit counts of the first Pos digits of the whole
// sequence, relative to the stretch.
type TracePoint struct {
	Pos    int64
	Counts []int64
}

func newDigitCounts(b int) *DigitCounts { return &DigitCounts{Counts: make([]int64, b)} }

// DigitCounts returns the digit counts of the stretch.
func (t *Tally) DigitCounts() []int64 { t.settle(); return t.dig.Counts }

// Trace returns the digit counts at the checkpoints inside the stretch.
func (t *Tally) Trace() []TracePoint { t.settle(); return t.dig.Trace }

func (r *DigitCounts) kind() string { return "digits" }

func (r *DigitCounts) kernels(t *Tally) []kernel {
	k := kernel{name: "digits", cost: 0.7, run: func(d []byte) { r.add(d, t.Offset+t.N) }}
	if s := packWidth(t.Base); s > 0 {
		k.packed = func(p []byte) { r.addPacked(p, s, t.Offset+t.N) }
	}
	return []kernel{k}
}

// addPacked is add for a packed chunk (packed.go): the digits of whole
// bytes are counted from the bytes' frequencies, those of a byte a
// checkpoint cuts one by one.
func (r *DigitCounts) addPacked(p []byte, s int, pos0 int64) {
	m := 8 / s
	n := len(p) * m
	end := pos0 + int64(n)
	done := 0
	for c := traceNext(pos0); c <= end; c = traceNext(c) {
		cut := int(c - pos0)
		r.countPacked(p, s, done, cut)
		done = cut
		r.Trace = append(r.Trace, TracePoint{Pos: c, Counts: slices.Clone(r.Counts)})
	}
	r.countPacked(p, s, done, n)
}

// countPacked counts digits [a, b) of the packed chunk p.
func (r *DigitCounts) countPacked(p []byte, s, a, b int) {
	m := 8 / s
	qa, qb := (a+m-1)/m, b/m // the whole bytes
	if qa >= qb {
		r.count(digitsOf(p, s, a, b))
		return
	}
	r.count(digitsOf(p, s, a, qa*m))
	r.count(digitsOf(p, s, qb*m, b))
	var often [4][256]int64
	q := qa
	for ; q+4 <= qb; q += 4 {
		often[0][p[q]]++
		often[1][p[q+1]]++
		often[2][p[q+2]]++
		often[3][p[q+3]]++
	}
	for ; q < qb; q++ {
		often[0][p[q]]++
	}
	mask := 1<<s - 1
	for v := range 256 {
		k := often[0][v] + often[1][v] + often[2][v] + often[3][v]
		if k == 0 {
			continue
		}
		for j := range m {
			r.Counts[v>>(8-s*(j+1))&mask] += k
		}
	}
}

// add counts the digits of d (d[0] at global position pos0), stopping at
// each trace checkpoint inside d to record the counts so far: every digit
// is counted once.
func (r *DigitCounts) add(d []byte, pos0 int64) {
	end := pos0 + int64(len(d))
	done := 0
	for p := traceNext(pos0); p <= end; p = traceNext(p) {
		cut := int(p - pos0)
		r.count(d[done:cut])
		done = cut
		r.Trace = append(r.Trace, TracePoint{Pos: p, Counts: slices.Clone(r.Counts)})
	}
	r.count(d[done:])
}

// count counts the digits into four interleaved tables, so that a
// repeated digit does not make each increment wait for the previous one.
func (r *DigitCounts) count(d []byte) {
	var c [4][256]int64
	i := 0
	for ; i+4 <= len(d); i += 4 {
		c[0][d[i]]++
		c[1][d[i+1]]++
		c[2][d[i+2]]++
		c[3][d[i+3]]++
	}
	for ; i < len(d); i++ {
		c[0][d[i]]++
	}
	for x := range r.Counts {
		r.Counts[x] += c[0][x] + c[1][x] + c[2][x] + c[3][x]
	}
	for x := len(r.Counts); x < 256; x++ { // Add's contract: every digit below the base
		if c[0][x]+c[1][x]+c[2][x]+c[3][x] != 0 {
			panic(fmt.Sprintf("tally: %d is not a digit of base %d", x, len(r.Counts)))
		}
	}
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

// merge appends next's checkpoints shifted by the earlier counts, then adds
// the counts.
func (r *DigitCounts) merge(next record, _ *seam) {
	n := next.(*DigitCounts)
	for _, tp := range n.Trace {
		c := slices.Clone(tp.Counts)
		addInto(c, r.Counts)
		r.Trace = append(r.Trace, TracePoint{Pos: tp.Pos, Counts: c})
	}
	addInto(r.Counts, n.Counts)
}

func (r *DigitCounts) clone() record {
	u := &DigitCounts{Counts: slices.Clone(r.Counts), Trace: make([]TracePoint, len(r.Trace))}
	for i, tp := range r.Trace {
		u.Trace[i] = TracePoint{Pos: tp.Pos, Counts: slices.Clone(tp.Counts)}
	}
	return u
}

func (r *DigitCounts) settle(*Tally) {}

type digitsEntry struct {
	Counts table        `json:"counts"`
	Trace  []traceEntry `json:"trace"`
}

type traceEntry struct {
	Pos    int64 `json:"pos"`
	Counts table `json:"counts"`
}

func (r *DigitCounts) entry(*blobs) any {
	e := digitsEntry{Counts: r.Counts, Trace: []traceEntry{}}
	for _, tp := range r.Trace {
		e.Trace = append(e.Trace, traceEntry{tp.Pos, tp.Counts})
	}
	return e
}

func (r *DigitCounts) decode(data json.RawMessage, _ *blobs) error {
	var e digitsEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Counts, r.Trace = e.Counts, nil
	for _, tp := range e.Trace {
		r.Trace = append(r.Trace, TracePoint{tp.Pos, tp.Counts})
	}
	return nil
}

// check: one count per digit, adding up to N; trace points at the
// stretch's checkpoints, in order, each counting the digits before it and
// growing toward the final counts.
func (r *DigitCounts) check(t *Tally) error {
	if len(r.Counts) != t.Base {
		return fmt.Errorf("%d digit counts for base %d", len(r.Counts), t.Base)
	}
	if sum, err := nonNegative("the digit counts", r.Counts); err != nil {
		return err
	} else if sum != t.N {
		return fmt.Errorf("the digit counts add up to %d, not the %d digits of the stretch", sum, t.N)
	}
	if want := traceCount(t.Offset, t.N); len(r.Trace) != want {
		return fmt.Errorf("%d trace points, want %d", len(r.Trace), want)
	}
	prev := t.Offset
	var prevCounts []int64
	for _, tp := range r.Trace {
		if tp.Pos != traceNext(prev) {
			return fmt.Errorf("trace point at %d is out of order or outside the stretch", tp.Pos)
		}
		if len(tp.Counts) != t.Base {
			return fmt.Errorf("trace point with %d counts for base %d", len(tp.Counts), t.Base)
		}
		sum, err := nonNegative("a trace point", tp.Counts)
		if err != nil {
			return err
		}
		if sum != tp.Pos-t.Offset {
			return fmt.Errorf("trace point at %d counts %d digits", tp.Pos, sum)
		}
		for d := range tp.Counts {
			if prevCounts != nil && tp.Counts[d] < prevCounts[d] || tp.Counts[d] > r.Counts[d] {
				return fmt.Errorf("trace point at %d does not grow toward the digit counts", tp.Pos)
			}
		}
		prev, prevCounts = tp.Pos, tp.Counts
	}
	return nil
}

// traceCount returns the number of checkpoints in (off, off+n].
func traceCount(off, n int64) int {
	c := 0
	for p := traceNext(off); p <= off+n; p = traceNext(p) {
		c++
	}
	return c
}
