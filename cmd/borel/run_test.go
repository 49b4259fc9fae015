package main

import (
	"bytes"
	"compress/gzip"
	"encoding/binary"
	"encoding/json"
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/expand"
)

// borel runs the command in-process and returns exit status, stdout, stderr.
func borel(t *testing.T, stdin string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

func writeFile(t *testing.T, name string, data []byte) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// Every bad input and option of the audit: exit status and the one-line
// message that names what is wrong.
func TestBadInputs(t *testing.T) {
	dir := t.TempDir()
	letter := writeFile(t, "letter.txt", []byte("0123456789\n01234x6789\n"))
	big := writeFile(t, "big.txt", []byte("0123456"))
	empty := writeFile(t, "empty.txt", nil)
	blank := writeFile(t, "blank.txt", []byte(" \n\n\t "))
	var z bytes.Buffer
	zw := gzip.NewWriter(&z)
	zw.Write(bytes.Repeat([]byte("31415926535897932384"), 5000))
	zw.Close()
	trunc := writeFile(t, "trunc.gz", z.Bytes()[:z.Len()/2])
	cases := []struct {
		name  string
		stdin string
		args  []string
		code  int
		want  string
	}{
		{"letter", "", []string{"audit", letter}, 1, letter + ": byte 16 (line 2, column 6): 'x' is digit value 33, not below base 10"},
		{"digit not below base", "", []string{"audit", big, "--base", "6"}, 1, "'6' is digit value 6, not below base 6"},
		{"symbol on stdin", "0101#01", []string{"audit", "-", "--base", "2"}, 1, "stdin: byte 4 (line 1, column 5): '#' is not a digit of base 2"},
		{"empty", "", []string{"audit", empty}, 1, "the input is empty"},
		{"only whitespace", "", []string{"audit", blank}, 1, "holds no digits (only whitespace)"},
		{"empty stdin", "", []string{"audit", "-"}, 1, "stdin: the input is empty"},
		{"truncated gzip", "", []string{"audit", trunc}, 1, "the gzip stream is damaged or truncated"},
		{"directory", "", []string{"audit", dir}, 1, "is a directory"},
		{"missing file", "", []string{"audit", filepath.Join(dir, "nope.txt")}, 1, "cannot open " + filepath.Join(dir, "nope.txt") + ": no such file or directory"},
		{"base 0", "", []string{"audit", letter, "--base", "0"}, 2, "--base 0 is outside 2..36"},
		{"base 1", "", []string{"audit", letter, "--base", "1"}, 2, "--base 1 is outside 2..36"},
		{"base 37", "", []string{"audit", letter, "--base", "37"}, 2, "--base 37 is outside 2..36"},
		{"base text", "", []string{"audit", letter, "--base", "ten"}, 2, `--base "ten" is not a number`},
		{"vector length", "", []string{"audit", letter, "--base", "3", "--null", "0.5,0.5"}, 2, "has 2 entries but base 3 needs 3"},
		{"vector zero", "", []string{"audit", letter, "--base", "3", "--null", "0,0.5,0.5"}, 2, "entry 0 is 0"},
		{"vector negative", "", []string{"audit", letter, "--base", "3", "--null", "-0.1,0.6,0.5"}, 2, "entry 0 is -0.1"},
		{"vector sum", "", []string{"audit", letter, "--base", "3", "--null", "0.2,0.3,0.6"}, 2, "sums to 1.1, not 1"},
		{"vector NaN", "", []string{"audit", letter, "--base", "2", "--null", "NaN,0.5"}, 2, "entry 0 is NaN"},
		{"vector Inf", "", []string{"audit", letter, "--base", "2", "--null", "Inf,0.5"}, 2, "entry 0 is +Inf"},
		{"vector word", "", []string{"audit", letter, "--base", "2", "--null", "half,half"}, 2, `entry 1 "half" is not a number`},
		{"alpha 0", "", []string{"audit", letter, "--alpha", "0"}, 2, "--alpha 0 is outside (0, 1)"},
		{"alpha 1", "", []string{"audit", letter, "--alpha", "1"}, 2, "--alpha 1 is outside (0, 1)"},
		{"alpha text", "", []string{"audit", letter, "--alpha", "x"}, 2, `--alpha "x" is not a number`},
		{"block 0", "", []string{"audit", letter, "--max-block", "0"}, 2, "give a block length of 1 or more"},
		// 8 bytes × (cyclic Σ_{k=1..9} 10^k + blocks Σ_{k=2..9} 10^k + overlapping 10^9 + gaps 10·2049) = 24584 MiB.
		{"block too big", "", []string{"audit", letter, "--max-block", "9"}, 2, "--max-block 9 needs 24584 MiB of count tables in base 10, over the memory budget of 256 MiB"},
		{"format", "", []string{"audit", letter, "--format", "pdf"}, 2, `--format "pdf": borel writes text, md, csv, json, tex, html`},
		{"append unknown kind", "", []string{"audit", letter, "--append", "notes.docx"}, 2, "--append notes.docx: borel appends to .md, .tex or .html"},
		{"append missing", "", []string{"audit", letter, "--append", filepath.Join(dir, "none.md")}, 2, "no such document; create it first"},
		{"append and -o", "", []string{"audit", letter, "--append", letter + ".md", "-o", "x"}, 2, "--append and -o exclude each other"},
		{"section name", "", []string{"audit", letter, "--append", big, "--section", "a b"}, 2, "borel appends to .md, .tex or .html"},
		{"segments 1", "", []string{"audit", letter, "--segments", "1"}, 2, "--segments 1: give 2 or more segments"},
		{"segments too many", "", []string{"audit", letter, "--segments", "50"}, 2, "--segments 50 needs at least 50000 digits"},
		{"raw and bits", "", []string{"audit", letter, "--raw", "--bits"}, 2, "--raw and --bits exclude each other"},
		{"raw with base", "", []string{"audit", letter, "--raw", "--base", "10"}, 2, "a byte stream regroups exactly into bases 2, 4, 16 and 256"},
		{"no input", "", []string{"audit"}, 2, "audit needs one input"},
		{"two inputs", "", []string{"audit", letter, big}, 2, "audit needs one input"},
		{"unknown flag", "", []string{"audit", letter, "--colour"}, 2, "unknown flag: --colour"},
		{"unknown command", "", []string{"audti"}, 2, `unknown command "audti"`},
		{"memory", "", []string{"audit", letter, "--memory", "lots"}, 2, `--memory "lots": give a size from 1 byte to 1 EiB`},
		{"memory tiny", "", []string{"audit", letter, "--memory", ".1"}, 2, `--memory ".1": give a size from 1 byte`}, // found by FuzzOptionParsers
		{"adjust", "", []string{"audit", letter, "--adjust", "bonferroni"}, 2, `--adjust "bonferroni": use holm`},
	}
	for _, c := range cases {
		code, out, errs := borel(t, c.stdin, c.args...)
		if code != c.code || !strings.Contains(errs, c.want) {
			t.Errorf("%s: exit %d, stderr %q; want exit %d and %q", c.name, code, errs, c.code, c.want)
			continue
		}
		if out != "" {
			t.Errorf("%s: printed a report on bad input: %q", c.name, out)
		}
		if !strings.HasPrefix(errs, "borel: ") || strings.Count(errs, "\n") != 1 {
			t.Errorf("%s: message is not one line starting with 'borel: ': %q", c.name, errs)
		}
	}
}

func TestStrictExitStatus(t *testing.T) {
	periodic := writeFile(t, "periodic.txt", bytes.Repeat([]byte("0123456789"), 2000))
	code, out, _ := borel(t, "", "audit", periodic, "--strict")
	if code != exitVerdict || !strings.Contains(out, "NOT CONSISTENT") {
		t.Errorf("--strict on a periodic sequence: exit %d, want 3", code)
	}
	if code, _, _ := borel(t, "", "audit", periodic); code != 0 {
		t.Errorf("without --strict a verdict is a result, not an error: exit %d", code)
	}
}

// -o never overwrites the input; it writes the whole report atomically; a
// failed write leaves an earlier report untouched.
func TestOutputFile(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "digits.txt")
	os.WriteFile(in, bytes.Repeat([]byte("2718281828459045"), 500), 0o644)
	code, _, errs := borel(t, "", "audit", in, "-o", in)
	if code != 2 || !strings.Contains(errs, "is the input file") {
		t.Errorf("-o onto the input: exit %d %q", code, errs)
	}
	if data, _ := os.ReadFile(in); !bytes.HasPrefix(data, []byte("2718")) {
		t.Error("input was changed")
	}
	out := filepath.Join(dir, "report.json")
	if code, _, errs := borel(t, "", "audit", in, "--format", "json", "-o", out); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	data, _ := os.ReadFile(out)
	if err := json.Unmarshal(data, &doc); err != nil || doc["schema"] != "borel-audit" {
		t.Errorf("report is not the JSON document: %v", err)
	}
	// A failing run (bad option) leaves the earlier report as it was.
	borel(t, "", "audit", in, "--base", "99", "-o", out)
	if again, _ := os.ReadFile(out); !bytes.Equal(again, data) {
		t.Error("a failed run changed the earlier report")
	}
	// A report into a missing folder is refused before the pass and leaves
	// nothing behind.
	code, _, errs = borel(t, "", "audit", in, "-o", filepath.Join(dir, "no", "such", "r.txt"))
	if code != exitUsage || !strings.Contains(errs, "does not exist; create it first") {
		t.Errorf("missing folder: exit %d %q", code, errs)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".borel-") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
}

