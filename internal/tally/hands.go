package tally

import (
	"encoding/json"
	"fmt"
	"math/bits"
	"slices"
)

// HandSpec asks for the poker record: aligned non-overlapping hands of Size
// digits, counted by their number of distinct digits.
type HandSpec struct {
	Size int `json:"size"`
}

func init() { registerKind("poker", func() RecordSpec { return new(HandSpec) }) }

const maxHand = 64 // beyond it a decoded shard is damaged

func (s *HandSpec) Kind() string { return "poker" }

func (s *HandSpec) validate(int) error {
	if s.Size < 1 || s.Size > maxHand {
		return fmt.Errorf("hand size %d is out of range", s.Size)
	}
	return nil
}

func (s *HandSpec) span() int         { return s.Size }
func (s *HandSpec) cells(int) float64 { return float64(s.Size) }
func (s *HandSpec) newRecord(sp *Spec, _ int64) record {
	return &Hands{HandSpec: *s, Counts: make([]int64, s.Size+1), spec: sp}
}

// Hands is the poker record: Counts[r] is the number of aligned hands
// (starting at global multiples of Size) with r distinct digits.
type Hands struct {
	HandSpec
	Counts []int64

	spec *Spec
}

// Hands returns the poker record, or nil when the tally has none.
func (t *Tally) Hands() *Hands { t.settle(); r, _ := t.find("poker").(*Hands); return r }

func (r *Hands) kind() string    { return "poker" }
func (r *Hands) setSpec(s *Spec) { r.spec = s }

// derived reports whether the hands come from the aligned blocks of the
// same length, which are exactly the hands, when those are counted.
func (r *Hands) derived() bool { return r.spec.HasBlocks(r.Size) }

func (r *Hands) kernels(t *Tally) []kernel {
	if r.derived() {
		return nil
	}
	h := r.Size
	return []kernel{{name: "poker", cost: 3, run: func(d []byte) { forWindows(t.Tail, d, t.Offset+t.N, h, h, r.count) }}}
}

func (r *Hands) count(w []byte) { r.Counts[distinct(w)]++ }

// distinct returns the number of distinct digits in a poker hand.
func distinct(w []byte) int {
	var seen [4]uint64 // a bit per digit value 0..255
	for _, x := range w {
		seen[x>>6] |= 1 << (x & 63)
	}
	return bits.OnesCount64(seen[0]) + bits.OnesCount64(seen[1]) + bits.OnesCount64(seen[2]) + bits.OnesCount64(seen[3])
}

func (r *Hands) merge(next record, sm *seam) {
	addInto(r.Counts, next.(*Hands).Counts)
	forCrossing(sm.x, sm.xs, sm.cut, r.Size, r.Size, r.count)
}

func (r *Hands) clone() record {
	return &Hands{HandSpec: r.HandSpec, Counts: slices.Clone(r.Counts), spec: r.spec}
}

// settle fills the hands from the aligned blocks when they are derived
// (the blocks record settles first).
func (r *Hands) settle(t *Tally) {
	if !r.derived() {
		return
	}
	h, b := r.Size, t.Base
	clear(r.Counts)
	w := make([]byte, h)
	for v, c := range t.blk.Counts[h] {
		if c == 0 {
			continue
		}
		for j, x := h-1, v; j >= 0; j, x = j-1, x/b {
			w[j] = byte(x % b)
		}
		r.Counts[distinct(w)] += c
	}
}

type handsEntry struct {
	Counts table `json:"counts"`
}

func (r *Hands) entry(*blobs) any { return handsEntry{r.Counts} }

func (r *Hands) decode(data json.RawMessage, _ *blobs) error {
	var e handsEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Counts = e.Counts
	return nil
}

// check: Size+1 cells counting the aligned hands inside the stretch, none
// with zero distinct digits.
func (r *Hands) check(t *Tally) error {
	if len(r.Counts) != r.Size+1 {
		return fmt.Errorf("poker table of %d cells for hands of %d", len(r.Counts), r.Size)
	}
	if sum, err := nonNegative("the poker table", r.Counts); err != nil {
		return err
	} else if want := aligned(t.Offset, t.N, r.Size); sum != want || r.Counts[0] != 0 {
		return fmt.Errorf("the poker table counts %d hands, not the %d inside the stretch", sum, want)
	}
	return nil
}
