package tests

import (
	"math/rand/v2"
	"sort"
	"strings"
	"testing"

	"borel/stats/audit"
	"borel/stats/expand"
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

func caughtBy(r *audit.Result, mark string) []string {
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
		verdict string
		mark    string
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