// Besicovitch–Eggleston check values, computed with scipy 1.10 / mpmath 1.2.
func TestDimensionCommand(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"dimension", "0.5,0,0.5"}, "dim F(p) = 0.630930 in base 3"},
		{[]string{"dimension", "0.3333333333333333,0.6666666666666667"}, "dim F(p) = 0.918296 in base 2"},
		{[]string{"dimension", "0.2,0,0.2,0,0.2,0,0.2,0,0.2", "--base", "10"}, "dim F(p) = 0.698970 in base 10"},
	}
	for _, c := range cases {
		code, out, errs := borel(t, "", c.args...)
		if code != 0 || !strings.Contains(out, c.want) {
			t.Errorf("%v: exit %d %q %q, want %q", c.args, code, out, errs, c.want)
		}
	}
	for _, bad := range [][]string{{"dimension", "0.5,0.6"}, {"dimension", "1"}, {"dimension", "0.5,0.5", "--base", "1"}, {"dimension"},
		{"dimension", "--only", "0,2"}, {"dimension", "--only", "0,3", "--base", "3"}, {"dimension", "--only", "1,1", "--base", "3"},
		{"dimension", "0.5,0.5", "--format", "pdf"}} {
		if code, _, errs := borel(t, "", bad...); code != 2 || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: exit %d, want 2 and one line: %q", bad, code, errs)
		}
	}
}

