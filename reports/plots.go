package reports

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

// Figure is one plot of an audit, ready to write as SVG or PNG.
type Figure struct {
	Name  string // file name stem, e.g. "frequencies"
	Title string
	plot  *plot.Plot
	// legendBelow draws the legend under the plot area instead of on it,
	// so that the axes keep their natural range (p-values and dimensions
	// end at 1; a legend of six series pushed the axis to 1.6).
	legendBelow bool
	// pngPlot, when set, is the plot the PNG draws: its legend spells
	// what the raster fonts lack (∇ as Δ).
	pngPlot *plot.Plot
}

// The size of every figure: 6 × 3.6 inches (plus its legend when that is
// below), and PNGs at PNGDPI, sharp enough to print (1200 × 720 pixels).
const (
	figW, figH = 6 * vg.Inch, 3.6 * vg.Inch
	PNGDPI     = 200
)

// SVG renders the figure as an SVG document.
func (f Figure) SVG() ([]byte, error) { return f.render("svg") }

// PNG renders the figure as a PNG image at PNGDPI.
func (f Figure) PNG() ([]byte, error) { return f.render("png") }

func (f Figure) render(format string) ([]byte, error) {
	p := f.plot
	if format == "png" && f.pngPlot != nil {
		p = f.pngPlot
	}
	h := figH
	var legendH vg.Length
	if f.legendBelow {
		legendH = legendHeight(p)
		h += legendH
	}
	var c vg.CanvasWriterTo
	switch format {
	case "svg":
		c = vgsvg.New(figW, h)
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(figW, h), vgimg.UseDPI(PNGDPI))}
	default:
		return nil, fmt.Errorf("reports: no figure format %q", format)
	}
	dc := draw.New(c)
	if f.legendBelow {
		legend := p.Legend
		p.Legend = plot.NewLegend()
		p.Draw(draw.Crop(dc, 0, 0, legendH, 0))
		p.Legend = legend
		area := draw.Crop(dc, 0.4*vg.Inch, 0, 0, -figH)
		legend.Top, legend.Left = true, true
		legend.Draw(area)
	} else {
		p.Draw(dc)
	}
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// legendHeight is the room a legend needs below the plot: its entries and
// a margin.
func legendHeight(p *plot.Plot) vg.Length {
	r := p.Legend.Rectangle(draw.Canvas{})
	return r.Max.Y - r.Min.Y + 10
}

// Greys and dash patterns that stay distinguishable in grey print.
var (
	ink    = []color.Color{color.Gray{0}, color.Gray{90}, color.Gray{150}, color.RGBA{0, 90, 160, 255}, color.RGBA{180, 60, 0, 255}}
	dashes = [][]vg.Length{nil, {vg.Points(5), vg.Points(3)}, {vg.Points(1.5), vg.Points(2)}, {vg.Points(8), vg.Points(2), vg.Points(1.5), vg.Points(2)}, {vg.Points(3), vg.Points(1)}}
	shapes = []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.CrossGlyph{}, draw.PlusGlyph{}, draw.RingGlyph{}, draw.PyramidGlyph{}, draw.BoxGlyph{}}
	// series are the styles of the running plot's digits: each its own
	// colour, dash pattern and marker (none solid: solid is the envelope's).
	series = []struct {
		ink    color.Color
		dashes []vg.Length
		shape  draw.GlyphDrawer
	}{
		{color.RGBA{0, 90, 160, 255}, []vg.Length{vg.Points(6), vg.Points(3)}, draw.CircleGlyph{}},
		{color.RGBA{180, 60, 0, 255}, []vg.Length{vg.Points(1.5), vg.Points(2)}, draw.SquareGlyph{}},
		{color.Gray{70}, []vg.Length{vg.Points(8), vg.Points(2), vg.Points(1.5), vg.Points(2)}, draw.TriangleGlyph{}},
		{color.RGBA{0, 130, 60, 255}, []vg.Length{vg.Points(3), vg.Points(1.5)}, draw.CrossGlyph{}},
		{color.Gray{130}, []vg.Length{vg.Points(10), vg.Points(3)}, draw.RingGlyph{}},
	}
)

func styleLine(l *plotter.Line, i int) {
	l.Color = ink[i%len(ink)]
	l.Dashes = dashes[(i/len(ink)+i)%len(dashes)]
	l.Width = vg.Points(1.2)
}

// integerTicks labels every integer of a short axis (digits, block lengths).
type integerTicks struct{}

