package reports

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

// inputHeadline returns the one verdict of an input audited in several
// views or bases, and the sentence that says what it rests on and how the
// views were combined (audit.Combine).
func inputHeadline(v audit.InputVerdict) (headline, reason string) {
	var bases, views []string
	for _, r := range v.Views {
		if r.Source.View != "" {
			views = append(views, r.Source.View)
		} else {
			bases = append(bases, strconv.Itoa(r.Base))
		}
	}
	list := "bases " + strings.Join(bases, ", ")
	if len(views) > 0 {
		list += "; " + strings.Join(views, "; ")
	}
	headline = fmt.Sprintf("Verdict for %s over its %d views (%s): %s", v.Input, len(v.Views), list, strings.ToUpper(string(v.Verdict)))
	alpha := 0.0
	if len(v.Views) > 0 {
		alpha = v.Views[0].Alpha
	}
	rule := fmt.Sprintf("each view's smallest adjusted p-value, deviation and too-uniform side, adjusted again by Holm across the %d views, so that this one verdict has its false-alarm rate at alpha = %g; the views' own verdicts below are detail", len(v.Views), alpha)
	switch v.Verdict {
	case audit.NotConsistent:
		reason = fmt.Sprintf("the smallest deviation p after the adjustment across views is %s, in %s (%s): %s.", formatP(v.LogPDeviation), viewName(v.Views[v.Decisive]), decisiveLabel(v.Views[v.Decisive]), rule)
	case audit.TooUniform:
		reason = fmt.Sprintf("nothing deviates; the smallest too-uniform p after the adjustment across views is %s, in %s (%s): %s.", formatP(v.LogPTooUniform), viewName(v.Views[v.Decisive]), decisiveLabel(v.Views[v.Decisive]), rule)
	case audit.Untested:
		reason = "no view could form a statistic: nothing was tested, so this is no evidence either way."
	default:
		reason = fmt.Sprintf("no p-value is at or below alpha after the adjustment across views (smallest %s): %s.", formatP(min(v.LogPDeviation, v.LogPTooUniform)), rule)
	}
	return headline, reason
}

// viewName names one view of an input: its base, or what it reads.
func viewName(r *audit.Result) string {
	if r.Source.View != "" {
		return fmt.Sprintf("the view of the %s (base %d)", r.Source.View, r.Base)
	}
	return fmt.Sprintf("base %d", r.Base)
}

// decisiveLabel names the finding a view's verdict rests on.
func decisiveLabel(r *audit.Result) string {
	if d := r.Decisive(); d.Index >= 0 {
		f := r.Findings[d.Index].Finding
		if desc := checks.Description(f.Check); desc != "" {
			return findingLabel(f) + ", " + desc
		}
		return findingLabel(f)
	}
	return "–"
}

// indent prefixes every line of s.
func indent(s, prefix string) string {
	return prefix + strings.ReplaceAll(s, "\n", "\n"+prefix)
}
