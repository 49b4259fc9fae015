package main

import (
	"bytes"
	"fmt"
	"os"
	"runtime/debug"
	"sort"
	"strings"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/seq"
)

const tallyHelp = `Usage: borel tally FILE|- --offset N --max-block K [--base B | --bits | --raw [--word W]] [--null ...] [--workers N] [--quiet] -o SHARD

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
	word := fs.Int("word", 0, "with --raw, also tally the word-level records of words of 8, 16, 24, 32 or 64 bits (the offset counts bytes of the whole stream)")
	endian := fs.String("endian", "little", "byte order of --word: little or big")
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
	if err := checkWordFlags(*word, *endian, fs.Changed("endian"), *raw); err != nil {
		return 0, err
	}
	opts.Word, opts.BigEndian = *word, *endian == "big"
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
	if err := writeShardFile(*output, sh); err != nil {
		return 0, err
	}
	if !*quiet {
		fmt.Fprintf(e.stderr, "borel: digits %d to %d of the sequence tallied into %s\n", *offset, *offset+sh.Tally.N-1, *output)
	}
	return exitOK, nil
}

// writeShardFile writes a shard to path, atomically where path is a
// regular file (writeAtomic's rules).
func writeShardFile(path string, sh *tally.Shard) error {
	var buf bytes.Buffer
	if err := tally.WriteShard(&buf, sh); err != nil {
		return err
	}
	return writeAtomic(path, buf.Bytes())
}

const mergeHelp = `Usage: borel merge SHARD... [--alpha A] [--adjust holm|bh] [--strict] [REPORT OPTIONS]
       borel merge SHARD... --shard FILE

Joins the shards written by borel tally, in offset order whatever the order given, into the
tally of the whole sequence, and audits it: the findings are the same, bit for bit, as one
borel audit of the whole input with the same --max-block. A missing or overlapping stretch, or
shards of different bases, block lengths or nulls, are errors, found from the shards' headers
before any table is read. The shards are then added one at a time, each checked whole and its
tables read straight into the merged ones, so the memory is one tally and one shard's bytes
however many shards there are. With --shard FILE the merged stretch (which need not start at
digit 0) is written as one shard instead of a report: merges in a tree, a group of shards per
job, then one merge of the groups.

Example: one shard merged (with more, list them all):
  $ borel merge /tmp/borel-part0.shard

A group of shards merged into one shard, for a merge of the groups later:
  $ borel merge /tmp/borel-part0.shard -q --shard /tmp/borel-group0.shard
