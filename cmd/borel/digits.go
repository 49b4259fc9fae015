package main

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"math/big"
	"os"
	"runtime/debug"
	"time"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/stats/expand"
	"github.com/borel-audit/borel/stats/seq"
)

const digitsHelp = `Usage: borel digits SOURCE --count N [--base B] [--offset K] [--method M] [--wrap W] [-o OUT]

Writes the fractional digits of a constant, or the output of a reference generator, to standard
output (what it did goes to standard error). Constants are computed exactly in any base 2..36
(and 256, written as raw bytes), with a bound on the error, and checked before any digit is
printed: the value by a method that shares nothing with its computation (pi and ln2 by digit
extraction at the end of the computed bits, e by re-evaluating its series modulo a prime, square
roots by squaring back, Stoneham terms by multiplying back), and the digits against the value by
one exact product. A digit too close to a boundary is recomputed with more precision; a failed
check is an error, and nothing is printed. Standard error says what was checked.

Digits far out: pi and ln2 in bases 2, 4, 8 and 16 are also computed at any offset by digit
extraction (Bailey, Borwein & Plouffe 1997; Bellard's formula for pi), without the digits before
them and in constant memory, up to 896 binary digits at a time; every digit is certified by the
error bound of the sums. --method extract asks for it, --method series for the whole computation;
auto (the default) extracts when the offset is at least 8 times the count.

Sources: pi, e, sqrtN (e.g. sqrt2), ln2, phi, champernowne, copeland-erdos, stoneham:B,C
(coprime B, C ≥ 2), rational:P/Q, liouville; generators iid:p0,p1,..., pcg:SEED, chacha8:SEED and
lcg:SEED (RANDU, deliberately weak).

Example: 1000 digits of pi in base 7, then 100 000 of them audited in base 7:
  $ borel digits pi --base 7 --count 1000
  ...
  borel digits pi --base 7 --count 100000 | borel audit --base 7 -

Example: the 32 hexadecimal digits of pi after its first 10 million (about 3 s on two cores):
  $ borel digits pi --base 16 --offset 10000000 --count 32
  7af5863efed8de97033cd0f6b80a3d26
`

