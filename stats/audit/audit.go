// Package audit runs borel's battery on one sequence in one base: it plans
// the block lengths (validity rule and memory budget), makes the one pass
// over the digits into a tally, runs every check, adjusts the p-values of
// the whole family, and gives the verdict. It returns data; rendering is the
// reports package's job.
package audit

import (
	"fmt"
	"math"
	"runtime"
	"strings"
	"sync"

	"borel/stats"
	"borel/stats/checks"
	"borel/stats/seq"
	"borel/stats/tally"
)

// Verdicts.
const (
	Consistent    = "consistent"
	NotConsistent = "not consistent"
	TooUniform    = "too uniform"
)

// Finding marks.
const (
	MarkDeviates   = "deviates"    // upper tail significant after adjustment
	MarkTooUniform = "too uniform" // lower tail significant after adjustment
)

// Adjustment methods.
const (
	Holm = "holm"
	BH   = "bh"
)

// NullSpec is the null as the user gave it, before the data are seen.
type NullSpec struct {
	Kind checks.NullKind
	P    []float64 // for Vector
}

// Options holds the tunables of an audit.
type Options struct {
	Alpha       float64 // significance level of the verdict, in (0, 1)
	Adjustment  string  // Holm (default) or BH
	MaxBlock    int     // 0: choose automatically
	MemoryBytes int64   // budget for the count tables
	MinExpected float64 // smallest expected count per cell (rule of thumb 5)
	Null        NullSpec
	Segments    int    // second level: number of segments, 0 for none
	Seed        uint64 // seed of the randomized p-values of discrete statistics
	Workers     int    // goroutines of the pass (results do not depend on it)
	// Checks, when not empty, names the only checks to run (checks.All's
	// names); the tally then skips the loops no selected check needs.
	Checks []string
	// OptionName, when set, gives the name messages use for an option
	// (OptMaxBlock, …); by default they use the field's name.
	OptionName func(option string) string
}

// selected reports whether check name is to be run.
func (o Options) selected(name string) bool {
	if len(o.Checks) == 0 {
		return true
	}
	for _, c := range o.Checks {
		if c == name {
			return true
		}
	}
	return false
}

// DefaultOptions returns alpha 0.01, Holm, automatic K, 256 MiB, minimum
// expected count 5, uniform null.
func DefaultOptions() Options {
	return Options{Alpha: 0.01, Adjustment: Holm, MemoryBytes: 256 << 20, MinExpected: 5, Seed: 1,
		Workers: runtime.GOMAXPROCS(0)}
}

// Source describes where a sequence came from, for the report.
type Source struct {
	Name        string // as the user gave it: a path, "-" or a built-in name
	Kind        string // "file", "stdin" or "built-in"
	Format      string // "text", "raw" or "bits"
	Bytes       int64  // input size in bytes when known, else -1
	Compressed  bool
	IntegerPart string   // dropped integer part, "" when none
	SHA256      string   // hex SHA-256 of the input bytes as read, "" for built-in sources
	Parameters  string   // for a built-in source: how it was made
	Checks      []string // for a computed constant: how its value and digits were checked
}

// SegmentSeries is the p-values one statistic took in the segments.
type SegmentSeries struct {
	Label   string
	PValues []float64
}

// Finding is a check's finding with its adjusted p-values and mark.
// LogAdj* are adjusted by the audit's method (they decide the mark);
// LogHolm* and LogBH* carry both methods for the record.
type Finding struct {
	checks.Finding
	LogAdjUpper, LogAdjLower   float64
	LogHolmUpper, LogHolmLower float64
	LogBHUpper, LogBHLower     float64
	Mark                       string
}

// Result is the audit of one sequence in one base.
type Result struct {
	Source      Source
	Base        int
	Digits      int64
	Null        checks.Null
	Alpha       float64
	Adjustment  string
	MaxBlock    int    // largest block length the checks used
	BlockChoice string // how MaxBlock was chosen, in words
	Findings    []Finding
	Skips       []checks.Skip
	Entropy     *checks.EntropyProfile
	Verdict     string
	Notes       []string

	Segments       int                // second level: number of segments (0: none)
	Seed           uint64             // seed of the randomized p-values
	DigitCounts    []int64            // occurrences of each digit
	Trace          []tally.TracePoint // digit counts at log-spaced positions, for plots
	SegmentPValues []SegmentSeries    // second level: each statistic's segment p-values
}

