package main

import (
	"strings"
	"testing"
)

// An audit in which no check could form a statistic says so, and --strict
// does not pass it: a fitted null with only the frequency check, and 28
// bytes with checks that need more (updown's exact law tests 5 values of 7
// bytes and more, so 35 bytes are enough for it).
func TestNothingTested(t *testing.T) {
	digits := strings.Repeat("0123456789", 300)
	bytes28 := writeFile(t, "b.bin", []byte(strings.Repeat("\x07\xf3\x11\x80", 7)))
	for _, args := range [][]string{
		{"audit", "-", "--null", "fitted", "--checks", "freq", "--strict", "-q"},
		{"audit", bytes28, "--raw", "--base", "256", "--checks", "gap,poker,coupon,updown", "--strict", "-q"},
	} {
		code, out, errs := borel(t, digits, args...)
		// sentences wrap at 100 columns: compare with the line breaks as spaces
		if flat := strings.Join(strings.Fields(out), " "); code != exitVerdict || !strings.Contains(flat, "NOTHING TESTED") || !strings.Contains(flat, "no evidence") {
			t.Errorf("%v: exit %d, stderr %q, verdict line %q", args, code, errs, verdictLine(out))
		}
	}
	if code, out, _ := borel(t, digits, "audit", "-", "--null", "fitted", "--checks", "freq", "-q", "--format", "json"); code != 0 ||
		!strings.Contains(out, `"verdict": "nothing tested"`) {
		t.Errorf("json: exit %d, %s", code, out)
	}
}

func verdictLine(out string) string {
	for _, l := range strings.Split(out, "\n") {
		if strings.HasPrefix(l, "Verdict") {
			return l
		}
	}
	return ""
}
