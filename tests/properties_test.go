package tests

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/borel-audit/borel/reports"
	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/expand"
)

// Properties over random sequences, bases, lengths and nulls: every p-value
// lies in [0, 1] (as a natural log: ≤ 0, not NaN), adjusted p-values are
// not below raw ones, every reported log10 p is finite or null (exact zero),
// and the JSON report round-trips unchanged.
func TestReportProperties(t *testing.T) {
	rng := rand.New(rand.NewPCG(77, 78))
	for trial := 0; trial < 80; trial++ {
		base := 2 + rng.IntN(20)
		n := 50 + rng.IntN(30_000)
		switch trial % 4 { // short inputs in the bases of the trade, and bytes
		case 1:
			base, n = []int{2, 10, 36}[rng.IntN(3)], []int{30, 100, 1000}[rng.IntN(3)]
		case 3:
			base, n = 256, 200+rng.IntN(2000)
		}
		var d []byte
		switch rng.IntN(4) {
		case 0:
			d = expand.Sticky(n, base, rng.Float64()*0.3, rng)
		case 1:
			d = make([]byte, n) // constant: extreme statistics
		default:
			p := make([]float64, base)
			for i := range p {
				p[i] = 1 / float64(base)
			}
			d = expand.IID(n, p, rng)
		}
		opts := audit.DefaultOptions()
		if rng.IntN(3) == 0 {
			opts.Null = audit.NullSpec{Kind: checks.Fitted}
		}
		if rng.IntN(3) == 0 && n >= 4000 {
			opts.Segments = 2 + rng.IntN(3)
		}
		r, err := audit.Digits(d, base, audit.Source{Name: "prop", Kind: "built-in", Bytes: -1}, opts)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		for _, f := range r.Findings {
			for _, lp := range []float64{f.LogPUpper, f.LogPLower, f.LogAdjUpper, f.LogAdjLower} {
				if math.IsNaN(lp) || lp > 0 { // p ≤ 1 exactly: p-values are clamped once, in the audit
					t.Fatalf("trial %d: %s has ln p = %v", trial, f.Label(), lp)
				}
			}
			if f.LogAdjUpper < f.LogPUpper-1e-9 || f.LogAdjLower < f.LogPLower-1e-9 {
				t.Fatalf("trial %d: %s adjusted below raw", trial, f.Label())
			}
		}
		doc := reports.Document{Version: "test", Results: []*audit.Result{r}}
		var first bytes.Buffer
		if err := reports.JSON(&first, doc); err != nil {
			for _, f := range r.Findings {
				t.Logf("%s %v %v %v %v", f.Label(), f.Value, f.LogPUpper, f.LogPLower, f.LogPAtom)
			}
			t.Fatal(err)
		}
		var decoded reports.JSONDocument
		if err := json.Unmarshal(first.Bytes(), &decoded); err != nil {
			t.Fatal(err)
		}
		for _, a := range decoded.Audits {
			for _, f := range a.Findings {
				for _, v := range []*float64{f.Log10PUpper, f.Log10PLower} {
					if v != nil && (math.IsInf(*v, 0) || math.IsNaN(*v)) {
						t.Fatalf("trial %d: log10 p %v", trial, *v)
					}
				}
			}
		}
		again, err := json.MarshalIndent(decoded, "", "  ")
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(append(again, '\n'), first.Bytes()) {
			t.Fatalf("trial %d: the JSON report does not round-trip", trial)
		}
	}
}
