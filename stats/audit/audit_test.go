package audit

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/expand"
)

// deBruijn returns the cyclic de Bruijn sequence B(b, k) of length b^k, by
// the Fredricksen–Kessler–Maiorana (Lyndon word) construction: every k-word
// occurs exactly once cyclically, so every j-word (j ≤ k) occurs exactly
// b^(k-j) times (by its definition: de Bruijn 1946).
func deBruijn(b, k int) []byte {
	a := make([]int, b*k)
	var out []byte
	var db func(t, p int)
	db = func(t, p int) {
		if t > k {
			if k%p == 0 {
				for _, v := range a[1 : p+1] {
					out = append(out, byte(v))
				}
			}
			return
		}
		a[t] = a[t-p]
		db(t+1, p)
		for j := a[t-p] + 1; j < b; j++ {
			a[t] = j
			db(t+1, t)
		}
	}
	db(1, 1)
	return out
}

func auditOf(t *testing.T, d []byte, base int, opts Options) *Result {
	t.Helper()
	r, err := Digits(d, base, Source{Name: "test", Kind: "built-in"}, opts)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// assertEveryWordOnce checks the de Bruijn property: each k-word once, cyclically.
func assertEveryWordOnce(t *testing.T, d []byte, b, k int) {
	t.Helper()
	seen := make([]bool, int(math.Pow(float64(b), float64(k))))
	for i := range d {
		w := 0
		for j := 0; j < k; j++ {
			w = w*b + int(d[(i+j)%len(d)])
		}
		if seen[w] {
			t.Fatalf("word %d occurs twice", w)
		}
		seen[w] = true
	}
	if len(d) != len(seen) {
		t.Fatalf("length %d, want %d", len(d), len(seen))
	}
}

// A de Bruijn sequence holds every k-word exactly once cyclically, so every
// overlapping j-block count equals its expectation (ψ²_j = 0) — the
// canonical "too uniform" input.
func TestDeBruijnIsTooUniform(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	for _, c := range []struct{ b, k int }{{2, 16}, {10, 5}} {
		d := expand.RandomDeBruijn(c.b, c.k, rng)
		assertEveryWordOnce(t, d, c.b, c.k)
		r := auditOf(t, d, c.b, DefaultOptions())
		if r.Verdict != TooUniform {
			t.Errorf("random B(%d,%d): verdict %q, want %q", c.b, c.k, r.Verdict, TooUniform)
			for _, f := range r.Findings {
				t.Logf("%s %s %v: %g df %g up %g lo %g mark %q", f.Check, f.Statistic, f.Params, f.Value, f.DF, f.LogAdjUpper, f.LogAdjLower, f.Mark)
			}
		}
	}
}

// The lexicographically least de Bruijn sequence (FKM) is too uniform in its
// overlapping counts, yet its Lyndon-word order shows in the non-overlapping
// blocks: it is not consistent, and the serial check still marks it too
// uniform.
func TestLexicographicDeBruijnIsNotConsistent(t *testing.T) {
	d := deBruijn(10, 5)
	assertEveryWordOnce(t, d, 10, 5)
	r := auditOf(t, d, 10, DefaultOptions())
	if r.Verdict != NotConsistent {
		t.Errorf("FKM B(10,5): verdict %q, want %q", r.Verdict, NotConsistent)
	}
	for _, f := range r.Findings {
		if f.Check == "serial" && f.Mark != MarkTooUniform {
			t.Errorf("serial %s k=%d: mark %q, want too uniform", f.Statistic, f.Params["k"], f.Mark)
		}
	}
}

func TestPeriodicIsNotConsistent(t *testing.T) {
	d := make([]byte, 100_000)
	for i := range d {
		d[i] = byte(i % 10)
	}
	r := auditOf(t, d, 10, DefaultOptions())
	if r.Verdict != NotConsistent {
		t.Errorf("periodic 0123456789…: verdict %q, want %q", r.Verdict, NotConsistent)
	}
	// Its digit frequencies are exactly uniform: freq alone says "too uniform",
	// the serial check says it deviates.
	for _, f := range r.Findings {
		if f.Check == "freq" && f.Statistic == "X2" && f.Mark != MarkTooUniform {
			t.Errorf("freq X² mark %q, want %q", f.Mark, MarkTooUniform)
		}
	}
}

func seededDigits(n, base int, seed uint64) []byte {
	var key [32]byte
	key[0] = byte(seed)
	rng := rand.New(rand.NewChaCha8(key))
	d := make([]byte, n)
	for i := range d {
		d[i] = byte(rng.IntN(base))
	}
	return d
}

func TestIIDIsConsistent(t *testing.T) {
	for _, base := range []int{2, 10, 16} {
		r := auditOf(t, seededDigits(200_000, base, 7), base, DefaultOptions())
		if r.Verdict != Consistent {
			t.Errorf("ChaCha8 digits in base %d: verdict %q, want consistent", base, r.Verdict)
		}
		if r.MaxBlock < 2 || len(r.Findings) < 4 {
			t.Errorf("base %d: K = %d with %d findings", base, r.MaxBlock, len(r.Findings))
		}
	}
}

// Under a vector null, i.i.d. digits from that vector are consistent and
// uniform digits are not; the fitted null accepts both.
func TestVectorAndFittedNulls(t *testing.T) {
	p := []float64{0.2, 0.3, 0.5}
	rng := rand.New(rand.NewPCG(5, 6))
	d := make([]byte, 100_000)
	for i := range d {
		u := rng.Float64()
		switch {
		case u < 0.2:
			d[i] = 0
		case u < 0.5:
			d[i] = 1
		default:
			d[i] = 2
		}
	}
	vec := DefaultOptions()
	vec.Null = NullSpec{Kind: checks.Vector, P: p}
	if r := auditOf(t, d, 3, vec); r.Verdict != Consistent {
		t.Errorf("i.i.d. (0.2,0.3,0.5) under its own vector: %q", r.Verdict)
	} else if math.Abs(r.Entropy.NullDimension-0.9372305632) > 1e-9 {
		// mpmath 1.2.1: H(0.2,0.3,0.5)/ln 3 = 1.02965301406457/1.09861228866811
		// = 0.937230563216 (H = 1.029653 nats, computed with scipy 1.10 / mpmath 1.2).
		t.Errorf("Besicovitch–Eggleston dimension %.10f, want 0.9372305632", r.Entropy.NullDimension)
	}
	if r := auditOf(t, seededDigits(100_000, 3, 1), 3, vec); r.Verdict != NotConsistent {
		t.Errorf("uniform digits under vector (0.2,0.3,0.5): %q", r.Verdict)
	}
	fit := DefaultOptions()
	fit.Null = NullSpec{Kind: checks.Fitted}
	if r := auditOf(t, d, 3, fit); r.Verdict != Consistent {
		t.Errorf("i.i.d. digits under a fitted null: %q", r.Verdict)
	}
}

func TestPlanMemoryBudget(t *testing.T) {
	opts := DefaultOptions()
	opts.MaxBlock = 9
	if _, err := NewPlan(10, 1e9, opts); err == nil {
		t.Error("--max-block 9 in base 10 fits 256 MiB?")
	}
	opts.MaxBlock = 0
	p, err := NewPlan(10, 1e6, opts)
	if err != nil || p.Spec.MaxBlock != 5 {
		t.Errorf("auto K for 1e6 decimal digits = %d (%v), want 5 (1e6·1e-5 = 10 ≥ 5)", p.Spec.MaxBlock, err)
	}
}

// Which non-overlapping block lengths the pass counts: at 10^8 decimal
// digits the blocks check can use k ≤ 6 (⌊10^8/7⌋·10^-7 < 5, the rule of
// thumb), every k ≤ K when the length is unknown (standard input, shards),
// and none when the blocks check is not selected.
func TestCountedBlocks(t *testing.T) {
	opts := DefaultOptions()
	for _, c := range []struct {
		n      int64
		checks []string
		want   []int // the counted (or derived) k in 2..K
	}{
		{1e8, nil, []int{2, 3, 4, 5, 6}},
		{-1, nil, []int{2, 3, 4, 5, 6}}, // K = 6: about 2^20 cells for an unknown length
		{1e8, []string{"serial", "freq"}, nil},
		{1e8, []string{"blocks"}, []int{2, 3, 4, 5, 6}},
	} {
		opts.Checks = c.checks
		p, err := NewPlan(10, c.n, opts)
		if err != nil {
			t.Fatal(err)
		}
		var got []int
		for k := 2; k <= p.Spec.MaxBlock; k++ {
			if p.Spec.HasBlocks(k) {
				got = append(got, k)
			}
		}
		if !slices.Equal(got, c.want) {
			t.Errorf("n=%d, checks %v: K=%d, blocks counted for %v, want %v", c.n, c.checks, p.Spec.MaxBlock, got, c.want)
		}
	}
}

// A sequence that is right on average and wrong locally: digit 0 has
// frequency 0.115 in the first half and 0.085 in the second (0.10 overall).
// One-level checks see little; the second level (20 segments) catches it.
func TestSecondLevelCatchesLocalBias(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 8))
	first := make([]float64, 10)
	second := make([]float64, 10)
	for i := range first {
		first[i], second[i] = 0.885/9, 0.915/9
	}
	first[0], second[0] = 0.115, 0.085
	d := append(expand.IID(200_000, first, rng), expand.IID(200_000, second, rng)...)
	opts := DefaultOptions()
	opts.Segments = 20
	r := auditOf(t, d, 10, opts)
	if r.Verdict != NotConsistent {
		t.Fatalf("verdict %q, want not consistent", r.Verdict)
	}
	caught := map[string]bool{}
	for _, f := range r.Findings {
		if f.Mark == MarkDeviates {
			caught[f.Check] = true
		}
	}
	if !caught["segments"] || caught["freq"] {
		t.Errorf("caught by %v; want the second level and not the whole-sequence freq check", caught)
	}
}

