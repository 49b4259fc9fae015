package reports

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/borel-audit/borel/stats/checks"
)

// CSVHeader is the header of the CSV report: one row per finding, numbers at
// full double precision, probabilities also as log10 (empty when the
// probability is exactly 0). Lines before the header start with '#' and
// carry the provenance and the audits' notes; encoding/csv reads them with
// Comment = '#'. note is where a deviating finding deviates (its cells of
// largest standardized residual), notes joined by "; ".
var CSVHeader = []string{"sequence", "base", "digits", "null", "verdict", "check", "statistic", "params", "of",
	"two_sided", "value", "df", "p_upper", "p_lower", "log10_p_upper", "log10_p_lower",
	"adjusted_p_upper", "adjusted_p_lower", "log10_adjusted_p_upper", "log10_adjusted_p_lower",
	"holm_p_upper", "holm_p_lower", "bh_p_upper", "bh_p_lower", "mark", "note"}

// full writes a number at full precision, never as "-0".
func full(v float64) string {
	if v == 0 {
		v = 0 // -0 → 0
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// fullDF writes degrees of freedom, empty for a statistic that has none
// (z scores, runs, excursions: DF 0).
func fullDF(df float64) string {
	if df == 0 {
		return ""
	}
	return full(df)
}

func fullLog10(lnP float64) string {
	if math.IsInf(lnP, -1) {
		return ""
	}
	return full(lnP / math.Ln10)
}

func csvParams(p map[string]int) string {
	keys := checks.ParamNames(p)
	parts := make([]string, len(keys))
	for i, k := range keys {
		parts[i] = fmt.Sprintf("%s=%d", k, p[k])
	}
	return strings.Join(parts, ";")
}

// CSV writes the report as CSV.
func CSV(w io.Writer, doc Document) error {
	fmt.Fprintf(w, "# borel %s audit report, %s\n", doc.Version, doc.Created.UTC().Format(time.RFC3339))
	fmt.Fprintf(w, "# command: %s\n", strings.Join(doc.Command, " "))
	for _, v := range doc.Inputs {
		h, reason := inputHeadline(v)
		fmt.Fprintf(w, "# %s; %s\n", h, reason)
	}
	if len(doc.Results) > 1 {
		// The side-by-side table first, as comment lines (its columns are
		// ComparisonCSVHeader's; the table of findings below is the data).
		var buf bytes.Buffer
		if err := comparisonCSVRows(&buf, doc); err != nil {
			return err
		}
		fmt.Fprintln(w, "# side by side:")
		for _, line := range strings.Split(strings.TrimRight(buf.String(), "\n"), "\n") {
			fmt.Fprintf(w, "# %s\n", line)
		}
	}
	for _, r := range doc.Results {
		for _, p := range provenance(doc, r)[3:] {
			fmt.Fprintf(w, "# %s %s: %s\n", r.Source.Name, p[0], p[1])
		}
		for _, n := range r.Notes {
			fmt.Fprintf(w, "# %s note: %s\n", r.Source.Name, strings.ReplaceAll(n.Text, "\n", " "))
		}
	}
	fmt.Fprintf(w, "# %s\n", Caution)
	cw := csv.NewWriter(w)
	if err := cw.Write(CSVHeader); err != nil {
		return err
	}
	for _, r := range doc.Results {
		for _, f := range r.Findings {
			row := []string{seqName(r), strconv.Itoa(r.Base), strconv.FormatInt(r.Digits, 10), r.Null.Kind.String(), string(r.Verdict),
				f.Check, string(f.Statistic), csvParams(f.Params), f.Of, strconv.FormatBool(f.TwoSided),
				full(f.Value), fullDF(f.DF), full(math.Exp(f.LogPUpper)), full(math.Exp(f.LogPLower)),
				fullLog10(f.LogPUpper), fullLog10(f.LogPLower),
				full(math.Exp(f.LogAdjUpper)), full(math.Exp(f.LogAdjLower)), fullLog10(f.LogAdjUpper), fullLog10(f.LogAdjLower),
				full(math.Exp(f.LogHolmUpper)), full(math.Exp(f.LogHolmLower)), full(math.Exp(f.LogBHUpper)), full(math.Exp(f.LogBHLower)),
				string(f.Mark), strings.Join(checks.NoteTexts(f.Notes), "; ")}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}
