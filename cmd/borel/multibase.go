package main

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/expand"
	"github.com/borel-audit/borel/stats/seq"
)

// rawRegroupings are the bases a byte stream splits into exactly: bits,
// bit pairs, nibbles and bytes.
var rawRegroupings = []int{2, 4, 16, 256}

// parseBases reads --bases: a comma-separated list of distinct bases.
func parseBases(s string, maxBase int, what string) ([]int, error) {
	var out []int
	seen := map[int]bool{}
	for _, part := range strings.Split(s, ",") {
		b, err := parseBase(strings.TrimSpace(part), 2, maxBase, what)
		if err != nil {
			return nil, usagef("--bases %q: %v", s, strings.TrimPrefix(err.Error(), "--base "))
		}
		if !seen[b] {
			seen[b] = true
			out = append(out, b)
		}
	}
	return out, nil
}

// perfectRoot returns the smallest m with n = m^k for some k ≥ 1.
func perfectRoot(n int) int {
	for m := 2; m*m <= n; m++ {
		p := m
		for p < n {
			p *= m
		}
		if p == n {
			return m
		}
	}
	return n
}

// powerNotes says which audited bases are powers of a common base: for
// them normality is one claim, not several (Schmidt 1960), so their
// verdicts are not independent evidence.
//
// Views read from words (Source.View) are other sequences, not the same
// digits in another base, and take no part.
func powerNotes(results []*audit.Result) {
	groups := map[int][]int{}
	for _, r := range results {
		if r.Source.View != "" {
			continue
		}
		root := perfectRoot(r.Base)
		groups[root] = append(groups[root], r.Base)
	}
	for _, r := range results {
		if r.Source.View != "" {
			continue
		}
		g := groups[perfectRoot(r.Base)]
		if len(g) < 2 {
			continue
		}
		sort.Ints(g)
		list := make([]string, len(g))
		for i, b := range g {
			list[i] = strconv.Itoa(b)
		}
		r.Notes = append(r.Notes, checks.Notef(checks.NotePowerBases, "bases %s are powers of %d: normality in one is normality in all (Schmidt 1960), so their verdicts are one piece of evidence, not %d",
			strings.Join(list, ", "), perfectRoot(r.Base), len(g)))
	}
}

// auditSource audits a built-in source in each base.
func auditSource(e env, name string, bases []int, count int, opts audit.Options, quiet bool) ([]*audit.Result, error) {
	src, err := expand.ParseSource(name)
	if err != nil {
		return nil, usageError{err.Error()}
	}
	var out []*audit.Result
	for _, b := range bases {
		if src.Base() != 0 && b != src.Base() {
			return nil, usagef("source %s makes base-%d digits; --bases %d does not fit", name, src.Base(), b)
		}
		if err := checkDigitMemory(src, count, b, digitMemory()); err != nil {
			return nil, err
		}
		d, checks, err := checkedDigits(e, quiet, src, count, 0, b)
		if err != nil {
			return nil, err
		}
		res, err := audit.Digits(d, b, audit.Source{Name: name, Kind: "built-in", Bytes: -1,
			Parameters: fmt.Sprintf("%d digits in base %d; %s", count, b, src.Detail), Checks: checks}, opts)
		if err != nil {
			return nil, err
		}
		out = append(out, res)
	}
	return out, nil
}

