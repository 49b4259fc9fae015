package tests

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// findingsOf returns the findings array of a JSON report, as raw JSON, for
// a bit-for-bit comparison.
func findingsOf(t *testing.T, report []byte) string {
	t.Helper()
	var doc struct {
		Audits []struct {
			Findings json.RawMessage `json:"findings"`
			Verdict  string          `json:"verdict"`
			Digits   int64           `json:"digits"`
		} `json:"audits"`
	}
	if err := json.Unmarshal(report, &doc); err != nil || len(doc.Audits) != 1 {
		t.Fatalf("report: %v", err)
	}
	return string(doc.Audits[0].Findings)
}

// shardsOf cuts the digits at the given positions, tallies each piece with
// its global offset, and returns the shard files.
func shardsOf(t *testing.T, digits []byte, cuts []int, extra ...string) []string {
	t.Helper()
	dir := t.TempDir()
	var files []string
	bounds := append(append([]int{0}, cuts...), len(digits))
	for i := 0; i+1 < len(bounds); i++ {
		name := filepath.Join(dir, "part"+strconv.Itoa(i)+".shard")
		args := append([]string{"tally", "-", "--offset", strconv.Itoa(bounds[i]), "--max-block", "3", "-o", name}, extra...)
		if code, _, errs := runBorel(t, digits[bounds[i]:bounds[i+1]], args...); code != 0 {
			t.Fatalf("tally %d: exit %d: %s", i, code, errs)
		}
		files = append(files, name)
	}
	return files
}

// Merged shards give the same findings, bit for bit, as one audit of the
// whole input: 1, 2 and 7 shards, cut at odd places, given out of order.
func TestShardsMergeLikeOneAudit(t *testing.T) {
	digits := smallInput(t)[2:] // 20 000 decimals of π, without "3."
	_, whole, errs := runBorel(t, digits, "audit", "-", "--max-block", "3", "--format", "json")
	want := findingsOf(t, whole)
	if want == "" {
		t.Fatalf("no findings: %s", errs)
	}
	for _, cuts := range [][]int{nil, {9_999}, {1, 2_718, 2_719, 6_000, 11_113, 17_777}} {
		files := shardsOf(t, digits, cuts)
		for i, j := 0, len(files)-1; i < j; i, j = i+1, j-1 { // reversed order
			files[i], files[j] = files[j], files[i]
		}
		code, merged, errs := runBorel(t, nil, append([]string{"merge", "--format", "json"}, files...)...)
		if code != 0 {
			t.Fatalf("%d shards: exit %d: %s", len(files), code, errs)
		}
		if got := findingsOf(t, merged); got != want {
			t.Errorf("%d shards: findings differ from one audit of the whole", len(files))
		}
	}
}

