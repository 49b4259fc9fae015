package reports

import (
	"fmt"
	"strconv"
	"strings"

	"borel/stats/audit"
)

// inputHeadline returns the one verdict of an input audited in several
// views or bases, and the sentence that says what it rests on and how the
// views were combined (audit.Combine).
func inputHeadline(v audit.InputVerdict) (headline, reason string) {
	bases := make([]string, len(v.Views))
	for i, r := range v.Views {
		bases[i] = strconv.Itoa(r.Base)
	}
	headline = fmt.Sprintf("Verdict for %s over its %d views (bases %s): %s", v.Input, len(v.Views), strings.Join(bases, ", "), strings.ToUpper(v.Verdict))
	alpha := 0.0
	if len(v.Views) > 0 {
		alpha = v.Views[0].Alpha
	}
	rule := fmt.Sprintf("each view's smallest adjusted p-value, deviation and too-uniform side, adjusted again by Holm across the %d views, so that this one verdict has its false-alarm rate at alpha = %g; the views' own verdicts below are detail", len(v.Views), alpha)
	switch v.Verdict {
	case audit.NotConsistent:
		reason = fmt.Sprintf("the smallest deviation p after the adjustment across views is %s, in base %d (%s): %s.", formatP(v.LogPDeviation), v.Views[v.Decisive].Base, decisiveLabel(v.Views[v.Decisive]), rule)
	case audit.TooUniform:
		reason = fmt.Sprintf("nothing deviates; the smallest too-uniform p after the adjustment across views is %s, in base %d (%s): %s.", formatP(v.LogPTooUniform), v.Views[v.Decisive].Base, decisiveLabel(v.Views[v.Decisive]), rule)
	case audit.Untested:
		reason = "no view could form a statistic: nothing was tested, so this is no evidence either way."
	default:
		reason = fmt.Sprintf("no p-value is at or below alpha after the adjustment across views (smallest %s): %s.", formatP(min(v.LogPDeviation, v.LogPTooUniform)), rule)
	}
	return headline, reason
}

// decisiveLabel names the finding a view's verdict rests on.
func decisiveLabel(r *audit.Result) string {
	if d := r.Decisive(); d.Index >= 0 {
		return findingLabel(r.Findings[d.Index].Finding)
	}
	return "–"
}

// indent prefixes every line of s.
func indent(s, prefix string) string {
	return prefix + strings.ReplaceAll(s, "\n", "\n"+prefix)
}