// auditRebased reads a text digit file in base from and audits the digits
// it determines in each base (exact rebase).
func auditRebased(e env, input string, from int, bases []int, opts audit.Options, gz seq.Gzip) ([]*audit.Result, error) {
	var in io.Reader = e.stdin
	name, kind, size := "stdin", "stdin", int64(-1)
	if input != "-" {
		f, err := os.Open(input)
		if err != nil {
			return nil, fmt.Errorf("cannot open %s: %v", input, unwrapPathError(err))
		}
		defer f.Close()
		st, err := f.Stat()
		if err != nil || st.IsDir() {
			return nil, fmt.Errorf("%s is not a file of digits; give a file, or - for standard input", input)
		}
		in, name, kind, size = f, input, "file", st.Size()
	}
	hash := sha256.New()
	r, err := newReader(io.TeeReader(in, hash), seq.Options{Source: name, Base: from, Gzip: gz})
	if err != nil {
		return nil, err
	}
	var d []byte
	for r.Scan() {
		d = append(d, r.Digits()...)
	}
	if err := r.Err(); err != nil {
		return nil, err
	}
	var out []*audit.Result
	for _, b := range bases {
		digits, how := d, fmt.Sprintf("%d base-%d digits as read", len(d), from)
		if b != from {
			digits = expand.Rebase(d, from, b)
			how = fmt.Sprintf("exact rebase of %d base-%d digits: %d base-%d digits determined", len(d), from, len(digits), b)
		}
		src := audit.Source{Name: name, Kind: kind, Format: "text", Bytes: size, Compressed: r.Compressed(),
			IntegerPart: r.IntegerPart(), SHA256: hex.EncodeToString(hash.Sum(nil)), Parameters: how}
		res, err := audit.Digits(digits, b, src, opts)
		if err != nil {
			return nil, err
		}
		out = append(out, res)
	}
	return out, nil
}

// auditRegrouped reads a raw byte stream once and audits it in each of the
// exact regroupings (bits, bit pairs, nibbles, bytes), most significant
// first; with opts.Word it also reads the bytes as words: the bytes view
// gets the word-level checks, and three views are built from the words
// (their top h bits as base-2^h digits, h chosen so that the serial and
// block checks reach triples of consecutive words; their lowest bit; their
// highest bit).
func auditRegrouped(e env, input string, bases []int, opts audit.Options, quiet bool, gz seq.Gzip) ([]*audit.Result, error) {
	src, in, closeIn, err := openInput(e, input, seq.Options{Format: seq.Raw, Base: 256, Gzip: gz})
	if err != nil {
		return nil, err
	}
	defer closeIn()
	hash := sha256.New()
	r, err := newReader(io.TeeReader(in, hash), seq.Options{Format: seq.Raw, Source: src.Name, Gzip: gz})
	if err != nil {
		return nil, err
	}
	bytesHint := int64(-1)
	if src.Bytes >= 0 && !src.Compressed {
		bytesHint = src.Bytes
	}
	lanes, err := byteLanes(bases, opts, bytesHint)
	if err != nil {
		return nil, err
	}
	for _, l := range lanes {
		if err := l.plan.Start(); err != nil {
			return nil, err
		}
	}
	prog := newProgress(e, quiet, src.Bytes)
	for r.Scan() {
		feedLanes(lanes, r.Digits())
		prog.update(r.Count(), r.Offset())
	}
	prog.done()
	if err := r.Err(); err != nil {
		return nil, err
	}
	src.Compressed = r.Compressed()
	src.SHA256 = hex.EncodeToString(hash.Sum(nil))
	var results []*audit.Result
	for _, l := range lanes {
		res, err := l.plan.Done(l.source(src))
		if err != nil {
			return nil, err
		}
		results = append(results, res)
	}
	return results, nil
}

// lane is one view of a byte stream: the digits it makes of each chunk
// and the plan they fill.
type lane struct {
	base         int
	plan         *audit.Plan
	buf          []byte
	format, view string
	digits       func(chunk, out []byte) []byte
	packed       bool // the chunk's bytes are the lane's digits packed: no digits func
}

// source is the input as this lane's audit names it.
func (l *lane) source(src audit.Source) audit.Source {
	src.Format, src.View = l.format, l.view
	return src
}

// feedLanes adds a chunk of bytes to every lane.
func feedLanes(lanes []*lane, chunk []byte) {
	for _, l := range lanes {
		if l.packed {
			l.plan.AddPacked(chunk)
			continue
		}
		l.buf = l.digits(chunk, l.buf)
		if len(l.buf) > 0 {
			l.plan.Add(l.buf)
		}
	}
}

