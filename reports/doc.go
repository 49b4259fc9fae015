// Package reports renders audit results for people and programs: a text
// report for terminals and logs, and a versioned JSON document. It reads
// audit.Result values and never recomputes a statistic; every number it
// prints was computed by the stats packages.
package reports

import (
	"time"

	"github.com/borel-audit/borel/stats/audit"
)

// Document is everything one run of borel reports.
type Document struct {
	Version string    // borel version
	Command []string  // the command line, for provenance
	Created time.Time // when the report was made
	Results []*audit.Result
	// Inputs: for one input audited in several views or bases, its one
	// verdict (audit.Combine), reported first; nil otherwise.
	Inputs []audit.InputVerdict
	// Width is the number of columns a text report fits (a terminal's
	// width); 0 means no limit, for pipes and files: tables whole,
	// sentences wrapped at 100 columns. Other formats ignore it.
	Width int
}

// Caution ends every report. Consistency is evidence of nothing more.
const Caution = "Caution: consistency with a null is not a proof of normality, and passing statistical checks " +
	"is no evidence of cryptographic strength. For gambling, lottery or security certification, defer to " +
	"the regulator's or standard body's accredited procedure."
