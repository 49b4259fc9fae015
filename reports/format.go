package reports

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

// formatP prints a probability given as its natural log: 4 significant
// digits down to 1e-10, below that the power of ten with its log10 to two
// decimals ("10^-15732.54"), since a double cannot hold it and a 0 would
// lie. An exact zero (a statistic at the edge of its range) prints as
// "0 (exact)".
func formatP(logP float64) string {
	switch {
	case math.IsInf(logP, -1):
		return "0 (exact)"
	case logP >= 0:
		return "1"
	case logP < math.Log(1e-10):
		return fmt.Sprintf("10^%.2f", logP/math.Ln10)
	default:
		return strconv.FormatFloat(math.Exp(logP), 'g', 4, 64)
	}
}

// formatStat prints a statistic with 4 significant digits, without an
// exponent between 1e-4 and 1e9 (90399.8 prints as 90400, 5.50908 as 5.509).
func formatStat(v float64) string {
	if v == 0 {
		return "0"
	}
	if v == math.Trunc(v) && math.Abs(v) < 1e6 {
		// An integer value (a count, a complexity) prints whole: rounded to
		// 4 digits, lincomp's L = 19937 read 19940.
		return strconv.FormatFloat(v, 'f', 0, 64)
	}
	exp := math.Floor(math.Log10(math.Abs(v)))
	if exp >= 4 && exp < 9 {
		scale := math.Pow(10, exp-3)
		return strconv.FormatFloat(math.Round(v/scale)*scale, 'f', 0, 64)
	}
	return strconv.FormatFloat(v, 'g', 4, 64)
}

// formatDF prints degrees of freedom (integers in borel), or "–" for a
// statistic that has none (z scores, run lengths, excursions).
func formatDF(df float64) string {
	if df == 0 {
		return "–"
	}
	return strconv.FormatFloat(df, 'f', -1, 64)
}

// statisticName gives the printed name of a statistic identifier: the
// name its check declares (checks.StatisticName), else the identifier.
func statisticName(id string) string {
	if n, ok := checks.StatisticName(id); ok {
		return n.Text
	}
	return id
}

// findingParams prints a finding's parameters, or for a second-level
// finding the statistic it tests.
func findingParams(f checks.Finding) string {
	if f.Of != "" {
		return "of " + readableLabel(f.Of)
	}
	return formatParams(f.Params)
}

// readableLabel turns "serial dpsi2 k=2" into "serial ∇ψ² k=2".
func readableLabel(l string) string {
	parts := strings.Fields(l)
	if len(parts) >= 2 {
		parts[1] = statisticName(parts[1])
	}
	for i := 2; i < len(parts); i++ {
		if k, v, ok := strings.Cut(parts[i], "="); ok && k != "k" {
			parts[i] = k + " " + v
		}
	}
	return strings.Join(parts, " ")
}

// formatParams prints parameters as "k=3" or "digit 7", in key order.
func formatParams(p map[string]int) string {
	keys := checks.ParamNames(p)
	parts := make([]string, len(keys))
	for i, k := range keys {
		if k == "k" {
			parts[i] = fmt.Sprintf("k=%d", p[k])
		} else {
			parts[i] = fmt.Sprintf("%s %d", k, p[k])
		}
	}
	return strings.Join(parts, ", ")
}

// seqName names an audit's sequence in titles and tables: the source, and
// the view of it when the input is read in several word views.
func seqName(r *audit.Result) string {
	if r.Source.View != "" {
		return r.Source.Name + " (" + r.Source.View + ")"
	}
	return r.Source.Name
}
