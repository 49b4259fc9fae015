package tests

import (
	"encoding/binary"
	"encoding/json"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/expand"
)

// Power: named flawed sources with the verdict each must get. Each case
// logs which checks caught it (go test ./tests -run Power -v).

// markovRepeat returns n decimal digits that repeat the previous digit with
// probability repeat and otherwise take one of the other 9 digits uniformly:
// digit frequencies stay exactly uniform, only the pairs change.
func markovRepeat(n int, repeat float64, rng *rand.Rand) []byte {
	d := make([]byte, n)
	d[0] = byte(rng.IntN(10))
	for i := 1; i < n; i++ {
		if rng.Float64() < repeat {
			d[i] = d[i-1]
		} else {
			d[i] = byte((int(d[i-1]) + 1 + rng.IntN(9)) % 10)
		}
	}
	return d
}

func caughtBy(r *audit.Result, mark audit.Mark) []string {
	seen := map[string]bool{}
	for _, f := range r.Findings {
		if f.Mark == mark {
			seen[f.Check] = true
		}
	}
	var out []string
	for c := range seen {
		out = append(out, c)
	}
	sort.Strings(out)
	return out
}

func TestPower(t *testing.T) {
	rng := rand.New(rand.NewPCG(2026, 12))
	biased := make([]float64, 10)
	for i := range biased {
		biased[i] = 0.895 / 9
	}
	biased[0] = 0.105
	periodic := make([]byte, 100_000)
	for i := range periodic {
		periodic[i] = byte(i * 7 % 10)
	}
	cases := []struct {
		name    string
		digits  []byte
		verdict audit.Verdict
		mark    audit.Mark
		notBy   string // a check that must not catch it
	}{
		{"Markov chain repeating the last digit with probability 0.12 instead of 0.10, 10^6 digits",
			markovRepeat(1_000_000, 0.12, rng), audit.NotConsistent, audit.MarkDeviates, "freq"},
		{"digit 0 with frequency 0.105 instead of 0.100, 10^6 digits",
			expand.IID(1_000_000, biased, rng), audit.NotConsistent, audit.MarkDeviates, ""},
		{"periodic sequence 0741852963…, 10^5 digits", periodic, audit.NotConsistent, audit.MarkDeviates, ""},
		{"de Bruijn sequence B(10, 5), random Eulerian circuit", expand.RandomDeBruijn(10, 5, rng),
			audit.TooUniform, audit.MarkTooUniform, ""},
		{"Champernowne's constant, first 10^6 decimals", expand.Champernowne(1_000_000, 10),
			audit.NotConsistent, audit.MarkDeviates, ""},
	}
	for _, c := range cases {
		r, err := audit.Digits(c.digits, 10, audit.Source{Name: c.name, Kind: "built-in", Bytes: -1}, audit.DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		by := caughtBy(r, c.mark)
		t.Logf("%s: %s; caught by %s", c.name, r.Verdict, strings.Join(by, ", "))
		if r.Verdict != c.verdict {
			t.Errorf("%s: verdict %q, want %q", c.name, r.Verdict, c.verdict)
		}
		for _, b := range by {
			if b == c.notBy {
				t.Errorf("%s: %s caught it, but its digit frequencies are exactly right", c.name, b)
			}
		}
	}
}

// Word-level power: generator output read as words (borel audit FILE --raw --word W).

// Generators with structural defects that are established mathematics,
// written here from their published definitions, each seeded; and good
// generators that must pass the same audit.

// words32 writes n 32-bit words little-endian.
func words32(n int, next func() uint32) []byte {
	b := make([]byte, 4*n)
	for i := 0; i < n; i++ {
		binary.LittleEndian.PutUint32(b[4*i:], next())
	}
	return b
}

func words64(n int, next func() uint64) []byte {
	b := make([]byte, 8*n)
	for i := 0; i < n; i++ {
		binary.LittleEndian.PutUint64(b[8*i:], next())
	}
	return b
}

// wordGenerators are the cases: bytes of output, the word size to read
// them as, and the check that must catch a flawed one (empty: a good
// generator, which must stay consistent).
func wordGenerators() []struct {
	name   string
	data   []byte
	word   int
	caught []string
} {
	const bytes = 1_000_000
	seed := rand.New(rand.NewPCG(14, 2026))

	mt := expand.NewMT19937(5489)

	// Additive lagged Fibonacci x_n = x_{n−24} + x_{n−55} mod 2^32 (Knuth,
	// TAOCP vol. 2, §3.2.2 (7)); its lowest bit is an LFSR of x^55 + x^24 + 1.
	lf := make([]uint32, 55)
	for i := range lf {
		lf[i] = seed.Uint32()
	}
	lfi := 0
	lfib := func() uint32 {
		// lf is a ring of the last 55 values; x_{n−55} is at lfi, x_{n−24} at lfi+31.
		v := lf[(lfi+31)%55] + lf[lfi]
		lf[lfi] = v
		lfi = (lfi + 1) % 55
		return v
	}

	// Marsaglia's xorshift generators, J. Statist. Software 8(14) (2003).
	x64 := seed.Uint64() | 1
	xs64 := func() uint64 { x64 ^= x64 << 13; x64 ^= x64 >> 7; x64 ^= x64 << 17; return x64 }
	x32 := seed.Uint32() | 1
	xs32 := func() uint32 { x32 ^= x32 << 13; x32 ^= x32 >> 17; x32 ^= x32 << 5; return x32 }

	// Subtract-with-borrow x_n = x_{n−10} − x_{n−24} − c mod 2^24
	// (Marsaglia & Zaman, Ann. Appl. Probab. 1 (1991) 462–480; the lags of
	// RANLUX's generator), written as 24-bit words, 3 bytes little-endian.
	sw := make([]int32, 24)
	for i := range sw {
		sw[i] = int32(seed.Uint32() >> 8)
	}
	swi, carry := 0, int32(0)
	swb := func() uint32 {
		// ring of the last 24: x_{n−24} at swi, x_{n−10} at swi+14
		v := sw[(swi+14)%24] - sw[swi] - carry
		carry = 0
		if v < 0 {
			v += 1 << 24
			carry = 1
		}
		sw[swi] = v
		swi = (swi + 1) % 24
		return uint32(v)
	}
	swbBytes := make([]byte, 0, bytes)
	for len(swbBytes)+3 <= bytes {
		v := swb()
		swbBytes = append(swbBytes, byte(v), byte(v>>8), byte(v>>16))
	}

	// RANDU, x_{n+1} = 65539 x_n mod 2^31 (IBM 1960s): the top 8 of its 31
	// bits, one byte per output. Its triples lie on 15 planes.
	ru := uint32(seed.Uint32() | 1)
	randu := make([]byte, bytes)
	for i := range randu {
		ru = uint32(uint64(ru) * 65539 % (1 << 31))
		randu[i] = byte(ru >> 23)
	}

	pcg := rand.New(rand.NewPCG(3, 2026))
	cc := rand.New(rand.NewChaCha8([32]byte{'b', 'o', 'r', 'e', 'l'}))
	return []struct {
		name   string
		data   []byte
		word   int
		caught []string
	}{
		{"MT19937", words32(bytes/4, mt.Uint32), 32, []string{"lincomp"}},
		{"additive lagged Fibonacci (24, 55)", words32(bytes/4, lfib), 32, []string{"lincomp", "birthday"}},
		{"xorshift64 (13, 7, 17)", words64(bytes/8, xs64), 64, []string{"rank"}},
		{"xorshift32 (13, 17, 5)", words32(bytes/4, xs32), 32, []string{"rank", "lincomp"}},
		{"subtract-with-borrow (24, 10)", swbBytes, 24, []string{"birthday"}},
		{"RANDU, top byte", randu, 8, []string{"serial"}},
		{"PCG (math/rand/v2)", words64(bytes/8, pcg.Uint64), 64, nil},
		{"ChaCha8 (math/rand/v2), 32-bit words", words32(bytes/4, cc.Uint32), 32, nil},
		{"ChaCha8 (math/rand/v2), 64-bit words", words64(bytes/8, cc.Uint64), 64, nil},
	}
}

// Each flawed generator is "not consistent" at 10^6 bytes, caught by the
// check its defect is known for; PCG and ChaCha8 stay consistent in the
// same audit (borel audit FILE --raw --word W). -v prints what caught
// each.
func TestWordPower(t *testing.T) {
	dir := t.TempDir()
	for _, g := range wordGenerators() {
		path := filepath.Join(dir, strings.NewReplacer(" ", "_", "/", "_").Replace(g.name)+".bin")
		if err := os.WriteFile(path, g.data, 0o644); err != nil {
			t.Fatal(err)
		}
		code, out, errs := runBorel(t, nil, "audit", path, "--raw", "--word", strconv.Itoa(g.word), "-q", "--format", "json")
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", g.name, code, errs)
		}
		var doc struct {
			Inputs []struct{ Verdict string } `json:"inputs"`
			Audits []struct {
				Source struct {
					View string `json:"view"`
				} `json:"source"`
				Base     int `json:"base"`
				Findings []struct {
					Check string `json:"check"`
					Mark  string `json:"mark"`
				} `json:"findings"`
			} `json:"audits"`
		}
		if err := json.Unmarshal(out, &doc); err != nil || len(doc.Inputs) != 1 {
			t.Fatalf("%s: %v", g.name, err)
		}
		seen := map[string]bool{}
		for _, a := range doc.Audits {
			for _, f := range a.Findings {
				if f.Mark == "deviates" {
					seen[f.Check] = true
				}
			}
		}
		var caught []string
		for c := range seen {
			caught = append(caught, c)
		}
		sort.Strings(caught)
		verdict := doc.Inputs[0].Verdict
		t.Logf("%-40s %s; deviating checks: %s", g.name, verdict, strings.Join(caught, ", "))
		// The README's third column: the same bytes without --word are
		// consistent, except RANDU's, which the bits view's long serial
		// windows catch too.
		if g.caught != nil {
			code, out, _ := runBorel(t, nil, "audit", path, "--raw", "-q", "--format", "json")
			var plain struct {
				Inputs []struct{ Verdict string } `json:"inputs"`
			}
			want := "consistent"
			if strings.HasPrefix(g.name, "RANDU") {
				want = "not consistent"
			}
			if json.Unmarshal(out, &plain); code != 0 || len(plain.Inputs) != 1 || plain.Inputs[0].Verdict != want {
				t.Errorf("%s without --word: %v, the README says %s at 10^6 bytes", g.name, plain.Inputs, want)
			}
		}
		if g.caught == nil {
			if verdict != "consistent" {
				t.Errorf("%s: a good generator got %q (%s)", g.name, verdict, strings.Join(caught, ", "))
			}
			continue
		}
		if verdict != "not consistent" {
			t.Errorf("%s: %q, want not consistent", g.name, verdict)
		}
		for _, c := range g.caught {
			if !slices.Contains(caught, c) {
				t.Errorf("%s: not caught by %s (caught by %s)", g.name, c, strings.Join(caught, ", "))
			}
		}
	}
}