func (integerTicks) Ticks(lo, hi float64) []plot.Tick {
	step := math.Max(1, math.Ceil((hi-lo)/16))
	var ts []plot.Tick
	for v := math.Ceil(lo); v <= hi; v += step {
		if v == 0 {
			v = 0 // math.Ceil(-0.5) is -0, which would print as "-0"
		}
		ts = append(ts, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', 0, 64)})
	}
	return ts
}

// digitTicks labels the digits of a base as the input writes them: 0-9
// then a-z up to base 36 (base 36 showed 10..35 for a..z), numbers above.
type digitTicks struct{ base int }

func (d digitTicks) Ticks(lo, hi float64) []plot.Tick {
	ts := integerTicks{}.Ticks(lo, hi)
	if d.base <= 10 || d.base > 36 {
		return ts
	}
	for i, t := range ts {
		if v := int(t.Value); v >= 0 && v < d.base {
			ts[i].Label = strconv.FormatInt(int64(v), 36)
		}
	}
	return ts
}

// preciseTicks keeps gonum's tick positions but labels them with as many
// decimals as their spacing needs (the default rounds 1.0004 to "1").
type preciseTicks struct{}

func (preciseTicks) Ticks(lo, hi float64) []plot.Tick {
	ts := plot.DefaultTicks{}.Ticks(lo, hi)
	step := math.Inf(1)
	prev := math.NaN()
	for _, t := range ts {
		if t.Label != "" {
			if !math.IsNaN(prev) {
				step = math.Min(step, t.Value-prev)
			}
			prev = t.Value
		}
	}
	decimals := 0
	if step > 0 && !math.IsInf(step, 1) {
		decimals = max(0, int(math.Ceil(-math.Log10(step)+1e-9)))
	}
	// Then as many more as the values need to be printed exactly: ticks at
	// 0.0985, 0.1005 read "0.099, 0.101" at the spacing's 3 decimals, and
	// 2.5 read "2" at 0 (the label must say where the tick is).
	for decimals < 12 && !exactLabels(ts, decimals) {
		decimals++
	}
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = strconv.FormatFloat(ts[i].Value, 'f', decimals, 64)
		}
	}
	return ts
}

// rasterLabel writes a label with glyphs the PNG fonts have: they lack ∇,
// so Good's differences ∇ψ² become Δψ² there (the SVG, drawn by the
// viewer's fonts, writes ∇ψ² as the tables do).
func rasterLabel(l string) string { return strings.ReplaceAll(l, "∇", "Δ") }

// legendRoom raises the top of the y axis so that a legend of n entries
// sits above the data instead of on it.
func legendRoom(p *plot.Plot, n int) {
	span := p.Y.Max - p.Y.Min
	if span <= 0 {
		span = math.Abs(p.Y.Max) + 1
	}
	p.Y.Max += span * 0.1 * float64(n)
	p.Y.Min -= span * 0.05
}

func newPlot(title, x, y string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = x
	p.Y.Label.Text = y
	p.Legend.Top = true
	p.Legend.Padding = vg.Points(1.5) // room between entries: hats and subscripts touched the next line
	p.Y.Tick.Marker = preciseTicks{}
	return p
}

// Figures returns the plots of one audit: digit frequencies, p-value
// histogram and Q–Q plot, dimension profile, running deviations and, with a
// second level, the segment p-values. Every number comes from the audit.
func Figures(r *audit.Result) ([]Figure, error) {
	var figs []Figure
	for _, build := range []func(*audit.Result) (Figure, bool, error){
		frequencyFigure, pHistogramFigure, pQQFigure, dimensionFigure, landscapeFigure, landscapeNearFigure, auditSpectrumFigure, runningFigure, segmentFigure,
	} {
		f, ok, err := build(r)
		if err != nil {
			return nil, err
		}
		if ok {
			figs = append(figs, f)
		}
	}
	return figs, nil
}

