package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Sizes in SI and IEC units (1MB and 1kB were refused).
func TestParseSizeUnits(t *testing.T) {
	for in, want := range map[string]int64{"1MB": 1_000_000, "1kB": 1000, "1KB": 1000, "2GiB": 2 << 30, "256M": 256 << 20,
		"256MiB": 256 << 20, "1.5GB": 1_500_000_000, "1TiB": 1 << 40, "4096": 4096, "10B": 10} {
		if got, err := parseSize(in); err != nil || got != want {
			t.Errorf("%s: %d, %v; want %d", in, got, err, want)
		}
	}
	if _, err := parseSize("1XB"); err == nil || !strings.Contains(err.Error(), "powers of 1000") {
		t.Errorf("1XB: %v", err)
	}
}

// Messages that named the wrong option, and a missing required one.
func TestRoughEdgeMessages(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		stdin string
		args  []string
		want  string
	}{
		{"0123", []string{"audit", "-", "--raw", "--base", "8"}, "--base 8 with --raw"},
		{"12a4", []string{"rebase", "-", "--from", "10", "--to", "3"}, "give the right --from"},
		{"", []string{"digits", "pi"}, "digits needs --count N"},
	} {
		code, _, errs := borel(t, c.stdin, c.args...)
		if code == 0 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want %q", c.args, code, errs, c.want)
		}
	}
	// One shard is "1 shard".
	shard := filepath.Join(dir, "p.shard")
	digits := strings.Repeat("31415926535897932384", 100)
	if code, _, errs := borel(t, digits, "tally", "-", "--offset", "0", "--max-block", "2", "-q", "-o", shard); code != 0 {
		t.Fatalf("tally: %d %s", code, errs)
	}
	code, out, errs := borel(t, "", "merge", shard, "-q")
	if code != 0 || strings.Contains(out, "1 shards") || !strings.Contains(out, "1 shard") {
		t.Errorf("merge of one shard: exit %d %s; %q", code, errs, verdictLine(out))
	}
}

// Every help lists option values by what they are (A, N, SIZE…), never by
// Go type, and switches without "[=true|false]"; and the claims of the
// help examples hold (the digit counts they state).
func TestHelpListsOptionsPlainly(t *testing.T) {
	for _, c := range subcommands() {
		_, help, _ := borel(t, "", c.name, "--help")
		opts := help[strings.Index(help, "Options:"):]
		for _, bad := range []string{"[=true|false]", " string ", " int ", " uint64 "} {
			if strings.Contains(opts, bad) {
				t.Errorf("borel %s --help lists %q", c.name, bad)
			}
		}
	}
	if _, out, _ := borel(t, "", "digits", "pi", "--base", "7", "--count", "1000", "-q"); len(strings.TrimSpace(out)) != 1000 {
		t.Errorf("the digits example printed %d digits, its help says 1000", len(strings.TrimSpace(out)))
	}
	_, out, _ := borel(t, "", "rebase", "--from", "10", "--to", "3", "../../testdata/pi-1e6.txt.gz", "-q")
	_, frac, _ := strings.Cut(strings.TrimSpace(out), ".") // the integer part, 10 in base 3, is printed first
	if n := len(frac); n != 2_095_902 {
		t.Errorf("the rebase example printed %d ternary digits, its help says 2 095 902", n)
	}
	if _, help, _ := borel(t, "", "--help"); !strings.Contains(help, "130") {
		t.Error("borel --help leaves out exit status 130")
	}
}

// Raw output that starts with 1f 8b is audited, from a file and a pipe;
// --gzip no reads even a real gzip file as bytes; --gzip yes insists.
func TestRawStartingLikeGzip(t *testing.T) {
	raw := []byte("\x1f\x8b" + strings.Repeat("\x07\xf3\x11\x80\x55\xaa\x01\xfe", 600))
	f := writeFile(t, "g.bin", raw)
	if code, out, errs := borel(t, "", "audit", f, "--raw", "--base", "256", "-q"); code != 0 || !strings.Contains(out, "Verdict for") {
		t.Errorf("file: exit %d %s", code, errs)
	}
	if code, _, errs := borel(t, string(raw), "audit", "-", "--raw", "--base", "256", "-q"); code != 0 {
		t.Errorf("pipe: exit %d %s", code, errs)
	}
	if code, _, errs := borel(t, "", "audit", "../../testdata/pi-1e6.txt.gz", "--raw", "--base", "256", "--gzip", "no", "-q"); code != 0 {
		t.Errorf("--gzip no: exit %d %s", code, errs)
	}
	if code, _, errs := borel(t, string(raw), "audit", "-", "--raw", "--base", "256", "--gzip", "yes", "-q"); code != 1 || !strings.Contains(errs, "gzip") {
		t.Errorf("--gzip yes: exit %d %s", code, errs)
	}
	if code, _, errs := borel(t, "", "audit", "-", "--gzip", "maybe"); code != 2 || !strings.Contains(errs, "--gzip \"maybe\"") {
		t.Errorf("--gzip maybe: exit %d %s", code, errs)
	}
}

