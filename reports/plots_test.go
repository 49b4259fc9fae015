package reports

import (
	"math"
	"math/rand/v2"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/expand"
)

// plotResults are audits whose figures cover every axis kind: uniform
// decimal digits (frequency ticks near 0.1), a skewed vector null in base
// 4 (ticks near 0.25), base 36 (digit labels), a sticky source with
// segments (running deviations, segment p-values).
func plotResults(t *testing.T) []*audit.Result {
	t.Helper()
	var out []*audit.Result
	add := func(d []byte, base int, opts audit.Options) {
		r, err := audit.Digits(d, base, audit.Source{Name: "t", Kind: "built-in", Bytes: -1}, opts)
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, r)
	}
	rng := func(s uint64) *rand.Rand { return rand.New(rand.NewPCG(s, 16)) }
	uniform := func(b int) []float64 {
		p := make([]float64, b)
		for i := range p {
			p[i] = 1 / float64(b)
		}
		return p
	}
	for i, n := range []int{10000, 20000, 30000, 200000} {
		add(expand.IID(n, uniform(10), rng(uint64(10+i))), 10, audit.DefaultOptions())
	}
	add(expand.IID(100000, uniform(2), rng(5)), 2, audit.DefaultOptions())
	vec := audit.DefaultOptions()
	vec.Null = audit.NullSpec{Kind: checks.Vector, P: []float64{0.25, 0.3, 0.25, 0.2}}
	add(expand.IID(40000, vec.Null.P, rng(2)), 4, vec)
	add(expand.IID(50000, uniform(36), rng(3)), 36, audit.DefaultOptions())
	seg := audit.DefaultOptions()
	seg.Segments = 10
	add(expand.Sticky(30000, 10, 0.02, rng(4)), 10, seg)
	return out
}

var (
	svgText = regexp.MustCompile(`<text x="([-0-9.e+]+)" y="([-0-9.e+]+)" transform="scale\(1, -1\)"\s*style="[^"]*font-size:([0-9.]+)px[^"]*">([^<]*)</text>`)
	svgSeg  = regexp.MustCompile(`<path d="M([-0-9.e+]+),([-0-9.e+]+)L([-0-9.e+]+),([-0-9.e+]+)" style="fill:none;stroke:#000000;stroke-width:0.5" />`)
)

// Every tick label of every figure says where its tick is: reading the
// SVG back, each label is paired with the tick mark under (or beside) it,
// the mark's position is mapped to a value with the axis transform (the
// plot's range and data area), and the label must state that value to its
// own precision — strictly within half a unit of its last digit. (Labels
// took their decimals from the tick spacing: ticks at 0.0985 read
// "0.099", ±2.5 read "±2".)
func TestSVGTickLabelsReadBack(t *testing.T) {
	checked := 0
	for ri, r := range plotResults(t) {
		figs, err := Figures(r)
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range figs {
			svg, err := f.SVG()
			if err != nil {
				t.Fatal(err)
			}
			h := figH
			if f.legendBelow {
				h += legendHeight(f.plot)
			}
			da := draw.New(vgsvg.New(figW, h))
			if f.legendBelow {
				da = draw.Crop(da, 0, 0, legendHeight(f.plot), 0)
			}
			dc := f.plot.DataCanvas(da)
			var xMarks, yMarks []float64
			for _, m := range svgSeg.FindAllStringSubmatch(string(svg), -1) {
				x1, y1, x2, y2 := num(m[1]), num(m[2]), num(m[3]), num(m[4])
				switch {
				case x1 == x2 && math.Max(y1, y2) <= float64(dc.Min.Y)+0.01 && math.Abs(y1-y2) < 12:
					xMarks = append(xMarks, x1)
				case y1 == y2 && math.Max(x1, x2) <= float64(dc.Min.X)+0.01 && math.Abs(x1-x2) < 12:
					yMarks = append(yMarks, y1)
				}
			}
			for _, m := range svgText.FindAllStringSubmatch(string(svg), -1) {
				x, y, size, label := num(m[1]), -num(m[2]), num(m[3]), m[4]
				value, decimals, ok := labelValue(label, r.Base, f.Name == "frequencies")
				if !ok {
					continue
				}
				var axis *plot.Axis
				var mark, lo, hi float64
				switch {
				case x+float64(f.plot.Y.Tick.Label.Width(label)) <= float64(dc.Min.X) && len(yMarks) > 0: // left of the y axis
					axis, lo, hi = &f.plot.Y, float64(dc.Min.Y), float64(dc.Max.Y)
					mark = nearest(yMarks, y+0.3*size)
				case y < float64(dc.Min.Y) && len(xMarks) > 0: // under the x axis
					axis, lo, hi = &f.plot.X, float64(dc.Min.X), float64(dc.Max.X)
					center := x + float64(f.plot.X.Tick.Label.Width(label))/2
					mark = nearest(xMarks, center)
				default:
					continue
				}
				at := axisValue(axis, (mark-lo)/(hi-lo))
				half := 0.5 * math.Pow(10, -float64(decimals))
				if math.Abs(at-value) >= half*(1-1e-6) {
					t.Errorf("audit %d, %s: label %q (at %.2f, %.2f) sits at a tick of value %.9g (marks %v; data area %v)", ri, f.Name, label, x, y, at, yMarks, dc.Rectangle)
				}
				checked++
			}
		}
	}
	if checked < 60 {
		t.Errorf("only %d tick labels read back", checked)
	}
}

