package tally

import (
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
)

func randomDigits(rng *rand.Rand, n, base int) []byte {
	d := make([]byte, n)
	for i := range d {
		d[i] = byte(rng.IntN(base))
	}
	return d
}

func mustNew(t *testing.T, spec Spec, off int64) *Tally {
	t.Helper()
	tl, err := New(spec, off)
	if err != nil {
		t.Fatal(err)
	}
	return tl
}

// randomCuts splits n into pieces, often shorter than K-1.
func randomCuts(rng *rand.Rand, n int) []int {
	cuts := []int{0}
	for pos := 0; pos < n; {
		step := 1 + rng.IntN(7)
		if rng.IntN(3) == 0 {
			step = 1 + rng.IntN(n)
		}
		pos = min(n, pos+step)
		cuts = append(cuts, pos)
	}
	return cuts
}

// Property: merge(tally(a), tally(b)) == tally(a‖b), for random chunkings,
// merged left to right and as a balanced tree.
func TestMergeEqualsWhole(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 200; trial++ {
		base := 2 + rng.IntN(9)
		K := 1 + rng.IntN(5)
		spec := Spec{Base: base, MaxBlock: K, GapCap: 1 + rng.IntN(12)}
		if rng.IntN(2) == 0 {
			spec.GapClass = make([]int, base)
			for i := range spec.GapClass {
				spec.GapClass[i] = i % 3
			}
		}
		n := 1 + rng.IntN(400)
		d := randomDigits(rng, n, base)
		whole := mustNew(t, spec, 0)
		whole.Add(d)

		cuts := randomCuts(rng, n)
		var parts []*Tally
		for i := 1; i < len(cuts); i++ {
			p := mustNew(t, spec, int64(cuts[i-1]))
			p.Add(d[cuts[i-1]:cuts[i]])
			parts = append(parts, p)
		}
		left := parts[0]
		for _, p := range parts[1:] {
			var err error
			if left, err = Merge(left, p); err != nil {
				t.Fatal(err)
			}
		}
		if !reflect.DeepEqual(left, whole) {
			t.Fatalf("trial %d (base %d, K %d, n %d, cuts %v): left-fold merge differs from the whole", trial, base, K, n, cuts)
		}
		if tree := mergeTree(t, parts); !reflect.DeepEqual(tree, whole) {
			t.Fatalf("trial %d: tree merge differs from the whole", trial)
		}
		// Streaming in several Add calls is the same as one.
		inc := mustNew(t, spec, 0)
		for i := 1; i < len(cuts); i++ {
			inc.Add(d[cuts[i-1]:cuts[i]])
		}
		if !reflect.DeepEqual(inc, whole) {
			t.Fatalf("trial %d: incremental Add differs from one Add", trial)
		}
	}
}

func mergeTree(t *testing.T, parts []*Tally) *Tally {
	if len(parts) == 1 {
		return parts[0]
	}
	mid := len(parts) / 2
	m, err := Merge(mergeTree(t, parts[:mid]), mergeTree(t, parts[mid:]))
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// Brute-force references computed directly from the definition.
func TestCountsAgainstDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := 0; trial < 50; trial++ {
		base := 2 + rng.IntN(6)
		K := 1 + rng.IntN(4)
		n := K + rng.IntN(300)
		d := randomDigits(rng, n, base)
		tl := mustNew(t, Spec{Base: base, MaxBlock: K, GapCap: 5}, 0)
		tl.Add(d)
		cyc, err := tl.Cyclic()
		if err != nil {
			t.Fatal(err)
		}
		for k := 1; k <= K; k++ {
			want := make([]int64, ipow(base, k))
			for i := 0; i < n; i++ {
				w := 0
				for j := 0; j < k; j++ {
					w = w*base + int(d[(i+j)%n])
				}
				want[w]++
			}
			if !slices.Equal(cyc[k], want) {
				t.Fatalf("cyclic k=%d differs from the definition", k)
			}
		}
		for k := 2; k <= K; k++ {
			want := make([]int64, ipow(base, k))
			for i := 0; i+k <= n; i += k {
				want[value(d[i:i+k], base)]++
			}
			if !slices.Equal(tl.Blocks[k], want) {
				t.Fatalf("blocks k=%d differ from the definition", k)
			}
		}
		for c := 0; c < base; c++ {
			want := make([]int64, 6)
			last := -1
			for i, x := range d {
				if int(x) == c {
					if last >= 0 {
						want[min(i-last-1, 5)]++
					}
					last = i
				}
			}
			if !slices.Equal(tl.Gaps[c].Hist, want) {
				t.Fatalf("gaps of %d: %v, want %v", c, tl.Gaps[c].Hist, want)
			}
		}
	}
}

func TestMergeRejectsGapsAndOverlaps(t *testing.T) {
	spec := Spec{Base: 10, MaxBlock: 2}
	a := mustNew(t, spec, 0)
	a.Add([]byte{1, 2, 3})
	b := mustNew(t, spec, 4) // digit 3 is missing
	b.Add([]byte{4})
	if _, err := Merge(a, b); err == nil {
		t.Error("merge across a missing digit accepted")
	}
	c := mustNew(t, spec, 2) // overlaps a
	c.Add([]byte{3})
	if _, err := Merge(a, c); err == nil {
		t.Error("merge of overlapping stretches accepted")
	}
	d := mustNew(t, Spec{Base: 10, MaxBlock: 3}, 3)
	if _, err := Merge(a, d); err == nil {
		t.Error("merge of different specs accepted")
	}
}
