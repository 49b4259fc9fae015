package audit

// The plan: options → the records and block lengths of the tally, before
// any digit is read.

import (
	"fmt"
	"math"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats/checks"
)

// Plan is what an audit decides before reading: the tally to fill.
type Plan struct {
	Spec tally.Spec
	Auto bool
	opts Options
	seg  *segmenter
	t    *tally.Tally
	run  *tally.Runner
	// OnChunk, when set, is called after each chunk with the digits and
	// input bytes read so far (for a progress display).
	OnChunk func(digits, bytes int64)
}

// unknownLengthCells caps the tables when the input length is not known in
// advance (stdin, compressed input): about 8 MiB per table.
const unknownLengthCells = 1 << 20

// validBlock returns the largest k ≥ 1 with n·minP^k ≥ minExpected, or 0.
func validBlock(n float64, minP, minExpected float64) int {
	k := 0
	for e := n * minP; e >= minExpected && k < 64; e *= minP {
		k++
	}
	return k
}

// batterySpec collects what the selected checks need (checks.Check.Needs):
// their records with their parameters, in the checks' order; the block
// length is planned afterwards.
func batterySpec(base int, opts Options) tally.Spec {
	set := checks.Setting{Base: base, Null: opts.Null.Kind, P: opts.Null.P, Word: opts.Word, BigEndian: opts.BigEndian}
	s := tally.Spec{Base: base}
	for _, c := range checks.All() {
		if opts.selected(c.Name()) {
			for _, r := range c.Needs(set).Records {
				s = s.With(r)
			}
		}
	}
	return s
}

// needs reports whether a selected check reads the windows, and whether
// one reads the aligned blocks.
func needs(base int, opts Options) (windows, blocks bool) {
	set := checks.Setting{Base: base, Null: opts.Null.Kind, P: opts.Null.P}
	for _, c := range checks.All() {
		if opts.selected(c.Name()) {
			n := c.Needs(set)
			windows = windows || n.Windows
			blocks = blocks || n.Blocks
		}
	}
	return windows, blocks
}
func mib(bytes float64) string { return fmt.Sprintf("%.0f MiB", math.Ceil(bytes/(1<<20))) }

// NewPlan decides the tally for a sequence in base b whose length is at
// most sizeHint digits (sizeHint < 0: unknown). An explicit MaxBlock whose
// tables exceed the memory budget is an error that says what it would need.
func NewPlan(base int, sizeHint int64, opts Options) (*Plan, error) {
	opts = opts.withDefaults()
	if err := validateOptions(opts); err != nil {
		return nil, err
	}
	p := &Plan{opts: opts, Spec: batterySpec(base, opts)}
	if opts.Segments > 0 && sizeHint >= 0 && sizeHint/int64(opts.Segments) < MinSegmentDigits {
		return nil, optionErrorf(OptSegments, int64(opts.Segments), int64(opts.Segments)*MinSegmentDigits, sizeHint,
			"%s %d needs at least %d digits (%d per segment); the input holds at most %d",
			opts.name(OptSegments), opts.Segments, int64(opts.Segments)*MinSegmentDigits, MinSegmentDigits, sizeHint)
	}
	bytesFor := func(k int) float64 {
		s := p.Spec
		s.MaxBlock = k
		return 8 * s.Cells()
	}
	if opts.MaxBlock > 0 {
		if need := bytesFor(opts.MaxBlock); need > float64(opts.MemoryBytes) {
			return nil, optionErrorf(OptMaxBlock, int64(opts.MaxBlock), int64(need), opts.MemoryBytes,
				"%s %d needs %s of count tables in base %d, over the memory budget of %s; lower %s or raise %s",
				opts.name(OptMaxBlock), opts.MaxBlock, mib(need), base, mib(float64(opts.MemoryBytes)), opts.name(OptMaxBlock), opts.name(OptMemory))
		}
		p.Spec.MaxBlock = opts.MaxBlock
		p.Spec.BlocksMax = countedBlocks(p.Spec.MaxBlock, base, sizeHint, opts)
		return p, nil
	}
	p.Auto = true
	budgetK := 1
	for bytesFor(budgetK+1) <= float64(opts.MemoryBytes) {
		budgetK++
	}
	minP := 1 / float64(base)
	if opts.Null.Kind == checks.Vector {
		minP = checks.Null{P: opts.Null.P}.MinProb()
	}
	var k int
	if sizeHint >= 0 {
		k = validBlock(float64(sizeHint), minP, opts.MinExpected)
	} else {
		k = 1
		for math.Pow(float64(base), float64(k+1)) <= unknownLengthCells {
			k++
		}
	}
	k = max(1, min(k, budgetK))
	if windows, _ := needs(base, opts); !windows {
		k = 1 // no selected check looks at blocks
	}
	p.Spec.MaxBlock = k
	p.Spec.BlocksMax = countedBlocks(k, base, sizeHint, opts)
	return p, nil
}

// countedBlocks returns the Spec's BlocksMax: when the input length n is
// known, non-overlapping k-blocks whose ⌊n/k⌋ blocks cannot reach the
// minimum expected count are not counted (the blocks check would skip them;
// at 10^8 decimal digits the 10^7-cell table of k = 7 is left out, which
// is most of the pass's memory traffic after the overlapping windows).
// 0 (count every k ≤ K) when the length is unknown; 1 (none) when the
// blocks check is not among the selected checks (Options.Checks).
func countedBlocks(K, base int, sizeHint int64, opts Options) int {
	if _, blocks := needs(base, opts); !blocks {
		return 1
	}
	if sizeHint < 0 {
		return 0
	}
	minP := 1 / float64(base)
	if opts.Null.Kind == checks.Vector {
		minP = checks.Null{P: opts.Null.P}.MinProb()
	}
	k := K
	for k >= 2 && float64(sizeHint/int64(k))*math.Pow(minP, float64(k)) < opts.MinExpected {
		k--
	}
	if k >= K {
		return 0
	}
	return max(k, 1)
}

// PlanForSpec returns the plan of a tally made elsewhere (merged shards),
// for Finish.
func PlanForSpec(spec tally.Spec, opts Options) (*Plan, error) {
	opts = opts.withDefaults()
	if err := validateOptions(opts); err != nil {
		return nil, err
	}
	return &Plan{Spec: spec, opts: opts}, nil
}