// Under the null the second level is quiet, and the segmenter's segments
// cover the sequence exactly.
func TestSecondLevelQuietUnderNull(t *testing.T) {
	d := seededDigits(300_000, 10, 3)
	opts := DefaultOptions()
	opts.Segments = 30
	r := auditOf(t, d, 10, opts)
	if r.Verdict != Consistent {
		t.Errorf("verdict %q", r.Verdict)
	}
	n := 0
	for _, f := range r.Findings {
		if f.Check == "segments" {
			n++
		}
	}
	if n < 10 {
		t.Errorf("only %d second-level findings", n)
	}
	p, _ := NewPlan(10, int64(len(d)), opts)
	p.startSegments()
	p.seg.Add(d[:123_457])
	p.seg.Add(d[123_457:])
	segs, err := p.seg.Segments()
	if err != nil {
		t.Fatal(err)
	}
	var total int64
	for i, s := range segs {
		if s.Offset != total {
			t.Fatalf("segment %d starts at %d, want %d", i, s.Offset, total)
		}
		total += s.N
	}
	if total != int64(len(d)) || len(segs) != 30 {
		t.Errorf("%d segments cover %d digits", len(segs), total)
	}
}

// Both adjustments are carried; the chosen one decides. Holm's adjusted p
// is never below BH's (Holm is the stricter), and --adjust bh can only
// reject more.
func TestBothAdjustments(t *testing.T) {
	d := expand.Sticky(200_000, 10, 0.004, rand.New(rand.NewPCG(4, 4)))
	holm := auditOf(t, d, 10, DefaultOptions())
	opts := DefaultOptions()
	opts.Adjustment = BH
	bh := auditOf(t, d, 10, opts)
	nh, nb := 0, 0
	for i, f := range holm.Findings {
		if f.LogHolmUpper < f.LogBHUpper-1e-12 || f.LogHolmLower < f.LogBHLower-1e-12 {
			t.Errorf("%s: Holm %g below BH %g", f.Label(), f.LogHolmUpper, f.LogBHUpper)
		}
		if f.LogAdjUpper != f.LogHolmUpper || bh.Findings[i].LogAdjUpper != bh.Findings[i].LogBHUpper {
			t.Errorf("%s: the chosen adjustment is not the one reported", f.Label())
		}
		if f.Mark != "" {
			nh++
		}
		if bh.Findings[i].Mark != "" {
			nb++
		}
	}
	if nb < nh {
		t.Errorf("BH marks %d findings, Holm %d", nb, nh)
	}
}

