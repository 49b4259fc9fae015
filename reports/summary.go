package reports

import (
	"fmt"
	"io"
	"math"
	"strconv"
)

// Summary writes one row per sequence and base: the verdict, the smallest
// adjusted p-value and the finding that gave it, and the dimension estimate
// (entropy rate / ln b at the largest block length) with its interval.
func Summary(w io.Writer, doc Document) error {
	var rows [][]string
	for _, r := range doc.Results {
		// The smallest adjusted p; ties (adjusted p-values cap at 1) go to
		// the smallest raw p.
		worst, worstRaw, label := 0.0, 0.0, "–"
		for _, f := range r.Findings {
			lp, raw, tail := f.LogAdjUpper, f.LogPUpper, "upper"
			if f.LogAdjLower < lp || (f.LogAdjLower == lp && f.LogPLower < raw) {
				lp, raw, tail = f.LogAdjLower, f.LogPLower, "lower"
			}
			if label == "–" || lp < worst || (lp == worst && raw < worstRaw) {
				worst, worstRaw = lp, raw
				label = fmt.Sprintf("%s %s %s (%s)", f.Check, statisticName(f.Statistic), findingParams(f.Finding), tail)
			}
		}
		dim, interval := "–", "–"
		if e := r.Entropy; e != nil && len(e.Rows) > 0 {
			dim = formatDim(e.Summary.Dimension)
			if !math.IsNaN(e.Summary.DimLow) {
				interval = fmt.Sprintf("[%s, %s]", formatDim(e.Summary.DimLow), formatDim(e.Summary.DimHigh))
			}
		}
		rows = append(rows, []string{r.Source.Name, strconv.Itoa(r.Base), strconv.FormatInt(r.Digits, 10),
			r.Verdict, formatP(worst), label, dim, interval})
	}
	return writeTable(w, []string{"sequence", "base", "digits", "verdict", "smallest adjusted p", "from", "dimension", "interval"},
		rows, []bool{false, true, true, false, true, false, true, false})
}