func num(s string) float64 { v, _ := strconv.ParseFloat(s, 64); return v }

func nearest(marks []float64, v float64) float64 {
	best := marks[0]
	for _, m := range marks {
		if math.Abs(m-v) < math.Abs(best-v) {
			best = m
		}
	}
	return best
}

// axisValue inverts the axis transform: the value at fraction u of the
// axis (linear, or logarithmic for the running plot's digit count).
func axisValue(a *plot.Axis, u float64) float64 {
	if _, ok := a.Scale.(plot.LogScale); ok {
		return math.Exp(math.Log(a.Min) + u*(math.Log(a.Max)-math.Log(a.Min)))
	}
	return a.Min + u*(a.Max-a.Min)
}

// labelValue reads a tick label: a number (its decimals give its
// precision; "1e+04" is exact), or on a frequency plot's digit axis a digit
// of the base (0-9, a-z).
func labelValue(label string, base int, digits bool) (v float64, decimals int, ok bool) {
	label = strings.TrimSpace(label)
	if f, err := strconv.ParseFloat(label, 64); err == nil {
		if m, _, isExp := strings.Cut(label, "e"); isExp {
			if _, frac, dot := strings.Cut(m, "."); dot {
				return f, len(frac) - int(math.Floor(math.Log10(f))), true
			}
			return f, -int(math.Floor(math.Log10(f))), true
		}
		if _, frac, dot := strings.Cut(label, "."); dot {
			return f, len(frac), true
		}
		return f, 0, true
	}
	if digits && len(label) == 1 && base > 10 {
		if d, err := strconv.ParseInt(label, 36, 64); err == nil && int(d) < base {
			return float64(d), 0, true
		}
	}
	return 0, 0, false
}

