package reports

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

// Text writes the report for terminals and logs: for each sequence and base,
// what was audited, the findings table with footnotes, what was skipped and
// why, the entropy profile, and the verdict; the caution once at the end.
func Text(w io.Writer, doc Document) error {
	bw := bufio.NewWriter(w)
	m := textMeasure(doc.Width)
	for _, v := range doc.Inputs {
		h, reason := inputHeadline(v)
		hanging(bw, m, "", h)
		hanging(bw, m, "  ", reason)
		fmt.Fprintln(bw)
	}
	if len(doc.Results) > 1 { // the side-by-side table first, every report after it
		fmt.Fprintln(bw, "Side by side")
		if err := Summary(bw, doc); err != nil {
			return err
		}
		fmt.Fprintln(bw)
	}
	for i, r := range doc.Results {
		if i > 0 {
			fmt.Fprintln(bw)
		}
		if err := textResult(bw, doc, r); err != nil {
			return err
		}
	}
	fmt.Fprintln(bw)
	fmt.Fprintln(bw, wrapDisplay(Caution, m))
	return bw.Flush()
}

func describeSource(s audit.Source) string {
	var parts []string
	parts = append(parts, s.Kind)
	if s.Kind != "built-in" {
		parts = append(parts, s.Format)
	}
	if s.Compressed {
		parts = append(parts, "gzip")
	}
	if s.Bytes >= 0 && s.Kind == "file" {
		parts = append(parts, fmt.Sprintf("%d bytes", s.Bytes))
	}
	return fmt.Sprintf("%s (%s)", s.Name, strings.Join(parts, ", "))
}

func describeNull(n checks.Null, base int) string {
	switch n.Kind {
	case checks.Vector:
		return fmt.Sprintf("vector p = (%s): i.i.d. digits, P(w) = p_w1···p_wk", joinFloats(n.P))
	case checks.Fitted:
		return fmt.Sprintf("fitted: i.i.d. digits with p estimated from the data = (%s); df reduced", joinFloats(n.P))
	default:
		return fmt.Sprintf("uniform: i.i.d. digits, every k-block with probability %d^-k", base)
	}
}

func joinFloats(p []float64) string {
	s := make([]string, len(p))
	for i, v := range p {
		s[i] = strconv.FormatFloat(v, 'g', 4, 64)
	}
	return strings.Join(s, ", ")
}

func textResult(w io.Writer, doc Document, r *audit.Result) error {
	m := textMeasure(doc.Width)
	hanging(w, m, "", "borel audit of "+seqName(r))
	for _, p := range provenance(doc, r) {
		hanging(w, m, fmt.Sprintf("  %-12s ", p[0]), p[1])
	}
	fmt.Fprintln(w)

	if err := writeFitted(w, doc.Width, findingLayouts(r)...); err != nil {
		return err
	}
	hanging(w, m, "  ", "p upper: chance of a statistic at least this large (deviation); p lower: at most this small (fit too good); "+
		fmt.Sprintf("adjusted: the smaller of the two after %s adjustment over the whole family.", adjustmentName(string(r.Adjustment))))
	_, _, notes := findingTable(r)
	for i, n := range notes {
		hanging(w, m, fmt.Sprintf("  [%d] ", i+1), n)
	}

	if len(r.Skips) > 0 {
		fmt.Fprintln(w)
		fmt.Fprintln(w, "Not run:")
		for _, s := range r.Skips {
			hangingPad(w, m, "  ", "      ", fmt.Sprintf("%s %s: %s", s.Check, formatParams(s.Params), s.Reason))
		}
	}

	if e := r.Entropy; e != nil && len(e.Rows) > 0 {
		fmt.Fprintln(w)
		hanging(w, m, "", fmt.Sprintf("Entropy profile (nats; dimension = entropy rate / ln %d, with a %g%% interval)", r.Base, 100*e.Confidence))
		eh, erows := entropyTable(r)
		if err := writeFitted(w, doc.Width, textTable{header: eh, rows: erows, right: entropyAlign,
			key: 1}); err != nil {
			return err
		}
		hanging(w, m, "  ", entropyNote(r)+"; the last column is the likelihood-ratio test of a Markov chain of order k-2 against k-1 (Anderson & Goodman 1957).")
		if lines := positionLines(r); len(lines) > 0 {
			fmt.Fprintln(w)
			hanging(w, m, "", positionTitle(r))
			for _, l := range lines {
				hangingPad(w, m, "  - ", "    ", l)
			}
			if ph, prows, cap := positionTable(r); len(prows) > 0 {
				hanging(w, m, "  ", cap+":")
				if err := writeFitted(w, doc.Width, textTable{header: ph, rows: prows, right: []bool{false, true, false, true}, key: 1}); err != nil {
					return err
				}
			} else if cap != "" {
				hanging(w, m, "  ", cap+".")
			}
		}
	}

	if len(r.Notes) > 0 {
		fmt.Fprintln(w)
		fmt.Fprintln(w, "Notes:")
		for _, n := range r.Notes {
			hanging(w, m, "  - ", n.Text)
		}
	}
	fmt.Fprintln(w)
	hanging(w, m, "", fmt.Sprintf("Verdict for %s in base %d: %s", seqName(r), r.Base, strings.ToUpper(string(r.Verdict))))
	hanging(w, m, "  ", verdictReason(r))
	return nil
}