func TestShardErrors(t *testing.T) {
	digits := smallInput(t)[2:]
	files := shardsOf(t, digits, []int{5_000, 12_000})
	run := func(args ...string) (int, string) {
		code, _, errs := runBorel(t, nil, append([]string{"merge"}, args...)...)
		return code, string(errs)
	}
	if code, errs := run(files[0], files[2]); code != 1 || !strings.Contains(errs, "digits 5000 to 11999 are in no shard") {
		t.Errorf("missing middle shard: exit %d %s", code, errs)
	}
	if code, errs := run(files[1], files[2]); code != 1 || !strings.Contains(errs, "no shard starts at digit 0") {
		t.Errorf("missing first shard: exit %d %s", code, errs)
	}
	dup := filepath.Join(t.TempDir(), "dup.shard")
	runBorel(t, digits[4_000:8_000], "tally", "-", "--offset", "4000", "--max-block", "3", "-o", dup)
	if code, errs := run(files[0], dup, files[1], files[2]); code != 1 || !strings.Contains(errs, "overlaps the shards before it: digits 4000 to 4999") {
		t.Errorf("overlap: exit %d %s", code, errs)
	}
	other := filepath.Join(t.TempDir(), "other.shard")
	runBorel(t, digits[5_000:12_000], "tally", "-", "--offset", "5000", "--max-block", "3", "--base", "16", "-o", other)
	if code, errs := run(files[0], other, files[2]); code != 1 || !strings.Contains(errs, "base 16") {
		t.Errorf("base mismatch: exit %d %s", code, errs)
	}
	data, _ := os.ReadFile(files[1])
	bad := filepath.Join(t.TempDir(), "bad.shard")
	corrupt := bytes.Clone(data)
	corrupt[len(corrupt)-5] ^= 1
	os.WriteFile(bad, corrupt, 0o644)
	if code, errs := run(files[0], bad, files[2]); code != 1 || !strings.Contains(errs, "corrupted") {
		t.Errorf("corrupted: exit %d %s", code, errs)
	}
	os.WriteFile(bad, data[:len(data)/2], 0o644)
	if code, errs := run(files[0], bad, files[2]); code != 1 || !strings.Contains(errs, "truncated") {
		t.Errorf("truncated: exit %d %s", code, errs)
	}
	os.WriteFile(bad, bytes.Replace(data, []byte("borel-tally 4 "), []byte("borel-tally 9 "), 1), 0o644)
	if code, errs := run(files[0], bad, files[2]); code != 1 || !strings.Contains(errs, "newer borel") {
		t.Errorf("future version: exit %d %s", code, errs)
	}
	// A shard of format 1, written by borel 0.1.0 before the records (the
	// first 2000 digits of a test input, --max-block 2), is refused with
	// what wrote it and what to do.
	if code, _, errs := runBorel(t, nil, "merge", "tests/testdata/format1.shard"); code != 1 ||
		!strings.Contains(string(errs), "format 1 was written by borel 0.1.0 before its tallies were split into records") ||
		!strings.Contains(string(errs), "tally that stretch again") || strings.Count(string(errs), "\n") != 1 {
		t.Errorf("format 1 shard: exit %d %s", code, errs)
	}
	if code, _, errs := runBorel(t, digits, "tally", "-", "--offset", "0", "-o", bad); code != 2 || !strings.Contains(string(errs), "--max-block K, the same for every shard") {
		t.Errorf("tally without --max-block: exit %d %s", code, errs)
	}
	later := filepath.Join(t.TempDir(), "later.shard")
	if code, _, errs := runBorel(t, []byte("3.14159265358979"), "tally", "-", "--offset", "3", "--max-block", "2", "-o", later); code != 1 ||
		!strings.Contains(string(errs), "only the stretch at offset 0 may have them") {
		t.Errorf("integer part in a later stretch: exit %d %s", code, errs)
	}
	if _, err := os.Stat(later); err == nil {
		t.Error("a refused stretch left a shard")
	}
}

// A shard is the same file whatever the number of workers (3·10^6 digits:
// past the Runner's calibration, so two workers run concurrently); --quiet
// silences standard error; a bad --workers is a usage error.
func TestTallyWorkersAndQuiet(t *testing.T) {
	digits := make([]byte, 3_000_000)
	x := uint64(12345)
	for i := range digits {
		x = x*6364136223846793005 + 1442695040888963407 // Knuth's MMIX LCG; high bits as digits
		digits[i] = '0' + byte((x>>33)%10)
	}
	dir := t.TempDir()
	var shards [][]byte
	for _, w := range []string{"1", "2"} {
		name := filepath.Join(dir, "w"+w+".shard")
		code, _, errs := runBorel(t, digits, "tally", "-", "--offset", "7", "--max-block", "6", "--workers", w, "-q", "-o", name)
		if code != 0 || len(errs) != 0 {
			t.Fatalf("--workers %s -q: exit %d, stderr %q", w, code, errs)
		}
		data, err := os.ReadFile(name)
		if err != nil {
			t.Fatal(err)
		}
		shards = append(shards, data)
	}
	if !bytes.Equal(shards[0], shards[1]) {
		t.Error("the shards of 1 and 2 workers differ")
	}
	name := filepath.Join(dir, "loud.shard")
	if code, _, errs := runBorel(t, digits[:1000], "tally", "-", "--offset", "0", "--max-block", "2", "-o", name); code != 0 ||
		!strings.Contains(string(errs), "digits 0 to 999 of the sequence tallied into") {
		t.Errorf("without -q: exit %d, stderr %q", code, errs)
	}
	if code, _, errs := runBorel(t, digits[:1000], "tally", "-", "--offset", "0", "--max-block", "2", "--workers", "0", "-o", name); code != 2 ||
		!strings.Contains(string(errs), "--workers 0: give 1 or more") {
		t.Errorf("--workers 0: exit %d, stderr %q", code, errs)
	}
}

