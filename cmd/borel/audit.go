package main

import (
	"bufio"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"strings"
	"unicode/utf8"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/expand"
	"github.com/borel-audit/borel/stats/seq"
)

// auditHelp is the help of borel audit; the battery's list is the checks'
// own (checks.All), so a new check appears in it.
var auditHelp = `Usage: borel audit FILE|- [options]

Reads a digit sequence from FILE (gzip-compressed or not) or from standard input (-),
` + wrap("runs the battery ("+strings.Join(checkNames(), ", ")+") against the null, adjusts the p-values of every finding in both tails, and gives the verdict: consistent, not consistent, or too uniform.", 91) + `

Text input holds digits 0-9 then a-z (either case) in base 2..36; whitespace is ignored;
an integer part and radix point may open it ("3.14159...") and are dropped. --bits reads
bytes as bits (most significant first); --raw reads bytes and audits them as bits, bit
pairs, nibbles and bytes side by side (--base 256 for bytes alone). --word 8|16|24|32|64
also reads them as words (--endian little or big): the word-level checks (lincomp, rank,
rowrank, birthday, wordcoll, hamming, perm; they run only with --word) and views of the
words' top bits, lowest bit and highest bit, for generator output.

Across bases: --bases re-expands a text file exactly from --from-base into each base, and
--source audits a constant or generator made by borel (see borel digits --help).

Example: the first million decimals of pi, against the uniform null:
  $ borel audit testdata/pi-1e6.txt.gz
  ...
  Verdict for testdata/pi-1e6.txt.gz in base 10: CONSISTENT

Generator output as 32-bit words (MT19937 fails on the linear complexity of its bits):
  $ borel audit mt.bin --raw --word 32

Second level: 20 segments, each statistic's 20 p-values tested for uniformity:
  $ borel audit testdata/pi-1e6.txt.gz --segments 20

One number in several bases, side by side:
  $ borel audit --source stoneham:2,3 --count 30000 --bases 2,3,6,10

Against a stated digit-frequency vector, with a JSON report written atomically:
  $ borel audit lab.txt --base 3 --null 0.2,0.3,0.5 --format json -o lab.json
`

