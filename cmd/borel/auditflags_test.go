package main

import (
	"strings"
	"testing"
)

// The shared audit options are one parser: a bad value gets the same
// one-line message from every subcommand that offers the option, and the
// library messages name the command's flags (names.go).
func TestSharedAuditOptions(t *testing.T) {
	digits := strings.Repeat("0123456789", 300)
	shard := writeFile(t, "s.shard", nil)
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"audit", "-", "--alpha", "2"}, "--alpha 2 is outside (0, 1)"},
		{[]string{"audit", "-", "--bases", "2,3", "--alpha", "2"}, "--alpha 2 is outside (0, 1)"},
		{[]string{"compare", "pi", "--alpha", "2"}, "--alpha 2 is outside (0, 1)"},
		{[]string{"merge", shard, "--alpha", "2"}, "--alpha 2 is outside (0, 1)"},
		{[]string{"audit", "-", "--adjust", "x"}, "--adjust"},
		{[]string{"merge", shard, "--adjust", "x"}, "--adjust"},
		{[]string{"audit", "-", "--workers", "0"}, "--workers 0: give 1 or more"},
		{[]string{"tally", "-", "--offset", "0", "--max-block", "2", "--workers", "0", "-o", shard}, "--workers 0: give 1 or more"},
		{[]string{"tally", "-", "--offset", "0", "--max-block", "auto", "-o", shard}, "tally needs --max-block K"},
		{[]string{"audit", "-", "--segments", "1"}, "--segments 1: give 2 or more segments"},
		{[]string{"audit", "-", "--bases", "2,3", "--segments", "1"}, "--segments 1: give 2 or more segments"},
		{[]string{"audit", "-", "--null", "0.5,0.5"}, "--null"},
		{[]string{"tally", "-", "--offset", "0", "--max-block", "2", "--null", "0.5,0.5", "-o", shard}, "--null"},
		{[]string{"compare", "pi", "--null", "0.5,0.5"}, "--null"},
		// Library messages in the command's terms.
		{[]string{"audit", "-", "--max-block", "9", "--memory", "1MiB"}, "lower --max-block or raise --memory"},
		{[]string{"audit", "-", "--segments", "50"}, "too few for --segments 50"},
		{[]string{"audit", "-", "--checks", "nope"}, "--checks: unknown check \"nope\""},
	} {
		code, _, errs := borel(t, digits, c.args...)
		if code == 0 || !strings.Contains(errs, c.want) || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: exit %d, %q; want one line with %q", c.args, code, errs, c.want)
		}
	}
}
