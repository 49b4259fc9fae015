package audit

import (
	"fmt"
	"runtime"
	"strings"

	"github.com/borel-audit/borel/stats/checks"
)

// NullSpec is the null as the user gave it, before the data are seen.
type NullSpec struct {
	Kind checks.NullKind
	P    []float64 // for Vector
}

// Options holds the tunables of an audit.
type Options struct {
	Alpha       float64    // significance level of the verdict, in (0, 1)
	Adjustment  Adjustment // Holm (default) or BH
	MaxBlock    int        // 0: choose automatically
	MemoryBytes int64      // budget for the count tables
	MinExpected float64    // smallest expected count per cell (rule of thumb 5)
	Null        NullSpec
	Segments    int    // second level: number of segments, 0 for none
	Seed        uint64 // seed of the randomized p-values of discrete statistics
	Workers     int    // goroutines of the pass (results do not depend on it)
	// Word, when not 0, reads a raw byte stream (base 256) as words of
	// this many bits (8, 16, 24, 32 or 64), little-endian unless
	// BigEndian, for the word-level checks (lincomp, rank, rowrank, birthday,
	// wordcoll, hamming, perm) besides the byte-level battery.
	Word      int
	BigEndian bool
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
// expected count 5, uniform null, seed 1, all cores. The zero Options
// means the same: every entry point fills the fields left zero from these.
func DefaultOptions() Options {
	return Options{Alpha: 0.01, Adjustment: Holm, MemoryBytes: 256 << 20, MinExpected: 5, Seed: 1,
		Workers: runtime.GOMAXPROCS(0)}
}

// Source describes where a sequence came from, for the report.
type Source struct {
	Name   string // as the user gave it: a path, "-" or a built-in name
	Kind   string // "file", "stdin" or "built-in"
	Format string // "text", "raw" or "bits"
	// View names, for one of several views of an input read as words,
	// what this audit reads ("top 5 bits of 32-bit words"); empty for the
	// byte regroupings and single audits.
	View        string
	Bytes       int64 // input size in bytes when known, else -1
	Compressed  bool
	IntegerPart string   // dropped integer part, "" when none
	SHA256      string   // hex SHA-256 of the input bytes as read, "" for built-in sources
	Parameters  string   // for a built-in source: how it was made
	Checks      []string // for a computed constant: how its value and digits were checked
}

// withDefaults fills the fields left zero from DefaultOptions, so that the
// zero Options works (Seed 0 is a seed like any other and stays).
func (o Options) withDefaults() Options {
	d := DefaultOptions()
	if o.Alpha == 0 {
		o.Alpha = d.Alpha
	}
	if o.Adjustment == "" {
		o.Adjustment = d.Adjustment
	}
	if o.MemoryBytes == 0 {
		o.MemoryBytes = d.MemoryBytes
	}
	if o.MinExpected == 0 {
		o.MinExpected = d.MinExpected
	}
	if o.Workers == 0 {
		o.Workers = d.Workers
	}
	return o
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
	switch o.Word {
	case 0, 8, 16, 24, 32, 64:
	default:
		return fmt.Errorf("word size %d bits: use 8, 16, 24, 32 or 64", o.Word)
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