// A file named like a built-in source is taken, with a warning; builtin:NAME
// takes the built-in (before: the file was taken silently).
func TestCompareFileOrBuiltin(t *testing.T) {
	wd, _ := os.Getwd()
	t.Cleanup(func() { os.Chdir(wd) })
	dir := t.TempDir()
	os.Chdir(dir)
	os.WriteFile("e", []byte(strings.Repeat("0123456789", 500)), 0o644)
	code, out, errs := borel(t, "", "compare", "e", "--count", "5000", "-q", "--format", "json")
	if code != 0 || !strings.Contains(errs, "e is a file here and a built-in source") || !strings.Contains(out, `"kind": "file"`) {
		t.Errorf("file e: exit %d, %q", code, errs)
	}
	code, out, errs = borel(t, "", "compare", "builtin:e", "--count", "5000", "-q", "--format", "json")
	if code != 0 || errs != "" || !strings.Contains(out, `"kind": "built-in"`) {
		t.Errorf("builtin:e: exit %d, %q", code, errs)
	}
}

// compare takes audit's input options: two generator outputs as raw bytes
// (four views each), bits, and constants in several bases.
func TestCompareInputOptions(t *testing.T) {
	a := writeFile(t, "a.bin", []byte(strings.Repeat("\x07\xf3\x11\x80\x55\xaa\x01\xfe\x33\x9c", 500)))
	b := writeFile(t, "b.bin", []byte(strings.Repeat("\x8e\x21\x4d\xb0\x69\x17\xc2\x3a", 600)))
	rows := func(out string) int { return strings.Count(out, "\"verdict\"") - strings.Count(out, "\"inputs\"") }
	for _, c := range []struct {
		args []string
		rows int
	}{
		{[]string{"compare", a, b, "--raw"}, 8},
		{[]string{"compare", a, b, "--raw", "--bases", "2,256"}, 4},
		{[]string{"compare", a, "--bits"}, 1},
		{[]string{"compare", "pi", "e", "sqrt2", "--bases", "2,3,10,16", "--count", "3000"}, 12},
	} {
		code, out, errs := borel(t, "", append(c.args, "-q", "--format", "json")...)
		if code != 0 || rows(out) != c.rows {
			t.Errorf("%v: exit %d %s; %d audits, want %d", c.args, code, errs, rows(out), c.rows)
		}
	}
	if code, _, errs := borel(t, "", "compare", a, "--raw", "--bases", "8"); code != 2 || !strings.Contains(errs, "regroups exactly") {
		t.Errorf("--raw --bases 8: exit %d %s", code, errs)
	}
}

// tally reads raw bytes (it had --bits but no --raw): two stretches of
// bytes merge into the findings of one audit of the bytes.
func TestTallyRaw(t *testing.T) {
	data := []byte(strings.Repeat("\x07\xf3\x11\x80\x55\xaa\x01\xfe\x33\x9c\x42", 700))
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a.shard"), filepath.Join(dir, "b.shard")
	if code, _, errs := borel(t, string(data[:3000]), "tally", "-", "--raw", "--offset", "0", "--max-block", "2", "-q", "-o", a); code != 0 {
		t.Fatalf("tally a: %d %s", code, errs)
	}
	if code, _, errs := borel(t, string(data[3000:]), "tally", "-", "--raw", "--offset", "3000", "--max-block", "2", "-q", "-o", b); code != 0 {
		t.Fatalf("tally b: %d %s", code, errs)
	}
	_, merged, _ := borel(t, "", "merge", a, b, "-q", "--format", "csv")
	_, direct, _ := borel(t, string(data), "audit", "-", "--raw", "--base", "256", "--max-block", "2", "-q", "--format", "csv")
	body := func(s string) string { // the findings, without the provenance comments and the source column
		var out []string
		for _, l := range strings.Split(s, "\n") {
			if l != "" && !strings.HasPrefix(l, "#") {
				out = append(out, l[strings.Index(l, ","):])
			}
		}
		return strings.Join(out, "\n")
	}
	if body(merged) == "" || body(merged) != body(direct) {
		t.Errorf("merged raw shards differ from the direct audit:\n%s\n---\n%s", body(merged), body(direct))
	}
}

// Markdown escapes emphasis and code marks in names: a file named
// my*odd*name.txt rendered in italics.
func TestMarkdownEscapesNames(t *testing.T) {
	f := writeFile(t, "my*odd*name_`x`.txt", []byte(strings.Repeat("31415926535897932384", 60)))
	_, out, _ := borel(t, "", "audit", f, "-q", "--format", "md")
	if !strings.Contains(out, `my\*odd\*name\_\`+"`"+`x\`+"`"+`.txt`) || strings.Contains(out, "my*odd*") {
		t.Errorf("the name is not escaped:\n%s", out[:min(len(out), 400)])
	}
}

// compare --format tex sets small p-values in math mode, not a literal
// caret (10\textasciicircum{}-14213.89).
func TestCompareLaTeXPValues(t *testing.T) {
	_, out, _ := borel(t, "", "compare", "champernowne", "--count", "20000", "-q", "--format", "tex")
	if strings.Contains(out, "textasciicircum") || !strings.Contains(out, "$10^{-") {
		t.Errorf("p-values in the LaTeX comparison:\n%s", out)
	}
}
