package main

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/reports"
	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/seq"
)

const watchHelp = `Usage: borel watch FILE|- [--raw [--word W] | --bits | --base B] [options]

Audits a stream that need not end — a generator piped in for hours, a device, a file
that grows (--follow) — at checkpoints of doubling length: --start (1 MiB of input by
default), twice that, four times, … At each checkpoint one status line goes to standard
error (length read, rate, the verdict so far, the smallest adjusted p-value and its
finding) and, with -o, the full report of that checkpoint, written atomically so that
another program can read the latest at any time. The run stops at the first checkpoint
whose verdict is not consistent (exit 3; --keep-going goes on and reports every one),
at --until, or when the input ends (a last checkpoint then audits everything read).

The false-alarm rate of the whole run is at most --alpha however long it runs: checkpoint
i (i = 0, 1, 2, …) is judged at alpha/2^(i+1), and these levels sum to alpha (a union
bound over the nested checkpoints, which holds whatever their dependence). A defect is
therefore caught at a stricter level later in a run, in exchange for never stopping on
chance more often than alpha in all.

The tables are sized once, for the memory budget and --until (or as for a stream of
unknown length); a block length that becomes valid only later is listed as not yet run
until then. --save keeps the tally of the last checkpoint (a shard, or a folder of one
shard per view with --raw), so that --resume continues a stopped run from it: give the
input that follows what was read, and the same options. SIGINT or SIGTERM writes the
report of what was read, marked as interrupted, and exits 130.

Example: a generator's raw output as 32-bit words, stopping at 64 MiB:
  $ some-generator | borel watch - --raw --word 32 --until 64MiB -o latest.txt

A file of generator output, with checkpoints from 64 KiB (the status lines on standard
error, the last checkpoint's report on standard output):
  $ borel watch gen.bin --raw --start 64KiB
  ...
  Side by side
  ...
`

// watchRun is one live audit: its lanes (views) and where it stands.
type watchRun struct {
	e            env
	lanes        []*lane
	src          audit.Source
	out          output
	alpha        float64
	start, until int64 // input units (bytes, bits or text digits)
	next         int64 // the next checkpoint's length
	index        int   // the next checkpoint's number
	read         int64 // input units read
	began        time.Time
	readAtStart  int64 // units read before this run (a resumed one)
	keepGoing    bool
	save         string
	failed       int
	hash         hash.Hash
	lastResults  []*audit.Result
	lastInputs   []audit.InputVerdict
	null         tally.ShardNull
}