// byteLanes plans the views of a byte stream of at most bytesHint bytes
// (< 0: unknown): the regroupings in bases (2, 4, 16, 256), and with
// opts.Word the word views; the bytes view has the word-level checks.
func byteLanes(bases []int, opts audit.Options, bytesHint int64) ([]*lane, error) {
	plain := opts
	plain.Word, plain.BigEndian = 0, false
	var lanes []*lane
	for _, b := range bases {
		bitsPer := map[int]int{2: 1, 4: 2, 16: 4, 256: 8}[b]
		hint := int64(-1)
		if bytesHint >= 0 {
			hint = bytesHint * int64(8/bitsPer)
		}
		o := plain
		if b == 256 {
			o = opts
		}
		plan, err := audit.NewPlan(b, hint, o)
		if err != nil {
			return nil, usageError{err.Error()}
		}
		l := &lane{base: b, plan: plan, format: map[int]string{2: "bits", 4: "bit pairs", 16: "nibbles", 256: "bytes"}[b]}
		if b == 256 {
			l.digits = func(chunk, _ []byte) []byte { return chunk }
		} else {
			l.packed = true // the plan reads the bytes as they are (Plan.AddPacked)
		}
		lanes = append(lanes, l)
	}
	if W := opts.Word; W > 0 {
		per := W / 8
		order := "little-endian"
		if opts.BigEndian {
			order = "big-endian"
		}
		words := int64(-1)
		if bytesHint >= 0 {
			words = bytesHint / int64(per)
		}
		h := topBits(words, W)
		for _, v := range []struct {
			base  int
			view  string
			digit func(w uint64) byte
		}{
			{1 << h, fmt.Sprintf("top %d bits of %d-bit %s words", h, W, order), func(w uint64) byte { return byte(w >> (W - h)) }},
			{2, fmt.Sprintf("bit 0 of %d-bit %s words", W, order), func(w uint64) byte { return byte(w & 1) }},
			{2, fmt.Sprintf("bit %d of %d-bit %s words", W-1, W, order), func(w uint64) byte { return byte(w >> (W - 1) & 1) }},
		} {
			plan, err := audit.NewPlan(v.base, words, plain)
			if err != nil {
				return nil, usageError{err.Error()}
			}
			var carry []byte // the bytes of a word cut by the chunk's end
			digit, big := v.digit, opts.BigEndian
			lanes = append(lanes, &lane{base: v.base, plan: plan, format: "words", view: v.view,
				digits: func(chunk, out []byte) []byte {
					out = out[:0]
					for len(chunk) > 0 {
						take := min(per-len(carry), len(chunk))
						carry = append(carry, chunk[:take]...)
						chunk = chunk[take:]
						if len(carry) < per {
							break
						}
						var w uint64
						if big {
							for _, x := range carry {
								w = w<<8 | uint64(x)
							}
						} else {
							for k := per - 1; k >= 0; k-- {
								w = w<<8 | uint64(carry[k])
							}
						}
						out = append(out, digit(w))
						carry = carry[:0]
					}
					return out
				}})
		}
	}
	return lanes, nil
}

// topBits is the number h of top bits of each word that the top-bits view
// reads: the largest with 5 expected triples of consecutive words in each
// of the 2^3h cells (n/2^3h ≥ 5), so that the serial and block checks see
// how consecutive words' leading bits go together (RANDU's triples lie on
// 15 planes); between 1 and 8 (a base up to 256), below the word size. 5
// when the length is not known.
func topBits(words int64, W int) int {
	h := 5
	if words > 0 {
		h = 1
		for h < 8 && float64(words)/math.Pow(2, float64(3*(h+1))) >= 5 {
			h++
		}
	}
	return min(h, W-1)
}

// checkMultiNull refuses a vector null across several bases.
func checkMultiNull(ns audit.NullSpec, bases []int) error {
	if ns.Kind == checks.Vector && len(bases) > 1 {
		return usagef("a frequency vector fixes one base; with several bases use --null uniform or fitted")
	}
	return nil
}