func runDigits(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("digits", pflag.ContinueOnError)
	base := fs.String("base", "10", "base of the digits: 2..36 (text) or 256 (raw bytes)")
	count := fs.Int("count", 0, "number of digits")
	offset := fs.Int("offset", 0, "skip this many digits after the point first")
	wrap := fs.Int("wrap", 0, "break lines after this many digits (0: one line)")
	method := fs.String("method", "auto", "auto, series (compute every digit up to the last) or extract (digit extraction: pi and ln2 in bases 2, 4, 8, 16)")
	memory := fs.String("memory", sizeString(digitMemory()), "refuse requests that would need more memory than this; the default is three quarters of this machine's memory")
	output := fs.StringP("output", "o", "", "write the digits to this file (atomically) instead of standard output")
	quiet := fs.BoolP("quiet", "q", false, "say nothing on standard error")
	if done, err := parseFlags(fs, args, digitsHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if fs.NArg() != 1 {
		return 0, usagef("digits needs one source (got %d); see borel digits --help", fs.NArg())
	}
	src, err := expand.ParseSource(fs.Arg(0))
	if err != nil {
		return 0, usageError{err.Error()}
	}
	b := 10
	if *base == "256" {
		b = 256
	} else if b, err = parseBase(*base, 2, seq.MaxTextBase, "or 256 for raw bytes"); err != nil {
		return 0, err
	}
	if !fs.Changed("base") && src.Base() != 0 {
		b = src.Base()
	}
	if !fs.Changed("count") {
		return 0, usagef("digits needs --count N, the number of digits to write")
	}
	if *count < 1 {
		return 0, usagef("--count %d: give the number of digits, 1 or more", *count)
	}
	if *output != "" && *output != "-" {
		if err := checkWritable(*output, "-o"); err != nil {
			return 0, err
		}
	}
	if *offset < 0 || *wrap < 0 {
		return 0, usagef("--offset and --wrap must not be negative")
	}
	limit, err := parseSize(*memory)
	if err != nil {
		return 0, err
	}
	extract, err := useExtraction(src, *method, b, *offset, *count)
	if err != nil {
		return 0, err
	}
	if !extract && !src.Streams() {
		if err := checkDigitMemory(src, *count+*offset, b, limit); err != nil {
			return 0, err
		}
	}
	start := time.Now()
	if !extract && src.Streams() {
		// A generator's digits go out as they are made, 1 MiB at a time:
		// memory does not grow with --count.
		write := func(w io.Writer) error { return streamDigits(w, src, *count, *offset, b, *wrap) }
		var err error
		if *output != "" && *output != "-" {
			err = writeAtomicFunc(*output, write)
		} else {
			err = write(e.stdout)
		}
		if err != nil {
			return 0, err
		}
		if !*quiet {
			fmt.Fprintf(e.stderr, "borel: %d digits of %s in base %d (digits %d to %d after the point) in %.2f s, streamed; %s\n",
				*count, src.Name, b, *offset+1, *offset+*count, time.Since(start).Seconds(), src.Detail)
		}
		return exitOK, nil
	}
	var d []byte
	var checks []string
	if extract {
		var how string
		esrc := src
		p := newProgress(e, *quiet, -1)
		if p != nil {
			what := fmt.Sprintf("%s in base %d after digit %d", src.Name, b, *offset)
			esrc = src.WithMeter(func(phase string, done float64) { p.phase(what, phase, done) })
		}
		d, how, err = esrc.ExtractDigits(b, uint64(*offset), *count)
		p.done() // the line goes before anything else is written
		checks = []string{how}
	} else {
		d, checks, err = checkedDigits(e, *quiet, src, *count, *offset, b)
	}
	if err != nil {
		return 0, err
	}
	var data []byte
	if b == 256 {
		data = d
	} else {
		data = formatDigits(d, *wrap)
	}
	if err := emit(e, *output, data); err != nil {
		return 0, err
	}
	if !*quiet {
		how := src.Detail
		if extract {
			how = "by digit extraction, without the digits before them"
		}
		fmt.Fprintf(e.stderr, "borel: %d digits of %s in base %d (digits %d to %d after the point) in %.2f s; %s\n",
			len(d), src.Name, b, *offset+1, *offset+len(d), time.Since(start).Seconds(), how)
		for _, c := range checks {
			fmt.Fprintf(e.stderr, "borel: checked: %s\n", c)
		}
	}
	return exitOK, nil
}

// useExtraction says whether the digits come by digit extraction: asked
// for (--method extract, an error where it does not apply), or chosen
// (auto) where it applies and the offset is at least 8 times the count, so
// that one sum far out is cheaper than every digit before it.
func useExtraction(src expand.Source, method string, base, offset, count int) (bool, error) {
	bitsPer := digitBits(base)
	fits := src.CanExtract(base) && count*bitsPer <= expand.MaxExtractDigits
	switch method {
	case "series":
		return false, nil
	case "extract":
		if !src.CanExtract(base) {
			return false, usagef("--method extract: digit extraction gives pi and ln2 in bases 2, 4, 8 and 16, not %s in base %d; use --method series", src.Name, base)
		}
		if !fits {
			return false, usagef("--method extract gives at most %d base-%d digits at a time (--count %d); ask for fewer, or run it once per stretch", expand.MaxExtractDigits/bitsPer, base, count)
		}
		if uint64(offset)*uint64(bitsPer) > expand.MaxExtractPosition {
			return false, usagef("--offset %d: digit extraction reaches binary position 2^40 (base-%d digit %d); ask for an earlier offset", offset, base, expand.MaxExtractPosition/uint64(bitsPer))
		}
		return true, nil
	case "auto":
		return fits && offset >= 8*count && uint64(offset)*uint64(bitsPer) <= expand.MaxExtractPosition, nil
	}
	return false, usagef("--method %q: choose auto, series or extract", method)
}

// checkDigitMemory refuses, before any work, a request whose digits would
// need more memory than limit, saying how much it would need.
func checkDigitMemory(src expand.Source, n, base int, limit int64) error {
	if need := src.MemoryEstimate(n, base); need > float64(limit) {
		return usagef("%d digits of %s in base %d need about %s of memory, over the bound of %s (--memory); ask for fewer digits or raise --memory if the machine has it",
			n, src.Name, base, mib(need), mib(float64(limit)))
	}
	return nil
}

// streamDigits writes a streaming source's digits to w as formatDigits
// would write them all at once (raw bytes in base 256), chunk by chunk.
func streamDigits(w io.Writer, src expand.Source, count, offset, base, wrap int) error {
	const alphabet = "0123456789abcdefghijklmnopqrstuvwxyz"
	col, written := 0, 0
	out := make([]byte, 0, 2<<20)
	err := src.Stream(count, offset, base, func(d []byte) error {
		if base == 256 {
			_, err := w.Write(d)
			return err
		}
		out = out[:0]
		for _, x := range d {
			out = append(out, alphabet[x])
			col++
			written++
			if wrap > 0 && col == wrap && written < count {
				out = append(out, '\n')
				col = 0
			}
		}
		_, err := w.Write(out)
		return err
	})
	if err != nil || base == 256 {
		return err
	}
	_, err = w.Write([]byte{'\n'})
	return err
}

// formatDigits writes digit values as 0-9a-z, one line or wrapped.
func formatDigits(d []byte, wrap int) []byte {
	const alphabet = "0123456789abcdefghijklmnopqrstuvwxyz"
	out := make([]byte, 0, len(d)+len(d)/max(wrap, 1)+1)
	for i, x := range d {
		out = append(out, alphabet[x])
		if wrap > 0 && (i+1)%wrap == 0 && i+1 < len(d) {
			out = append(out, '\n')
		}
	}
	return append(out, '\n')
}

func mib(bytes float64) string { return fmt.Sprintf("%.0f MiB", math.Ceil(bytes/(1<<20))) }

const rebaseHelp = `Usage: borel rebase --from A --to B [FILE|-] [--wrap W] [-o OUT]

Re-expands a digit string exactly into another base. n digits in base A fix a number only to
within A^-n: borel prints exactly the base-B digits that every number in that interval shares
(the common prefix of the two ends' expansions), and says on standard error how many. An integer
part before a radix point is converted exactly and printed before the point.

Example: the 10^6 decimals of pi in the test data into base 3 (2 095 902 ternary digits):
  $ borel rebase --from 10 --to 3 testdata/pi-1e6.txt.gz
`

func runRebase(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("rebase", pflag.ContinueOnError)
	from := fs.String("from", "", "base of the input digits, 2..36")
	to := fs.String("to", "", "base of the output digits, 2..36")
	wrap := fs.Int("wrap", 0, "break lines after this many digits (0: one line)")
	output := fs.StringP("output", "o", "", "write the digits to this file (atomically) instead of standard output")
	quiet := fs.BoolP("quiet", "q", false, "say nothing on standard error")
	if done, err := parseFlags(fs, args, rebaseHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if *from == "" || *to == "" {
		return 0, usagef("rebase needs --from and --to; see borel rebase --help")
	}
	a, err := parseBase(*from, 2, seq.MaxTextBase, "text digits are 0-9 then a-z")
	if err != nil {
		return 0, usageError{"--from: " + err.Error()}
	}
	b, err := parseBase(*to, 2, seq.MaxTextBase, "text digits are 0-9 then a-z")
	if err != nil {
		return 0, usageError{"--to: " + err.Error()}
	}
	input := "-"
	if fs.NArg() == 1 {
		input = fs.Arg(0)
	} else if fs.NArg() > 1 {
		return 0, usagef("rebase takes one input (got %d)", fs.NArg())
	}
	if sameFile(input, *output) {
		return 0, usagef("-o %s is the input file; choose another name", *output)
	}
	if *output != "" && *output != "-" {
		if err := checkWritable(*output, "-o"); err != nil {
			return 0, err
		}
	}
	d, intPart, err := readAllDigits(e, input, a)
	if err != nil {
		return 0, err
	}
	// The collector at 25 % instead of 100 %: dead transforms would pile up
	// to twice the live heap (3.3 GB resident at 10^8 decimals into base 3,
	// 1.5 GB like this, in the same time).
	defer debug.SetGCPercent(debug.SetGCPercent(25))
	n := len(d)
	got := expand.Rebase(d, a, b) // d is not read after: the collector may take it
	data := formatDigits(got, *wrap)
	if intPart != "" {
		iv, _ := new(big.Int).SetString(intPart, a)
		data = append([]byte(iv.Text(b)+"."), data...)
	}
	if err := emit(e, *output, data); err != nil {
		return 0, err
	}
	if !*quiet {
		fmt.Fprintf(e.stderr, "borel: %d base-%d digits determine %d base-%d digits\n", n, a, len(got), b)
	}
	return exitOK, nil
}

// readAllDigits reads a whole digit sequence (rebase needs the whole number).
func readAllDigits(e env, input string, base int) ([]byte, string, error) {
	var in io.Reader = e.stdin
	name := "stdin"
	if input != "-" {
		f, err := os.Open(input)
		if err != nil {
			return nil, "", fmt.Errorf("cannot open %s: %v", input, unwrapPathError(err))
		}
		defer f.Close()
		if st, err := f.Stat(); err == nil && st.IsDir() {
			return nil, "", fmt.Errorf("%s is a directory; give a file of digits, or - for standard input", input)
		}
		in, name = bufio.NewReader(f), input
	}
	// rebase's input base is its --from.
	opt := seq.Options{Source: name, Base: base, OptionName: func(o string) string {
		if o == "Base" {
			return "--from"
		}
		return flagName(o)
	}}
	r, err := seq.NewReader(in, opt)
	if err != nil {
		return nil, "", err
	}
	var d []byte
	for r.Scan() {
		d = append(d, r.Digits()...)
	}
	return d, r.IntegerPart(), r.Err()
}