func runWatch(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("watch", pflag.ContinueOnError)
	base := fs.String("base", "10", "base of the text digits, 2..36")
	raw := fs.Bool("raw", false, "read bytes: audited as bits, bit pairs, nibbles and bytes (--word for words)")
	bits := fs.Bool("bits", false, "read bytes as bits, most significant bit first (base 2)")
	word := fs.Int("word", 0, "with --raw, also read the bytes as words of 8, 16, 24, 32 or 64 bits (as audit --word)")
	endian := fs.String("endian", "little", "byte order of --word: little or big")
	startArg := fs.String("start", "1MiB", "the first checkpoint: input length (bytes; bits with --bits; digits for text)")
	untilArg := fs.String("until", "", "stop after this much input (default: when the input ends or on a signal)")
	follow := fs.Bool("follow", false, "a regular file that grows: at its end wait for more instead of stopping")
	keepGoing := fs.Bool("keep-going", false, "do not stop at a failing checkpoint: report every one, exit 3 at the end")
	save := fs.String("save", "", "keep the tally of the last checkpoint here (a shard; a folder of shards with --raw)")
	resume := fs.String("resume", "", "continue the run saved here (--save's file or folder) on the input that follows it")
	var af auditFlags
	af.register(fs, flNull|flAlpha|flAdjust|flMaxBlock|flMemory|flWorkers|flChecks, nil)
	var out output
	out.register(fs)
	if done, err := parseFlags(fs, args, watchHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if fs.NArg() != 1 {
		return 0, usagef("watch needs one input, a file, a device or - for standard input (got %d); see borel watch --help", fs.NArg())
	}
	if *raw && *bits {
		return 0, usagef("--raw and --bits exclude each other: bytes are read either as base-256 digits or as bits")
	}
	if err := checkWordFlags(*word, *endian, fs.Changed("endian"), *raw); err != nil {
		return 0, err
	}
	if out.appendTo != "" || out.plots != "" {
		return 0, usagef("watch writes whole reports (-o); --append and --plots are for audit")
	}
	start, err := parseSize(*startArg)
	if err != nil || start < 1 {
		return 0, usagef("--start %q: give a length such as 1MiB", *startArg)
	}
	until := int64(-1)
	if *untilArg != "" {
		if until, err = parseSize(*untilArg); err != nil || until < 1 {
			return 0, usagef("--until %q: give a length such as 64MiB", *untilArg)
		}
	}
	opts, err := af.options()
	if err != nil {
		return 0, err
	}
	opt := seq.Options{Format: seq.Text}
	switch {
	case *raw:
		opt.Format, opt.Base = seq.Raw, 256
	case *bits:
		opt.Format, opt.Base = seq.Bits, 2
	default:
		if opt.Base, err = parseBase(*base, 2, seq.MaxTextBase, "text digits are 0-9 then a-z; use --raw for bytes"); err != nil {
			return 0, err
		}
	}
	if opts.Null, err = af.nullFor(opt.Base); err != nil {
		return 0, err
	}
	opts.Word, opts.BigEndian = *word, *endian == "big"
	input := fs.Arg(0)
	if err := out.check(input); err != nil {
		return 0, err
	}
	w := &watchRun{e: e, out: out, alpha: opts.Alpha, start: start, until: until, keepGoing: *keepGoing, save: *save, hash: sha256.New(),
		null: tally.ShardNull{Kind: opts.Null.Kind.String(), P: opts.Null.P}}
	if *raw {
		bases := []int{2, 4, 16, 256}
		if err := checkMultiNull(opts.Null, bases); err != nil {
			return 0, err
		}
		bytesHint := int64(-1)
		if until > 0 {
			bytesHint = until
		}
		if w.lanes, err = byteLanes(bases, opts, bytesHint); err != nil {
			return 0, err
		}
	} else {
		plan, err := audit.NewPlan(opt.Base, until, opts)
		if err != nil {
			return 0, usageError{err.Error()}
		}
		w.lanes = []*lane{{base: opt.Base, plan: plan, format: opt.Format.String(),
			digits: func(chunk, out []byte) []byte { return append(out[:0], chunk...) }}}
	}
	if *resume != "" {
		if err := w.resumeFrom(*resume); err != nil {
			return 0, err
		}
	} else {
		for _, l := range w.lanes {
			if err := l.plan.Start(); err != nil {
				return 0, err
			}
		}
	}
	w.next = start
	for w.next <= w.read {
		w.next *= 2
		w.index++
	}
	if w.read > 0 && w.read != w.next/2 && w.read >= start {
		// The saved run ended between doublings, with a last checkpoint of
		// its own at the next level: that level is spent.
		w.index++
	}

	src, in, closeIn, err := openInput(e, input, opt)
	if err != nil {
		return 0, err
	}
	defer closeIn()
	if *follow {
		if src.Kind != "file" || src.Bytes < 0 {
			return 0, usagef("--follow is for a regular file that grows; %s is not one", input)
		}
		in = &followReader{r: in}
	}
	src.Bytes = -1 // a stream: its length is what was read
	w.src = src
	opt.Live = true // hand over each read at once: a slow producer's checkpoints come when reached
	r, err := newReader(io.TeeReader(in, w.hash), opt)
	if err != nil {
		return 0, err
	}
	forceExitAfter.Store(int64(time.Minute)) // time to write the interrupted report
	writesAfterSignal.Store(true)
	return w.loop(r)
}

// loop reads chunks on a goroutine (a read may block for long on a slow
// pipe) and audits at each checkpoint; a signal ends it with the report of
// what was read.
func (w *watchRun) loop(r *seq.Reader) (int, error) {
	type chunk struct {
		d   []byte
		end bool
		err error
	}
	chunks := make(chan chunk, 2)
	go func() {
		for r.Scan() {
			chunks <- chunk{d: append([]byte(nil), r.Digits()...)}
		}
		chunks <- chunk{end: true, err: r.Err()}
	}()
	w.began = time.Now()
	for {
		select {
		case <-passCtx.Done():
			return w.finish("interrupted")
		case c := <-chunks:
			if c.end {
				if c.err != nil && !errors.Is(c.err, io.EOF) {
					return 0, c.err
				}
				if w.read == w.readAtStart && w.read == 0 {
					return 0, fmt.Errorf("%s: the input is empty", w.src.Name)
				}
				return w.finish("ended")
			}
			d := c.d
			for len(d) > 0 {
				take := int64(len(d))
				if w.until > 0 {
					take = min(take, w.until-w.read)
				}
				take = min(take, w.next-w.read)
				feedLanes(w.lanes, d[:take])
				w.read += take
				d = d[take:]
				if w.read == w.next {
					stop, err := w.checkpoint("")
					if err != nil {
						return 0, err
					}
					if stop {
						return w.end("stopped at a failing checkpoint")
					}
					w.next *= 2
					w.index++
				}
				if w.until > 0 && w.read >= w.until {
					return w.finish("reached --until")
				}
			}
		}
	}
}

// checkpoint audits every view at level alpha/2^(index+1), prints the
// status line, writes the report and the saved tally; stop is true when
// the run ends here (a failing checkpoint without --keep-going).
func (w *watchRun) checkpoint(why string) (stop bool, err error) {
	level := w.alpha * math.Pow(2, -float64(w.index+1))
	var results []*audit.Result
	for _, l := range w.lanes {
		if l.plan.Tally().N == 0 {
			continue
		}
		s := l.source(w.src)
		s.SHA256 = hex.EncodeToString(w.hash.Sum(nil))
		res, err := l.plan.Snapshot(s, level)
		if err != nil {
			return true, err
		}
		res.Notes = append(res.Notes, checks.Notef(checks.NoteLive, "live audit (borel watch): checkpoint %d at %s of input, judged at alpha/2^%d = %.3g so that all checkpoints together keep the false-alarm rate at %g", w.index, w.units(w.read), w.index+1, level, w.alpha))
		if w.readAtStart > 0 {
			res.Notes = append(res.Notes, checks.Notef(checks.NoteResumed, "resumed from a saved tally of %s; the SHA-256 covers the input read since", w.units(w.readAtStart)))
		}
		if why == "interrupted" {
			res.Notes = append(res.Notes, audit.Note{Kind: checks.NoteInterrupted, Text: "interrupted by a signal: this report covers what was read up to the last complete chunk"})
		}
		results = append(results, res)
	}
	if len(results) == 0 {
		return true, fmt.Errorf("%s: nothing was read", w.src.Name)
	}
	var inputs []audit.InputVerdict
	verdict := results[0].Verdict
	if len(results) > 1 {
		powerNotes(results)
		v := audit.Combine(results[0].Source.Name, results, level)
		inputs = []audit.InputVerdict{v}
		verdict = v.Verdict
	}
	w.lastResults, w.lastInputs = results, inputs
	w.status(verdict, results, level, why)
	if w.out.path != "" && w.out.path != "-" {
		doc := reports.Document{Version: version, Command: append([]string{"borel"}, w.e.args...), Created: reportTime(), Results: results, Inputs: inputs}
		data, err := render(doc, w.out.format)
		if err != nil {
			return true, err
		}
		if err := writeAtomic(w.out.path, data); err != nil {
			return true, err
		}
	}
	if w.save != "" {
		if err := w.saveTallies(); err != nil {
			return true, err
		}
	}
	if verdict != audit.Consistent && verdict != audit.Untested {
		w.failed++
		return !w.keepGoing, nil
	}
	return false, nil
}

// finish audits what was read at the end (the input ended, --until, or a
// signal) as a last checkpoint, unless the last one covered it already.
func (w *watchRun) finish(why string) (int, error) {
	covered := w.lastResults != nil && w.lastResults[0].Digits == w.lanes[0].plan.Tally().N
	if why == "interrupted" || (!covered && w.read > w.readAtStart) {
		if _, err := w.checkpoint(why); err != nil {
			return 0, err
		}
	} else if !w.out.quiet {
		fmt.Fprintf(w.e.stderr, "borel watch: %s at %s\n", why, w.units(w.read))
	}
	return w.end(why)
}

// end prints the last checkpoint's report when no -o took it, and returns
// the run's status: 130 after a signal, 3 after a failing checkpoint.
func (w *watchRun) end(why string) (int, error) {
	if (w.out.path == "" || w.out.path == "-") && w.lastResults != nil {
		doc := reports.Document{Version: version, Command: append([]string{"borel"}, w.e.args...), Created: reportTime(),
			Results: w.lastResults, Inputs: w.lastInputs, Width: w.out.textWidth(w.e)}
		data, err := render(doc, w.out.format)
		if err != nil {
			return 0, err
		}
		if _, err := w.e.stdout.Write(data); err != nil {
			return 0, err
		}
	}
	switch {
	case why == "interrupted":
		return exitInterrupted, nil
	case w.failed > 0:
		return exitVerdict, nil
	}
	return exitOK, nil
}

// status prints the checkpoint's line on standard error.
func (w *watchRun) status(verdict audit.Verdict, results []*audit.Result, level float64, why string) {
	if w.out.quiet {
		return
	}
	el := time.Since(w.began).Seconds()
	rate := ""
	if el > 0 {
		rate = ", " + strings.TrimSpace(human(float64(w.read-w.readAtStart)/el)+" ") + w.unitName() + "/s"
	}
	best, from := 0.0, "–"
	for _, r := range results {
		if d := r.Decisive(); d.Index >= 0 && (from == "–" || d.LogAdj < best) {
			best, from = d.LogAdj, decisiveName(r, d.Index)
		}
	}
	tag := ""
	if why != "" {
		tag = " (" + why + ")"
	}
	fmt.Fprintf(w.e.stderr, "borel watch: checkpoint %d%s: %s read%s; at alpha %.3g: %s; smallest adjusted p %s (%s)\n",
		w.index, tag, w.units(w.read), rate, level, verdict, formatLogP(best), from)
}

// decisiveName names the decisive finding of a view, and the view.
func decisiveName(r *audit.Result, i int) string {
	name := reports.FindingLabel(r.Findings[i].Finding)
	if r.Source.View != "" {
		return name + ", " + r.Source.View
	}
	return name + ", base " + strconv.Itoa(r.Base)
}

// formatLogP prints a probability given by its natural log.
func formatLogP(l float64) string {
	if l < math.Log(1e-10) {
		return fmt.Sprintf("10^%.2f", l/math.Ln10)
	}
	return strconv.FormatFloat(math.Exp(l), 'g', 3, 64)
}

// unitName is the unit the run counts its input in: bytes of a raw or bit
// stream, digits of text.
func (w *watchRun) unitName() string {
	switch w.src.Format {
	case "raw":
		return "B"
	case "bits":
		return "bits"
	}
	return "digits"
}

func (w *watchRun) units(n int64) string {
	if w.unitName() == "B" {
		return humanBytes(n)
	}
	return human(float64(n)) + " " + w.unitName()
}

// humanBytes writes a byte count in binary units.
func humanBytes(n int64) string {
	switch {
	case n >= 1<<30:
		return fmt.Sprintf("%.2f GiB", float64(n)/(1<<30))
	case n >= 1<<20:
		return fmt.Sprintf("%.2f MiB", float64(n)/(1<<20))
	case n >= 1<<10:
		return fmt.Sprintf("%.1f KiB", float64(n)/(1<<10))
	}
	return fmt.Sprintf("%d B", n)
}

// savePaths are the files --save writes: the path itself for one view, a
// shard per view in the folder path for several.
func (w *watchRun) savePaths(path string) []string {
	if len(w.lanes) == 1 {
		return []string{path}
	}
	var ps []string
	for i := range w.lanes {
		ps = append(ps, filepath.Join(path, fmt.Sprintf("view-%d.shard", i+1)))
	}
	return ps
}

// saveTallies writes the tallies of the checkpoint (each shard atomically;
// the input read so far is the shard's byte count).
func (w *watchRun) saveTallies() error {
	if len(w.lanes) > 1 {
		if err := os.MkdirAll(w.save, 0o755); err != nil {
			return fmt.Errorf("--save %s: %v", w.save, unwrapPathError(err))
		}
	}
	for i, p := range w.savePaths(w.save) {
		l := w.lanes[i]
		sh := &tally.Shard{Writer: "borel " + version, Null: w.null,
			Source: tally.ShardInput{Name: w.src.Name + " (" + l.source(w.src).Format + viewSuffix(l) + ")", Bytes: w.read},
			Tally:  l.plan.Tally()}
		if err := writeShardFile(p, sh); err != nil {
			return err
		}
	}
	return nil
}

func viewSuffix(l *lane) string {
	if l.view != "" {
		return ": " + l.view
	}
	return ""
}

// resumeFrom reads the saved tallies back and continues from them.
func (w *watchRun) resumeFrom(path string) error {
	for i, p := range w.savePaths(path) {
		f, err := os.Open(p)
		if err != nil {
			return fmt.Errorf("--resume %s: %v", path, unwrapPathError(err))
		}
		sh, err := tally.ReadShard(f, p)
		f.Close()
		if err != nil {
			return fmt.Errorf("--resume: %v", err)
		}
		if err := w.lanes[i].plan.Resume(sh.Tally); err != nil {
			return fmt.Errorf("--resume %s: %v", p, err)
		}
		if i == 0 {
			w.read = sh.Source.Bytes
		} else if sh.Source.Bytes != w.read {
			return fmt.Errorf("--resume %s: the saved views were taken at different lengths (%d and %d)", path, w.read, sh.Source.Bytes)
		}
	}
	w.readAtStart = w.read
	return nil
}

// followReader reads a regular file that grows: at its end it waits for
// more (every 200 ms) until the run is stopped.
type followReader struct{ r io.Reader }

func (f *followReader) Read(p []byte) (int, error) {
	for {
		n, err := f.r.Read(p)
		if n > 0 || (err != nil && !errors.Is(err, io.EOF)) {
			return n, err
		}
		select {
		case <-passCtx.Done():
			return 0, io.EOF
		case <-time.After(200 * time.Millisecond):
		}
	}
}