`

func runMerge(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("merge", pflag.ContinueOnError)
	var af auditFlags
	af.register(fs, flAlpha|flAdjust|flStrict, map[string]string{"adjust": "multiple-testing adjustment: holm or bh"})
	var out output
	out.register(fs)
	into := fs.String("shard", "", "write the merged stretch as one shard FILE instead of a report (merges in a tree)")
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
	if *into != "" {
		if out.path != "" || out.plots != "" || out.appendTo != "" || fs.Changed("format") || af.strict {
			return 0, usagef("--shard writes a shard, not a report: -o, --format, --plots, --append and --strict belong to the final merge")
		}
		for _, name := range fs.Args() {
			if sameFile(name, *into) {
				return 0, usagef("--shard %s is one of the shards merged; choose another name", *into)
			}
		}
		if err := checkWritable(*into, "--shard"); err != nil {
			return 0, err
		}
	} else if err := out.check(""); err != nil {
		return 0, err
	}
	// First the headers only: order the shards and check that they fit
	// together before any table is read.
	type named struct {
		name string
		info *tally.ShardInfo
	}
	var shards []named
	for _, name := range fs.Args() {
		f, err := os.Open(name)
		if err != nil {
			return 0, fmt.Errorf("cannot open %s: %v", name, unwrapPathError(err))
		}
		info, err := tally.ReadShardInfo(f, name)
		f.Close()
		if err != nil {
			return 0, err
		}
		shards = append(shards, named{name, info})
	}
	sort.SliceStable(shards, func(i, j int) bool { return shards[i].info.Offset < shards[j].info.Offset })
	first := shards[0]
	if first.info.Offset != 0 && *into == "" {
		return 0, fmt.Errorf("no shard starts at digit 0 (the first begins at %d in %s): a shard is missing (to merge a later stretch into one shard, use --shard FILE)", first.info.Offset, first.name)
	}
	describe := func(s *tally.ShardInfo) string {
		return fmt.Sprintf("base %d, block length %d, %s null", s.Spec.Base, s.Spec.MaxBlock, s.Null.Kind)
	}
	end := first.info.Offset
	var size int64
	for _, n := range shards {
		if describe(n.info) != describe(first.info) || fmt.Sprint(n.info.Null.P) != fmt.Sprint(first.info.Null.P) {
			return 0, fmt.Errorf("%s was tallied with %s, but %s with %s: tally every shard with the same --base, --max-block and --null",
				n.name, describe(n.info), first.name, describe(first.info))
		}
		switch {
		case n.info.Offset > end:
			return 0, fmt.Errorf("digits %d to %d are in no shard (before %s): a shard is missing", end, n.info.Offset-1, n.name)
		case n.info.Offset < end:
			return 0, fmt.Errorf("%s overlaps the shards before it: digits %d to %d are tallied twice", n.name, n.info.Offset, min(end, n.info.Offset+n.info.Length)-1)
		}
		end = n.info.Offset + n.info.Length
		size += n.info.Source.Bytes
	}
	// Then the fold, one shard at a time: the merged tally and the shard
	// being read are all that is held, whatever the number of shards. The
	// collector runs at a quarter of the live heap instead of its whole:
	// 20 shards of 10^7 digits at K = 7 peaked at 930 MB with the default
	// and 600 MB so, in the same time.
	defer debug.SetGCPercent(debug.SetGCPercent(25))
	var merged *tally.Tally
	for _, n := range shards {
		f, err := os.Open(n.name)
		if err != nil {
			return 0, fmt.Errorf("cannot open %s: %v", n.name, unwrapPathError(err))
		}
		if merged == nil {
			s, err := tally.ReadShard(f, n.name)
			f.Close()
			if err != nil {
				return 0, err
			}
			merged = s.Tally
			continue
		}
		_, err = merged.AppendShard(f, n.name)
		f.Close()
		if err != nil {
			return 0, err
		}
	}
	var names []string
	for _, n := range shards {
		names = append(names, n.name)
	}
	if *into != "" {
		sh := &tally.Shard{Writer: "borel " + version, Null: first.info.Null,
			Source: tally.ShardInput{Name: "merge of " + strings.Join(names, ", "), Bytes: size},
			Tally:  merged}
		if err := writeShardFile(*into, sh); err != nil {
			return 0, err
		}
		if !out.quiet {
			fmt.Fprintf(e.stderr, "borel: %s merged into %s (digits %d to %d)\n", plural(len(shards), "shard"), *into, merged.Offset, merged.Offset+merged.N-1)
		}
		return exitOK, nil
	}
	switch first.info.Null.Kind {
	case "vector":
		opts.Null = audit.NullSpec{Kind: checks.Vector, P: first.info.Null.P}
	case "fitted":
		opts.Null = audit.NullSpec{Kind: checks.Fitted}
	}
	plan, err := audit.PlanForSpec(merged.Spec, opts)
	if err != nil {
		return 0, usageError{err.Error()}
	}
	src := audit.Source{Name: plural(len(shards), "shard"), Kind: "shards", Format: "tally", Bytes: -1,
		Parameters: "merged in offset order: " + strings.Join(names, ", ")}
	res, err := plan.Finish(merged, src)
	if err != nil {
		return 0, err
	}
	return out.report(e, []*audit.Result{res}, af.strict)
}