// Merges in a tree: groups of shards merged into shards (--shard), the
// groups merged into the report, give the same report as one flat merge
// and as one audit of the whole; the group of a later stretch starts
// where its first shard does. Options that make a report are refused with
// --shard, and a shard named as its own output is refused.
func TestMergeTree(t *testing.T) {
	dir := t.TempDir()
	digits := make([]byte, 60_000)
	x := uint64(7)
	for i := range digits {
		x = x*6364136223846793005 + 1442695040888963407
		digits[i] = '0' + byte((x>>33)%10)
	}
	var parts []string
	for i := 0; i < 6; i++ {
		p := filepath.Join(dir, fmt.Sprintf("p%d.shard", i))
		if code, _, errs := runBorel(t, digits[i*10_000:(i+1)*10_000], "tally", "-", "--offset", fmt.Sprint(i*10_000), "--max-block", "3", "-q", "-o", p); code != 0 {
			t.Fatalf("tally %d: exit %d %s", i, code, errs)
		}
		parts = append(parts, p)
	}
	g0, g1 := filepath.Join(dir, "g0.shard"), filepath.Join(dir, "g1.shard")
	if code, _, errs := runBorel(t, nil, append([]string{"merge", "-q", "--shard", g1}, parts[3:]...)...); code != 0 {
		t.Fatalf("group 1: exit %d %s", code, errs)
	}
	if code, _, errs := runBorel(t, nil, append([]string{"merge", "-q", "--shard", g0}, parts[2], parts[0], parts[1])...); code != 0 {
		t.Fatalf("group 0: exit %d %s", code, errs)
	}
	body := func(b []byte) string { // the findings table (the names differ)
		s := string(b)
		i, j := strings.Index(s, "┌"), strings.Index(s, "┘")
		if i < 0 || j < i {
			return s
		}
		return s[i:j]
	}
	_, tree, _ := runBorel(t, nil, "merge", g1, g0)
	_, flat, _ := runBorel(t, nil, append([]string{"merge"}, parts...)...)
	_, whole, _ := runBorel(t, digits, "audit", "-", "--max-block", "3")
	if body(tree) != body(flat) || body(flat) != body(whole) {
		t.Errorf("tree, flat and whole differ:\n%s\n---\n%s\n---\n%s", body(tree), body(flat), body(whole))
	}
	if code, _, errs := runBorel(t, nil, "merge", parts[1], "--shard", parts[1]); code != 2 || !strings.Contains(string(errs), "is one of the shards merged") {
		t.Errorf("own output: exit %d %s", code, errs)
	}
	if code, _, errs := runBorel(t, nil, "merge", parts[1], "--shard", filepath.Join(dir, "x.shard"), "--format", "json"); code != 2 || !strings.Contains(string(errs), "--shard writes a shard, not a report") {
		t.Errorf("report option with --shard: exit %d %s", code, errs)
	}
	if code, _, errs := runBorel(t, nil, "merge", parts[1], parts[2]); code != 1 || !strings.Contains(string(errs), "no shard starts at digit 0") {
		t.Errorf("later stretch without --shard: exit %d %s", code, errs)
	}
}