func frequencyFigure(r *audit.Result) (Figure, bool, error) {
	p := newPlot(fmt.Sprintf("Digit frequencies, %d digits in base %d", r.Digits, r.Base), "digit", "relative frequency")
	n := float64(r.Digits)
	obs, null, lo, hi := make(plotter.XYs, r.Base), make(plotter.XYs, r.Base), make(plotter.XYs, r.Base), make(plotter.XYs, r.Base)
	for j := 0; j < r.Base; j++ {
		x := float64(j)
		obs[j] = plotter.XY{X: x, Y: float64(r.DigitCounts[j]) / n}
		null[j] = plotter.XY{X: x, Y: r.Null.P[j]}
		lo[j] = plotter.XY{X: x, Y: r.Curves.BandLow[j]}
		hi[j] = plotter.XY{X: x, Y: r.Curves.BandHigh[j]}
	}
	nl, err := plotter.NewLine(null)
	if err != nil {
		return Figure{}, false, err
	}
	styleLine(nl, 1)
	band := []*plotter.Line{}
	for _, xy := range []plotter.XYs{lo, hi} {
		l, err := plotter.NewLine(xy)
		if err != nil {
			return Figure{}, false, err
		}
		styleLine(l, 2)
		band = append(band, l)
	}
	sc, err := plotter.NewScatter(obs)
	if err != nil {
		return Figure{}, false, err
	}
	sc.GlyphStyle.Shape = draw.CircleGlyph{}
	sc.GlyphStyle.Color = ink[0]
	sc.GlyphStyle.Radius = vg.Points(2.5)
	p.Add(nl, band[0], band[1], sc)
	p.Legend.Add("observed", sc)
	p.Legend.Add("null ("+r.Null.Kind.String()+")", nl)
	p.Legend.Add(fmt.Sprintf("%g%% band (binomial, normal approx.)", 100*audit.BandLevel), band[0])
	p.X.Tick.Marker = digitTicks{base: r.Base}
	p.X.Min, p.X.Max = -0.5, float64(r.Base)-0.5
	legendRoom(p, 3)
	return Figure{Name: "frequencies", Title: "Digit frequencies against the null", plot: p}, true, nil
}

func upperPValues(r *audit.Result) []float64 {
	ps := make([]float64, 0, len(r.Findings))
	for _, f := range r.Findings {
		ps = append(ps, math.Exp(f.LogPUpper))
	}
	return ps
}

func pHistogramFigure(r *audit.Result) (Figure, bool, error) {
	ps := upperPValues(r)
	if len(ps) == 0 {
		return Figure{}, false, nil
	}
	p := newPlot(fmt.Sprintf("p-values of the %d findings", len(ps)), "p-value (upper tail)", "number of findings")
	// The tenths of [0, 1], whatever the p-values span (binning from the
	// smallest to the largest p made edges such as 0.010, 0.102, …, and
	// one zero-width bar for two findings).
	h := &plotter.Histogram{Bins: tenths(ps), Width: 0.1, LineStyle: plotter.DefaultLineStyle}
	h.FillColor = color.Gray{190}
	h.LineStyle.Color = ink[0]
	p.Add(h)
	flat, err := plotter.NewLine(plotter.XYs{{X: 0, Y: float64(len(ps)) / 10}, {X: 1, Y: float64(len(ps)) / 10}})
	if err != nil {
		return Figure{}, false, err
	}
	styleLine(flat, 1)
	p.Add(flat)
	p.Legend.Add("findings per tenth", h)
	p.Legend.Add("expected under the null", flat)
	p.X.Min, p.X.Max = 0, 1
	legendRoom(p, 2) // above the bars, not on them
	return Figure{Name: "p-histogram", Title: "Histogram of p-values", plot: p}, true, nil
}

func pQQFigure(r *audit.Result) (Figure, bool, error) {
	ps := upperPValues(r)
	if len(ps) == 0 {
		return Figure{}, false, nil
	}
	sort.Float64s(ps)
	pts := make(plotter.XYs, len(ps))
	for i, v := range ps {
		pts[i] = plotter.XY{X: (float64(i) + 0.5) / float64(len(ps)), Y: v}
	}
	p := newPlot("Uniform Q–Q plot of p-values", "uniform quantile", "ordered p-value (upper tail)")
	sc, err := plotter.NewScatter(pts)
	if err != nil {
		return Figure{}, false, err
	}
	sc.GlyphStyle.Shape = draw.CircleGlyph{}
	sc.GlyphStyle.Color = ink[0]
	diag, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 1}})
	if err != nil {
		return Figure{}, false, err
	}
	styleLine(diag, 1)
	p.Add(diag)
	var bandLine *plotter.Line
	if m := len(ps); len(r.Curves.QQLow) == m {
		for k, bound := range [][]float64{r.Curves.QQLow, r.Curves.QQHigh} {
			xy := make(plotter.XYs, 0, m+1)
			if k == 1 { // the upper bound starts at d for the first point
				xy = append(xy, plotter.XY{X: 0, Y: bound[0]})
			}
			for i, v := range bound {
				xy = append(xy, plotter.XY{X: pts[i].X, Y: v})
			}
			if k == 0 {
				xy = append(xy, plotter.XY{X: 1, Y: bound[m-1]})
			}
			l, err := plotter.NewLine(xy)
			if err != nil {
				return Figure{}, false, err
			}
			styleLine(l, 2)
			p.Add(l)
			bandLine = l
		}
	}
	p.Add(sc)
	p.Legend.Add("findings", sc)
	p.Legend.Add("uniform (null)", diag)
	if bandLine != nil {
		p.Legend.Add(fmt.Sprintf("%g%% band (Kolmogorov–Smirnov, simultaneous)", 100*audit.BandLevel), bandLine)
	}
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, 1, 0, 1
	p.Legend.Left = true // the top left stays empty when the points follow the diagonal
	return Figure{Name: "p-qq", Title: "Q–Q plot of p-values", plot: p}, true, nil
}

