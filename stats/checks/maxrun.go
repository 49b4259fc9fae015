package checks

import (
	"fmt"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
)

// maxrunCheck is the longest run: of identical digits (any digit), and of
// one digit (b-1: ones for bits). Its exact law comes from a Markov chain on
// the current run length raised to the n-th power (stats.LongestRunLogTails;
// Poisson approximation only in far tails beyond the chain, which a note
// says). L is discrete: p upper is P(L ≥ l), p lower is P(L ≤ l) — a longest
// run shorter than chance allows is a fit that is too good (constructed
// sequences avoid long runs). The second level uses randomized p-values.
// Checks: π's first 10^6 decimals have a longest run of 7 ("3333333" at
// decimal 710 100, also stated in M. E. Lines, A Number for Your Thoughts,
// 1986, ch. 18; P(L ≥ 7) ≈ 0.59). References: Erdős & Rényi, J. Analyse
// Math. 23 (1970) 103–111; Gordon, Schilling & Waterman, Probab. Theory Rel.
// Fields 72 (1986) 279–287; Schilling, College Math. J. 21 (1990) 196–207.
type maxrunCheck struct{}

var _ Check = maxrunCheck{}

func (maxrunCheck) Name() string { return "maxrun" }

// SegmentStatistic: the longest run of any digit.
func (maxrunCheck) SegmentStatistic(f Finding) bool { return f.Statistic == "run_any" }

// StatisticNames: the longest runs.
func (maxrunCheck) StatisticNames() map[string]StatName {
	return map[string]StatName{"run_any": {"L (any digit)", `$L$ (any digit)`}, "run_digit": {"L", `$L$`}}
}

// Needs: the longest runs of identical digits and of digit b−1.
func (maxrunCheck) Needs(s Setting) Needs {
	return Needs{Records: []tally.RecordSpec{&tally.RunSpec{Digit: s.Base - 1}}}
}

func (maxrunCheck) Run(in Input, out *Result) {
	t := in.Tally
	add := func(stat Statistic, params map[string]int, class int, l int64) {
		up, lo, approx := stats.LongestRunLogTails(t.N, in.Null.P, class, l)
		f := Finding{Check: "maxrun", Statistic: stat, Params: params, Value: float64(l)}
		f.setDiscrete(up, lo, atomFromTails(up, lo))
		if approx {
			f.Notes = append(f.Notes, Note{NoteApproximation, "a tail beyond the exact chain uses the Poisson approximation (Erdős–Rényi)"})
		}
		out.Findings = append(out.Findings, f)
	}
	runs := t.Runs()
	add("run_any", nil, -1, runs.Any.Max)
	if in.Null.P[runs.Digit] > 0 {
		add("run_digit", map[string]int{"digit": runs.Digit}, runs.Digit, runs.Dig.Max)
	} else {
		out.Skips = append(out.Skips, Skip{Check: "maxrun", Params: map[string]int{"digit": runs.Digit},
			Reason: fmt.Sprintf("digit %d has probability 0 under the null", runs.Digit)})
	}
}
