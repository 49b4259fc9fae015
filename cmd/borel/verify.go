package main

import (
	"fmt"
	"math"
	"math/bits"
	"math/rand/v2"
	"os"
	"slices"
	"strings"
	"time"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/stats/expand"
	"github.com/borel-audit/borel/stats/seq"
)

const verifyHelp = `Usage: borel verify FILE --source SOURCE [--base B] [--spots N] [--span L] [--seed S] [--all]
                    [--method auto|series|extract] [--memory SIZE]

Checks that a file of digits holds the digits of SOURCE (a constant or a reference generator, as
in borel digits) before anyone audits it. Spot mode (the default) compares stretches of --span
digits at the file's first and last digits and at --spots positions drawn with --seed, and says
which stretches disagree (and, where it sees one, that the file is the source shifted by a digit
or two). --all compares every digit.

What spots can and cannot catch: a file of another constant, a shifted file, or one whose second
half comes from elsewhere disagrees at nearly every spot in the affected part, so 64 spots miss it
only by a chance of about (1 − f)^64 for an affected fraction f. A single changed digit is found
only if a spot lands on it: with N spots of L digits in n digits, a chance of about N·L/n. Use
--all to rule that out.

The expected digits come by digit extraction (pi and ln2 in bases 2, 4, 8 and 16: each spot on its
own, in constant memory, at a cost that grows with its position) or by computing every digit up to
the last spot (every source; memory grows with the file's length). auto picks the cheaper one that
fits in --memory. Exit status 3 when any digit disagrees.

Example: make a file of pi's first 100 000 hexadecimal digits, then check it at 64 random spots:
  $ borel digits pi --base 16 --count 100000 -q -o pi16.txt
  $ borel verify pi16.txt --source pi --base 16
  ...
  agrees: all 66 stretches of 16 digits match pi in base 16 (1056 of 100000 digits compared)
`