func dimensionFigure(r *audit.Result) (Figure, bool, error) {
	e := r.Entropy
	if e == nil || len(e.Rows) == 0 {
		return Figure{}, false, nil
	}
	p := newPlot(fmt.Sprintf("Dimension estimate by block length (%g%% intervals)", 100*e.Confidence),
		"block length k", fmt.Sprintf("dimension (entropy rate / ln %d)", r.Base))
	pts := make(plotter.XYs, len(e.Rows))
	var errs plotter.YErrors
	for i, row := range e.Rows {
		pts[i] = plotter.XY{X: float64(row.K), Y: row.Dimension}
		lo, hi := row.Dimension-row.DimLow, row.DimHigh-row.Dimension
		if math.IsNaN(lo) {
			lo, hi = 0, 0
		}
		errs = append(errs, struct{ Low, High float64 }{lo, hi})
	}
	eb, err := plotter.NewYErrorBars(struct {
		plotter.XYer
		plotter.YErrorer
	}{pts, errs})
	if err != nil {
		return Figure{}, false, err
	}
	eb.LineStyle.Color = ink[0]
	sc, err := plotter.NewScatter(pts)
	if err != nil {
		return Figure{}, false, err
	}
	sc.GlyphStyle.Shape = draw.SquareGlyph{}
	sc.GlyphStyle.Color = ink[0]
	k0, k1 := 0.5, float64(len(e.Rows))+0.5
	full, err := plotter.NewLine(plotter.XYs{{X: k0, Y: 1}, {X: k1, Y: 1}})
	if err != nil {
		return Figure{}, false, err
	}
	styleLine(full, 1)
	p.Add(full, eb, sc)
	p.Legend.Add("estimate with interval", sc)
	p.Legend.Add("full dimension", full)
	if math.Abs(e.NullDimension-1) > 1e-12 {
		be, err := plotter.NewLine(plotter.XYs{{X: k0, Y: e.NullDimension}, {X: k1, Y: e.NullDimension}})
		if err != nil {
			return Figure{}, false, err
		}
		styleLine(be, 2)
		p.Add(be)
		p.Legend.Add("Besicovitch–Eggleston H(p)/ln b", be)
	}
	p.X.Min, p.X.Max = k0, k1
	p.X.Tick.Marker = integerTicks{}
	// A dimension is at most 1: the axis ends there (the legend is below).
	lo := 1.0
	for _, row := range e.Rows {
		lo = math.Min(lo, row.Dimension)
		if !math.IsNaN(row.DimLow) {
			lo = math.Min(lo, row.DimLow)
		}
	}
	lo = math.Min(lo, e.NullDimension)
	p.Y.Min, p.Y.Max = math.Max(0, lo-0.05*(1-lo)-1e-6), 1
	return Figure{Name: "dimension", Title: "Entropy dimension profile", plot: p, legendBelow: true}, true, nil
}

