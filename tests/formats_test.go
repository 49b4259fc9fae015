package tests

import (
	"bytes"
	"compress/gzip"
	"encoding/csv"
	"encoding/json"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"golang.org/x/net/html"
)

// smallInput is the fixed input of the format tests: the first 20 000
// decimals of π from testdata/pi-1e6.txt.gz (python3-mpmath 1.2.1).
func smallInput(t *testing.T) []byte {
	t.Helper()
	f, err := os.Open("../testdata/pi-1e6.txt.gz")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	z, err := gzip.NewReader(f)
	if err != nil {
		t.Fatal(err)
	}
	head := make([]byte, 2+20_000)
	if _, err := io.ReadFull(z, head); err != nil {
		t.Fatal(err)
	}
	return head // "3." and 20 000 decimals
}

// reportArgs audits the small input with a second level, so every part of
// every report (findings, skips, entropy, segments, plots) appears.
var reportArgs = []string{"audit", "-", "--segments", "10"}

func TestGoldenEveryFormat(t *testing.T) {
	in := smallInput(t)
	for _, format := range []string{"text", "md", "csv", "json", "tex", "html"} {
		code, out, errs := runBorel(t, in, append(reportArgs, "--format", format)...)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", format, code, errs)
		}
		golden(t, "small."+format, out)
	}
}

// The LaTeX output compiles (when pdflatex is installed: Debian's
// texlive-latex-base and texlive-latex-recommended for booktabs).
func TestLaTeXCompiles(t *testing.T) {
	pdflatex := usablePdflatex(t)
	code, out, errs := runBorel(t, smallInput(t), append(reportArgs, "--format", "tex")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	dir := t.TempDir()
	doc := "\\documentclass{article}\n\\usepackage[margin=1cm,landscape]{geometry}\n\\usepackage{booktabs}\n\\usepackage{longtable}\n\\begin{document}\n\\input{report}\n\\end{document}\n"
	os.WriteFile(filepath.Join(dir, "report.tex"), out, 0o644)
	os.WriteFile(filepath.Join(dir, "paper.tex"), []byte(doc), 0o644)
	cmd := exec.Command(pdflatex, "-interaction=nonstopmode", "-halt-on-error", "paper.tex")
	cmd.Dir = dir
	if log, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("pdflatex failed: %v\n%s", err, log[max(0, len(log)-3000):])
	}
	if st, err := os.Stat(filepath.Join(dir, "paper.pdf")); err != nil || st.Size() == 0 {
		t.Errorf("no PDF: %v", err)
	}
}

// usablePdflatex returns pdflatex, or skips the test when it is missing or
// cannot compile an empty article with booktabs (pdflatex without its
// format file cannot judge ours), saying why.
func usablePdflatex(t *testing.T) string {
	t.Helper()
	pdflatex, err := exec.LookPath("pdflatex")
	if err != nil {
		t.Skip("pdflatex is not installed (apt-get install texlive-latex-base texlive-latex-recommended); LaTeX output not compiled")
	}
	probe := t.TempDir()
	os.WriteFile(filepath.Join(probe, "probe.tex"), []byte("\\documentclass{article}\n\\usepackage{booktabs}\n\\begin{document}x\\end{document}\n"), 0o644)
	pc := exec.Command(pdflatex, "-interaction=nonstopmode", "-halt-on-error", "probe.tex")
	pc.Dir = probe
	if log, err := pc.CombinedOutput(); err != nil {
		t.Skipf("pdflatex cannot compile an empty article with booktabs here (%v: %s); LaTeX output not compiled", err, lastLine(log))
	}
	return pdflatex
}

