package main

import (
	"fmt"
	"os"
	"strings"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/reports"
	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/expand"
	"github.com/borel-audit/borel/stats/seq"
)

const compareHelp = `Usage: borel compare SOURCE... [options]

Audits several sequences and puts them side by side: one row per source and base, with the
verdict, the smallest adjusted p-value and the check that gave it, the entropy deficit and
the dimension estimate. A SOURCE is a file of digits (as for borel audit) or, when no such
file exists, a built-in source made by borel in --base (see borel digits --help): pi, e,
sqrtN, ln2, phi, champernowne, copeland-erdos, stoneham:B,C, rational:P/Q, liouville,
iid:p0,p1,..., pcg:SEED, chacha8:SEED, lcg:SEED. When a file has a built-in's name, the file
is taken and standard error says so: write builtin:NAME for the built-in (./NAME is the file).

Built-in sources give --count digits (default 100000). Text, Markdown, CSV and LaTeX show the
side-by-side table; json and html carry every audit in full.

Example: two constants against a generator:
  $ borel compare pi sqrt2 chacha8:7 --count 50000
`

func runCompare(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("compare", pflag.ContinueOnError)
	base := fs.String("base", "10", "base of text files and of built-in sources")
	count := fs.Int("count", 100_000, "digits drawn from each built-in source")
	raw := fs.Bool("raw", false, "read files as raw bytes, regrouped as bits, bit pairs, nibbles and bytes (or the --bases given among 2,4,16,256)")
	bits := fs.Bool("bits", false, "read files as bits, most significant bit first (base 2)")
	basesArg := fs.String("bases", "", "compare each source in each of these bases: text files are re-expanded exactly from --base, built-in sources made in each")
	gz := fs.String("gzip", "auto", gzipUsage)
	var af auditFlags
	af.register(fs, flNull|flAlpha|flAdjust|flMaxBlock|flMemory|flWorkers|flChecks, map[string]string{"null": "null hypothesis: uniform, fitted, or p0,p1,...", "alpha": "significance level of the verdicts"})
	var out output
	out.register(fs)
	if done, err := parseFlags(fs, args, compareHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if fs.NArg() < 1 {
		return 0, usagef("compare needs at least one source; see borel compare --help")
	}
	b, err := parseBase(*base, 2, seq.MaxTextBase, "text digits are 0-9 then a-z")
	if err != nil {
		return 0, err
	}
	if *count < 1 {
		return 0, usagef("--count %d: give the number of digits, 1 or more", *count)
	}
	opts, err := af.options()
	if err != nil {
		return 0, err
	}
	if err := out.check(""); err != nil {
		return 0, err
	}
	gzipMode, err := parseGzip(*gz)
	if err != nil {
		return 0, err
	}
	if *raw && *bits {
		return 0, usagef("--raw and --bits exclude each other: bytes are read either as base-256 digits or as bits")
	}
	var bases []int
	if *basesArg != "" {
		if bases, err = parseBases(*basesArg, 256, "2..36, or with --raw 2, 4, 16 and 256"); err != nil {
			return 0, err
		}
	}
	if *raw {
		if bases == nil {
			bases = []int{2, 4, 16, 256}
		}
		for _, rb := range bases {
			if rb != 2 && rb != 4 && rb != 16 && rb != 256 {
				return 0, usagef("--bases %d with --raw: a byte stream regroups exactly into bases 2, 4, 16 and 256; give those", rb)
			}
		}
	}
	doc := reports.Document{Version: version, Command: append([]string{"borel"}, e.args...), Created: reportTime(), Width: out.textWidth(e)}
	for _, name := range fs.Args() {
		rs, err := compareSource(e, name, compareInput{base: b, count: *count, bases: bases, raw: *raw, bits: *bits, gzip: gzipMode}, &af, opts, out.quiet)
		if err != nil {
			return 0, err
		}
		doc.Results = append(doc.Results, rs...)
	}
	data, err := renderComparison(doc, out.format)
	if err != nil {
		return 0, err
	}
	return exitOK, out.publish(e, doc, data)
}

// compareInput is how compare reads its sources: the input options of
// audit.
type compareInput struct {
	base, count int
	bases       []int // several bases (re-expanded text, regrouped bytes, built-ins made in each)
	raw, bits   bool
	gzip        seq.Gzip
}

// compareSource audits one source, a file if it exists, else a built-in
// source, in one base or in each of several.
func compareSource(e env, name string, ci compareInput, af *auditFlags, opts audit.Options, quiet bool) ([]*audit.Result, error) {
	builtin, forced := strings.CutPrefix(name, "builtin:")
	st, err := os.Stat(name)
	isFile := !forced && err == nil && !st.IsDir()
	if isFile {
		if _, err := expand.ParseSource(name); err == nil {
			fmt.Fprintf(e.stderr, "borel: %s is a file here and a built-in source; the file is audited (write builtin:%s for the built-in)\n", name, name)
		}
	}
	if len(ci.bases) > 0 {
		ns, err := af.nullFor(ci.bases[0])
		if err != nil {
			return nil, err
		}
		if err := checkMultiNull(ns, ci.bases); err != nil {
			return nil, err
		}
		opts.Null = ns
		switch {
		case isFile && ci.raw:
			return auditRegrouped(e, name, ci.bases, opts, quiet, ci.gzip)
		case isFile:
			return auditRebased(e, name, ci.base, ci.bases, opts, ci.gzip)
		}
		if _, err := expand.ParseSource(builtin); err != nil {
			return nil, usagef("%q is neither a file nor a built-in source: %v", name, err)
		}
		return auditSource(e, builtin, ci.bases, ci.count, opts, quiet)
	}
	r, err := compareOne(e, name, ci, isFile, builtin, af, opts, quiet)
	if err != nil {
		return nil, err
	}
	return []*audit.Result{r}, nil
}

// compareOne audits one source in one base.
func compareOne(e env, name string, ci compareInput, isFile bool, builtin string, af *auditFlags, opts audit.Options, quiet bool) (*audit.Result, error) {
	base, count := ci.base, ci.count
	if isFile {
		opt := seq.Options{Format: seq.Text, Base: base, Gzip: ci.gzip}
		if ci.bits {
			opt.Format, opt.Base, base = seq.Bits, 2, 2
		}
		ns, err := af.nullFor(base)
		if err != nil {
			return nil, err
		}
		opts.Null = ns
		src, in, closeIn, err := openInput(e, name, opt)
		if err != nil {
			return nil, err
		}
		defer closeIn()
		hint := int64(-1)
		if !src.Compressed {
			hint = src.Bytes
			if ci.bits {
				hint *= 8
			}
		}
		plan, err := audit.NewPlan(base, hint, opts)
		if err != nil {
			return nil, usageError{err.Error()}
		}
		t, err := tallyInput(e, name, in, &src, opt, plan, 0, quiet, nil)
		if err != nil {
			return nil, err
		}
		return plan.Finish(t, src)
	}
	src, err := expand.ParseSource(builtin)
	if err != nil {
		return nil, usagef("%q is neither a file nor a built-in source: %v", name, err)
	}
	b := base
	if src.Base() != 0 {
		b = src.Base()
	}
	if err := checkDigitMemory(src, count, b, digitMemory()); err != nil {
		return nil, err
	}
	d, checks, err := checkedDigits(e, quiet, src, count, 0, b)
	if err != nil {
		return nil, err
	}
	ns, err := af.nullFor(b)
	if err != nil {
		return nil, err
	}
	opts.Null = ns
	return audit.Digits(d, b, audit.Source{Name: builtin, Kind: "built-in", Bytes: -1,
		Parameters: fmt.Sprintf("%d digits in base %d; %s", count, b, src.Detail), Checks: checks}, opts)
}