func runningFigure(r *audit.Result) (Figure, bool, error) {
	var pts []int
	for i, tp := range r.Trace {
		if tp.Pos >= 16 {
			pts = append(pts, i)
		}
	}
	if len(pts) < 2 {
		return Figure{}, false, nil
	}
	z := func(tpIdx, d int) float64 { return r.Curves.Deviation[tpIdx][d] }
	// The 5 digits furthest from their expectation at the end.
	digits := make([]int, r.Base)
	for d := range digits {
		digits[d] = d
	}
	last := pts[len(pts)-1]
	sort.SliceStable(digits, func(a, b int) bool { return math.Abs(z(last, digits[a])) > math.Abs(z(last, digits[b])) })
	if len(digits) > 5 {
		digits = digits[:5]
	}
	sort.Ints(digits)
	title := "Running deviation of each digit's frequency"
	if r.Base > 5 {
		title = "Running deviation of the 5 most deviant digits"
	}
	p := newPlot(title, "digits read, n (log scale)", "standardized deviation (sd units)")
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = plot.LogTicks{}
	for i, d := range digits {
		xy := make(plotter.XYs, len(pts))
		for k, idx := range pts {
			xy[k] = plotter.XY{X: float64(r.Trace[idx].Pos), Y: z(idx, d)}
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return Figure{}, false, err
		}
		st := series[i%len(series)]
		l.Color, l.Dashes, l.Width = st.ink, st.dashes, vg.Points(1.1)
		// Markers at about eight points along the line, each digit its own
		// shape, so the series stay apart in grey print.
		var marks plotter.XYs
		step := max(1, len(xy)/8)
		for k := len(xy) - 1; k >= 0; k -= step {
			marks = append(marks, xy[k])
		}
		sc, err := plotter.NewScatter(marks)
		if err != nil {
			return Figure{}, false, err
		}
		sc.GlyphStyle.Shape, sc.GlyphStyle.Color, sc.GlyphStyle.Radius = st.shape, st.ink, vg.Points(2.3)
		p.Add(l, sc)
		p.Legend.Add("digit "+checks.DigitName(d, r.Base), l, sc)
	}
	for _, sign := range []float64{1, -1} {
		env := make(plotter.XYs, len(pts))
		for k, idx := range pts {
			env[k] = plotter.XY{X: float64(r.Trace[idx].Pos), Y: sign * r.Curves.Envelope[idx]}
		}
		l, err := plotter.NewLine(env)
		if err != nil {
			return Figure{}, false, err
		}
		styleLine(l, 0)
		l.Width = vg.Points(1.8)
		p.Add(l)
		if sign > 0 {
			p.Legend.Add("±√(2 ln ln n), iterated-logarithm envelope (descriptive)", l)
		}
	}
	return Figure{Name: "running", Title: "Running frequency deviation", plot: p, legendBelow: true}, true, nil
}

func segmentFigure(r *audit.Result) (Figure, bool, error) {
	if len(r.SegmentPValues) == 0 {
		return Figure{}, false, nil
	}
	build := func(label func(string) string) (*plot.Plot, error) {
		p := newPlot(fmt.Sprintf("Second level: p-values in each of %d segments", r.Segments), "segment", "p-value (upper tail)")
		for i, s := range r.SegmentPValues {
			xy := make(plotter.XYs, len(s.PValues))
			for j, v := range s.PValues {
				xy[j] = plotter.XY{X: float64(j + 1), Y: v}
			}
			sc, err := plotter.NewScatter(xy)
			if err != nil {
				return nil, err
			}
			sc.GlyphStyle.Shape = shapes[i%len(shapes)]
			sc.GlyphStyle.Color = ink[i%len(ink)]
			sc.GlyphStyle.Radius = vg.Points(2.2)
			p.Add(sc)
			p.Legend.Add(label(readableLabel(s.Label)), sc)
		}
		// p-values live in [0, 1] and the legend is below: the axis ends at
		// 1, and half a segment of room at each end keeps the first and the
		// last points whole.
		p.Y.Min, p.Y.Max = 0, 1
		p.X.Min, p.X.Max = 0.5, float64(r.Segments)+0.5
		p.X.Tick.Marker = integerTicks{}
		return p, nil
	}
	p, err := build(func(s string) string { return s })
	if err != nil {
		return Figure{}, false, err
	}
	raster, err := build(rasterLabel)
	if err != nil {
		return Figure{}, false, err
	}
	return Figure{Name: "segments", Title: "Segment p-values", plot: p, pngPlot: raster, legendBelow: true}, true, nil
}

// tenths counts p-values in the bins [0, 0.1), …, [0.9, 1] (1 in the last).
func tenths(ps []float64) []plotter.HistogramBin {
	bins := make([]plotter.HistogramBin, 10)
	for i := range bins {
		bins[i].Min, bins[i].Max = float64(i)/10, float64(i+1)/10
	}
	for _, p := range ps {
		bins[min(9, max(0, int(p*10)))].Weight++
	}
	return bins
}

// exactLabels reports whether every labelled tick value prints exactly with
// the given decimals (to 1e-9 of its size).
func exactLabels(ts []plot.Tick, decimals int) bool {
	for _, t := range ts {
		if t.Label == "" {
			continue
		}
		v, _ := strconv.ParseFloat(strconv.FormatFloat(t.Value, 'f', decimals, 64), 64)
		if math.Abs(v-t.Value) > 1e-9*math.Max(1e-9, math.Abs(t.Value)) && math.Abs(v-t.Value) > 1e-12 {
			return false
		}
	}
	return true
}
