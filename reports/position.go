package reports

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/stats"
	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

// maxPositionRows is the largest base whose every digit gets a row in the
// position table; in larger bases only the digits whose interval misses
// the null's probability are listed.
const maxPositionRows = 16

// positionTitle heads the section on where the sequence sits.
func positionTitle(r *audit.Result) string {
	return fmt.Sprintf("Where the sequence sits among the sets F(q) (%g%% level)", 100*r.Entropy.Confidence)
}

// positionLines says where the sequence sits: the region of its frequency
// vector and whether the null's vector is in it, the dimension of F(q̂),
// and under a stated vector the local dimension of μ_p.
func positionLines(r *audit.Result) []string {
	e := r.Entropy
	if e == nil || e.Position == nil || len(e.Rows) == 0 {
		return nil
	}
	p := e.Position
	in := "inside"
	if !p.NullInside {
		in = "outside"
	}
	null := "the uniform vector"
	switch r.Null.Kind {
	case checks.Fitted:
		null = "the fitted vector (q̂ itself)"
	case checks.Vector:
		null = "the stated vector p"
	}
	lines := []string{
		fmt.Sprintf("digit frequencies q̂ of %d digits: %s lies %s their region n·Σ(q̂_j − q_j)²/q_j ≤ %s (the Pearson test's, χ² quantile with %d df)",
			p.Region.N, null, in, strconv.FormatFloat(p.Region.A, 'f', 3, 64), len(p.Region.QHat)-1),
		fmt.Sprintf("dim F(q̂) = %s %s (Besicovitch–Eggleston dimension of the frequency vector's set; the entropy profile at k = 1)",
			formatDim(e.Rows[0].Dimension), dimInterval(e.Rows[0].DimLow, e.Rows[0].DimHigh)),
	}
	if p.HasAlpha {
		if math.IsInf(p.Alpha, 1) {
			lines = append(lines, "local dimension of μ_p: infinite, the sequence uses a digit p excludes")
		} else {
			lines = append(lines, fmt.Sprintf("local dimension of μ_p along the sequence α̂ = −Σ q̂_j log_%d p_j = %s [%s, %s]; a sequence generic for μ_p has α = dim F(p) = %s",
				r.Base, formatDim(p.Alpha), formatDim(p.AlphaLow), formatDim(p.AlphaHigh), formatDim(e.NullDimension)))
			if tied := tiedDigits(r.Null.P, r.Base); tied != "" {
				lines = append(lines, fmt.Sprintf("α̂ weighs each digit by −log_%d p_j, so it cannot tell apart digits of equal p_j (%s): moving frequency between them leaves α̂ where it is; the frequency table and dim F(q̂) can", r.Base, tied))
			}
			if s, err := stats.NewSpectrum(r.Null.P, r.Base); err == nil {
				if f, _, ok := s.F(p.Alpha); ok {
					lines = append(lines, fmt.Sprintf("the spectrum of μ_p there: f(α̂) = %s, the dimension of the numbers at which μ_p has local dimension α̂ (dim F(q̂) ≤ f(α̂), equal when q̂ is a tilted vector of p)", formatDim(f)))
				}
			}
		}
	}
	return lines
}

func dimInterval(lo, hi float64) string {
	if math.IsNaN(lo) {
		return ""
	}
	return fmt.Sprintf("[%s, %s]", formatDim(lo), formatDim(hi))
}

// positionTable returns the frequency table: each digit's q̂, its
// simultaneous interval (Quesenberry–Hurst) and the null's probability; in
// bases above maxPositionRows only the rows whose interval misses it.
// caption says which.
func positionTable(r *audit.Result) (header []string, rows [][]string, caption string) {
	e := r.Entropy
	if e == nil || e.Position == nil {
		return nil, nil, ""
	}
	p := e.Position
	header = []string{"digit", "q̂", "simultaneous interval", "null p"}
	all := len(p.Region.QHat) <= maxPositionRows
	for j, q := range p.Region.QHat {
		pj := 0.0
		if j < len(r.Null.P) {
			pj = r.Null.P[j]
		}
		miss := pj < p.Region.Low[j] || pj > p.Region.High[j]
		if !all && !miss {
			continue
		}
		mark := ""
		if miss {
			mark = " (outside)"
		}
		rows = append(rows, []string{checks.DigitName(j, r.Base), strconv.FormatFloat(q, 'f', 6, 64),
			fmt.Sprintf("[%s, %s]", strconv.FormatFloat(p.Region.Low[j], 'f', 6, 64), strconv.FormatFloat(p.Region.High[j], 'f', 6, 64)),
			strconv.FormatFloat(pj, 'g', 6, 64) + mark})
	}
	caption = fmt.Sprintf("Digit frequencies with simultaneous %g%% intervals (Quesenberry & Hurst 1964: the region's projections)", 100*e.Confidence)
	if !all {
		if len(rows) == 0 {
			caption = fmt.Sprintf("Every one of the %d digits' simultaneous %g%% intervals (Quesenberry & Hurst 1964) holds the null's probability", len(p.Region.QHat), 100*e.Confidence)
		} else {
			caption = fmt.Sprintf("The digits whose simultaneous %g%% interval (Quesenberry & Hurst 1964) misses the null's probability (%d of %d)", 100*e.Confidence, len(rows), len(p.Region.QHat))
		}
	}
	return header, rows, caption
}

// orderCell is the entropy table's cell for the Markov order test of row
// k: the p-value of order k−2 against k−1.
func orderCell(row checks.EntropyRow) string {
	if math.IsNaN(row.OrderLogP) {
		return "–"
	}
	return formatP(row.OrderLogP)
}

// entropyAlign right-aligns the entropy table's numbers (the interval is
// text).
var entropyAlign = []bool{true, true, true, true, true, false, true, true}

// entropyNote says what full dimension is under the audit's null.
func entropyNote(r *audit.Result) string {
	if r.Null.Kind == checks.Uniform {
		return fmt.Sprintf("Full dimension is 1 (ln %d = %s nats per digit)", r.Base, formatFixed(math.Log(float64(r.Base))))
	}
	return fmt.Sprintf("The null's Besicovitch–Eggleston dimension H(p)/ln %d = %s", r.Base, formatDim(r.Entropy.NullDimension))
}

// tiedDigits names the groups of used digits with equal probability, e.g.
// "0 and 1", or "" when every p_j differs.
func tiedDigits(p []float64, base int) string {
	var groups []string
	done := make([]bool, len(p))
	for i := range p {
		if done[i] || p[i] <= 0 {
			continue
		}
		names := []string{checks.DigitName(i, base)}
		for j := i + 1; j < len(p); j++ {
			if !done[j] && p[j] == p[i] {
				names = append(names, checks.DigitName(j, base))
				done[j] = true
			}
		}
		if len(names) > 1 {
			if len(names) > 4 {
				names = append(names[:3], fmt.Sprintf("… (%d digits)", len(names)))
			}
			groups = append(groups, strings.Join(names[:len(names)-1], ", ")+" and "+names[len(names)-1])
		}
	}
	return strings.Join(groups, "; ")
}