// findingLayouts are the findings table's text layouts, widest first: every
// column; then check, statistic and parameters as one finding, with the
// note references beside the mark (when the terminal is narrow).
func findingLayouts(r *audit.Result) []textTable {
	header, rows, _ := findingTable(r)
	full := textTable{header: header, rows: rows, right: []bool{false, false, false, true, true, true, true, true, false, false},
		wrap: []int{0, 0, 0, 0, 0, 0, 0, 0, 8, 8}, key: 3}
	narrow := textTable{header: []string{"finding", "value", "df", "p upper", "p lower", "adjusted", "mark"},
		right: []bool{false, true, true, true, true, true, false}, wrap: []int{20, 0, 0, 0, 0, 0, 8}, key: 1}
	for _, row := range rows {
		label := row[0] + " " + row[1]
		if row[2] != "" {
			label += " " + row[2]
		}
		mark := strings.TrimSpace(row[8] + " " + row[9])
		narrow.rows = append(narrow.rows, []string{label, row[3], row[4], row[5], row[6], row[7], mark})
	}
	return []textTable{full, narrow}
}

func adjustmentName(a string) string {
	if audit.Adjustment(a) == audit.BH {
		return "Benjamini–Hochberg"
	}
	return "Holm"
}

func formatFixed(v float64) string { return strconv.FormatFloat(v, 'f', 6, 64) }

// formatDim prints a dimension near 1 with enough digits to see the gap.
func formatDim(v float64) string { return strconv.FormatFloat(v, 'f', 6, 64) }

func formatDeficit(v float64) string {
	if math.Abs(v) < 5e-7 {
		return "0"
	}
	return strconv.FormatFloat(v, 'g', 3, 64)
}

func verdictReason(r *audit.Result) string {
	var dev, uni []string
	for _, f := range r.Findings {
		label := findingLabel(f.Finding)
		if d := checks.Description(f.Check); d != "" {
			label += ", " + d // lincomp L min bit 0, linear complexity
		}
		switch f.Mark {
		case audit.MarkDeviates:
			dev = append(dev, label)
		case audit.MarkTooUniform:
			uni = append(uni, label)
		}
	}
	switch r.Verdict {
	case audit.NotConsistent:
		return fmt.Sprintf("%d of %d findings deviate after adjustment (%s).", len(dev), len(r.Findings), listSome(dev))
	case audit.TooUniform:
		return fmt.Sprintf("no finding deviates, but %d fit better than chance allows (%s): counts this close to their expectations suggest constructed or low-discrepancy data, not independent digits.",
			len(uni), listSome(uni))
	case audit.Untested:
		return fmt.Sprintf("no check could form a statistic (%d skipped; see why above): nothing was tested, so this is no evidence that the digits are consistent with the null.", len(r.Skips))
	default:
		return fmt.Sprintf("no adjusted p-value is at or below alpha = %g in either tail: the digits are statistically consistent with the null at this length.", r.Alpha)
	}
}

func listSome(s []string) string {
	if len(s) <= 4 {
		return strings.Join(s, "; ")
	}
	return strings.Join(s[:4], "; ") + fmt.Sprintf("; and %d more", len(s)-4)
}