func runAudit(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("audit", pflag.ContinueOnError)
	base := fs.String("base", "", "base of the digits: 2..36 for text (default 10); raw bytes are base 256, bits base 2")
	raw := fs.Bool("raw", false, "read bytes as base-256 digits")
	gz := fs.String("gzip", "auto", gzipUsage)
	bits := fs.Bool("bits", false, "read bytes as bits, most significant bit first (base 2)")
	word := fs.Int("word", 0, "with --raw, also read the bytes as words of 8, 16, 24, 32 or 64 bits: word-level checks (linear complexity, ranks, birthday spacings, collisions, Hamming weights, order) and views of the words' top bits, lowest and highest bit")
	endian := fs.String("endian", "little", "byte order of --word: little (the usual memory order) or big")
	var af auditFlags
	af.register(fs, flNull|flAlpha|flAdjust|flMaxBlock|flMemory|flStrict|flSegments|flSeed|flWorkers|flChecks, nil)
	var out output
	out.register(fs)
	basesArg := fs.String("bases", "", "audit in each of these bases, side by side (e.g. 2,3,6,10): text input is re-expanded exactly from --from-base; raw bytes are regrouped (2,4,16,256, the default with --raw)")
	fromBase := fs.String("from-base", "", "base of the text input when --bases re-expands it (default: --base, else 10)")
	source := fs.String("source", "", "audit a built-in source instead of a file: "+expand.Names)
	count := fs.Int("count", 100_000, "digits drawn from --source in each base")
	if done, err := parseFlags(fs, args, auditHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	gzipMode, err := parseGzip(*gz)
	if err != nil {
		return 0, err
	}
	if err := checkWordFlags(*word, *endian, fs.Changed("endian"), *raw && !*bits && *source == ""); err != nil {
		return 0, err
	}
	if *source != "" || *basesArg != "" || (*raw && !*bits) { // several bases, a built-in source, or byte regroupings
		return runAuditAcross(e, fs, auditAcross{source: *source, bases: *basesArg, fromBase: *fromBase, base: *base,
			raw: *raw, bits: *bits, word: *word, bigEndian: *endian == "big", count: *count, flags: &af, out: out, gzip: gzipMode})
	}
	if fs.NArg() != 1 {
		return 0, usagef("audit needs one input, a file or - for standard input (got %d); see borel audit --help", fs.NArg())
	}
	input := fs.Arg(0)

	opt := seq.Options{Format: seq.Text, Base: 10, Gzip: gzipMode}
	switch {
	case *raw && *bits:
		return 0, usagef("--raw and --bits exclude each other: bytes are read either as base-256 digits or as bits")
	case *bits:
		opt.Format, opt.Base = seq.Bits, 2
		if *base != "" && *base != "2" {
			return 0, usagef("--bits reads base-2 digits; drop --base %s", *base)
		}
	case *base != "":
		b, err := parseBase(*base, 2, seq.MaxTextBase, "text digits are 0-9 then a-z; use --raw for bytes")
		if err != nil {
			return 0, err
		}
		opt.Base = b
	}
	opts, err := af.options()
	if err != nil {
		return 0, err
	}
	if opts.Null, err = af.nullFor(opt.Base); err != nil {
		return 0, err
	}
	if err := out.check(input); err != nil {
		return 0, err
	}

	src, in, closeIn, err := openInput(e, input, opt)
	if err != nil {
		return 0, err
	}
	defer closeIn()
	hint := int64(-1)
	if src.Bytes >= 0 && !src.Compressed {
		hint = src.Bytes
		if opt.Format == seq.Bits {
			hint *= 8
		}
	}
	plan, err := audit.NewPlan(opt.Base, hint, opts)
	if err != nil {
		return 0, usageError{err.Error()}
	}
	t, err := tallyInput(e, input, in, &src, opt, plan, 0, out.quiet, nil)
	if err != nil {
		return 0, err
	}
	res, err := plan.Finish(t, src)
	if err != nil {
		return 0, err
	}
	return out.report(e, []*audit.Result{res}, af.strict)
}

// openInput opens a file or standard input and describes it.
func openInput(e env, name string, opt seq.Options) (audit.Source, io.Reader, func(), error) {
	src := audit.Source{Name: name, Kind: "file", Format: opt.Format.String(), Bytes: -1}
	if name == "-" {
		src.Name, src.Kind = "stdin", "stdin"
		return src, e.stdin, func() {}, nil
	}
	f, err := os.Open(name)
	if err != nil {
		return src, nil, nil, fmt.Errorf("cannot open %s: %v", name, unwrapPathError(err))
	}
	st, err := f.Stat()
	if err != nil {
		f.Close()
		return src, nil, nil, fmt.Errorf("cannot read %s: %v", name, err)
	}
	if st.IsDir() {
		f.Close()
		return src, nil, nil, fmt.Errorf("%s is a directory; give a file of digits, or - for standard input", name)
	}
	if st.Mode().IsRegular() {
		src.Bytes = st.Size()
		var header [10]byte
		n, _ := io.ReadFull(f, header[:])
		src.Compressed = opt.Gzip == seq.GzipYes || (opt.Gzip == seq.GzipAuto && seq.LooksGzip(header[:n]))
		if _, err := f.Seek(0, io.SeekStart); err != nil {
			f.Close()
			return src, nil, nil, fmt.Errorf("cannot read %s: %v", name, err)
		}
	}
	return src, bufio.NewReaderSize(f, 1<<16), func() { f.Close() }, nil
}

func unwrapPathError(err error) error {
	if pe, ok := err.(*os.PathError); ok {
		return pe.Err
	}
	return err
}

// tallyInput runs the plan's pass over in, opened by openInput as src, for
// the stretch that begins at global digit position offset (0 for a whole
// sequence): the SHA-256 of the bytes on its own goroutine beside it, a
// progress line unless quiet, stopped within a chunk by SIGINT or SIGTERM.
// accept, if not nil, sees the reader before the pass (its integer part is
// known then) and may refuse it. It fills src's compression, integer part
// and SHA-256, and refuses a file that shrank while it was read.
func tallyInput(e env, input string, in io.Reader, src *audit.Source, opt seq.Options, plan *audit.Plan, offset int64, quiet bool, accept func(*seq.Reader) error) (*tally.Tally, error) {
	opt.Source = src.Name
	hash := newAsyncHash()
	r, err := newReader(io.TeeReader(in, hash), opt)
	if err == nil && accept != nil {
		err = accept(r)
	}
	if err != nil {
		hash.Sum()
		return nil, err
	}
	prog := newProgress(e, quiet, src.Bytes)
	plan.OnChunk = func(digits, bytes int64) { prog.update(digits, bytes) }
	t, err := plan.TallyAt(passCtx, r, offset)
	prog.done()
	sum := hash.Sum()
	if err != nil {
		return nil, err
	}
	src.Compressed = r.Compressed()
	src.IntegerPart = r.IntegerPart()
	src.SHA256 = hex.EncodeToString(sum)
	return t, checkUnchanged(input, *src, r.Offset())
}

// checkUnchanged refuses a report on a regular file that shrank while it
// was read: the digits audited would not be the file's.
func checkUnchanged(input string, src audit.Source, read int64) error {
	if input == "-" || src.Bytes < 0 || src.Compressed {
		return nil
	}
	st, err := os.Stat(input)
	if err != nil {
		return fmt.Errorf("%s disappeared while being read; nothing was written", input)
	}
	if read < src.Bytes || st.Size() < src.Bytes {
		return fmt.Errorf("%s shrank while being read (from %d to %d bytes); nothing was written: give a file that is not being written", input, src.Bytes, st.Size())
	}
	return nil
}

// splitList splits a comma-separated option value, dropping blanks.
func splitList(s string) []string {
	var out []string
	for _, part := range strings.Split(s, ",") {
		if p := strings.TrimSpace(part); p != "" {
			out = append(out, p)
		}
	}
	return out
}

// checkNames returns the names of the battery's checks, in report order.
func checkNames() []string {
	var names []string
	for _, c := range checks.All() {
		names = append(names, c.Name())
	}
	return names
}

// wrap breaks text into lines of at most width characters at spaces.
func wrap(text string, width int) string {
	var lines []string
	line := ""
	for _, w := range strings.Fields(text) {
		switch {
		case line == "":
			line = w
		case utf8.RuneCountInString(line)+1+utf8.RuneCountInString(w) <= width:
			line += " " + w
		default:
			lines = append(lines, line)
			line = w
		}
	}
	return strings.Join(append(lines, line), "\n")
}

// checkWordFlags validates --word and --endian: a word size of 8, 16, 24,
// 32 or 64 bits, a byte order, and raw input (raw: --raw on a file or
// standard input) for either.
func checkWordFlags(word int, endian string, endianGiven, raw bool) error {
	switch word {
	case 0, 8, 16, 24, 32, 64:
	default:
		return usagef("--word %d: words are 8, 16, 24, 32 or 64 bits", word)
	}
	if endian != "little" && endian != "big" {
		return usagef("--endian %q: little or big", endian)
	}
	if (word > 0 || endianGiven) && !raw {
		return usagef("--word and --endian read a raw byte stream as words; use them with --raw on a file or standard input")
	}
	return nil
}
