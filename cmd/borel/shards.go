package main

import (
	"bytes"
	"fmt"
	"os"
	"sort"
	"strings"

	"github.com/spf13/pflag"

	"borel/internal/tally"
	"borel/stats/audit"
	"borel/stats/checks"
	"borel/stats/seq"
)

const tallyHelp = `Usage: borel tally FILE|- --offset N --max-block K [--base B | --bits | --raw] [--null ...] [--workers N] [--quiet] -o SHARD

Tallies one stretch of a long sequence — the digits at global positions N, N+1, … — and
writes its shard: the one-pass sufficient statistics of the stretch, which borel merge joins
exactly. Every shard of one audit needs the same --max-block, --base and --null; a batch
scheduler runs one borel tally per stretch, on any machines, in any order.

Example: the stretch at offset 0 as one shard (each machine tallies its own stretch, with its
own --offset, from its own piece of the file or stream):
  $ borel tally testdata/pi-1e6.txt.gz --offset 0 --max-block 4 -o /tmp/borel-part0.shard
`

func runTally(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("tally", pflag.ContinueOnError)
	offset := fs.Int64("offset", -1, "global position (0-based digit index) of the stretch's first digit; required (0 for the first stretch)")
	fs.Lookup("offset").DefValue = "0" // -1 marks "not given"; the help shows no default
	base := fs.String("base", "10", "base of the text digits, 2..36")
	bits := fs.Bool("bits", false, "read bytes as bits, most significant bit first (base 2)")
	gz := fs.String("gzip", "auto", gzipUsage)
	raw := fs.Bool("raw", false, "read bytes as base-256 digits (one view: the bytes; tally bits with --bits)")
	var af auditFlags
	af.register(fs, flNull|flMaxBlock|flWorkers, map[string]string{
		"null":      "null hypothesis of the audit the shard is for: uniform, fitted or p0,p1,...",
		"max-block": "block length `K`, the same for every shard",
		"workers":   "goroutines for the pass (the shard is the same for any number)"})
	fs.Lookup("max-block").DefValue = "" // required: no automatic choice for a shard
	quiet := fs.BoolP("quiet", "q", false, "no progress line and no closing line on standard error")
	output := fs.StringP("output", "o", "", "the shard file to write")
	if done, err := parseFlags(fs, args, tallyHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if fs.NArg() != 1 {
		return 0, usagef("tally needs one input, a file or - (got %d); see borel tally --help", fs.NArg())
	}
	if *offset < 0 {
		return 0, usagef("tally needs --offset N, the global position of the stretch's first digit (0 for the first)")
	}
	if k, err := parseMaxBlock(af.maxBlock); err != nil || k < 1 || !fs.Changed("max-block") {
		return 0, usagef("tally needs --max-block K, the same for every shard of the audit, so the shards can be merged")
	}
	if *output == "" {
		return 0, usagef("tally needs -o SHARD, the file to write")
	}
	opt := seq.Options{Format: seq.Text}
	var err error
	if opt.Gzip, err = parseGzip(*gz); err != nil {
		return 0, err
	}
	switch {
	case *raw && *bits:
		return 0, usagef("--raw and --bits exclude each other: bytes are read either as base-256 digits or as bits")
	case *raw:
		opt.Format, opt.Base = seq.Raw, 256
	case *bits:
		opt.Format, opt.Base = seq.Bits, 2
	default:
		if opt.Base, err = parseBase(*base, 2, seq.MaxTextBase, "text digits are 0-9 then a-z"); err != nil {
			return 0, err
		}
	}
	opts, err := af.options()
	if err != nil {
		return 0, err
	}
	if opts.Null, err = af.nullFor(opt.Base); err != nil {
		return 0, err
	}
	input := fs.Arg(0)
	if sameFile(input, *output) {
		return 0, usagef("-o %s is the input file; choose another name", *output)
	}
	if err := checkWritable(*output, "-o"); err != nil {
		return 0, err
	}
	plan, err := audit.NewPlan(opt.Base, -1, opts)
	if err != nil {
		return 0, usageError{err.Error()}
	}
	src, in, closeIn, err := openInput(e, input, opt)
	if err != nil {
		return 0, err
	}
	defer closeIn()
	onlyFirst := func(r *seq.Reader) error {
		if r.IntegerPart() != "" && *offset > 0 {
			return fmt.Errorf("%s: an integer part and radix point open this stretch, but only the stretch at offset 0 may have them", src.Name)
		}
		return nil
	}
	t, err := tallyInput(e, input, in, &src, opt, plan, *offset, *quiet, onlyFirst)
	if err != nil {
		return 0, err
	}
	sh := &tally.Shard{Writer: "borel " + version, Null: tally.ShardNull{Kind: opts.Null.Kind.String(), P: opts.Null.P},
		Source: tally.ShardInput{Name: src.Name, Bytes: src.Bytes, SHA256: src.SHA256},
		Tally:  t}
	var buf bytes.Buffer
	if err := tally.WriteShard(&buf, sh); err != nil {
		return 0, err
	}
	if err := writeAtomic(*output, buf.Bytes()); err != nil {
		return 0, err
	}
	if !*quiet {
		fmt.Fprintf(e.stderr, "borel: digits %d to %d of the sequence tallied into %s\n", *offset, *offset+sh.Tally.N-1, *output)
	}
	return exitOK, nil
}

const mergeHelp = `Usage: borel merge SHARD... [--alpha A] [--adjust holm|bh] [--strict] [REPORT OPTIONS]

Joins the shards written by borel tally, in offset order whatever the order given, into the
tally of the whole sequence, and audits it: the findings are the same, bit for bit, as one
borel audit of the whole input with the same --max-block. A missing or overlapping stretch, or
shards of different bases, block lengths or nulls, are errors.

Example: one shard merged (with more, list them all):
  $ borel merge /tmp/borel-part0.shard
`

func runMerge(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("merge", pflag.ContinueOnError)
	var af auditFlags
	af.register(fs, flAlpha|flAdjust|flStrict, map[string]string{"adjust": "multiple-testing adjustment: holm or bh"})
	var out output
	out.register(fs)
	if done, err := parseFlags(fs, args, mergeHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if fs.NArg() < 1 {
		return 0, usagef("merge needs one or more shard files; see borel merge --help")
	}
	opts, err := af.options()
	if err != nil {
		return 0, err
	}
	if err := out.check(""); err != nil {
		return 0, err
	}
	type named struct {
		name string
		s    *tally.Shard
	}
	var shards []named
	for _, name := range fs.Args() {
		f, err := os.Open(name)
		if err != nil {
			return 0, fmt.Errorf("cannot open %s: %v", name, unwrapPathError(err))
		}
		s, err := tally.ReadShard(f, name)
		f.Close()
		if err != nil {
			return 0, err
		}
		shards = append(shards, named{name, s})
	}
	sort.SliceStable(shards, func(i, j int) bool { return shards[i].s.Tally.Offset < shards[j].s.Tally.Offset })
	first := shards[0]
	if first.s.Tally.Offset != 0 {
		return 0, fmt.Errorf("no shard starts at digit 0 (the first begins at %d in %s): a shard is missing", first.s.Tally.Offset, first.name)
	}
	describe := func(s *tally.Shard) string {
		return fmt.Sprintf("base %d, block length %d, %s null", s.Tally.Base, s.Tally.MaxBlock, s.Null.Kind)
	}
	merged := first.s.Tally
	for _, n := range shards[1:] {
		t := n.s.Tally
		if describe(n.s) != describe(first.s) || fmt.Sprint(n.s.Null.P) != fmt.Sprint(first.s.Null.P) {
			return 0, fmt.Errorf("%s was tallied with %s, but %s with %s: tally every shard with the same --base, --max-block and --null",
				n.name, describe(n.s), first.name, describe(first.s))
		}
		end := merged.Offset + merged.N
		switch {
		case t.Offset > end:
			return 0, fmt.Errorf("digits %d to %d are in no shard (before %s): a shard is missing", end, t.Offset-1, n.name)
		case t.Offset < end:
			return 0, fmt.Errorf("%s overlaps the shards before it: digits %d to %d are tallied twice", n.name, t.Offset, min(end, t.Offset+t.N)-1)
		}
		if merged, err = tally.Merge(merged, t); err != nil {
			return 0, err
		}
	}
	switch first.s.Null.Kind {
	case "vector":
		opts.Null = audit.NullSpec{Kind: checks.Vector, P: first.s.Null.P}
	case "fitted":
		opts.Null = audit.NullSpec{Kind: checks.Fitted}
	}
	plan, err := audit.PlanForSpec(merged.Spec, opts)
	if err != nil {
		return 0, usageError{err.Error()}
	}
	var names []string
	var size int64
	for _, n := range shards {
		names = append(names, n.name)
		size += n.s.Source.Bytes
	}
	src := audit.Source{Name: plural(len(shards), "shard"), Kind: "shards", Format: "tally", Bytes: -1,
		Parameters: "merged in offset order: " + strings.Join(names, ", ")}
	res, err := plan.Finish(merged, src)
	if err != nil {
		return 0, err
	}
	return out.report(e, []*audit.Result{res}, af.strict)
}
