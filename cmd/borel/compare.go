package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"borel/reports"
	"borel/stats/audit"
	"borel/stats/expand"
	"borel/stats/seq"
)

const compareHelp = `Usage: borel compare SOURCE... [options]

Audits several sequences and puts them side by side: one row per source and base, with the
verdict, the smallest adjusted p-value and the check that gave it, the entropy deficit and
the dimension estimate. A SOURCE is a file of digits (as for borel audit) or, when no such
file exists, a built-in source made by borel:

  pi, e, sqrtN (e.g. sqrt2)   decimal digits of the constant, exact (--base 10 only)
  champernowne                Champernowne's constant in the base given by --base
  iid:p0,p1,...               independent digits from the vector (its length is the base)
  pcg:SEED, chacha8:SEED      uniform digits in --base from Go's PCG or ChaCha8 generator

Built-in sources give --count digits (default 100000). Text, Markdown, CSV and LaTeX show the
side-by-side table; json and html carry every audit in full.

Example: two constants against a generator:
  $ borel compare pi sqrt2 chacha8:7 --count 50000
`

func runCompare(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("compare", pflag.ContinueOnError)
	base := fs.String("base", "10", "base of text files and of built-in sources")
	count := fs.Int("count", 100_000, "digits drawn from each built-in source")
	null := fs.String("null", "uniform", "null hypothesis: uniform, fitted, or p0,p1,...")
	alpha := fs.String("alpha", "0.01", "significance level of the verdicts")
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
	if *count < 1 || *count > expand.MaxDigits {
		return 0, usagef("--count %d: give 1 to %d digits", *count, expand.MaxDigits)
	}
	opts := audit.DefaultOptions()
	if opts.Alpha, err = parseAlpha(*alpha); err != nil {
		return 0, err
	}
	if err := out.check(""); err != nil {
		return 0, err
	}
	doc := reports.Document{Version: version, Command: append([]string{"borel"}, e.args...), Created: reportTime()}
	for _, name := range fs.Args() {
		res, err := compareOne(e, name, b, *count, *null, opts)
		if err != nil {
			return 0, err
		}
		doc.Results = append(doc.Results, res)
	}
	var data []byte
	switch out.format {
	case "json", "html":
		data, err = render(doc, out.format)
	default:
		var buf bytes.Buffer
		err = reports.Comparison(&buf, doc, out.format)
		data = buf.Bytes()
	}
	if err != nil {
		return 0, err
	}
	return exitOK, out.publish(e, doc, data)
}

// compareOne audits one source: a file if it exists, else a built-in source.
func compareOne(e env, name string, base, count int, nullArg string, opts audit.Options) (*audit.Result, error) {
	if st, err := os.Stat(name); err == nil && !st.IsDir() {
		ns, err := parseNull(nullArg, base)
		if err != nil {
			return nil, err
		}
		opts.Null = ns
		src, in, closeIn, err := openInput(e, name, seq.Options{Format: seq.Text, Base: base})
		if err != nil {
			return nil, err
		}
		defer closeIn()
		hint := int64(-1)
		if !src.Compressed {
			hint = src.Bytes
		}
		plan, err := audit.NewPlan(base, hint, opts)
		if err != nil {
			return nil, usageError{err.Error()}
		}
		hash := sha256.New()
		r, err := seq.NewReader(io.TeeReader(in, hash), seq.Options{Format: seq.Text, Base: base, Source: name})
		if err != nil {
			return nil, err
		}
		t, err := plan.Tally(r)
		if err != nil {
			return nil, err
		}
		src.Compressed, src.IntegerPart = r.Compressed(), r.IntegerPart()
		src.SHA256 = hex.EncodeToString(hash.Sum(nil))
		return plan.Finish(t, src)
	}
	d, b, params, err := builtinDigits(name, base, count)
	if err != nil {
		return nil, err
	}
	ns, err := parseNull(nullArg, b)
	if err != nil {
		return nil, err
	}
	opts.Null = ns
	return audit.Digits(d, b, audit.Source{Name: name, Kind: "built-in", Bytes: -1, Parameters: params}, opts)
}

// builtinDigits makes the digits of a built-in source.
func builtinDigits(name string, base, count int) ([]byte, int, string, error) {
	kind, arg, _ := strings.Cut(name, ":")
	needDecimal := func() error {
		if base != 10 {
			return usagef("%s: digits of constants are computed in base 10 only in this version (--base %d asked)", name, base)
		}
		return nil
	}
	switch {
	case kind == "pi":
		if err := needDecimal(); err != nil {
			return nil, 0, "", err
		}
		d, err := expand.Pi(count)
		return d, 10, fmt.Sprintf("first %d decimals, exact (Machin's formula)", count), err
	case kind == "e":
		if err := needDecimal(); err != nil {
			return nil, 0, "", err
		}
		d, err := expand.E(count)
		return d, 10, fmt.Sprintf("first %d decimals, exact (series Σ 1/k!)", count), err
	case strings.HasPrefix(kind, "sqrt") && arg == "":
		m, err := strconv.ParseInt(strings.TrimPrefix(kind, "sqrt"), 10, 64)
		if err != nil || m <= 0 {
			return nil, 0, "", usagef("%s: write sqrtN with a positive integer N, e.g. sqrt2", name)
		}
		if err := needDecimal(); err != nil {
			return nil, 0, "", err
		}
		d, err := expand.Sqrt(m, count)
		if err != nil {
			return nil, 0, "", usagef("%s: %v", name, err)
		}
		return d, 10, fmt.Sprintf("first %d decimals, exact (integer square root)", count), nil
	case kind == "champernowne":
		return expand.Champernowne(count, base), base, fmt.Sprintf("first %d digits in base %d", count, base), nil
	case kind == "iid":
		p, err := parseVector(arg)
		if err != nil {
			return nil, 0, "", usagef("%s: %v", name, err)
		}
		if len(p) < 2 || len(p) > seq.MaxTextBase {
			return nil, 0, "", usagef("%s: give 2 to 36 probabilities", name)
		}
		if _, err := parseNull(arg, len(p)); err != nil {
			return nil, 0, "", err
		}
		rng := rand.New(rand.NewPCG(1, uint64(len(p))))
		return expand.IID(count, p, rng), len(p), fmt.Sprintf("%d independent digits from (%s), PCG(1, %d)", count, arg, len(p)), nil
	case kind == "pcg" || kind == "chacha8":
		seed, err := strconv.ParseUint(arg, 10, 64)
		if err != nil {
			return nil, 0, "", usagef("%s: write %s:SEED with a non-negative integer seed", name, kind)
		}
		var rng *rand.Rand
		if kind == "pcg" {
			rng = rand.New(rand.NewPCG(seed, 0))
		} else {
			var key [32]byte
			copy(key[:], strconv.FormatUint(seed, 10))
			rng = rand.New(rand.NewChaCha8(key))
		}
		d := make([]byte, count)
		for i := range d {
			d[i] = byte(rng.IntN(base))
		}
		return d, base, fmt.Sprintf("%d uniform digits from Go's %s, seed %d", count, strings.ToUpper(kind), seed), nil
	case kind == "ln2" || kind == "phi" || kind == "copeland-erdos" || kind == "stoneham" || kind == "rational" || kind == "liouville" || kind == "lcg":
		return nil, 0, "", usagef("built-in source %q is not available in this version; give a file of its digits", name)
	}
	return nil, 0, "", usagef("%q is neither a file nor a built-in source (pi, e, sqrtN, champernowne, iid:p0,p1,..., pcg:SEED, chacha8:SEED)", name)
}