// The dimension workbench's figures: the landscape in each shape (base 2,
// base 3 with its close view, larger bases), the spectrum only against a
// stated vector, and across bases only for a sequence audited in two bases
// or more; each renders as SVG and PNG, and the heat map writes each
// audit's −log10 p in its cell.
func TestDimensionWorkbenchFigures(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	run := func(name string, d []byte, base int, opts audit.Options) *audit.Result {
		r, err := audit.Digits(d, base, audit.Source{Name: name, Kind: "built-in", Bytes: -1}, opts)
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	vec := audit.DefaultOptions()
	vec.Null = audit.NullSpec{Kind: checks.Vector, P: []float64{0.5, 0.3, 0.2}}
	cases := []struct {
		r    *audit.Result
		want []string
		not  []string
	}{
		{run("bits", expand.IID(50000, []float64{0.5, 0.5}, rng), 2, audit.DefaultOptions()), []string{"landscape", "landscape-near"}, []string{"spectrum"}},
		{run("trits", expand.IID(50000, []float64{0.48, 0.32, 0.2}, rng), 3, vec), []string{"landscape", "landscape-near", "spectrum"}, nil},
		{run("few trits", expand.IID(300, []float64{0.5, 0.3, 0.2}, rng), 3, vec), []string{"landscape", "spectrum"}, []string{"landscape-near"}},
		{run("decimals", expand.IID(50000, uniform10(), rng), 10, audit.DefaultOptions()), []string{"landscape"}, []string{"landscape-near", "spectrum"}},
	}
	for _, c := range cases {
		figs, err := Figures(c.r)
		if err != nil {
			t.Fatal(err)
		}
		names := map[string]bool{}
		for _, f := range figs {
			names[f.Name] = true
			for _, render := range []func() ([]byte, error){f.SVG, f.PNG} {
				if b, err := render(); err != nil || len(b) < 1000 {
					t.Errorf("%s %s: %d bytes, %v", c.r.Source.Name, f.Name, len(b), err)
				}
			}
		}
		for _, w := range c.want {
			if !names[w] {
				t.Errorf("%s: no %s figure (have %v)", c.r.Source.Name, w, names)
			}
		}
		for _, w := range c.not {
			if names[w] {
				t.Errorf("%s: a %s figure it should not have", c.r.Source.Name, w)
			}
		}
	}
	one := Document{Results: []*audit.Result{cases[0].r, cases[3].r}}
	if figs, _ := DocumentFigures(one); len(figs) != 0 {
		t.Errorf("two sequences in one base each: %d across-bases figures", len(figs))
	}
	a := run("pi", expand.IID(20000, []float64{0.5, 0.5}, rng), 2, audit.DefaultOptions())
	b := run("pi", expand.IID(20000, uniform10(), rng), 10, audit.DefaultOptions())
	many := Document{Results: []*audit.Result{a, b, cases[1].r}}
	figs, err := DocumentFigures(many)
	if err != nil || len(figs) != 2 || figs[0].Name != "bases-deficit" || figs[1].Name != "bases-heatmap" {
		t.Fatalf("across bases: %v %v", figs, err)
	}
	svg, _ := figs[1].SVG()
	for _, r := range many.Results {
		want := strconv.FormatFloat(math.Max(0, -r.Decisive().LogAdj/math.Ln10), 'f', 1, 64)
		if !strings.Contains(string(svg), ">"+want) {
			t.Errorf("the heat map lacks %s's value %s", r.Source.Name, want)
		}
	}
}

func uniform10() []float64 {
	p := make([]float64, 10)
	for i := range p {
		p[i] = 0.1
	}
	return p
}

// The side-by-side table of an HTML page keeps each interval on one line
// (its cells wrapped at the comma before; class n does not wrap).
func TestHTMLSummaryIntervalNoWrap(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	var doc Document
	for _, b := range []int{2, 10} {
		r, err := audit.Digits(expand.IID(20000, uniformOf(b), rng), b, audit.Source{Name: "x", Kind: "built-in", Bytes: -1}, audit.DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		doc.Results = append(doc.Results, r)
	}
	var buf strings.Builder
	if err := HTML(&buf, doc); err != nil {
		t.Fatal(err)
	}
	if !regexp.MustCompile(`<td class="n">\[[0-9.]+, [0-9.]+\]</td></tr>`).MatchString(buf.String()) {
		t.Error("the summary's interval cells are not kept on one line")
	}
}

func uniformOf(b int) []float64 {
	p := make([]float64, b)
	for i := range p {
		p[i] = 1 / float64(b)
	}
	return p
}
