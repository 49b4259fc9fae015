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
//
// In five lines, from a Go program or test:
//
//	r, err := audit.Generator(rand.NewChaCha8(seed), 1<<20, audit.Options{})
//	if err != nil {
//		return err
//	}
//	fmt.Println(r.Verdict, r.Summary()) // consistent, or the finding that decided
//
// Reader and Bytes audit a stream (text digits, raw bytes), Digits digits in
// memory; the zero Options means DefaultOptions. Package audittest turns
// the verdict into a test failure.
package audit

// Verdict is the outcome of an audit (or of an input over its views).
type Verdict string

// String returns the verdict as the reports write it.
func (v Verdict) String() string { return string(v) }

// Verdicts.
const (
	Consistent    Verdict = "consistent"
	NotConsistent Verdict = "not consistent"
	TooUniform    Verdict = "too uniform"
	// Untested: no check could form a statistic (every one was skipped:
	// too few digits, or nothing to test under the chosen null and
	// checks). It is not evidence of consistency, and --strict-style
	// gating must not pass it.
	Untested Verdict = "nothing tested"
)

// Mark is what the adjustment made of a finding: nothing (""), deviates,
// or too uniform.
type Mark string

// String returns the mark as the reports write it ("" for none).
func (m Mark) String() string { return string(m) }

// Finding marks.
const (
	MarkDeviates   Mark = "deviates"    // upper tail significant after adjustment
	MarkTooUniform Mark = "too uniform" // lower tail significant after adjustment
)

// Adjustment is a multiple-testing adjustment.
type Adjustment string

// String returns the adjustment's name (holm, bh).
func (a Adjustment) String() string { return string(a) }

// Adjustment methods.
const (
	Holm Adjustment = "holm"
	BH   Adjustment = "bh"
)
