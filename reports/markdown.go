package reports

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
)

// findingTable returns the human rows of the findings table, shared by the
// text, Markdown and HTML reports, and the footnotes they refer to.
func findingTable(r *audit.Result) (header []string, rows [][]string, notes []string) {
	header = []string{"check", "statistic", "parameter", "value", "df", "p upper", "p lower", "adjusted", "mark", "note"}
	number := map[string]int{} // identical notes share a footnote
	for _, f := range r.Findings {
		ref := ""
		for _, n := range f.Notes {
			if number[n.Text] == 0 {
				notes = append(notes, n.Text)
				number[n.Text] = len(notes)
			}
			if ref != "" {
				ref += ","
			}
			ref += fmt.Sprintf("[%d]", number[n.Text])
		}
		rows = append(rows, []string{f.Check, statisticName(string(f.Statistic)), findingParams(f.Finding),
			formatStat(f.Value), formatDF(f.DF), formatP(f.LogPUpper), formatP(f.LogPLower),
			formatP(math.Min(f.LogAdjUpper, f.LogAdjLower)), string(f.Mark), ref})
	}
	return header, rows, notes
}

// entropyTable returns the rows of the entropy profile.
func entropyTable(r *audit.Result) (header []string, rows [][]string) {
	header = []string{"k", "H_k plug-in", "H_k Miller–Madow", "h given k-1 digits", "dimension", "interval", "deficit", "order k-1 vs k-2: p"}
	if r.Entropy == nil {
		return header, nil
	}
	for _, row := range r.Entropy.Rows {
		interval := "–"
		if !math.IsNaN(row.DimLow) {
			interval = fmt.Sprintf("[%s, %s]", formatDim(row.DimLow), formatDim(row.DimHigh))
		}
		rows = append(rows, []string{fmt.Sprint(row.K), formatFixed(row.PlugIn), formatFixed(row.MillerMadow),
			formatFixed(row.Conditional), formatDim(row.Dimension), interval, formatDeficit(row.Deficit), orderCell(row)})
	}
	return header, rows
}

func mdCell(s string) string {
	s = strings.ReplaceAll(s, `\`, `\\`)
	// Emphasis and code marks in names and details are text (a file named
	// my*odd*name.txt rendered in italics).
	for _, c := range []string{"|", "*", "_", "`"} {
		s = strings.ReplaceAll(s, c, `\`+c)
	}
	return strings.ReplaceAll(s, "\n", " ")
}

func mdTable(w io.Writer, header []string, rows [][]string, right []bool) {
	cells := make([]string, len(header))
	for i, h := range header {
		cells[i] = mdCell(h)
	}
	fmt.Fprintf(w, "| %s |\n|", strings.Join(cells, " | "))
	for i := range header {
		if i < len(right) && right[i] {
			fmt.Fprint(w, " ---: |")
		} else {
			fmt.Fprint(w, " --- |")
		}
	}
	fmt.Fprintln(w)
	for _, r := range rows {
		for i, c := range r {
			cells[i] = mdCell(c)
		}
		fmt.Fprintf(w, "| %s |\n", strings.Join(cells[:len(r)], " | "))
	}
}

var findingAlign = []bool{false, false, false, true, true, true, true, true, false, false}

// Markdown writes the report as GitHub-flavoured Markdown: per sequence and
// base a heading with the verdict, the provenance, the findings table with
// footnotes, what was not run, the entropy profile and notes; the caution
// once at the end.
func Markdown(w io.Writer, doc Document) error {
	bw := bufio.NewWriter(w)
	for _, v := range doc.Inputs {
		h, reason := inputHeadline(v)
		fmt.Fprintf(bw, "**%s**\n\n%s\n\n", mdCell(h), mdCell(reason))
	}
	if len(doc.Results) > 1 {
		h, rows := summaryRows(doc)
		fmt.Fprintln(bw, "**Side by side**")
		fmt.Fprintln(bw)
		mdTable(bw, h, rows, summaryAlign)
		fmt.Fprintln(bw)
	}
	for _, r := range doc.Results {
		fmt.Fprintf(bw, "### borel audit of %s in base %d: %s\n\n", mdCell(seqName(r)), r.Base, r.Verdict)
		fmt.Fprintf(bw, "%s\n\n", mdCell(verdictReason(r)))
		// The provenance as a list: a table needs a header row, and an
		// empty one rendered as a blank bar.
		for _, p := range provenance(doc, r) {
			fmt.Fprintf(bw, "- **%s**: %s\n", mdCell(p[0]), mdCell(p[1]))
		}
		fmt.Fprintln(bw)
		header, frows, notes := findingTable(r)
		mdTable(bw, header, frows, findingAlign)
		fmt.Fprintln(bw)
		fmt.Fprintln(bw, "*p upper*: chance of a statistic at least this large (deviation); *p lower*: at most this small (fit too good); *adjusted*: the smaller of the two after "+adjustmentName(string(r.Adjustment))+" adjustment over the whole family.")
		for i, n := range notes {
			fmt.Fprintf(bw, "\n[%d] %s\n", i+1, mdCell(n))
		}
		if len(r.Skips) > 0 {
			fmt.Fprintln(bw, "\nNot run:")
			for _, s := range r.Skips {
				fmt.Fprintf(bw, "- %s %s: %s\n", s.Check, formatParams(s.Params), mdCell(s.Reason))
			}
		}
		if eh, erows := entropyTable(r); len(erows) > 0 {
			fmt.Fprintf(bw, "\nEntropy profile (nats; dimension = entropy rate / ln %d, %g%% interval):\n\n", r.Base, 100*r.Entropy.Confidence)
			mdTable(bw, eh, erows, entropyAlign)
			fmt.Fprintf(bw, "\n%s (the last column: the likelihood-ratio test of a Markov chain of order k-2 against k-1, Anderson & Goodman 1957).\n", entropyNote(r))
		}
		if lines := positionLines(r); len(lines) > 0 {
			fmt.Fprintf(bw, "\n%s:\n\n", positionTitle(r))
			for _, l := range lines {
				fmt.Fprintf(bw, "- %s\n", mdCell(l))
			}
			if ph, prows, cap := positionTable(r); len(prows) > 0 {
				fmt.Fprintf(bw, "\n%s:\n\n", cap)
				mdTable(bw, ph, prows, []bool{false, true, false, true})
			} else if cap != "" {
				fmt.Fprintf(bw, "\n%s.\n", cap)
			}
		}
		if len(r.Notes) > 0 {
			fmt.Fprintln(bw, "\nNotes:")
			for _, n := range r.Notes {
				fmt.Fprintf(bw, "- %s\n", mdCell(n.Text))
			}
		}
		fmt.Fprintln(bw)
	}
	fmt.Fprintf(bw, "> %s\n", Caution)
	return bw.Flush()
}