type auditAcross struct {
	source, bases, fromBase, base string
	raw, bits                     bool
	word                          int
	bigEndian                     bool
	count                         int
	flags                         *auditFlags
	out                           output
	gzip                          seq.Gzip
}

// runAuditAcross audits one number or stream in several bases side by side.
func runAuditAcross(e env, fs interface {
	NArg() int
	Arg(int) string
}, a auditAcross) (int, error) {
	opts, err := a.flags.options()
	if err != nil {
		return 0, err
	}
	if a.bits && a.raw {
		return 0, usagef("--raw and --bits exclude each other: bytes are read either as base-256 digits or as bits")
	}
	var bases []int
	var results []*audit.Result
	input := "-"
	switch {
	case a.source != "":
		if fs.NArg() != 0 {
			return 0, usagef("--source makes the digits; give no input file (got %q)", fs.Arg(0))
		}
		if a.count < 1 {
			return 0, usagef("--count %d: give the number of digits, 1 or more", a.count)
		}
		list := a.bases
		if list == "" {
			list = a.base
		}
		if list == "" {
			list = "10"
		}
		if bases, err = parseBases(list, 256, "2..36, or 256 for bytes"); err != nil {
			return 0, err
		}
	case a.raw:
		list := a.bases
		if list == "" {
			list = a.base // --raw --base 16: the nibbles alone
		}
		if list == "" {
			list = "2,4,16,256"
		}
		if bases, err = parseBases(list, 256, "the regroupings of bytes are 2, 4, 16 and 256"); err != nil {
			return 0, err
		}
		for _, b := range bases {
			if b != 2 && b != 4 && b != 16 && b != 256 {
				what := "--bases " + strconv.Itoa(b)
				if a.bases == "" {
					what = "--base " + strconv.Itoa(b) + " with --raw"
				}
				return 0, usagef("%s: a byte stream regroups exactly into bases 2, 4, 16 and 256 (bits, bit pairs, nibbles, bytes); give one of those", what)
			}
		}
	default:
		if bases, err = parseBases(a.bases, seq.MaxTextBase, "text digits are 0-9 then a-z"); err != nil {
			return 0, err
		}
	}
	if a.source == "" {
		if fs.NArg() != 1 {
			return 0, usagef("audit needs one input, a file or - for standard input (got %d); see borel audit --help", fs.NArg())
		}
		input = fs.Arg(0)
	}
	if err := a.out.check(input); err != nil {
		return 0, err
	}
	opts.Null, err = a.flags.nullFor(bases[0])
	if err != nil {
		return 0, err
	}
	if err := checkMultiNull(opts.Null, bases); err != nil {
		return 0, err
	}
	switch {
	case a.source != "":
		results, err = auditSource(e, a.source, bases, a.count, opts, a.out.quiet)
	case a.raw:
		opts.Word, opts.BigEndian = a.word, a.bigEndian
		if a.word > 0 && !slices.Contains(bases, 256) {
			return 0, usagef("--word %d: the word checks run in the bytes view; keep base 256 in --bases", a.word)
		}
		results, err = auditRegrouped(e, input, bases, opts, a.out.quiet, a.gzip)
	default:
		from := 10
		fb := a.fromBase
		if fb == "" {
			fb = a.base
		}
		if fb != "" {
			if from, err = parseBase(fb, 2, seq.MaxTextBase, "text digits are 0-9 then a-z"); err != nil {
				return 0, usageError{"--from-base: " + err.Error()}
			}
		}
		results, err = auditRebased(e, input, from, bases, opts, a.gzip)
	}
	if err != nil {
		return 0, err
	}
	powerNotes(results)
	name := results[0].Source.Name
	var inputs []audit.InputVerdict
	if len(results) > 1 {
		inputs = []audit.InputVerdict{audit.Combine(name, results, opts.Alpha)}
	}
	return a.out.reportInputs(e, results, inputs, a.flags.strict)
}