// A constant sequence: under the uniform null every check deviates; under a
// fitted null nothing can be tested, and the audit says so instead of failing.
func TestConstantSequence(t *testing.T) {
	d := make([]byte, 5000)
	if r := auditOf(t, d, 10, DefaultOptions()); r.Verdict != NotConsistent {
		t.Errorf("uniform: %q", r.Verdict)
	}
	fit := DefaultOptions()
	fit.Null = NullSpec{Kind: checks.Fitted}
	r := auditOf(t, d, 10, fit)
	if len(r.Findings) != 0 || len(r.Skips) != 1 || !strings.Contains(r.Skips[0].Reason, "nothing can be tested") {
		t.Errorf("fitted: %d findings, skips %+v", len(r.Findings), r.Skips)
	}
}

// The decisive finding: smallest adjusted p in either tail; a tie of
// adjusted values (both capped at 1, or equal after Holm's step-down) goes
// to the smaller raw p; the lower tail wins within a finding only when it
// is smaller, or equal with a smaller raw p.
func TestDecisive(t *testing.T) {
	f := func(adjUp, rawUp, adjLo, rawLo float64) Finding {
		var x Finding
		x.LogAdjUpper, x.LogPUpper, x.LogAdjLower, x.LogPLower = adjUp, rawUp, adjLo, rawLo
		return x
	}
	cases := []struct {
		fs    []Finding
		index int
		lower bool
	}{
		{nil, -1, false},
		{[]Finding{f(0, -0.1, 0, -0.5), f(0, -0.2, 0, -0.3)}, 0, true},
		{[]Finding{f(-3, -4, 0, -0.1), f(-3, -5, 0, -0.1)}, 1, false},
		{[]Finding{f(-2, -3, -2, -3), f(-1, -9, 0, 0)}, 0, false},
		{[]Finding{f(0, -1, -4, -6)}, 0, true},
	}
	for i, c := range cases {
		d := (&Result{Findings: c.fs}).Decisive()
		if d.Index != c.index || (d.Index >= 0 && d.Lower != c.lower) {
			t.Errorf("case %d: %+v, want index %d lower %v", i, d, c.index, c.lower)
		}
	}
}