// The spectrum in every format: the check values of stats' tests (mpmath)
// reach the reports, the restricted-digit set prints log m/log b, and the
// HTML page and --plots carry the drawing.
func TestDimensionSpectrumFormats(t *testing.T) {
	code, out, _ := borel(t, "", "dimension", "0.5,0.3,0.2", "--alpha", "0.9")
	for _, want := range []string{"α_min = −log_3 max p = 0.630930", "α_max = −log_3 min p = 1.464974", "peak f = 1.000000 at α = 1.063936",
		"f(α) = α = 0.937231 at q = 1", "f(0.9) = 0.894166 (at q = 1.31661)", "│ 2 │ 0.880733 │ 0.828849 │ 0.776965 │"} {
		if flat := strings.Join(strings.Fields(out), " "); code != 0 || !strings.Contains(flat, want) {
			t.Errorf("dimension 0.5,0.3,0.2: no %q in\n%s", want, out)
		}
	}
	_, out, _ = borel(t, "", "dimension", "--only", "0,2", "--base", "3")
	if out = strings.Join(strings.Fields(out), " "); !strings.Contains(out, "restricted digits {0, 2} in base 3: dimension log 2 / log 3 = 0.630930") || !strings.Contains(out, "the single point α = f(α) = 0.630930") {
		t.Errorf("Cantor set:\n%s", out)
	}
	_, out, _ = borel(t, "", "dimension", "0.5,0.3,0.2", "--alpha", "2")
	if !strings.Contains(strings.Join(strings.Fields(out), " "), "f(2) = −∞: no number has local dimension 2") {
		t.Errorf("α outside the spectrum:\n%s", out)
	}
	_, out, _ = borel(t, "", "dimension", "0.5,0.3,0.2", "--format", "json", "--alpha", "0.9")
	var doc struct {
		Dimension float64 `json:"dimension"`
		AlphaMin  float64 `json:"alpha_min"`
		FAsked    float64 `json:"f_at_asked_alpha"`
		Spectrum  []struct {
			Q     *float64 `json:"q"`
			QEnd  string   `json:"q_end"`
			Alpha float64  `json:"alpha"`
			F     float64  `json:"f"`
		} `json:"spectrum"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || math.Abs(doc.Dimension-0.93723056321612954) > 1e-12 ||
		math.Abs(doc.FAsked-0.8941663379851626) > 1e-9 || doc.Spectrum[0].QEnd != "-inf" || doc.Spectrum[0].Q != nil {
		t.Errorf("json: %v %+v", err, doc)
	}
	for _, f := range []string{"md", "csv", "tex", "html"} {
		_, out, _ := borel(t, "", "dimension", "0.5,0.3,0.2", "--format", f)
		if !strings.Contains(out, "0.776965") {
			t.Errorf("--format %s lacks the table:\n%s", f, out)
		}
		if f == "html" && (!strings.Contains(out, "<svg") || !strings.Contains(out, "Multifractal spectrum")) {
			t.Errorf("the HTML page has no spectrum drawing")
		}
	}
	dir := filepath.Join(t.TempDir(), "plots")
	if code, _, errs := borel(t, "", "dimension", "0.5,0.3,0.2", "--plots", dir); code != 0 {
		t.Fatalf("--plots: %s", errs)
	}
	for _, name := range []string{"dimension-spectrum.svg", "dimension-spectrum.png"} {
		if st, err := os.Stat(filepath.Join(dir, name)); err != nil || st.Size() < 1000 {
			t.Errorf("--plots: %s missing or empty", name)
		}
	}
}

// Every subcommand has --help with a worked example.
func TestHelp(t *testing.T) {
	for _, c := range subcommands() {
		code, out, _ := borel(t, "", c.name, "--help")
		if code != 0 || !strings.Contains(out, "Example") || !strings.Contains(out, "$ borel "+c.name) {
			t.Errorf("%s --help: exit %d, no worked example:\n%s", c.name, code, out)
		}
	}
	if code, out, _ := borel(t, "", "--help"); code != 0 || !strings.Contains(out, "Exit status") {
		t.Errorf("borel --help: exit %d", code)
	}
}

// The worked examples in every --help run as shown, from the repository
// root, so the manual cannot drift from the command.
func TestHelpExamplesRun(t *testing.T) {
	wd, _ := os.Getwd()
	t.Cleanup(func() { os.Chdir(wd) })
	if err := os.Chdir("../.."); err != nil {
		t.Fatal(err)
	}
	tmp := t.TempDir()
	os.WriteFile(filepath.Join(tmp, "lab.txt"), bytes.Repeat([]byte("0120210122"), 300), 0o644)
	mt := expand.NewMT19937(5489)
	mtBytes := make([]byte, 4*100_000)
	for i := 0; i < len(mtBytes); i += 4 {
		binary.LittleEndian.PutUint32(mtBytes[i:], mt.Uint32())
	}
	os.WriteFile(filepath.Join(tmp, "mt.bin"), mtBytes, 0o644)
	gen := make([]byte, 300_000)
	cc := rand.New(rand.NewChaCha8([32]byte{'g', 'e', 'n'}))
	for i := range gen {
		gen[i] = byte(cc.Uint32())
	}
	os.WriteFile(filepath.Join(tmp, "gen.bin"), gen, 0o644)
	piSrc, _ := expand.ParseSource("pi")
	pi16, _, err := piSrc.CheckedDigits(100_000, 0, 16)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(tmp, "pi16.txt"), formatDigits(pi16, 0), 0o644)
	claim := regexp.MustCompile(`(?:^Example: |\()(\d[\d ]*\d|\d) (?:[a-z]+ )?digits`)
	checked := 0
	for _, c := range subcommands() {
		_, help, _ := borel(t, "", c.name, "--help")
		lines := strings.Split(help, "\n")
		for li, line := range lines {
			line = strings.TrimSpace(line)
			if !strings.HasPrefix(line, "$ borel ") {
				continue
			}
			// What the text claims: a digit count in the description
			// ("Example: 1000 digits of …", "(2 095 902 ternary digits)"),
			// and the output lines it shows under the command.
			wantCount := -1
			for j := li - 1; j >= 0 && strings.TrimSpace(lines[j]) != ""; j-- {
				if m := claim.FindStringSubmatch(strings.TrimSpace(lines[j])); m != nil && strings.HasSuffix(strings.TrimSpace(lines[j]), ":") {
					wantCount, _ = strconv.Atoi(strings.ReplaceAll(m[1], " ", ""))
					break
				}
			}
			var shown []string
			for _, l := range lines[li+1:] {
				l = strings.TrimSpace(l)
				if l == "" || strings.HasPrefix(l, "$ ") {
					break
				}
				if l != "..." && !strings.HasPrefix(l, "borel ") {
					shown = append(shown, l)
				}
			}
			args := strings.Fields(strings.TrimPrefix(line, "$ borel "))
			for i, a := range args { // examples name files in the working folder
				switch a {
				case "lab.txt", "lab.json", "mt.bin", "gen.bin", "pi16.txt":
					args[i] = filepath.Join(tmp, a)
				case "/tmp/borel-part0.shard":
					args[i] = filepath.Join(tmp, "part0.shard")
				case "/tmp/borel-group0.shard":
					args[i] = filepath.Join(tmp, "group0.shard")
				}
			}
			code, out, errs := borel(t, "", args...)
			if code != 0 {
				t.Errorf("example %q: exit %d: %s", line, code, errs)
				continue
			}
			for _, l := range shown {
				checked++
				l = strings.TrimSpace(strings.TrimSuffix(l, "...")) // a line shown in part
				if !strings.Contains(out, l) {
					t.Errorf("example %q: the help shows %q, the output does not have it", line, l)
				}
			}
			if wantCount >= 0 {
				checked++
				digits := out
				if i := strings.IndexByte(digits, '.'); i >= 0 {
					digits = digits[i+1:] // the integer part is not counted
				}
				n := 0
				for _, r := range digits {
					if r >= '0' && r <= '9' || r >= 'a' && r <= 'z' {
						n++
					}
				}
				if n != wantCount {
					t.Errorf("example %q: the help says %d digits, the output has %d", line, wantCount, n)
				}
			}
		}
	}
	t.Logf("%d claims checked", checked)
	if checked < 3 {
		t.Errorf("only %d claims of the help examples checked", checked)
	}
}

// The package doc is the manual: each "$ borel" example in doc.go runs (from
// the repository root; "< FILE" feeds a generated file on standard input).
func TestManualExamplesRun(t *testing.T) {
	src, err := os.ReadFile("doc.go")
	if err != nil {
		t.Fatal(err)
	}
	wd, _ := os.Getwd()
	t.Cleanup(func() { os.Chdir(wd) })
	if err := os.Chdir("../.."); err != nil {
		t.Fatal(err)
	}
	bin := make([]byte, 400_000)
	for i := range bin {
		bin[i] = byte(uint64(i)*2654435761>>13) ^ byte(i>>5)
	}
	ran := 0
	for _, line := range strings.Split(string(src), "\n") {
		line = strings.TrimSpace(strings.TrimPrefix(line, "//"))
		if !strings.HasPrefix(line, "$ borel ") {
			continue
		}
		cmdline, stdin := line, ""
		if i := strings.Index(cmdline, " < "); i >= 0 {
			cmdline, stdin = cmdline[:i], string(bin)
		}
		args := strings.Fields(strings.TrimPrefix(cmdline, "$ borel "))
		code, out, errs := borel(t, stdin, args...)
		// What the manual's words claim of each kind of example.
		switch {
		case args[0] == "digits":
			n := 0
			for _, r := range out {
				if r >= '0' && r <= '9' || r >= 'a' && r <= 'z' {
					n++
				}
			}
			if slices.Contains(args, "--offset") && !strings.Contains(out, "26c65e52cb4593") {
				// Bailey, Borwein & Plouffe (1997), the table of π's hexadecimal digits at 10^6.
				t.Errorf("manual example %q: %q, the published digits are 26c65e52cb4593", line, out)
			}
			for k, a := range args {
				if a == "--count" && k+1 < len(args) && strconv.Itoa(n) != args[k+1] {
					t.Errorf("manual example %q: %d digits written, --count says %s", line, n, args[k+1])
				}
			}
		case args[0] == "dimension" && args[1] == "0.5,0,0.5":
			// The middle-thirds Cantor set: ln 2 / ln 3 = 0.6309297536 (textbook).
			if !strings.Contains(out, "dim F(p) = 0.630930 in base 3") {
				t.Errorf("manual example %q: %q, want dimension 0.630930 (ln 2/ln 3)", line, out)
			}
		case args[0] == "audit" && !strings.Contains(line, "json"):
			if !strings.Contains(out, "Verdict for ") {
				t.Errorf("manual example %q: no verdict in the output", line)
			}
		}
		want := 0
		if strings.Contains(line, "--strict") {
			want = code // the verdict decides; only a usage or read error fails here
			if code != 0 && code != exitVerdict {
				want = 0
			}
		}
		if code != want {
			t.Errorf("manual example %q: exit %d: %s", line, code, errs)
		}
		ran++
	}
	if ran < 7 {
		t.Errorf("only %d examples found in doc.go", ran)
	}
}

// --append adds a section to an existing document and, run again with the
// same name, replaces that section and nothing else; bytes outside it are
// kept exactly (CRLF line ends, trailing spaces).
func TestAppendToPaper(t *testing.T) {
	dir := t.TempDir()
	in := writeFile(t, "digits.txt", bytes.Repeat([]byte("31415926535897932384626433832795"), 600))
	paper := filepath.Join(dir, "paper.md")
	before := "# Results\r\n\nIntro text   \n\n"
	after := "\n## Discussion\n\nLater text.\n"
	os.WriteFile(paper, []byte(before+after), 0o600)
	if code, _, errs := borel(t, "", "audit", in, "--append", paper, "--section", "pi-table"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	first, _ := os.ReadFile(paper)
	if !bytes.HasPrefix(first, []byte(before+after)) || !bytes.Contains(first, []byte("<!-- borel:begin pi-table -->")) {
		t.Fatalf("first append:\n%s", first)
	}
	// Move the section into the middle by hand, as an author would.
	i := bytes.Index(first, []byte("<!-- borel:begin"))
	section := first[i:]
	doc := append([]byte(before), section...)
	doc = append(doc, []byte(after)...)
	os.WriteFile(paper, doc, 0o600)
	if code, _, errs := borel(t, "", "audit", in, "--append", paper, "--section", "pi-table", "--alpha", "0.05"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	second, _ := os.ReadFile(paper)
	if !bytes.HasPrefix(second, []byte(before+"<!-- borel:begin pi-table -->\n")) || !bytes.HasSuffix(second, []byte("<!-- borel:end pi-table -->\n"+after)) {
		t.Errorf("second append moved bytes outside the section:\n%s", second)
	}
	if !bytes.Contains(second, []byte("- **alpha**: 0.05")) {
		t.Errorf("the section was not replaced")
	}
	if st, _ := os.Stat(paper); st.Mode().Perm() != 0o600 {
		t.Errorf("permissions changed to %v", st.Mode().Perm())
	}
}

// limitWriter fails after n bytes, like a full disk.
type limitWriter struct {
	w io.Writer
	n int
}

func (l *limitWriter) Write(p []byte) (int, error) {
	if len(p) > l.n {
		k, _ := l.w.Write(p[:l.n])
		l.n = 0
		return k, errors.New("no space left on device")
	}
	l.n -= len(p)
	return l.w.Write(p)
}

// A write that fails part way leaves the earlier document as it was and no
// temporary file behind.
func TestFailedWriteKeepsDocument(t *testing.T) {
	dir := t.TempDir()
	in := writeFile(t, "digits.txt", bytes.Repeat([]byte("2718281828459045235360287471352662497757"), 500))
	paper := filepath.Join(dir, "paper.tex")
	original := []byte("\\documentclass{article}\n\\begin{document}\nText.\n\\end{document}\n")
	os.WriteFile(paper, original, 0o644)
	writeHook = func(w io.Writer) io.Writer { return &limitWriter{w: w, n: 100} }
	defer func() { writeHook = nil }()
	code, _, errs := borel(t, "", "audit", in, "--append", paper)
	if code != 1 || !strings.Contains(errs, "no space left on device") || !strings.Contains(errs, "unchanged") {
		t.Errorf("exit %d: %s", code, errs)
	}
	if now, _ := os.ReadFile(paper); !bytes.Equal(now, original) {
		t.Errorf("the document changed:\n%s", now)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".borel-") {
			t.Errorf("temporary file left: %s", e.Name())
		}
	}
}

// A file that shrinks while it is read gets an error, not a report.
func TestShrinkingFile(t *testing.T) {
	p := writeFile(t, "digits.txt", bytes.Repeat([]byte("0123456789"), 1000))
	src := audit.Source{Name: p, Kind: "file", Bytes: 10_000}
	if err := checkUnchanged(p, src, 10_000); err != nil {
		t.Errorf("unchanged file refused: %v", err)
	}
	os.Truncate(p, 4_000)
	if err := checkUnchanged(p, src, 10_000); err == nil || !strings.Contains(err.Error(), "shrank while being read (from 10000 to 4000 bytes)") {
		t.Errorf("shrunk file: %v", err)
	}
	if err := checkUnchanged(p, src, 4_000); err == nil {
		t.Error("a short read of the file was accepted")
	}
}
