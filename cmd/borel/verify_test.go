package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/borel-audit/borel/stats/expand"
)

// digitsOf runs borel digits and returns its output without the newline.
func digitsOf(t *testing.T, args ...string) string {
	t.Helper()
	code, out, errs := borel(t, "", append([]string{"digits", "--quiet"}, args...)...)
	if code != 0 {
		t.Fatalf("digits %v: exit %d: %s", args, code, errs)
	}
	return strings.TrimSpace(out)
}

// Digit extraction and the series give the same digits of π and ln 2 in
// every base extraction serves, and --method refuses what it cannot do.
func TestDigitsExtractionMatchesSeries(t *testing.T) {
	for _, c := range []struct{ src, base, offset, count string }{
		{"pi", "16", "5000", "40"}, {"pi", "8", "6667", "50"}, {"pi", "4", "9999", "60"},
		{"pi", "2", "20001", "200"}, {"ln2", "2", "30000", "150"}, {"ln2", "16", "7001", "30"},
	} {
		ext := digitsOf(t, c.src, "--base", c.base, "--offset", c.offset, "--count", c.count, "--method", "extract")
		ser := digitsOf(t, c.src, "--base", c.base, "--offset", c.offset, "--count", c.count, "--method", "series")
		if ext != ser || len(ext) == 0 {
			t.Errorf("%s base %s at %s: extraction %s, series %s", c.src, c.base, c.offset, ext, ser)
		}
	}
	_, _, errs := borel(t, "", "digits", "pi", "--base", "16", "--offset", "10000000", "--count", "8")
	if !strings.Contains(errs, "by digit extraction, without the digits before them") || !strings.Contains(errs, "every value within that bound has these digits") {
		t.Errorf("auto far out does not extract, or does not say how it certified: %s", errs)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"e", "--base", "16", "--count", "8", "--method", "extract"}, "not e in base 16; use --method series"},
		{[]string{"pi", "--base", "10", "--count", "8", "--method", "extract"}, "not pi in base 10"},
		{[]string{"pi", "--base", "16", "--count", "300", "--method", "extract"}, "at most 224 base-16 digits at a time"},
		{[]string{"pi", "--base", "16", "--count", "3", "--method", "fast"}, `--method "fast": choose auto, series or extract`},
		{[]string{"pi", "--base", "16", "--count", "3", "--offset", "400000000000", "--method", "extract"}, "digit extraction reaches binary position 2^40"},
	} {
		code, _, errs := borel(t, "", append([]string{"digits"}, c.args...)...)
		if code != exitUsage || !strings.Contains(errs, c.want) || strings.Count(errs, "\n") != 1 {
			t.Errorf("digits %v: exit %d, %q; want %q", c.args, code, errs, c.want)
		}
	}
}

