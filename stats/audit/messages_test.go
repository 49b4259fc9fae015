package audit

import (
	"errors"
	"strings"
	"testing"

	"github.com/borel-audit/borel/stats/checks"
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
	all := strings.Join(checks.NoteTexts(res.Notes), "\n") + res.BlockChoice
	for _, f := range res.Findings {
		all += strings.Join(checks.NoteTexts(f.Notes), "\n")
	}
	for _, s := range res.Skips {
		all += s.Reason
	}
	if strings.Contains(all, "--") || !strings.Contains(all, "MaxBlock 4 is beyond") || !strings.Contains(all, "checks run (Checks)") {
		t.Errorf("notes name flags or lost their option: %q", all)
	}
	// Each note says its kind, so a program can act on it without reading
	// the sentence.
	if !checks.HasNote(res.Notes, checks.NoteBlockBeyondRule) || !checks.HasNote(res.Notes, checks.NoteChecksSubset) {
		t.Errorf("audit notes lack their kinds: %+v", res.Notes)
	}
	sparse := false
	for _, f := range res.Findings {
		sparse = sparse || checks.HasNote(f.Notes, checks.NoteSparse)
	}
	if !sparse {
		t.Errorf("no finding carries a sparse-cells note at k=4 for 2000 digits")
	}
}

// Every note any audit writes has a kind and a sentence, and prints as
// its sentence.
func TestNotesHaveKinds(t *testing.T) {
	d := make([]byte, 3000)
	x := uint64(1)
	for i := range d {
		x = x*6364136223846793005 + 1442695040888963407
		d[i] = byte((x >> 33) % 7) // digits 0-6 in base 10: the wrong-base note
	}
	opts := DefaultOptions()
	opts.MaxBlock = 5
	res, err := Digits(d, 10, Source{Name: "x", Bytes: -1, IntegerPart: "3"}, opts)
	if err != nil {
		t.Fatal(err)
	}
	all := append([]Note{}, res.Notes...)
	for _, f := range res.Findings {
		all = append(all, f.Notes...)
	}
	for _, kind := range []checks.NoteKind{checks.NoteWrongBase, checks.NoteIntegerPart, checks.NoteBlockBeyondRule, checks.NoteWhere} {
		if !checks.HasNote(all, kind) {
			t.Errorf("no %s note in %+v", kind, all)
		}
	}
	for _, n := range all {
		if n.Kind == "" || n.Text == "" || n.String() != n.Text {
			t.Errorf("note %+v: no kind or no sentence", n)
		}
	}
}
