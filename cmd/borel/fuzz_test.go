package main

import (
	"math"
	"testing"

	"github.com/borel-audit/borel/stats/checks"
)

// FuzzOptionParsers: the vector, list and size parsers return a value or
// a usage error, never panic; an accepted vector is a valid null.
func FuzzOptionParsers(f *testing.F) {
	for _, s := range []string{"0.2,0.3,0.5", "uniform", "fitted", "NaN,1", "1e308,1e308", "0.5,,0.5", "2,3,6,10", "256MiB", "-1K", "1e400G"} {
		f.Add(s, uint8(3))
	}
	f.Fuzz(func(t *testing.T, s string, b uint8) {
		base := int(b%35) + 2
		if ns, err := parseNull(s, base); err == nil && ns.Kind == checks.Vector {
			if _, err := checks.VectorNull(ns.P, base); err != nil {
				t.Fatalf("accepted an invalid vector %q: %v", s, err)
			}
		}
		if bs, err := parseBases(s, 36, "fuzz"); err == nil {
			for _, x := range bs {
				if x < 2 || x > 36 {
					t.Fatalf("accepted base %d from %q", x, s)
				}
			}
		}
		if n, err := parseSize(s); err == nil && n <= 0 {
			t.Fatalf("accepted size %d from %q", n, s)
		}
		if a, err := parseAlpha(s); err == nil && !(a > 0 && a < 1) || math.IsNaN(a) && err == nil {
			t.Fatalf("accepted alpha %v from %q", a, s)
		}
	})
}