// verify catches a file of another constant, a file shifted by one digit
// and a file whose second half comes from another source, with 64 spots,
// by extraction and by the series alike; it passes the right file; and
// --all finds a single changed digit that spots miss.
func TestVerifyCatchesWrongFiles(t *testing.T) {
	const n = 20000
	pi := digitsOf(t, "pi", "--base", "16", "--count", "20002")
	e := digitsOf(t, "e", "--base", "16", "--count", "20000")
	gen := digitsOf(t, "chacha8:3", "--base", "16", "--count", "20000")
	changed := []byte(pi[:n])
	changed[12345] = "0123456789abcdef"[(strings.IndexByte("0123456789abcdef", changed[12345])+1)%16]
	files := map[string]string{
		"right":     pi[:n],
		"wrapped":   "3." + wrapLines(pi[:n], 64),
		"other":     e,
		"shifted":   pi[1 : n+1],
		"extra":     "0" + pi[:n-1],
		"half":      pi[:n/2] + gen[n/2:],
		"one-digit": string(changed),
	}
	paths := map[string]string{}
	for k, v := range files {
		paths[k] = writeFile(t, k+".txt", []byte(v+"\n"))
	}
	for _, method := range []string{"extract", "series"} {
		for _, c := range []struct {
			file string
			code int
			want string
		}{
			{"right", 0, "agrees: all 66 stretches of 16 digits match pi in base 16"},
			{"wrapped", 0, `after the integer part "3" (not compared)`},
			{"other", exitVerdict, "DISAGREES: 66 of 66 stretches differ"},
			{"shifted", exitVerdict, "the file lacks a digit before here"},
			{"extra", exitVerdict, "the file has a digit too many before here"},
			{"half", exitVerdict, "stretches differ from pi in base 16; the first from digit 1"},
			{"one-digit", 0, "agrees"}, // a single changed digit: spots do not land on it
		} {
			code, out, errs := borel(t, "", "verify", paths[c.file], "--source", "pi", "--base", "16", "--method", method)
			if code != c.code || !strings.Contains(out, c.want) {
				t.Errorf("verify %s (%s): exit %d, want %d and %q:\n%s%s", c.file, method, code, c.code, c.want, out, errs)
			}
			if c.file == "half" {
				// Every spot in the first half agrees, every one in the second differs.
				for _, line := range strings.Split(out, "\n") {
					f := strings.Fields(line)
					if len(f) < 4 || f[0] == "from" || !strings.ContainsAny(f[0][:1], "0123456789") {
						continue
					}
					var at int
					if _, err := fmt.Sscan(f[0], &at); err != nil {
						continue
					}
					if first := at+15 <= n/2; first != (f[3] == "agrees") {
						t.Errorf("half file, stretch from %d: %s", at, f[3])
					}
				}
			}
		}
	}
	code, out, _ := borel(t, "", "verify", paths["one-digit"], "--source", "pi", "--base", "16", "--all")
	if code != exitVerdict || !strings.Contains(out, "DISAGREES: 1 of 20000 digits differ from pi in base 16, at digits 12346") {
		t.Errorf("--all on one changed digit: exit %d\n%s", code, out)
	}
	code, out, _ = borel(t, "", "verify", paths["right"], "--source", "pi", "--base", "16", "--all")
	if code != 0 || !strings.Contains(out, "agrees: all 20000 digits match") {
		t.Errorf("--all on the right file: exit %d\n%s", code, out)
	}
	// Sources without extraction are computed: e in base 10.
	e10 := digitsOf(t, "e", "--count", "5000")
	p := writeFile(t, "e10.txt", []byte("2."+e10+"\n"))
	if code, out, _ := borel(t, "", "verify", p, "--source", "e", "--spots", "8"); code != 0 || !strings.Contains(out, "every digit computed up to the last one compared") {
		t.Errorf("verify e: exit %d\n%s", code, out)
	}
	if code, out, _ := borel(t, "", "verify", p, "--source", "sqrt2", "--spots", "8"); code != exitVerdict {
		t.Errorf("verify e as sqrt2: exit %d\n%s", code, out)
	}
	// A folder is refused without offering standard input, which verify refuses too.
	if _, _, errs := borel(t, "", "verify", t.TempDir(), "--source", "pi"); strings.Contains(errs, "standard input") {
		t.Errorf("verify on a folder: %q", errs)
	}
	// Every command is named when the command is unknown (watch was left out).
	if code, _, errs := borel(t, "", "nope"); code != exitUsage || !strings.Contains(errs, "verify and watch") || !strings.Contains(errs, "dimension") {
		t.Errorf("unknown command: exit %d, %q", code, errs)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"verify", "-", "--source", "pi"}, "needs a file, not standard input"},
		{[]string{"verify", paths["right"]}, "verify needs --source"},
		{[]string{"verify", paths["right"], "--source", "e", "--base", "16", "--method", "extract"}, "not e in base 16"},
		{[]string{"verify", paths["right"], "--source", "pi", "--base", "16", "--all", "--method", "extract"}, "--all compares every digit"},
		{[]string{"verify", paths["right"], "--source", "pi", "--base", "10"}, "not below base 10; give the right --base"},
		{[]string{"verify", "/nonexistent/x.txt", "--source", "pi"}, "cannot open /nonexistent/x.txt"},
		{[]string{"verify", t.TempDir(), "--source", "pi"}, "is a directory; give a file of digits"},
	} {
		code, _, errs := borel(t, "", c.args...)
		if code == 0 || !strings.Contains(errs, c.want) || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: exit %d, %q; want %q", c.args, code, errs, c.want)
		}
	}
}

func wrapLines(s string, w int) string {
	var b strings.Builder
	for i := 0; i < len(s); i += w {
		b.WriteString(s[i:min(i+w, len(s))])
		b.WriteByte('\n')
	}
	return b.String()
}

// A generator's digits stream: --memory does not refuse them (they once
// needed 2 bytes a digit), and what is written, to a file or standard
// output, wrapped or not, equals the digits of one computation.
func TestDigitsStreamGenerators(t *testing.T) {
	code, out, errs := borel(t, "", "digits", "chacha8:1", "--count", "3000000", "--memory", "1MiB", "--wrap", "1000", "-q")
	if code != 0 {
		t.Fatalf("a generator refused by --memory: exit %d: %s", code, errs)
	}
	src, _ := expand.ParseSource("chacha8:1")
	d, _, _ := src.CheckedDigits(3_000_000, 0, 10)
	if want := string(formatDigits(d, 1000)); out != want {
		t.Errorf("streamed digits differ from one computation (%d and %d bytes)", len(out), len(want))
	}
	path := filepath.Join(t.TempDir(), "raw.bin")
	if code, _, errs := borel(t, "", "digits", "pcg:2", "--base", "256", "--count", "2500000", "--offset", "3", "-o", path, "-q"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	got, _ := os.ReadFile(path)
	src, _ = expand.ParseSource("pcg:2")
	want, _, _ := src.CheckedDigits(2_500_000, 3, 256)
	if string(got) != string(want) {
		t.Errorf("streamed bytes in the file differ (%d and %d bytes)", len(got), len(want))
	}
	if _, _, errs := borel(t, "", "digits", "chacha8:1", "--count", "10", "-o", path); !strings.Contains(errs, "streamed") {
		t.Errorf("stderr does not say the digits were streamed: %q", errs)
	}
}