// Every LaTeX report fits the text block of a plain 11 pt article and
// loses no row: the demo, a pi audit with segments, Champernowne's
// constant (its mark column ran off the paper), a --raw audit (its base-2
// table of 75 rows was a float 329 pt taller than the page, its last rows
// lost) and compare (326 pt too wide). Each is compiled twice (longtable
// settles its column widths on the second run) and must have no overfull
// box over 1 pt and no float too large; the PDF's text keeps the last
// finding of every table.
func TestLaTeXFitsArticle(t *testing.T) {
	pdflatex := usablePdflatex(t)
	raw := make([]byte, 100000)
	rng := rand.New(rand.NewPCG(16, 2026))
	for i := range raw {
		raw[i] = byte(rng.Uint32())
	}
	rawFile := filepath.Join(t.TempDir(), "gen.bin")
	os.WriteFile(rawFile, raw, 0o644)
	overfull := regexp.MustCompile(`Overfull \\hbox \(([0-9.]+)pt too wide\)`)
	for _, c := range []struct {
		name string
		args []string
	}{
		{"demo", []string{"demo"}},
		{"pi-segments", []string{"audit", "--source", "pi", "--count", "20000", "--segments", "20", "-q"}},
		{"champernowne", []string{"audit", "--source", "champernowne", "--count", "20000", "-q"}},
		{"raw", []string{"audit", rawFile, "--raw", "-q"}},
		{"compare", []string{"compare", "pi", "e", "champernowne", "--count", "20000", "-q"}},
		{"dimension", []string{"dimension", "0.5,0.3,0.2", "--alpha", "0.9"}},
	} {
		code, out, errs := runBorel(t, nil, append(c.args, "--format", "tex")...)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", c.name, code, errs)
		}
		// Every character has its LaTeX form (q̂ and Σ once printed as [U+0302] and [U+03A3]).
		if i := bytes.Index(out, []byte("[U+")); i >= 0 {
			t.Errorf("%s: a character without its LaTeX form: %q", c.name, out[max(0, i-40):min(len(out), i+20)])
		}
		dir := t.TempDir()
		doc := "\\documentclass[11pt]{article}\n\\usepackage[utf8]{inputenc}\n\\usepackage{booktabs}\n\\usepackage{longtable}\n\\begin{document}\n\\input{report}\n\\end{document}\n"
		os.WriteFile(filepath.Join(dir, "report.tex"), out, 0o644)
		os.WriteFile(filepath.Join(dir, "paper.tex"), []byte(doc), 0o644)
		var log []byte
		for pass := 0; pass < 2; pass++ {
			cmd := exec.Command(pdflatex, "-interaction=nonstopmode", "-halt-on-error", "paper.tex")
			cmd.Dir = dir
			var err error
			if log, err = cmd.CombinedOutput(); err != nil {
				t.Fatalf("%s: pdflatex failed: %v\n%s", c.name, err, log[max(0, len(log)-2000):])
			}
		}
		for _, m := range overfull.FindAllSubmatchIndex(log, -1) {
			if v, _ := strconv.ParseFloat(string(log[m[2]:m[3]]), 64); v > 1 {
				t.Errorf("%s: %s", c.name, log[m[0]:min(len(log), m[1]+160)])
			}
		}
		if bytes.Contains(log, []byte("Float too large")) {
			t.Errorf("%s: a float is too large for the page", c.name)
		}
		if c.name == "raw" {
			if pdftotext, err := exec.LookPath("pdftotext"); err == nil {
				cmd := exec.Command(pdftotext, "paper.pdf", "-")
				cmd.Dir = dir
				text, _ := cmd.Output()
				if n, want := bytes.Count(text, []byte("drift max")), bytes.Count(out, []byte(`\raggedright drift $\max`)); n < want {
					t.Errorf("%s: the PDF shows %d drift findings of the %d in the tables (rows lost)", c.name, n, want)
				}
			}
		}
	}
}

