package main

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"sort"
	"strconv"
	"strings"

	"borel/stats/audit"
	"borel/stats/checks"
	"borel/stats/expand"
	"borel/stats/seq"
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
func powerNotes(results []*audit.Result) {
	groups := map[int][]int{}
	for _, r := range results {
		root := perfectRoot(r.Base)
		groups[root] = append(groups[root], r.Base)
	}
	for _, r := range results {
		g := groups[perfectRoot(r.Base)]
		if len(g) < 2 {
			continue
		}
		sort.Ints(g)
		list := make([]string, len(g))
		for i, b := range g {
			list[i] = strconv.Itoa(b)
		}
		r.Notes = append(r.Notes, fmt.Sprintf("bases %s are powers of %d: normality in one is normality in all (Schmidt 1960), so their verdicts are one piece of evidence, not %d",
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
// first.
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
	type lane struct {
		base, bits int
		plan       *audit.Plan
		buf        []byte
	}
	var lanes []*lane
	for _, b := range bases {
		bitsPer := map[int]int{2: 1, 4: 2, 16: 4, 256: 8}[b]
		hint := int64(-1)
		if src.Bytes >= 0 && !src.Compressed {
			hint = src.Bytes * int64(8/bitsPer)
		}
		plan, err := audit.NewPlan(b, hint, opts)
		if err != nil {
			return nil, usageError{err.Error()}
		}
		lanes = append(lanes, &lane{base: b, bits: bitsPer, plan: plan})
	}
	for _, l := range lanes {
		if err := l.plan.Start(); err != nil {
			return nil, err
		}
	}
	prog := newProgress(e, quiet, src.Bytes)
	for r.Scan() {
		chunk := r.Digits()
		for _, l := range lanes {
			per := 8 / l.bits
			if cap(l.buf) < per*len(chunk) {
				l.buf = make([]byte, per*len(chunk))
			}
			out := l.buf[:per*len(chunk)]
			mask := byte(1<<l.bits - 1)
			for j, c := range chunk {
				for k := 0; k < per; k++ {
					out[j*per+k] = c >> (8 - l.bits*(k+1)) & mask
				}
			}
			l.plan.Add(out)
		}
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
		s := src
		s.Format = map[int]string{2: "bits", 4: "bit pairs", 16: "nibbles", 256: "bytes"}[l.base]
		res, err := l.plan.Done(s)
		if err != nil {
			return nil, err
		}
		results = append(results, res)
	}
	return results, nil
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