// Plan is what an audit decides before reading: the tally to fill.
type Plan struct {
	Spec  tally.Spec
	Auto  bool
	Notes []string
	opts  Options
	seg   *segmenter
	t     *tally.Tally
	run   *tally.Runner
	// OnChunk, when set, is called after each chunk with the digits and
	// input bytes read so far (for a progress display).
	OnChunk func(digits, bytes int64)
	// Stop, when set and true after a chunk, ends the pass with ErrStopped.
	Stop func() bool
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
	set := checks.Setting{Base: base, Null: opts.Null.Kind, P: opts.Null.P}
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

func validateOptions(o Options) error {
	if !(o.Alpha > 0 && o.Alpha < 1) {
		return fmt.Errorf("alpha %v is outside (0, 1)", o.Alpha)
	}
	if o.Adjustment != Holm && o.Adjustment != BH {
		return fmt.Errorf("adjustment %q: use holm or bh", o.Adjustment)
	}
	if o.MemoryBytes <= 0 {
		return fmt.Errorf("memory budget must be positive")
	}
	if !(o.MinExpected > 0) {
		return fmt.Errorf("minimum expected count must be positive")
	}
	if o.Segments < 0 || o.Segments == 1 {
		return optionErrorf(OptSegments, int64(o.Segments), 0, 0, "%s %d: give 2 or more segments, or 0 for none", o.name(OptSegments), o.Segments)
	}
	for _, name := range o.Checks {
		known := false
		var names []string
		for _, c := range checks.All() {
			names = append(names, c.Name())
			known = known || c.Name() == name
		}
		if !known {
			return &OptionError{Option: OptChecks, msg: fmt.Sprintf("%s: unknown check %q; the checks are %s", o.name(OptChecks), name, strings.Join(names, ", "))}
		}
	}
	return nil
}

// Start prepares the plan's tally (and second level) for Add.
func (p *Plan) Start() error { return p.StartAt(0) }

// StartAt prepares a tally of a stretch that begins at global digit
// position offset (a shard); the second level needs the whole sequence and
// is refused for a shard.
func (p *Plan) StartAt(offset int64) error {
	if offset > 0 && p.opts.Segments > 0 {
		return optionErrorf(OptSegments, int64(p.opts.Segments), 0, 0, "the second level (%s) needs the whole sequence, not a shard", p.opts.name(OptSegments))
	}
	t, err := tally.New(p.Spec, offset)
	if err != nil {
		return err
	}
	p.t = t
	p.run = tally.NewRunner(t, p.opts.Workers)
	return p.startSegments()
}

// Add tallies the next digits of the sequence (after Start).
func (p *Plan) Add(d []byte) {
	p.run.Add(d)
	if p.seg != nil {
		p.seg.Add(d)
	}
}

// PlanForSpec returns the plan of a tally made elsewhere (merged shards),
// for Finish.
func PlanForSpec(spec tally.Spec, opts Options) (*Plan, error) {
	if err := validateOptions(opts); err != nil {
		return nil, err
	}
	return &Plan{Spec: spec, opts: opts}, nil
}

// Done finishes the audit of the digits added since Start.
func (p *Plan) Done(src Source) (*Result, error) {
	if p.t.N == 0 {
		return nil, fmt.Errorf("%s: the sequence is empty", src.Name)
	}
	return p.Finish(p.t, src)
}

// ErrStopped ends a pass that Plan.Stop asked to stop.
var ErrStopped = fmt.Errorf("the pass was stopped")

// TallyAt reads every digit of r into a new tally of the plan, for a
// stretch that begins at global digit position offset (0 for a whole
// sequence; see StartAt).
func (p *Plan) TallyAt(r *seq.Reader, offset int64) (*tally.Tally, error) {
	if err := p.StartAt(offset); err != nil {
		return nil, err
	}
	if p.opts.Workers > 1 {
		return p.tallyPipelined(r)
	}
	for r.Scan() {
		p.Add(r.Digits())
		if p.OnChunk != nil {
			p.OnChunk(r.Count(), r.Offset())
		}
		if p.Stop != nil && p.Stop() {
			return nil, ErrStopped
		}
	}
	if err := r.Err(); err != nil {
		return nil, err
	}
	return p.t, nil
}

// pipelineChunk is the digits handed to the kernels at a time by
// tallyPipelined.
const pipelineChunk = 1 << 18

// tallyPipelined is TallyAt with the reading (decoding, hashing by the
// caller's tee, decompression) on its own goroutine, one chunk ahead of the
// kernels, so that it overlaps with them instead of stopping every worker
// while the next chunk is read. The chunks and their order are the same as
// in TallyAt, so the tally is too.
func (p *Plan) tallyPipelined(r *seq.Reader) (*tally.Tally, error) {
	type chunk struct {
		d             []byte
		count, offset int64
	}
	const depth = 2
	free := make(chan []byte, depth+1)
	for range depth + 1 {
		free <- nil
	}
	full := make(chan chunk, depth)
	quit := make(chan struct{})
	go func() {
		defer close(full)
		more := r.Scan()
		for more {
			var buf []byte
			select {
			case buf = <-free:
			case <-quit:
				return
			}
			// Several reader chunks per step of the pass: each step ends by
			// waiting for the slowest group of kernels.
			buf = buf[:0]
			for more && len(buf) < pipelineChunk {
				buf = append(buf, r.Digits()...)
				more = r.Scan()
			}
			select {
			case full <- chunk{buf, r.Count(), r.Offset()}:
			case <-quit:
				return
			}
		}
	}()
	for c := range full {
		p.Add(c.d)
		free <- c.d
		if p.OnChunk != nil {
			p.OnChunk(c.count, c.offset)
		}
		if p.Stop != nil && p.Stop() {
			close(quit)
			for range full { // let the reader finish its current chunk
			}
			return nil, ErrStopped
		}
	}
	if err := r.Err(); err != nil {
		return nil, err
	}
	return p.t, nil
}

// runChecks runs the selected checks on in, each into its own result, on
// their own goroutines when more than one worker is allowed (they only read
// the tally), and joins the results in the checks' order.
func runChecks(in checks.Input, opts Options) checks.Result {
	var run []checks.Check
	for _, c := range checks.All() {
		if opts.selected(c.Name()) {
			run = append(run, c)
		}
	}
	parts := make([]checks.Result, len(run))
	if opts.Workers > 1 {
		var wg sync.WaitGroup
		for i, c := range run {
			wg.Add(1)
			go func() { defer wg.Done(); c.Run(in, &parts[i]) }()
		}
		wg.Wait()
	} else {
		for i, c := range run {
			c.Run(in, &parts[i])
		}
	}
	var out checks.Result
	for _, r := range parts {
		out.Findings = append(out.Findings, r.Findings...)
		out.Skips = append(out.Skips, r.Skips...)
		if r.Entropy != nil {
			out.Entropy = r.Entropy
		}
	}
	return out
}

// Finish runs the checks on a finished tally of the whole sequence and
// returns the audit result.
func (p *Plan) Finish(t *tally.Tally, src Source) (*Result, error) {
	opts := p.opts
	res := &Result{Source: src, Base: t.Base, Digits: t.N, Alpha: opts.Alpha, Adjustment: opts.Adjustment,
		Segments: opts.Segments, Seed: opts.Seed, DigitCounts: t.DigitCounts(), Trace: t.Trace()}
	switch opts.Null.Kind {
	case checks.Vector:
		null, err := checks.VectorNull(opts.Null.P, t.Base)
		if err != nil {
			return nil, err
		}
		res.Null = null
	case checks.Fitted:
		res.Null = checks.FittedNull(t.DigitCounts())
	default:
		res.Null = checks.UniformNull(t.Base)
	}
	if res.Null.Symbols() < 2 {
		// A fitted vector with one digit: an i.i.d. model reproduces a
		// constant sequence exactly and leaves no degree of freedom to test.
		res.Skips = append(res.Skips, checks.Skip{Check: "all checks",
			Reason: "the fitted vector gives one digit all the probability: an i.i.d. model fits a constant sequence exactly, so nothing can be tested; audit against " + opts.name(OptNull) + " uniform or a vector"})
		res.Findings, res.Verdict = []Finding{}, Consistent
		res.Notes = append(res.Notes, "the sequence uses a single digit")
		return res, nil
	}
	K := p.Spec.MaxBlock
	valid := validBlock(float64(t.N), res.Null.MinProb(), opts.MinExpected)
	if p.Auto {
		switch {
		case valid > K && src.Bytes < 0:
			res.Notes = append(res.Notes, fmt.Sprintf("the input length was not known before reading (stdin or compressed), so blocks were tallied up to k=%d; k=%d would be valid for %d digits: audit a file, or set %s %d",
				K, valid, t.N, opts.name(OptMaxBlock), valid))
		case valid > K:
			res.Notes = append(res.Notes, fmt.Sprintf("blocks stop at k=%d because of the memory budget (%s); k=%d would be valid for %d digits", K, opts.name(OptMemory), valid, t.N))
		}
		K = max(1, min(K, valid))
		res.BlockChoice = fmt.Sprintf("largest k with every expected count n·min p(w) at least %g (rule of thumb), within the memory budget", opts.MinExpected)
		if windows, _ := needs(t.Base, opts); !windows {
			res.BlockChoice = "no selected check uses blocks"
			res.Notes = res.Notes[:0]
		}
	} else {
		res.BlockChoice = "set by " + opts.name(OptMaxBlock)
		if valid < K {
			res.Notes = append(res.Notes, fmt.Sprintf("%s %d is beyond the rule of thumb (k ≤ %d for %d digits): expect notes on sparse cells", opts.name(OptMaxBlock), K, valid, t.N))
		}
	}
	if t.N < int64(K) {
		return nil, optionErrorf(OptMaxBlock, int64(K), int64(K), t.N, "%s: %d digits are too few for %s %d", src.Name, t.N, opts.name(OptMaxBlock), K)
	}
	cyc, err := t.CyclicInPlace() // the tally is not used after Finish
	if err != nil {
		return nil, err
	}
	res.MaxBlock = K
	in := checks.Input{Tally: t, Cyclic: cyc[:K+1], Null: res.Null,
		Opts: checks.Options{MinExpected: opts.MinExpected, Confidence: 1 - opts.Alpha, OptionName: opts.OptionName}}
	out := runChecks(in, opts)
	if len(opts.Checks) > 0 {
		res.Notes = append(res.Notes, "checks run ("+opts.name(OptChecks)+"): "+strings.Join(opts.Checks, ", "))
	}
	if p.seg != nil {
		if t.N/int64(opts.Segments) < MinSegmentDigits {
			return nil, optionErrorf(OptSegments, int64(opts.Segments), int64(opts.Segments)*MinSegmentDigits, t.N,
				"%s: %d digits are too few for %s %d (at least %d digits per segment); use fewer segments",
				src.Name, t.N, opts.name(OptSegments), opts.Segments, MinSegmentDigits)
		}
		segs, err := p.seg.Segments()
		if err != nil {
			return nil, err
		}
		fs, skips, series := secondLevel(segs, res.Null, opts)
		res.SegmentPValues = series
		out.Findings = append(out.Findings, fs...)
		out.Skips = append(out.Skips, skips...)
		res.Notes = append(res.Notes, fmt.Sprintf("second level: %d segments of about %d digits; discrete statistics enter with randomized p-values (seed %d)",
			opts.Segments, t.N/int64(opts.Segments), opts.Seed))
	}
	res.Skips = out.Skips
	res.Entropy = out.Entropy
	if src.IntegerPart != "" {
		res.Notes = append(res.Notes, fmt.Sprintf("integer part %q dropped: the sequence is the digits after the radix point", src.IntegerPart))
	}
	res.Findings, res.Verdict = adjust(out.Findings, opts)
	if res.Verdict == NotConsistent {
		for _, f := range res.Findings {
			if f.Mark == MarkTooUniform {
				res.Notes = append(res.Notes, "some findings are also too uniform: the sequence deviates in some respects and fits better than chance allows in others, which points to construction rather than chance")
				break
			}
		}
	}
	return res, nil
}

// adjust applies the multiple-testing adjustment to the family of every
// (finding, tail) and returns the verdict: not consistent when any adjusted
// upper-tail p (or either tail of a two-sided z score) is at or below alpha,
// else too uniform when any adjusted lower-tail p is, else consistent.
func adjust(fs []checks.Finding, opts Options) ([]Finding, string) {
	logP := make([]float64, 0, 2*len(fs))
	for _, f := range fs {
		logP = append(logP, f.LogPUpper, f.LogPLower)
	}
	holm, bh := stats.HolmLog(logP), stats.BHLog(logP)
	adj := holm
	if opts.Adjustment == BH {
		adj = bh
	}
	lnAlpha := math.Log(opts.Alpha)
	out := make([]Finding, len(fs))
	verdict := Consistent
	for i, f := range fs {
		a := Finding{Finding: f, LogAdjUpper: adj[2*i], LogAdjLower: adj[2*i+1],
			LogHolmUpper: holm[2*i], LogHolmLower: holm[2*i+1], LogBHUpper: bh[2*i], LogBHLower: bh[2*i+1]}
		switch {
		case a.LogAdjUpper <= lnAlpha, a.TwoSided && a.LogAdjLower <= lnAlpha:
			a.Mark = MarkDeviates
			verdict = NotConsistent
		case a.LogAdjLower <= lnAlpha:
			a.Mark = MarkTooUniform
			if verdict == Consistent {
				verdict = TooUniform
			}
		}
		out[i] = a
	}
	return out, verdict
}

// Digits audits a sequence held in memory (built-in sequences, tests).
func Digits(d []byte, base int, src Source, opts Options) (*Result, error) {
	p, err := NewPlan(base, int64(len(d)), opts)
	if err != nil {
		return nil, err
	}
	t, err := tally.New(p.Spec, 0)
	if err != nil {
		return nil, err
	}
	for i, x := range d {
		if int(x) >= base {
			return nil, fmt.Errorf("%s: digit %d at position %d is not below base %d", src.Name, x, i, base)
		}
	}
	t.Add(d)
	if t.N == 0 {
		return nil, fmt.Errorf("%s: the sequence is empty", src.Name)
	}
	if err := p.startSegments(); err != nil {
		return nil, err
	}
	if p.seg != nil {
		p.seg.Add(d)
	}
	return p.Finish(t, src)
}

func (p *Plan) startSegments() error {
	if p.opts.Segments == 0 {
		return nil
	}
	seg, err := newSegmenter(segmentSpec(p.Spec), p.opts.Segments)
	p.seg = seg
	return err
}

// Decisive is the finding a result's verdict rests on: the one with the
// smallest adjusted p-value in either tail. Ties (adjusted p-values cap at
// 1, and Holm's step-down makes neighbours equal) go to the smaller raw
// p-value, then to the earlier finding; within a finding the lower tail
// wins a tie only with a smaller raw p.
type Decisive struct {
	Index  int     // into Result.Findings; −1 when there are none
	Lower  bool    // the lower tail ("too uniform" side)
	LogAdj float64 // ln of its adjusted p-value
}

// Decisive returns the finding the verdict rests on.
func (r *Result) Decisive() Decisive {
	d := Decisive{Index: -1}
	var worstRaw float64
	for i, f := range r.Findings {
		lp, raw, lower := f.LogAdjUpper, f.LogPUpper, false
		if f.LogAdjLower < lp || (f.LogAdjLower == lp && f.LogPLower < raw) {
			lp, raw, lower = f.LogAdjLower, f.LogPLower, true
		}
		if d.Index < 0 || lp < d.LogAdj || (lp == d.LogAdj && raw < worstRaw) {
			d, worstRaw = Decisive{Index: i, Lower: lower, LogAdj: lp}, raw
		}
	}
	return d
}