// The HTML report parses, holds one <svg> per plot, and reaches nothing
// outside itself: no scripts, no external links or sources.
func TestHTMLReport(t *testing.T) {
	code, out, errs := runBorel(t, smallInput(t), append(reportArgs, "--format", "html")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc, err := html.Parse(bytes.NewReader(out))
	if err != nil {
		t.Fatal(err)
	}
	svgs, figures := 0, 0
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode {
			switch n.Data {
			case "svg":
				svgs++
			case "figure":
				figures++
			case "script", "link", "img", "iframe":
				t.Errorf("the page has a <%s> element", n.Data)
			}
			for _, a := range n.Attr {
				if (a.Key == "src" || a.Key == "href") && !strings.HasPrefix(a.Val, "#") {
					t.Errorf("external reference %s=%q", a.Key, a.Val)
				}
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
	// frequencies, p histogram, Q–Q, dimension, landscape, running deviation, segments
	if figures != 7 || svgs != figures {
		t.Errorf("%d figures and %d <svg> elements; want 7 and one each", figures, svgs)
	}
}

// The CSV report reads back with encoding/csv to the same numbers as the
// JSON report of the same run.
func TestCSVMatchesJSON(t *testing.T) {
	in := smallInput(t)
	_, csvOut, _ := runBorel(t, in, append(reportArgs, "--format", "csv")...)
	_, jsonOut, _ := runBorel(t, in, append(reportArgs, "--format", "json")...)
	r := csv.NewReader(bytes.NewReader(csvOut))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Audits []struct {
			Findings []struct {
				Check          string   `json:"check"`
				Statistic      string   `json:"statistic"`
				Value          float64  `json:"value"`
				DF             float64  `json:"df"`
				PUpper         float64  `json:"p_upper"`
				PLower         float64  `json:"p_lower"`
				Log10PUpper    *float64 `json:"log10_p_upper"`
				AdjustedPUpper float64  `json:"adjusted_p_upper"`
			} `json:"findings"`
		} `json:"audits"`
	}
	if err := json.Unmarshal(jsonOut, &doc); err != nil {
		t.Fatal(err)
	}
	header := recs[0]
	col := map[string]int{}
	for i, h := range header {
		col[h] = i
	}
	fs := doc.Audits[0].Findings
	if len(recs)-1 != len(fs) {
		t.Fatalf("%d CSV rows, %d JSON findings", len(recs)-1, len(fs))
	}
	num := func(s string) float64 {
		if s == "" { // df of a statistic without one
			return 0
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("%q: %v", s, err)
		}
		return v
	}
	for i, f := range fs {
		row := recs[i+1]
		if row[col["check"]] != f.Check || row[col["statistic"]] != f.Statistic ||
			num(row[col["value"]]) != f.Value || num(row[col["df"]]) != f.DF ||
			num(row[col["p_upper"]]) != f.PUpper || num(row[col["p_lower"]]) != f.PLower ||
			num(row[col["adjusted_p_upper"]]) != f.AdjustedPUpper ||
			(f.Log10PUpper != nil && math.Abs(num(row[col["log10_p_upper"]])-*f.Log10PUpper) != 0) {
			t.Errorf("row %d differs from the JSON finding %+v: %v", i+1, f, row)
		}
	}
}

// lastLine returns the last non-empty line of a log.
func lastLine(log []byte) string {
	lines := strings.Split(strings.TrimSpace(string(log)), "\n")
	return lines[len(lines)-1]
}

// The side-by-side table as CSV carries numbers, not their text: every
// numeric column parses as a float (or is empty), nothing reads "10^…",
// "[…]" or "-0", and the interval is two columns. (It wrote the text
// table's rounded strings, "10^-3604.22" and "[0.984554, 0.988911]".)
func TestComparisonCSVNumbers(t *testing.T) {
	code, out, errs := runBorel(t, nil, "compare", "pi", "champernowne", "--count", "20000", "--format", "csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	r := csv.NewReader(bytes.NewReader(out))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil || len(recs) != 3 {
		t.Fatalf("%d records, %v:\n%s", len(recs), err, out)
	}
	head := recs[0]
	numeric := map[string]bool{"base": true, "digits": true, "log10_smallest_adjusted_p": true, "smallest_adjusted_p": true,
		"deficit": true, "dimension": true, "dimension_low": true, "dimension_high": true}
	for _, rec := range recs[1:] {
		for i, v := range rec {
			if strings.Contains(v, "10^") || strings.HasPrefix(v, "[") || v == "-0" {
				t.Errorf("column %s holds text %q", head[i], v)
			}
			if numeric[head[i]] && v != "" {
				if _, err := strconv.ParseFloat(v, 64); err != nil {
					t.Errorf("column %s: %q is not a number", head[i], v)
				}
			}
		}
	}
	if recs[2][0] != "champernowne" || recs[2][4] == "" || recs[2][5] != "" {
		t.Errorf("champernowne's log10 p should be given and its p (below 1e-308) empty: %v", recs[2])
	}
}

// The JSON report carries the data behind every plot: digit counts that
// sum to the digits, the null's frequency band for each digit, the trace
// ending at n with the final counts and a deviation per digit, and one
// series of segment p-values per second-level statistic, one per segment.
func TestJSONPlotData(t *testing.T) {
	code, out, errs := runBorel(t, nil, "audit", "--source", "pi", "--count", "20000", "--segments", "5", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Audits []struct {
			Digits int64 `json:"digits"`
			Plots  struct {
				DigitCounts []int64    `json:"digit_counts"`
				BandLow     []*float64 `json:"band_low"`
				BandHigh    []*float64 `json:"band_high"`
				Trace       []struct {
					Pos       int64      `json:"pos"`
					Counts    []int64    `json:"counts"`
					Deviation []*float64 `json:"deviation"`
				} `json:"trace"`
				Segments []struct {
					Statistic string    `json:"statistic"`
					P         []float64 `json:"p"`
				} `json:"segment_p_values"`
			} `json:"plot_data"`
		} `json:"audits"`
	}
	if err := json.Unmarshal(out, &doc); err != nil || len(doc.Audits) != 1 {
		t.Fatalf("%v", err)
	}
	a := doc.Audits[0]
	p := a.Plots
	var sum int64
	for _, c := range p.DigitCounts {
		sum += c
	}
	if sum != a.Digits || len(p.DigitCounts) != 10 || len(p.BandLow) != 10 || len(p.BandHigh) != 10 {
		t.Errorf("digit counts %v (sum %d of %d), band %d/%d entries", p.DigitCounts, sum, a.Digits, len(p.BandLow), len(p.BandHigh))
	}
	last := p.Trace[len(p.Trace)-1]
	if last.Pos != a.Digits || !slices.Equal(last.Counts, p.DigitCounts) || len(last.Deviation) != 10 {
		t.Errorf("the trace ends at %d with %v, deviations %d", last.Pos, last.Counts, len(last.Deviation))
	}
	if len(p.Segments) < 3 {
		t.Errorf("%d segment series", len(p.Segments))
	}
	for _, s := range p.Segments {
		if len(s.P) != 5 {
			t.Errorf("%s: %d segment p-values, want 5", s.Statistic, len(s.P))
		}
	}
}

// Every format of a report with several audits opens with the side-by-side
// table (before it, only text, Markdown and LaTeX had it, text at the
// end): a --bases audit in text, md, tex, html and csv. The HTML page also
// has contents linking to each audit.
func TestSummaryFirstInEveryFormat(t *testing.T) {
	for _, c := range []struct{ format, summary, firstAudit string }{
		{"text", "Side by side", "borel audit of pi\n"},
		{"md", "**Side by side**", "### borel audit of pi in base 2"},
		{"tex", "the audits side by side", "\\begin{longtable}"},
		{"html", "<h2>Side by side</h2>", `<h2 id="borel-audit-1">borel audit of pi in base 2`},
		{"csv", "# side by side:", "sequence,base,digits,null,verdict"},
	} {
		code, out, errs := runBorel(t, nil, "audit", "--source", "pi", "--count", "20000", "--bases", "2,10", "--format", c.format)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", c.format, code, errs)
		}
		s := string(out)
		i, j := strings.Index(s, c.summary), strings.Index(s, c.firstAudit)
		if i < 0 || j < 0 || i > j {
			t.Errorf("%s: summary at %d, first audit at %d", c.format, i, j)
		}
		if c.format == "html" && (!strings.Contains(s, `<a href="#borel-audit-2">`) || !strings.Contains(s, `id="borel-audit-2"`)) {
			t.Errorf("html: no contents link to the second audit")
		}
	}
}

// Every format says where a failing finding deviates: for Champernowne's
// constant (the digit 1 is the most frequent in its first 20000 digits),
// freq X² names "digit 1" in the text footnotes, the Markdown, the HTML,
// the JSON's where, the CSV's note column (it had none) and the LaTeX
// notes below the table (it had none).
func TestWhereInEveryFormat(t *testing.T) {
	for _, format := range []string{"text", "md", "html", "json", "csv", "tex"} {
		code, out, errs := runBorel(t, nil, "audit", "--source", "champernowne", "--count", "20000", "-q", "--format", format)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", format, code, errs)
		}
		want := "digit 1: +"
		if format == "html" {
			want = "digit 1: &#43;"
		}
		if !bytes.Contains(out, []byte(want)) {
			t.Errorf("%s: no %q in the report", format, want)
		}
		if format == "csv" {
			r := csv.NewReader(bytes.NewReader(out))
			r.Comment = '#'
			recs, err := r.ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			note := slices.Index(recs[0], "note")
			if note < 0 || !strings.HasPrefix(recs[1][note], "largest deviations (O − E)/√E: digit 1: +") {
				t.Errorf("csv: note column %d, first row %q", note, recs[1])
			}
		}
	}
}
