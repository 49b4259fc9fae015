package main

import (
	"runtime"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/stats/audit"
)

// The audit options the subcommands share. Each subcommand registers the
// ones it offers (register) and resolves them into audit.Options
// (options, null): one parser for audit, its multi-base path, compare,
// tally and merge.
const (
	flNull = 1 << iota
	flAlpha
	flAdjust
	flMaxBlock
	flMemory
	flSegments
	flSeed
	flWorkers
	flChecks
	flStrict
)

// auditFlags holds the values of the shared audit options.
type auditFlags struct {
	set                                           int // the options registered
	null, alpha, adjust, maxBlock, memory, checks string
	segments, workers                             int
	seed                                          uint64
	strict                                        bool
}

// register adds the options in set to fs; usage replaces the help line of
// an option for this subcommand (by flag name).
func (a *auditFlags) register(fs *pflag.FlagSet, set int, usage map[string]string) {
	a.set = set
	help := func(name, def string) string {
		if u, ok := usage[name]; ok {
			return u
		}
		return def
	}
	if set&flNull != 0 {
		fs.StringVar(&a.null, "null", "uniform", help("null", "null hypothesis: uniform, fitted (vector estimated from the data), or p0,p1,... (one probability per digit)"))
	}
	if set&flAlpha != 0 {
		fs.StringVar(&a.alpha, "alpha", "0.01", help("alpha", "significance level of the verdict"))
	}
	if set&flAdjust != 0 {
		fs.StringVar(&a.adjust, "adjust", "holm", help("adjust", "multiple-testing adjustment: holm (family-wise) or bh (false discovery rate)"))
	}
	if set&flMaxBlock != 0 {
		fs.StringVar(&a.maxBlock, "max-block", "auto", help("max-block", "largest block length k; auto picks the largest with every expected count at least 5"))
	}
	if set&flMemory != 0 {
		fs.StringVar(&a.memory, "memory", "256MiB", help("memory", "memory budget for the count tables"))
	}
	if set&flStrict != 0 {
		fs.BoolVar(&a.strict, "strict", false, help("strict", "exit with status 3 unless the verdict is consistent"))
	}
	if set&flSegments != 0 {
		fs.IntVar(&a.segments, "segments", 0, help("segments", "second level: split into this many segments and test each statistic's segment p-values for uniformity (KS, Anderson–Darling)"))
	}
	if set&flSeed != 0 {
		fs.Uint64Var(&a.seed, "seed", 1, help("seed", "seed of the randomized p-values that discrete statistics give the second level"))
	}
	if set&flWorkers != 0 {
		fs.IntVar(&a.workers, "workers", runtime.GOMAXPROCS(0), help("workers", "goroutines for the pass (the findings are the same for any number)"))
	}
	if set&flChecks != 0 {
		fs.StringVar(&a.checks, "checks", "", help("checks", "run only these checks, e.g. freq,serial (default: all); the pass skips what they do not need"))
	}
}

// options resolves the registered options, except the null (which needs
// the base: null), into audit options; the others keep their defaults.
func (a *auditFlags) options() (audit.Options, error) {
	opts := auditDefaults()
	var err error
	if a.set&flAlpha != 0 {
		if opts.Alpha, err = parseAlpha(a.alpha); err != nil {
			return opts, err
		}
	}
	if a.set&flAdjust != 0 {
		if opts.Adjustment, err = parseAdjust(a.adjust); err != nil {
			return opts, err
		}
	}
	if a.set&flMaxBlock != 0 {
		if opts.MaxBlock, err = parseMaxBlock(a.maxBlock); err != nil {
			return opts, err
		}
	}
	if a.set&flMemory != 0 {
		if opts.MemoryBytes, err = parseSize(a.memory); err != nil {
			return opts, err
		}
	}
	if a.set&flSegments != 0 {
		if a.segments < 0 || a.segments == 1 {
			return opts, usagef("--segments %d: give 2 or more segments (for example 20), or 0 for none", a.segments)
		}
		opts.Segments = a.segments
	}
	if a.set&flSeed != 0 {
		opts.Seed = a.seed
	}
	if a.set&flWorkers != 0 {
		if a.workers < 1 {
			return opts, usagef("--workers %d: give 1 or more", a.workers)
		}
		opts.Workers = a.workers
	}
	if a.set&flChecks != 0 && a.checks != "" {
		opts.Checks = splitList(a.checks)
	}
	return opts, nil
}

// nullFor resolves --null for digits in base b.
func (a *auditFlags) nullFor(b int) (audit.NullSpec, error) {
	if a.set&flNull == 0 {
		return audit.NullSpec{}, nil
	}
	return parseNull(a.null, b)
}
