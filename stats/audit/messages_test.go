package audit

import (
	"errors"
	"strings"
	"testing"
)

// Library messages name options by their Options field, never by a
// command-line flag; a program's OptionName renames them; errors carry the
// limit they broke as values.
func TestMessagesNameOptionsNotFlags(t *testing.T) {
	opts := DefaultOptions()
	opts.MaxBlock, opts.MemoryBytes = 9, 1<<20
	_, err := NewPlan(10, 1000, opts)
	var oe *OptionError
	if !errors.As(err, &oe) || oe.Option != OptMaxBlock || oe.Value != 9 || oe.Have != 1<<20 || oe.Need <= oe.Have {
		t.Fatalf("memory limit: %v (%+v)", err, oe)
	}
	if msg := err.Error(); strings.Contains(msg, "--") || !strings.Contains(msg, "lower MaxBlock or raise MemoryBytes") {
		t.Errorf("library message: %q", msg)
	}
	opts.OptionName = func(o string) string { return "<" + o + ">" }
	if _, err := NewPlan(10, 1000, opts); err == nil || !strings.Contains(err.Error(), "lower <MaxBlock> or raise <MemoryBytes>") {
		t.Errorf("renamed: %v", err)
	}

	opts = DefaultOptions()
	opts.Segments = 10
	_, err = NewPlan(10, 5000, opts)
	if !errors.As(err, &oe) || oe.Option != OptSegments || oe.Need != 10*MinSegmentDigits || oe.Have != 5000 || strings.Contains(err.Error(), "--") {
		t.Errorf("segments: %v (%+v)", err, oe)
	}

	// Notes of a result: an explicit block length beyond the rule of thumb,
	// and a check selection.
	opts = DefaultOptions()
	opts.MaxBlock, opts.Checks = 4, []string{"freq", "serial"}
	d := make([]byte, 2000)
	for i := range d {
		d[i] = byte(i * 7 % 10)
	}
	res, err := Digits(d, 10, Source{Name: "x", Bytes: -1}, opts)
	if err != nil {
		t.Fatal(err)
	}
	all := strings.Join(res.Notes, "\n") + res.BlockChoice
	for _, f := range res.Findings {
		all += strings.Join(f.Notes, "\n")
	}
	for _, s := range res.Skips {
		all += s.Reason
	}
	if strings.Contains(all, "--") || !strings.Contains(all, "MaxBlock 4 is beyond") || !strings.Contains(all, "checks run (Checks)") {
		t.Errorf("notes name flags or lost their option: %q", all)
	}
}
