package reports

import (
	"bytes"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

// Printing rules (ours): 4 significant digits; below 1e-10 the
// log10; never 0 for a probability that is only small.
func TestFormatP(t *testing.T) {
	cases := []struct {
		logP float64
		want string
	}{
		{math.Log(0.78790123), "0.7879"},
		{math.Log(1.2345678e-5), "1.235e-05"},
		{math.Log(2e-10), "2e-10"},
		{-36225.509012653212, "10^-15732.54"}, // Champernowne
		{-1e5, "10^-43429.45"},
		{0, "1"},
		{math.Inf(-1), "0 (exact)"},
	}
	for _, c := range cases {
		if got := formatP(c.logP); got != c.want {
			t.Errorf("formatP(%g) = %q, want %q", c.logP, got, c.want)
		}
	}
	for lp := -1.0; lp > -1e6; lp *= 1.7 {
		if s := formatP(lp); s == "0" || strings.HasPrefix(s, "0 ") {
			t.Errorf("ln p = %g printed as %q", lp, s)
		}
	}
}

func TestFormatParams(t *testing.T) {
	if got := formatParams(map[string]int{"k": 3}); got != "k=3" {
		t.Errorf("%q", got)
	}
	if got := formatParams(map[string]int{"digit": 7}); got != "digit 7" {
		t.Errorf("%q", got)
	}
}

func TestWrap(t *testing.T) {
	for _, line := range strings.Split(wrapDisplay(Caution, 100), "\n") {
		if len(line) > 100 {
			t.Errorf("line longer than 100: %q", line)
		}
	}
}

// Human formats print 4 significant digits (issue: 3–4), no exponent for
// ordinary magnitudes.
func TestFormatStat(t *testing.T) {
	cases := map[float64]string{5.50908: "5.509", 90399.8: "90400", 863.798: "863.8", 1.00048e6: "1000000",
		0.0154667: "0.01547", -1.39009: "-1.39", 3.2e-7: "3.2e-07", 2.5e12: "2.5e+12", 0: "0", 7: "7"}
	for v, want := range cases {
		if got := formatStat(v); got != want {
			t.Errorf("formatStat(%g) = %q, want %q", v, got, want)
		}
	}
}

// The summary's "from" names the finding with the smallest adjusted p:
// check, statistic, parameters when it has any, and the tail — one space
// between the parts (a drift finding has no parameters).
func TestSummaryFrom(t *testing.T) {
	f := func(check string, stat checks.Statistic, params map[string]int, adjUp, adjLow float64) audit.Finding {
		return audit.Finding{Finding: checks.Finding{Check: check, Statistic: stat, Params: params, LogPUpper: adjUp, LogPLower: adjLow},
			LogAdjUpper: adjUp, LogAdjLower: adjLow}
	}
	for _, c := range []struct {
		findings []audit.Finding
		want     string
	}{
		{[]audit.Finding{f("freq", "X2", map[string]int{"k": 1}, -1, -2), f("drift", "M", nil, -0.5, -3)}, "drift max|S|/√n (lower)"},
		{[]audit.Finding{f("serial", "dpsi2", map[string]int{"k": 3}, -4, -1), f("drift", "M", nil, -0.5, -3)}, "serial ∇ψ² k=3 (upper)"},
	} {
		_, rows := summaryRows(Document{Results: []*audit.Result{{Source: audit.Source{Name: "x"}, Findings: c.findings}}})
		if got := rows[0][5]; got != c.want {
			t.Errorf("from = %q, want %q", got, c.want)
		}
	}
}

// The p-value histogram bins the tenths of [0, 1] whatever the values span:
// two findings at 0.31 and 0.35 fall in one bin [0.3, 0.4), not in a
// zero-width bar between them.
func TestPHistogramTenths(t *testing.T) {
	bins := tenths([]float64{0.31, 0.35, 0, 1, 0.999, 0.1})
	want := []float64{1, 1, 0, 2, 0, 0, 0, 0, 0, 2}
	for i, b := range bins {
		if math.Abs(b.Min-float64(i)/10) > 1e-12 || math.Abs(b.Max-float64(i+1)/10) > 1e-12 || b.Weight != want[i] {
			t.Errorf("bin %d: [%g, %g) holds %g, want [%g, %g) with %g", i, b.Min, b.Max, b.Weight, float64(i)/10, float64(i+1)/10, want[i])
		}
	}
}

// Tick labels say where their ticks are: each labelled tick's value, read
// back from its label, equals the position to the label's precision (12 of
// 35 frequency ticks in the demo's plots were off: 0.0985 read "0.099",
// 2.5 read "2").
func TestTickLabelsMatchPositions(t *testing.T) {
	for _, r := range [][2]float64{{0.0975, 0.1035}, {-2.7, 2.7}, {0.9995, 1.0001}, {0, 1}, {-3.2, 9.1}, {0.2485, 0.2515}, {1e-4, 3e-4}} {
		for _, tk := range (preciseTicks{}).Ticks(r[0], r[1]) {
			if tk.Label == "" {
				continue
			}
			v, err := strconv.ParseFloat(tk.Label, 64)
			if err != nil || math.Abs(v-tk.Value) > 1e-9*math.Max(1, math.Abs(tk.Value)) {
				t.Errorf("range %v: tick at %v labelled %q", r, tk.Value, tk.Label)
			}
		}
	}
}

// CSV: df is empty for statistics without one, and no number prints as -0.
func TestCSVNumbers(t *testing.T) {
	if fullDF(0) != "" || fullDF(9) != "9" {
		t.Errorf("df: %q, %q", fullDF(0), fullDF(9))
	}
	if full(math.Copysign(0, -1)) != "0" || fullLog10(0) != "0" {
		t.Errorf("-0 printed: %q, %q", full(math.Copysign(0, -1)), fullLog10(0))
	}
}

// The Markdown provenance is a list, not a table under an empty header row.
func TestMarkdownProvenanceIsAList(t *testing.T) {
	var buf bytes.Buffer
	r := &audit.Result{Source: audit.Source{Name: "x", Kind: "file", Format: "text", Bytes: -1}, Base: 10, Digits: 10,
		Null: checks.UniformNull(10), Alpha: 0.01, Adjustment: audit.Holm, Verdict: audit.Consistent}
	if err := Markdown(&buf, Document{Version: "t", Results: []*audit.Result{r}}); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(buf.String(), "|  |  |") || !strings.Contains(buf.String(), "- **program**: borel t") {
		t.Errorf("provenance:\n%s", buf.String())
	}
}

// The frequency plot of base 36 labels its digits 0-9 then a-z.
func TestDigitTicks(t *testing.T) {
	ts := (digitTicks{base: 36}).Ticks(-0.5, 35.5)
	for _, tk := range ts {
		if tk.Label != strconv.FormatInt(int64(tk.Value), 36) || len(tk.Label) != 1 {
			t.Errorf("base-36 tick at %v labelled %q", tk.Value, tk.Label)
		}
	}
	if len(ts) < 10 {
		t.Errorf("only %d ticks", len(ts))
	}
	if tk := (digitTicks{base: 10}).Ticks(-0.5, 9.5); tk[len(tk)-1].Label != "9" {
		t.Errorf("base-10 labels end with %q", tk[len(tk)-1].Label)
	}
}

// Integer statistics print whole (lincomp's L = 19937 read "19940"); other
// values keep 4 significant digits.
func TestFormatStatIntegers(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{{19937, "19937"}, {1302, "1302"}, {10486.3, "10490"}, {3.31, "3.31"}, {0, "0"}, {-17, "-17"}} {
		if got := formatStat(c.v); got != c.want {
			t.Errorf("formatStat(%v) = %q, want %q", c.v, got, c.want)
		}
	}
}
