package reports

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/borel-audit/borel/stats/checks"
)

// summaryRows returns one row per sequence and base: the verdict, the
// smallest adjusted p-value and the finding that gave it (audit's Decisive),
// the entropy deficit and the
// dimension estimate with its interval.
func summaryRows(doc Document) (header []string, rows [][]string) {
	header = []string{"sequence", "base", "digits", "verdict", "smallest adjusted p", "from", "deficit", "dimension", "interval"}
	for _, r := range doc.Results {
		worst, label := 0.0, "–"
		if d := r.Decisive(); d.Index >= 0 {
			tail := "upper"
			if d.Lower {
				tail = "lower"
			}
			worst, label = d.LogAdj, findingLabel(r.Findings[d.Index].Finding)+" ("+tail+")"
		}
		deficit, dim, interval := "–", "–", "–"
		if e := r.Entropy; e != nil && len(e.Rows) > 0 {
			deficit = formatDeficit(e.Summary.Deficit)
			dim = formatDim(e.Summary.Dimension)
			if !math.IsNaN(e.Summary.DimLow) {
				interval = fmt.Sprintf("[%s, %s]", formatDim(e.Summary.DimLow), formatDim(e.Summary.DimHigh))
			}
		}
		rows = append(rows, []string{seqName(r), strconv.Itoa(r.Base), strconv.FormatInt(r.Digits, 10),
			string(r.Verdict), formatP(worst), label, deficit, dim, interval})
	}
	return header, rows
}

var summaryAlign = []bool{false, true, true, false, true, false, true, true, false}

// Summary writes the side-by-side table as text.
func Summary(w io.Writer, doc Document) error {
	return writeFitted(w, doc.Width, summaryLayout(doc))
}

// summaryLayout is the side-by-side table for text: names, verdicts,
// findings and intervals may wrap; the sequence names each row.
func summaryLayout(doc Document) textTable {
	h, rows := summaryRows(doc)
	return textTable{header: h, rows: rows, right: summaryAlign,
		wrap: []int{16, 0, 0, 10, 0, 16, 0, 0, 0}, key: 1}
}

// Comparison writes the side-by-side table in the named format (text, md,
// csv or tex), with the provenance and the caution; json and html carry
// every audit in full instead (their renderer has no comparison).
func Comparison(w io.Writer, doc Document, format string) error {
	r, ok := Renderer(format)
	if !ok {
		return fmt.Errorf("reports: unknown format %q", format)
	}
	if r.Comparison == nil {
		return r.Report(w, doc)
	}
	return r.Comparison(w, doc)
}

func comparisonMarkdown(w io.Writer, doc Document) error {
	h, rows := summaryRows(doc)
	fmt.Fprintf(w, "borel %s comparison, %s: `%s`\n\n", doc.Version, doc.Created.UTC().Format(time.RFC3339), strings.Join(doc.Command, " "))
	mdTable(w, h, rows, summaryAlign)
	_, err := fmt.Fprintf(w, "\n> %s\n", Caution)
	return err
}

// ComparisonCSVHeader is the header of the side-by-side table as CSV: the
// same content as the text table, with numbers at full precision (the
// smallest adjusted p as log10 and as a probability, empty when it
// underflows; the interval as its two ends) and nothing rounded to text.
var ComparisonCSVHeader = []string{"sequence", "base", "digits", "verdict", "log10_smallest_adjusted_p", "smallest_adjusted_p",
	"from", "tail", "deficit", "dimension", "dimension_low", "dimension_high"}

func comparisonCSV(w io.Writer, doc Document) error {
	fmt.Fprintf(w, "# borel %s comparison, %s\n# command: %s\n# %s\n", doc.Version, doc.Created.UTC().Format(time.RFC3339), strings.Join(doc.Command, " "), Caution)
	return comparisonCSVRows(w, doc)
}

// comparisonCSVRows writes the side-by-side table's header and rows.
func comparisonCSVRows(w io.Writer, doc Document) error {
	cw := csv.NewWriter(w)
	cw.Write(ComparisonCSVHeader)
	num := func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return ""
		}
		return full(v)
	}
	for _, r := range doc.Results {
		logP, p, from, tail := "", "", "", ""
		if d := r.Decisive(); d.Index >= 0 {
			tail = "upper"
			if d.Lower {
				tail = "lower"
			}
			logP, from = num(d.LogAdj/math.Ln10), findingLabel(r.Findings[d.Index].Finding)
			if pv := math.Exp(d.LogAdj); pv > 0 {
				p = num(pv)
			}
		}
		deficit, dim, lo, hi := "", "", "", ""
		if e := r.Entropy; e != nil && len(e.Rows) > 0 {
			deficit, dim = num(e.Summary.Deficit), num(e.Summary.Dimension)
			lo, hi = num(e.Summary.DimLow), num(e.Summary.DimHigh)
		}
		cw.Write([]string{seqName(r), strconv.Itoa(r.Base), strconv.FormatInt(r.Digits, 10), string(r.Verdict), logP, p, from, tail, deficit, dim, lo, hi})
	}
	cw.Flush()
	return cw.Error()
}