func runVerify(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("verify", pflag.ContinueOnError)
	source := fs.String("source", "", "what the file should hold: a source of borel digits (pi, e, sqrt2, ln2, chacha8:SEED, …)")
	base := fs.String("base", "10", "base of the file's digits, 2..36")
	spots := fs.Int("spots", 64, "number of random positions to check, besides the first and last digits")
	span := fs.Int("span", 16, "digits compared at each spot")
	seed := fs.Uint64("seed", 1, "seed of the spot positions")
	all := fs.Bool("all", false, "compare every digit instead of spots")
	method := fs.String("method", "auto", "auto, series (compute every digit up to the last spot) or extract (digit extraction at each spot)")
	memory := fs.String("memory", sizeString(digitMemory()), "refuse to compute digits that would need more memory than this")
	gz := fs.String("gzip", "auto", gzipUsage)
	quiet := fs.BoolP("quiet", "q", false, "say nothing on standard error")
	if done, err := parseFlags(fs, args, verifyHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if fs.NArg() != 1 {
		return 0, usagef("verify needs one file (got %d); see borel verify --help", fs.NArg())
	}
	input := fs.Arg(0)
	if input == "-" {
		return 0, usagef("verify reads its file twice (once to count the digits, once to compare them), so it needs a file, not standard input")
	}
	if *source == "" {
		return 0, usagef("verify needs --source, what the file should hold (e.g. --source pi)")
	}
	if st, err := os.Stat(input); err == nil && st.IsDir() {
		return 0, usagef("%s is a directory; give a file of digits", input)
	}
	src, err := expand.ParseSource(*source)
	if err != nil {
		return 0, usageError{"--source: " + err.Error()}
	}
	b, err := parseBase(*base, 2, seq.MaxTextBase, "text digits are 0-9 then a-z")
	if err != nil {
		return 0, err
	}
	if !fs.Changed("base") && src.Base() != 0 {
		b = src.Base()
	}
	if src.Base() != 0 && b != src.Base() {
		return 0, usagef("source %s makes base-%d digits; --base %d does not fit", src.Name, src.Base(), b)
	}
	if *spots < 0 || *span < 1 {
		return 0, usagef("--spots must not be negative and --span must be 1 or more")
	}
	if *method != "auto" && *method != "series" && *method != "extract" {
		return 0, usagef("--method %q: choose auto, series or extract", *method)
	}
	if *method == "extract" && !src.CanExtract(b) {
		return 0, usagef("--method extract: digit extraction gives pi and ln2 in bases 2, 4, 8 and 16, not %s in base %d; use --method series", src.Name, b)
	}
	if *all && *method == "extract" {
		return 0, usagef("--all compares every digit, which extraction (one stretch at a time) does not serve; use --method series or auto")
	}
	limit, err := parseSize(*memory)
	if err != nil {
		return 0, err
	}
	gzipMode, err := parseGzip(*gz)
	if err != nil {
		return 0, err
	}
	opt := seq.Options{Format: seq.Text, Base: b, Gzip: gzipMode}
	start := time.Now()

	// Pass 1: the file's length in digits.
	var n int64
	var intPart string
	err = scanFile(e, input, opt, func(r *seq.Reader) { n += int64(len(r.Digits())) }, func(r *seq.Reader) { intPart = r.IntegerPart() })
	if err != nil {
		return 0, err
	}
	if n == 0 {
		return 0, fmt.Errorf("%s holds no base-%d digits", input, b)
	}

	// The stretches to compare.
	var stretches []stretch
	if *all {
		stretches = []stretch{{0, n}}
	} else {
		L := min(int64(*span), n)
		if src.CanExtract(b) && *method != "series" {
			L = min(L, int64(expand.MaxExtractDigits/digitBits(b)))
		}
		rng := rand.New(rand.NewPCG(*seed, 0x766572696679)) // "verify"
		starts := []int64{0, n - L}
		for range *spots {
			starts = append(starts, rng.Int64N(n-L+1))
		}
		slices.Sort(starts)
		starts = slices.Compact(starts)
		for _, s := range starts {
			stretches = append(stretches, stretch{s, L})
		}
	}

	// Pass 2: the file's digits in the stretches.
	got := make([][]byte, len(stretches))
	var mismatches []int64 // --all: the first positions that differ
	var differ int64
	var want []byte // the source's digits, from its start (series)
	extract := !*all && src.CanExtract(b) && *method != "series"
	how := ""
	if extract && *method == "auto" {
		extract = preferExtraction(src, b, stretches, n, limit)
	}
	if !extract {
		end := stretches[len(stretches)-1].end() + 2 // two more digits: the shift hint looks past the end
		if err := checkDigitMemory(src, int(end), b, limit); err != nil {
			return 0, err
		}
		var checks []string
		want, checks, err = checkedDigits(e, *quiet, src, int(end), 0, b)
		if err != nil {
			return 0, err
		}
		how = "every digit computed up to the last one compared"
		if len(checks) > 0 {
			how += "; " + strings.Join(checks, "; ")
		}
	} else {
		how = "digit extraction at each spot (Bailey, Borwein & Plouffe 1997), every digit certified"
	}
	var pos int64
	i := 0
	err = scanFile(e, input, opt, func(r *seq.Reader) {
		d := r.Digits()
		if *all {
			for j, x := range d {
				if x != want[pos+int64(j)] {
					differ++
					if len(mismatches) < 10 {
						mismatches = append(mismatches, pos+int64(j))
					}
				}
			}
			pos += int64(len(d))
			return
		}
		for i < len(stretches) && stretches[i].start < pos+int64(len(d)) {
			s := stretches[i]
			for p := max(s.start, pos); p < min(s.end(), pos+int64(len(d))); p++ {
				got[i] = append(got[i], d[p-pos])
			}
			if s.end() > pos+int64(len(d)) {
				break // the stretch goes on in the next chunk
			}
			i++
		}
		pos += int64(len(d))
	}, nil)
	if err != nil {
		return 0, err
	}
	if pos != n && !*all {
		return 0, fmt.Errorf("%s changed between its two readings (%d digits, then %d); nothing was compared: give a file that is not being written", input, n, pos)
	}

	w := e.stdout
	fmt.Fprintf(w, "borel verify of %s against %s in base %d\n", input, src.Name, b)
	fmt.Fprintf(w, "  file       %d base-%d digits", n, b)
	if intPart != "" {
		fmt.Fprintf(w, " after the integer part %q (not compared)", intPart)
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "  expected   %s\n", how)
	if *all {
		fmt.Fprintf(w, "  compared   every digit\n\n")
		if differ == 0 {
			fmt.Fprintf(w, "agrees: all %d digits match %s in base %d\n", n, src.Name, b)
			return exitOK, nil
		}
		var list []string
		for _, p := range mismatches {
			list = append(list, fmt.Sprint(p+1))
		}
		more := ""
		if differ > int64(len(mismatches)) {
			more = ", …"
		}
		fmt.Fprintf(w, "DISAGREES: %d of %d digits differ from %s in base %d, at digits %s%s\n", differ, n, src.Name, b, strings.Join(list, ", "), more)
		return exitVerdict, nil
	}
	fmt.Fprintf(w, "  compared   %d stretches of up to %d digits: the first and last digits and %d spots drawn with seed %d\n\n",
		len(stretches), stretches[0].n, *spots, *seed)
	fmt.Fprintf(w, "  %-12s  %-*s  %-*s  %s\n", "from digit", int(stretches[0].n), "file", int(stretches[0].n), src.Name, "")
	bad, firstBad := 0, int64(-1)
	compared := int64(0)
	for k, s := range stretches {
		lo := max(s.start-2, 0)
		var exp []byte
		if extract {
			exp, _, err = src.ExtractDigits(b, uint64(lo), int(s.end()+2-lo))
			if err != nil {
				return 0, err
			}
		} else {
			exp = want[lo:min(s.end()+2, int64(len(want)))]
		}
		at := int(s.start - lo)
		exact := exp[at : at+int(s.n)]
		compared += s.n
		status := "agrees"
		if string(got[k]) != string(exact) {
			bad++
			if firstBad < 0 {
				firstBad = s.start
			}
			status = "DIFFERS" + shiftHint(got[k], exp, at)
		}
		fmt.Fprintf(w, "  %-12d  %s  %s  %s\n", s.start+1, digitText(got[k]), digitText(exact), status)
	}
	fmt.Fprintln(w)
	if !*quiet {
		fmt.Fprintf(e.stderr, "borel: verified %d stretches in %.2f s\n", len(stretches), time.Since(start).Seconds())
	}
	if bad == 0 {
		fmt.Fprintf(w, "agrees: all %d stretches of %d digits match %s in base %d (%d of %d digits compared)\n",
			len(stretches), stretches[0].n, src.Name, b, compared, n)
		if compared < n {
			fmt.Fprintf(w, "(a changed digit elsewhere is found only if a spot lands on it; --all compares every digit)\n")
		}
		return exitOK, nil
	}
	fmt.Fprintf(w, "DISAGREES: %d of %d stretches differ from %s in base %d; the first from digit %d\n", bad, len(stretches), src.Name, b, firstBad+1)
	return exitVerdict, nil
}

// stretch is a run of n digits from position start (0 the first after the
// point).
type stretch struct{ start, n int64 }

func (s stretch) end() int64 { return s.start + s.n }

// digitBits is the number of binary digits in a digit of base b (a power
// of 2).
func digitBits(b int) int { return bits.TrailingZeros(uint(b)) }

// digitText writes digit values as 0-9a-z.
func digitText(d []byte) string {
	return strings.TrimSuffix(string(formatDigits(d, 0)), "\n")
}

// shiftHint says when the file's stretch is the source's moved by one or
// two digits: exp holds the source from two digits before the stretch
// (at is the stretch's place in it) to two after.
func shiftHint(got, exp []byte, at int) string {
	for _, s := range []int{1, -1, 2, -2} {
		lo, hi := at+s, at+s+len(got)
		if lo < 0 || hi > len(exp) {
			continue
		}
		if string(exp[lo:hi]) == string(got) {
			if s > 0 {
				return fmt.Sprintf(" (the source from %d digit%s later: the file lacks %s before here)", s, plur(s), digitCount(s))
			}
			return fmt.Sprintf(" (the source from %d digit%s earlier: the file has %s too many before here)", -s, plur(-s), digitCount(-s))
		}
	}
	return ""
}

func plur(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

func digitCount(n int) string {
	if n == 1 {
		return "a digit"
	}
	return fmt.Sprintf("%d digits", n)
}

// preferExtraction says whether extraction at each stretch is the better
// way to the expected digits: when computing every digit up to the last
// stretch would not fit in limit, or would take longer. The costs are
// rough measures of this program on a 2-core machine, and only their ratio
// matters: extraction about 0.13 µs a hexadecimal position a stretch (one
// modular power of 4 a position), the series about 1.3 µs a hexadecimal
// digit (binary splitting and conversion).
func preferExtraction(src expand.Source, b int, stretches []stretch, n int64, limit int64) bool {
	end := stretches[len(stretches)-1].end() + 2
	if src.MemoryEstimate(int(end), b) > float64(limit) {
		return true
	}
	j := float64(digitBits(b))
	ext := 0.0
	for _, s := range stretches {
		ext += 0.13e-6 * float64(s.start) * j / 4
	}
	series := 1.3e-6 * float64(end) * j / 4 * math.Max(1, math.Log2(float64(end))/20)
	return ext < series
}

// scanFile reads a file of digits with the given options, calling each for
// every chunk and first (if not nil) once the reader is open.
func scanFile(e env, input string, opt seq.Options, each func(*seq.Reader), first func(*seq.Reader)) error {
	src, in, closeIn, err := openInput(e, input, opt)
	if err != nil {
		return err
	}
	defer closeIn()
	opt.Source = src.Name
	r, err := newReader(in, opt)
	if err != nil {
		return err
	}
	if first != nil {
		first(r)
	}
	for r.Scan() {
		each(r)
	}
	return r.Err()
}
