package audit

// The judgement: the checks on the finished tally, the adjustment of the
// whole family, the verdict and the finding it rests on.

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"sync"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
	"github.com/borel-audit/borel/stats/checks"
)

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
	Mark                       Mark
}

// Result is the audit of one sequence in one base.
type Result struct {
	Source      Source
	Base        int
	Digits      int64
	Null        checks.Null
	Alpha       float64
	Adjustment  Adjustment
	MaxBlock    int    // largest block length the checks used
	BlockChoice string // how MaxBlock was chosen, in words
	Findings    []Finding
	Skips       []checks.Skip
	Entropy     *checks.EntropyProfile
	Verdict     Verdict
	Notes       []Note

	Segments       int                // second level: number of segments (0: none)
	Seed           uint64             // seed of the randomized p-values
	DigitCounts    []int64            // occurrences of each digit
	Trace          []tally.TracePoint // digit counts at log-spaced positions, for plots
	SegmentPValues []SegmentSeries    // second level: each statistic's segment p-values
	Curves         Curves             // reference curves for plots
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
			go func() { defer wg.Done(); runCheck(c, in, &parts[i]) }()
		}
		wg.Wait()
	} else {
		for i, c := range run {
			runCheck(c, in, &parts[i])
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

// gapClassNote says which digits form gap's classes above base 36 (16
// classes of consecutive digits, checks.gapCheck's Needs: digit d is in
// class ⌊16d/b⌋).
func gapClassNote(b int) string {
	if b == 256 {
		return "gap's class c holds the 16 byte values whose first hex digit is c: class 0 is 0x00–0x0f, class 1 0x10–0x1f, …, class 15 0xf0–0xff"
	}
	lo := func(c int) int { return (c*b + 15) / 16 }
	return fmt.Sprintf("gap's class c holds the digits from ⌈cb/16⌉ to ⌈(c+1)b/16⌉ − 1 (class 0: 0 to %d, class 15: %d to %d)", lo(1)-1, lo(15), b-1)
}

// missingTopDigits says so when the top digits of the base never occur
// although independent digits would have shown them (the chance that b − m
// given digits all stay absent from n is (m/b)^n; said below e^-20): the
// digits are likely in base m, the largest digit seen plus one.
func missingTopDigits(counts []int64, n int64, opts Options) string {
	b := len(counts)
	m := 0
	for d, c := range counts {
		if c > 0 {
			m = d + 1
		}
	}
	if m < 2 || m >= b || float64(n)*math.Log(float64(b)/float64(m)) < 20 {
		return ""
	}
	return fmt.Sprintf("digits %s to %s never occur in these %d digits, which independent base-%d digits would all but certainly have shown: the input may be in base %d (audit it with %s %d)",
		checks.DigitName(m, b), checks.DigitName(b-1, b), n, b, m, opts.name(OptBase), m)
}

// Finish runs the checks on a finished tally of the whole sequence and
// returns the audit result. It consumes t: the cyclic tables are made in
// place, so t can be neither added to nor finished again (Snapshot
// finishes a copy instead).
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
	// The trace ends at n: its checkpoints are fixed positions ⌈2^(j/8)⌉,
	// and the last one before n can be 8% short of it (a digit that ends
	// inside the envelope was drawn outside it).
	if tr := res.Trace; len(tr) == 0 || tr[len(tr)-1].Pos != t.N {
		res.Trace = append(slices.Clone(tr), tally.TracePoint{Pos: t.N, Counts: slices.Clone(res.DigitCounts)})
	}
	res.Curves = curves(res)
	if res.Null.Symbols() < 2 {
		// A fitted vector with one digit: an i.i.d. model reproduces a
		// constant sequence exactly and leaves no degree of freedom to test.
		res.Skips = append(res.Skips, checks.Skip{Check: "all checks",
			Reason: "the fitted vector gives one digit all the probability: an i.i.d. model fits a constant sequence exactly, so nothing can be tested; audit against " + opts.name(OptNull) + " uniform or a vector"})
		res.Findings, res.Verdict = []Finding{}, Untested
		res.Notes = append(res.Notes, Note{Kind: checks.NoteSingleDigit, Text: "the sequence uses a single digit"})
		return res, nil
	}
	K := p.Spec.MaxBlock
	valid := validBlock(float64(t.N), res.Null.MinProb(), opts.MinExpected)
	if p.Auto {
		switch {
		case valid > K && src.Bytes < 0:
			res.Notes = append(res.Notes, checks.Notef(checks.NoteBlockLimit, "the input length was not known before reading (stdin or compressed), so blocks were tallied up to k=%d; k=%d would be valid for %d digits: audit a file, or set %s %d",
				K, valid, t.N, opts.name(OptMaxBlock), valid))
		case valid > K:
			res.Notes = append(res.Notes, checks.Notef(checks.NoteBlockLimit, "blocks stop at k=%d because of the memory budget (%s); k=%d would be valid for %d digits", K, opts.name(OptMemory), valid, t.N))
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
			res.Notes = append(res.Notes, checks.Notef(checks.NoteBlockBeyondRule, "%s %d is beyond the rule of thumb (k ≤ %d for %d digits): expect notes on sparse cells", opts.name(OptMaxBlock), K, valid, t.N))
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
		res.Notes = append(res.Notes, Note{Kind: checks.NoteChecksSubset, Text: "checks run (" + opts.name(OptChecks) + "): " + strings.Join(opts.Checks, ", ")})
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
		shortest, longest := segs[0].N, segs[0].N
		for _, sg := range segs {
			shortest, longest = min(shortest, sg.N), max(longest, sg.N)
		}
		size := fmt.Sprintf("of %d digits", shortest)
		if longest != shortest {
			// One pass of unknown length is cut at power-of-two sub-tallies:
			// each segment's statistics use its own length, so the p-values
			// stay uniform; only the lengths differ.
			size = fmt.Sprintf("of %d to %d digits", shortest, longest)
		}
		res.Notes = append(res.Notes, checks.Notef(checks.NoteSecondLevel, "second level: %d segments %s; discrete statistics enter with randomized p-values (seed %d)",
			opts.Segments, size, opts.Seed))
	}
	res.Skips = out.Skips
	res.Entropy = out.Entropy
	if src.IntegerPart != "" {
		res.Notes = append(res.Notes, checks.Notef(checks.NoteIntegerPart, "integer part %q dropped: the sequence is the digits after the radix point", src.IntegerPart))
	}
	res.Findings, res.Verdict = adjust(out.Findings, opts)
	if len(res.Findings) == 0 {
		res.Verdict = Untested
	}
	qqBand(res)
	for _, f := range res.Findings {
		if _, ok := f.Params["class"]; ok && f.Check == "gap" {
			res.Notes = append(res.Notes, Note{Kind: checks.NoteGapClasses, Text: gapClassNote(res.Base)})
			break
		}
	}
	if opts.Word > 0 && res.Base == 256 && opts.Null.Kind != checks.Uniform {
		res.Notes = append(res.Notes, checks.Notef(checks.NoteWordNull, "the word-level checks test i.i.d. uniform %d-bit words, so under a %s null they do not run", opts.Word, opts.Null.Kind))
	}
	wrongBase := missingTopDigits(res.DigitCounts, res.Digits, opts)
	if wrongBase != "" {
		res.Notes = append(res.Notes, Note{Kind: checks.NoteWrongBase, Text: wrongBase})
	}
	if res.Verdict == NotConsistent && wrongBase == "" { // digits of a smaller base fit too well in some checks: not construction
		for _, f := range res.Findings {
			if f.Mark == MarkTooUniform {
				res.Notes = append(res.Notes, Note{Kind: checks.NoteMixed, Text: "some findings are also too uniform: the sequence deviates in some respects and fits better than chance allows in others, which points to construction rather than chance"})
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
func adjust(fs []checks.Finding, opts Options) ([]Finding, Verdict) {
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
			if a.Where != "" { // say where, in every format's notes
				a.Notes = append(slices.Clone(a.Notes), Note{Kind: checks.NoteWhere, Text: a.Finding.WhereNote()})
			}
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

// runCheck runs one check and bounds its p-values (checks.Clamp): every
// finding of an audit, first level or segment, passes here.
func runCheck(c checks.Check, in checks.Input, out *checks.Result) {
	n := len(out.Findings)
	c.Run(in, out)
	for i := n; i < len(out.Findings); i++ {
		out.Findings[i] = checks.Clamp(out.Findings[i])
	}
}

// Note is a finding's or an audit's note: its kind (checks.NoteKind) and
// its sentence.
type Note = checks.Note