func comparisonLaTeX(w io.Writer, doc Document) error {
	fmt.Fprintf(w, "%% borel %s comparison, %s. Needs \\usepackage{booktabs}.\n%% command: %s\n", doc.Version, doc.Created.UTC().Format(time.RFC3339), strings.Join(doc.Command, " "))
	for _, line := range strings.Split(wrapDisplay(Caution, 90), "\n") {
		fmt.Fprintf(w, "%% %s\n", line)
	}
	return summaryFloat(w, doc)
}

// summaryFloat writes the side-by-side table as a table float with its
// caption.
func summaryFloat(w io.Writer, doc Document) error {
	fmt.Fprintln(w, `\begin{table}[htbp]`)
	fmt.Fprintln(w, `\centering\scriptsize`)
	if err := summaryTabular(w, doc); err != nil {
		return err
	}
	fmt.Fprintln(w, `\caption{borel: the audits side by side (verdict, smallest adjusted $p$-value and the finding it comes from, dimension estimate and its interval; the entropy deficit is 1 minus the dimension).}`)
	_, err := fmt.Fprintln(w, `\end{table}`)
	return err
}

// summaryTabular writes the side-by-side table as a LaTeX tabular that fits
// an article's text width: the long cells (sequence, verdict, finding)
// wrap in paragraph columns, the dimension and its interval share one
// cell, and the deficit (1 − dimension) is left to the caption; the column
// gap is halved. (With every column of the text table it ran 295 pt past
// an 11 pt article's text block.)
func summaryTabular(w io.Writer, doc Document) error {
	_, rows := summaryRows(doc)
	fmt.Fprintln(w, `{\setlength{\tabcolsep}{3pt}`)
	fmt.Fprintln(w, `\begin{tabular}{@{}p{0.17\linewidth}rrp{0.11\linewidth}rp{0.17\linewidth}p{0.2\linewidth}@{}}`)
	fmt.Fprintln(w, `\toprule`)
	fmt.Fprintln(w, `sequence & base & digits & verdict & least adj.\ $p$ & from & dimension [interval] \tabularnewline`)
	fmt.Fprintln(w, `\midrule`)
	for _, r := range rows {
		p := texEscape(r[4])
		if exp, ok := strings.CutPrefix(r[4], "10^"); ok { // a p-value below 1e-10, in math mode
			p = "$10^{" + exp + "}$"
		}
		dim := texEscape(r[7])
		if r[8] != "–" {
			dim += " " + texEscape(r[8])
		}
		// \raggedright in the paragraph cells (no hyphens, no stretched
		// gaps); rows end with \tabularnewline, which it leaves alone.
		rr := `\raggedright `
		fmt.Fprintf(w, "%s%s & %s & %s & %s%s & %s & %s%s & %s%s \\tabularnewline\n", rr, texName(r[0]), r[1], r[2], rr, texEscape(r[3]), p, rr, texEscape(r[5]), rr, dim)
	}
	fmt.Fprintln(w, `\bottomrule`)
	_, err := fmt.Fprintln(w, `\end{tabular}}`)
	return err
}

func comparisonText(w io.Writer, doc Document) error {
	fmt.Fprintf(w, "borel %s comparison, %s\n", doc.Version, doc.Created.UTC().Format(time.RFC3339))
	if err := Summary(w, doc); err != nil {
		return err
	}
	_, err := fmt.Fprintln(w, wrapDisplay(Caution, textMeasure(doc.Width)))
	return err
}

// FindingLabel names a finding as the reports do ("serial ∇ψ² k=2").
func FindingLabel(f checks.Finding) string { return findingLabel(f) }

// findingLabel names a finding: check, statistic and its parameters when it
// has any (maxrun's and drift's whole-sequence findings have none).
func findingLabel(f checks.Finding) string {
	if p := findingParams(f); p != "" {
		return f.Check + " " + statisticName(string(f.Statistic)) + " " + p
	}
	return f.Check + " " + statisticName(string(f.Statistic))
}