// Digits of a smaller base read in a larger one: the top digits never
// occur, and the report says which base the input may be in (instead of
// only "points to construction"); random digits, and a short input where
// the absence is not yet telling, get no such note.
func TestMissingTopDigitsNote(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	seven := make([]byte, 20000)
	for i := range seven {
		seven[i] = byte(rng.IntN(7))
	}
	notes := func(d []byte) string {
		r, err := Digits(d, 10, Source{Name: "t", Kind: "built-in", Bytes: -1}, DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		return strings.Join(checks.NoteTexts(r.Notes), "\n")
	}
	if n := notes(seven); !strings.Contains(n, "digits 7 to 9 never occur") || !strings.Contains(n, "may be in base 7 (audit it with Base 7)") || strings.Contains(n, "construction") {
		t.Errorf("base-7 digits read as base 10: notes %q", n)
	}
	ten := make([]byte, 20000)
	for i := range ten {
		ten[i] = byte(rng.IntN(10))
	}
	if n := notes(ten); strings.Contains(n, "never occur") {
		t.Errorf("random decimals: %q", n)
	}
	if n := notes(seven[:40]); strings.Contains(n, "never occur") { // (7/10)^40 ≈ 6e-7: not below e^-20
		t.Errorf("40 digits: %q", n)
	}
}

// A failing finding says where: bytes whose value 0x00 is 0.25% too
// frequent get "byte 0x00: +…σ" first among freq's largest deviations, in
// the finding's notes (so in every format) and in Where; a passing finding
// gets no such note.
func TestFindingsSayWhere(t *testing.T) {
	rng := rand.New(rand.NewPCG(6, 6))
	d := make([]byte, 1_000_000)
	for i := range d {
		d[i] = byte(rng.IntN(256))
		if i%400 == 0 {
			d[i] = 0
		}
	}
	r, err := Digits(d, 256, Source{Name: "t", Kind: "built-in", Bytes: -1}, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	seen := false
	for _, f := range r.Findings {
		note := strings.Join(checks.NoteTexts(f.Notes), " ")
		if f.Check == "freq" && f.Statistic == "X2" {
			seen = true
			if f.Mark != MarkDeviates || !strings.HasPrefix(f.Where, "byte 0x00: +") || !strings.Contains(note, "largest deviations (O − E)/√E: byte 0x00: +") {
				t.Errorf("freq: mark %q, where %q, notes %q", f.Mark, f.Where, note)
			}
		}
		if f.Mark == "" && strings.Contains(note, "largest deviations") {
			t.Errorf("%s %s: a passing finding names deviations", f.Check, f.Statistic)
		}
	}
	if !seen {
		t.Error("no freq X² finding")
	}
	// Serial names overlapping windows: the most frequent pairs contain 0x00.
	serialDeviates := 0
	for _, f := range r.Findings {
		if f.Check == "serial" && f.Mark == MarkDeviates {
			serialDeviates++
			if !strings.Contains(f.Where, "0x00") {
				t.Errorf("serial %s %v: where %q names no window with 0x00", f.Statistic, f.Params, f.Where)
			}
		}
	}
	if serialDeviates == 0 {
		t.Error("no serial finding deviates on the biased bytes")
	}
	// Gap's classes of bytes are explained: in the notes, and in each
	// class finding's detail.
	if n := strings.Join(checks.NoteTexts(r.Notes), " "); !strings.Contains(n, "class 0 is 0x00–0x0f") {
		t.Errorf("no note on gap's classes: %q", n)
	}
	for _, f := range r.Findings {
		if c, ok := f.Params["class"]; ok && f.Check == "gap" && c == 1 && !strings.HasPrefix(f.Detail, "class 1: digits 0x10 to 0x1f") {
			t.Errorf("gap class 1 detail %q", f.Detail)
		}
	}
}

// Poker says where: digits that repeat the previous one too often make
// hands with few distinct digits too common.
func TestPokerSaysWhere(t *testing.T) {
	d := expand.Sticky(300_000, 10, 0.03, rand.New(rand.NewPCG(9, 9)))
	r, err := Digits(d, 10, Source{Name: "t", Kind: "built-in", Bytes: -1}, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range r.Findings {
		if f.Check == "poker" {
			if f.Mark != MarkDeviates || !strings.HasPrefix(f.Where, "hands of ") || !strings.Contains(f.Where, "distinct digits: +") {
				t.Errorf("poker: mark %q, where %q", f.Mark, f.Where)
			}
			return
		}
	}
	t.Error("no poker finding")
}

// Coupon says where: digits that repeat the previous one take longer to
// show every digit, so long segments are too common; the note names the
// pooled segment lengths ("segments of ≥ 40 digits: +…σ").
func TestCouponSaysWhere(t *testing.T) {
	d := expand.Sticky(300_000, 10, 0.1, rand.New(rand.NewPCG(9, 10)))
	r, err := Digits(d, 10, Source{Name: "t", Kind: "built-in", Bytes: -1}, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range r.Findings {
		if f.Check == "coupon" {
			if f.Mark != MarkDeviates || !strings.HasPrefix(f.Where, "segments of ") || !strings.Contains(f.Where, "digits: ") {
				t.Errorf("coupon: mark %q, where %q", f.Mark, f.Where)
			}
			t.Logf("coupon where: %s", f.Where)
			return
		}
	}
	t.Error("no coupon finding")
}

// Lagcorr's portmanteau Q says which lags carry it, and a second-level
// finding which segments: digits that repeat the previous one correlate at
// lag 1; a sequence that turns biased in its last fifth has its smallest
// segment p-values in its last segments.
func TestLagsAndSegmentsSayWhere(t *testing.T) {
	d := expand.Sticky(200_000, 10, 0.02, rand.New(rand.NewPCG(2, 2026)))
	r, err := Digits(d, 10, Source{Name: "t", Kind: "built-in", Bytes: -1}, DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range r.Findings {
		if f.Check == "lagcorr" && f.Statistic == "Q" {
			if note := strings.Join(checks.NoteTexts(f.Notes), " "); f.Mark != MarkDeviates || !strings.HasPrefix(f.Where, "lag 1: +") ||
				!strings.Contains(note, "largest deviations (z of each lag's correlation): lag 1: +") {
				t.Errorf("lagcorr Q: mark %q, where %q, notes %q", f.Mark, f.Where, note)
			}
		}
	}
	rng := rand.New(rand.NewPCG(5, 5))
	late := make([]byte, 100_000)
	for i := range late {
		late[i] = byte(rng.IntN(10))
		if i >= 80_000 && rng.Float64() < 0.05 {
			late[i] = 7
		}
	}
	opts := DefaultOptions()
	opts.Segments = 10
	r, err = Digits(late, 10, Source{Name: "t", Kind: "built-in", Bytes: -1}, opts)
	if err != nil {
		t.Fatal(err)
	}
	seen := false
	for _, f := range r.Findings {
		if f.Check == "segments" && f.Mark == MarkDeviates && strings.HasPrefix(f.Of, "freq") {
			seen = true
			if !strings.HasPrefix(f.Where, "segment 9: p = ") && !strings.HasPrefix(f.Where, "segment 10: p = ") ||
				f.WhereHow != "in the segments' p-values (smallest first)" {
				t.Errorf("segments of %s: where %q (%s)", f.Of, f.Where, f.WhereHow)
			}
		}
	}
	if !seen {
		t.Error("no deviating second-level finding of freq")
	}
}
