package tally

import (
	"math/rand/v2"
	"testing"
)

// TestRunsAgainstDefinition: the longest run of any digit and of the run
// digit, from the definition, on sequences with long runs now and then, at
// any offset, in random chunks, and after a merge at a random cut.
func TestRunsAgainstDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 7))
	for trial := range 300 {
		base := 2 + rng.IntN(6)
		digit := rng.IntN(base)
		spec := Spec{Base: base, MaxBlock: 1 + rng.IntN(3), Records: []RecordSpec{&RunSpec{Digit: digit}}}
		n := 1 + rng.IntN(300)
		d := randomDigits(rng, n, base)
		if rng.IntN(3) == 0 { // long runs
			for i := range d {
				if i > 0 && rng.IntN(4) > 0 {
					d[i] = d[i-1]
				}
			}
		}
		var maxAny, maxDig, run, runD int64
		for i, x := range d {
			if i > 0 && x == d[i-1] {
				run++
			} else {
				run = 1
			}
			if int(x) == digit {
				runD++
			} else {
				runD = 0
			}
			maxAny, maxDig = max(maxAny, run), max(maxDig, runD)
		}
		off := rng.Int64N(100)
		tl := randomStretch(rng, spec, off, 0)
		tl.Add(d)
		if r := tl.Runs(); r.Any.Max != maxAny || r.Dig.Max != maxDig {
			t.Fatalf("trial %d: runs %d %d, want %d %d", trial, r.Any.Max, r.Dig.Max, maxAny, maxDig)
		}
		cut := rng.IntN(n + 1)
		m, err := mergedHalves(t, spec, off, d, cut)
		if err != nil || !same(m, tl) {
			t.Fatalf("trial %d: halves cut at %d merge to a different record (%v)", trial, cut, err)
		}
	}
}

// TestRunsDamageRefused: a decoded runs record that no stretch can produce
// is refused in one line.
func TestRunsDamageRefused(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	spec := Spec{Base: 4, MaxBlock: 2, Records: []RecordSpec{&RunSpec{Digit: 3}}}
	for name, damage := range map[string]func(*Runs, int64){
		"longer than the stretch":      func(r *Runs, n int64) { r.Any.Max = n + 1 },
		"lead beyond the longest":      func(r *Runs, n int64) { r.Any.Lead = r.Any.Max + 1 },
		"run of a digit never seen":    func(r *Runs, n int64) { r.Dig.Max = n },
		"negative trail":               func(r *Runs, n int64) { r.Dig.Trail = -1 },
		"no run in a nonempty stretch": func(r *Runs, n int64) { r.Any = RunTally{} },
	} {
		d := randomDigits(rng, 200, 3) // digits 0..2: digit 3 never occurs
		tl := randomStretch(rng, spec, 10, 0)
		tl.Add(d)
		damage(tl.Runs(), tl.N)
		if _, err := roundTrip(tl); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
}