// Word records merge across shards exactly: MT19937's output cut at byte
// offsets that split words and items, tallied into three shards with
// --raw --word 32, and merged, gives the findings of the bytes view of one
// direct audit (the word-level ones among them).
func TestWordShardsMerge(t *testing.T) {
	mt := expand.NewMT19937(1)
	data := words32(250_000, mt.Uint32)
	dir := t.TempDir()
	whole := filepath.Join(dir, "mt.bin")
	os.WriteFile(whole, data, 0o644)
	cuts := []int{0, 333_333, 700_001, len(data)}
	var shards []string
	for i := 1; i < len(cuts); i++ {
		part := filepath.Join(dir, "part"+strconv.Itoa(i)+".bin")
		os.WriteFile(part, data[cuts[i-1]:cuts[i]], 0o644)
		sh := filepath.Join(dir, "part"+strconv.Itoa(i)+".shard")
		if code, _, errs := runBorel(t, nil, "tally", part, "--raw", "--word", "32", "--offset", strconv.Itoa(cuts[i-1]), "--max-block", "2", "-q", "-o", sh); code != 0 {
			t.Fatalf("tally: %s", errs)
		}
		shards = append(shards, sh)
	}
	code, merged, errs := runBorel(t, nil, append([]string{"merge", "--format", "csv", "-q"}, shards...)...)
	if code != 0 {
		t.Fatalf("merge: %s", errs)
	}
	code, direct, errs := runBorel(t, nil, "audit", whole, "--raw", "--base", "256", "--word", "32", "--max-block", "2", "--format", "csv", "-q")
	if code != 0 {
		t.Fatalf("audit: %s", errs)
	}
	rows := func(out []byte) map[string]string {
		m := map[string]string{}
		for _, l := range strings.Split(string(out), "\n") {
			f := strings.Split(l, ",")
			if len(f) > 12 && slices.Contains([]string{"lincomp", "rank", "birthday", "wordcoll", "hamming", "perm"}, f[5]) {
				m[f[5]+" "+f[6]+" "+f[7]] = strings.Join(f[10:14], ",")
			}
		}
		return m
	}
	a, b := rows(merged), rows(direct)
	if len(a) < 8 {
		t.Fatalf("only %d word findings merged: %v", len(a), a)
	}
	for k, v := range b {
		if a[k] != v {
			t.Errorf("%s: merged %q, direct %q", k, a[k], v)
		}
	}
}

// `borel audit mt.bin --raw --word 32` names linear complexity as the
// reason of its one verdict.
func TestMTNamesLinearComplexity(t *testing.T) {
	mt := expand.NewMT19937(5489)
	path := filepath.Join(t.TempDir(), "mt.bin")
	os.WriteFile(path, words32(250_000, mt.Uint32), 0o644)
	code, out, errs := runBorel(t, nil, "audit", path, "--raw", "--word", "32", "-q")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	flat := strings.Join(strings.Fields(string(out)), " ")
	for _, want := range []string{"): NOT CONSISTENT", "in base 256 (lincomp L min bit 0, linear complexity)",
		"largest deviations of the linear complexity: bit 0: L = 19937 in a segment of 100000 bits"} {
		if !strings.Contains(flat, want) {
			t.Errorf("the report lacks %q", want)
		}
	}
}
