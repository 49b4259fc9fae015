package reports

import (
	"fmt"
	"strconv"
	"strings"
	"time"

	"github.com/borel-audit/borel/stats/audit"
)

// provenance returns what a reader needs to reproduce one audit, as
// (label, value) rows: program, date, command, source (path, size, SHA-256
// or the built-in parameters), base, digits, integer part, null, alpha,
// adjustment, block lengths, segments and seed.
func provenance(doc Document, r *audit.Result) [][2]string {
	src := describeSource(r.Source)
	if r.Source.SHA256 != "" {
		src += ", SHA-256 " + r.Source.SHA256
	}
	if r.Source.Parameters != "" {
		src += ", " + r.Source.Parameters
	}
	rows := [][2]string{
		{"program", "borel " + doc.Version},
		{"date", doc.Created.UTC().Format(time.RFC3339)},
		{"command", strings.Join(doc.Command, " ")},
		{"source", src},
	}
	if len(r.Source.Checks) > 0 {
		rows = append(rows, [2]string{"checked", strings.Join(r.Source.Checks, "; ")})
	}
	rows = append(rows, [][2]string{
		{"base", strconv.Itoa(r.Base)},
		{"digits", strconv.FormatInt(r.Digits, 10)},
	}...)
	if r.Source.IntegerPart != "" {
		rows = append(rows, [2]string{"integer part", fmt.Sprintf("%q dropped", r.Source.IntegerPart)})
	}
	rows = append(rows,
		[2]string{"null", describeNull(r.Null, r.Base)},
		[2]string{"alpha", strconv.FormatFloat(r.Alpha, 'g', -1, 64)},
		[2]string{"adjustment", fmt.Sprintf("%s over %d p-values (%d findings × 2 tails)", adjustmentName(string(r.Adjustment)), 2*len(r.Findings), len(r.Findings))},
		[2]string{"windows", fmt.Sprintf("k ≤ %d digits (serial, entropy; blocks where counts allow): %s", r.MaxBlock, r.BlockChoice)},
	)
	if r.Segments > 0 {
		rows = append(rows, [2]string{"segments", fmt.Sprintf("%d, randomized p-values with seed %d", r.Segments, r.Seed)})
	}
	return rows
}
