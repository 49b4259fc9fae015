// Package audit runs borel's battery on one sequence in one base, in three
// steps along its seams:
//
//   - the plan (plan.go, options.go): options → the records the selected
//     checks need and the block lengths (validity rule and memory budget),
//     before any digit is read;
//   - the pass (pass.go, segments.go): the digits into the tally (and the
//     second level's segments), one chunk at a time, stopped through a
//     context.Context;
//   - the judgement (judgement.go): the checks on the finished tally, the
//     adjustment of the whole family, the verdict and the finding it rests
//     on (Result.Decisive).
//
// It returns data; rendering is the reports package's job. Messages name
// options by their Go names (messages.go), never by a command's flags.
package audit

// Verdicts.
const (
	Consistent    = "consistent"
	NotConsistent = "not consistent"
	TooUniform    = "too uniform"
	// Untested: no check could form a statistic (every one was skipped:
	// too few digits, or nothing to test under the chosen null and
	// checks). It is not evidence of consistency, and --strict-style
	// gating must not pass it.
	Untested = "nothing tested"
)

// Finding marks.
const (
	MarkDeviates   = "deviates"    // upper tail significant after adjustment
	MarkTooUniform = "too uniform" // lower tail significant after adjustment
)

// Adjustment methods.
const (
	Holm = "holm"
	BH   = "bh"
)
