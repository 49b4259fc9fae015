package main

import (
	"github.com/olekukonko/tablewriter/pkg/twwidth"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/borel-audit/borel/stats/expand"
)

// widthInput is a sticky decimal sequence (every table has marks and
// notes) written as a file.
func widthInput(t *testing.T) string {
	t.Helper()
	d := expand.Sticky(30000, 10, 0.03, rand.New(rand.NewPCG(16, 80)))
	for i := range d {
		d[i] += '0'
	}
	return writeFile(t, "sticky.txt", d)
}

// widest is the widest line of out in terminal columns (a combining mark,
// as in q̂, takes none).
func widest(out string) (int, string) {
	w, line := 0, ""
	for _, l := range strings.Split(out, "\n") {
		if n := twwidth.Width(l); n > w {
			w, line = n, l
		}
	}
	return w, line
}

// A text report fits the width it is given: at 80 and 120 columns no line
// is longer (before, lines ran to 173 columns and the provenance to 510),
// and nothing is lost on the way (every finding, mark and note of the
// whole report is still there). Without a width, as in a pipe, the tables
// are whole.
func TestTextFitsWidth(t *testing.T) {
	in := widthInput(t)
	args := []string{"audit", in, "--bases", "3,10", "--from-base", "10", "-q"}
	code, full, errs := borel(t, "", args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(full, "│ check ") || !strings.Contains(full, "│ sequence ") {
		t.Fatalf("without a width the full boxed tables are expected:\n%s", full)
	}
	fullDeviates := strings.Count(full, "deviates")
	for _, width := range []string{"80", "120"} {
		code, out, errs := borel(t, "", append(args, "--width", width)...)
		if code != 0 {
			t.Fatalf("--width %s: exit %d: %s", width, code, errs)
		}
		limit := map[string]int{"80": 80, "120": 120}[width]
		if w, line := widest(out); w > limit {
			t.Errorf("--width %s: a line of %d columns:\n%s", width, w, line)
		}
		if n := strings.Count(out, "deviates"); n != fullDeviates {
			t.Errorf("--width %s: %d marks 'deviates', the whole report has %d", width, n, fullDeviates)
		}
		flat := strings.Join(strings.Fields(strings.ReplaceAll(out, "│", " ")), " ")
		for _, want := range []string{"freq X² k=1", "serial ∇²ψ² k=2", "drift max|S|/√n", "largest deviations (O − E)/√E:",
			"Verdict for " + in + " in base 10: NOT CONSISTENT", "(continued:"} {
			if width == "120" && want == "(continued:" {
				continue
			}
			if !strings.Contains(flat, want) {
				t.Errorf("--width %s: the report lacks %q", width, want)
			}
		}
	}
	if w, _ := widest(full); w <= 120 {
		t.Errorf("the whole tables are expected wider than 120 columns for this test to mean something (widest %d)", w)
	}
}

// COLUMNS is for terminals: with standard output a pipe the tables stay
// whole, and --width below 40 columns is refused.
func TestColumnsIgnoredForPipes(t *testing.T) {
	t.Setenv("COLUMNS", "80")
	in := widthInput(t)
	_, out, _ := borel(t, "", "audit", in, "-q")
	if w, _ := widest(out); w <= 80 {
		t.Errorf("a pipe got a fitted report (widest line %d) though COLUMNS applies to terminals only", w)
	}
	code, _, errs := borel(t, "", "audit", in, "-q", "--width", "20")
	if code != exitUsage || !strings.Contains(errs, "--width 20: give at least 40 columns") {
		t.Errorf("--width 20: exit %d, %q", code, errs)
	}
}

// Word views are other sequences than the byte regroupings: the note that
// powers of one base share normality lists the regroupings only (it read
// "bases 2, 2, 2, 4, 16, 32, 256"); under a fitted null the word-level
// checks say why they do not run.
func TestWordViewNotes(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	b := make([]byte, 200_000)
	for i := range b {
		b[i] = byte(rng.Uint32())
	}
	in := writeFile(t, "gen.bin", b)
	_, out, _ := borel(t, "", "audit", in, "--raw", "--word", "32", "-q")
	flat := strings.Join(strings.Fields(out), " ")
	if !strings.Contains(flat, "bases 2, 4, 16, 256 are powers of 2") || strings.Contains(flat, "bases 2, 2") {
		t.Errorf("the powers-of-two note mixes in the word views:\n%s", out)
	}
	_, out, _ = borel(t, "", "audit", in, "--raw", "--word", "32", "--null", "fitted", "-q")
	if flat := strings.Join(strings.Fields(out), " "); !strings.Contains(flat, "the word-level checks test i.i.d. uniform 32-bit words, so under a fitted null they do not run") {
		t.Errorf("no note that the word checks do not run under a fitted null")
	}
}
