package reports

import (
	"fmt"
	"image/color"
	"math"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/borel-audit/borel/stats/audit"
)

// Across bases: for a document that audits sequences in two or more
// bases (audit --bases, compare --bases), the dimension deficit with its
// interval against the base for each sequence, and a heat map of −log10
// of the smallest adjusted p by sequence and base.

// DocumentFigures returns the figures of a whole document: the two across
// bases when some sequence is audited in two bases or more; none otherwise.
func DocumentFigures(doc Document) ([]Figure, error) {
	seqs, bases := basesGrid(doc)
	if len(bases) < 2 {
		return nil, nil
	}
	deficit, err := deficitFigure(seqs, bases)
	if err != nil {
		return nil, err
	}
	heat, err := heatFigure(seqs, bases)
	if err != nil {
		return nil, err
	}
	return []Figure{deficit, heat}, nil
}

// basesGrid groups the results by sequence (in order of first
// appearance) and lists the bases audited, ascending.
func basesGrid(doc Document) (seqs []seqRow, bases []int) {
	index := map[string]int{}
	seen := map[int]bool{}
	for _, r := range doc.Results {
		if r.Source.View != "" {
			continue // a view of words is another sequence, not a base
		}
		name := r.Source.Name
		i, ok := index[name]
		if !ok {
			i = len(seqs)
			index[name] = i
			seqs = append(seqs, seqRow{name: name, byBase: map[int]*audit.Result{}})
		}
		seqs[i].byBase[r.Base] = r
		seen[r.Base] = true
	}
	for b := range seen {
		bases = append(bases, b)
	}
	sort.Ints(bases)
	multi := false
	for _, s := range seqs {
		multi = multi || len(s.byBase) > 1
	}
	if !multi {
		return seqs, nil
	}
	return seqs, bases
}

type seqRow struct {
	name   string
	byBase map[int]*audit.Result
}

// baseTicks labels the audited bases on a log axis.
type baseTicks []int

func (b baseTicks) Ticks(lo, hi float64) []plot.Tick {
	var ts []plot.Tick
	for _, v := range b {
		ts = append(ts, plot.Tick{Value: float64(v), Label: strconv.Itoa(v)})
	}
	return ts
}

func deficitFigure(seqs []seqRow, bases []int) (Figure, error) {
	p := newPlot("Dimension deficit by base (1 − dimension, with its interval)", "base", "entropy deficit 1 − h/ln b")
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = baseTicks(bases)
	top := 0.0
	for i, s := range seqs {
		if len(s.byBase) < 2 {
			continue // one base: nothing to compare across bases (the heat map shows it)
		}
		var pts plotter.XYs
		var errs plotter.YErrors
		for _, b := range bases {
			r := s.byBase[b]
			if r == nil || r.Entropy == nil || len(r.Entropy.Rows) == 0 {
				continue
			}
			e := r.Entropy.Summary
			// the deficit's interval is 1 minus the dimension's, reversed
			lo, hi := 1-e.DimHigh, 1-e.DimLow
			if math.IsNaN(lo) {
				lo, hi = e.Deficit, e.Deficit
			}
			x := float64(b) * math.Pow(1.03, float64(i)-float64(len(seqs)-1)/2) // side by side, not on top of each other
			pts = append(pts, plotter.XY{X: x, Y: e.Deficit})
			errs = append(errs, struct{ Low, High float64 }{e.Deficit - lo, hi - e.Deficit})
			top = math.Max(top, hi)
		}
		if len(pts) == 0 {
			continue
		}
		st := series[i%len(series)]
		line, err := plotter.NewLine(pts)
		if err != nil {
			return Figure{}, err
		}
		line.Color, line.Dashes, line.Width = st.ink, st.dashes, vg.Points(1)
		sc, err := plotter.NewScatter(pts)
		if err != nil {
			return Figure{}, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: st.ink, Radius: vg.Points(3), Shape: st.shape}
		eb, err := plotter.NewYErrorBars(struct {
			plotter.XYer
			plotter.YErrorer
		}{pts, errs})
		if err != nil {
			return Figure{}, err
		}
		eb.LineStyle.Color = st.ink
		p.Add(line, eb, sc)
		p.Legend.Add(s.name, line, sc)
	}
	p.X.Min, p.X.Max = float64(bases[0])/1.2, float64(bases[len(bases)-1])*1.2
	p.Y.Min, p.Y.Max = 0, math.Max(top*1.1, 1e-4)
	return Figure{Name: "bases-deficit", Title: "Dimension deficit by base", plot: p, legendBelow: true}, nil
}

// heatGrid is −log10 of the smallest adjusted p by base (columns) and
// sequence (rows, the first on top); NaN where a pair was not audited.
type heatGrid struct {
	z      [][]float64 // [row][col]
	nb, ns int
}

func (g heatGrid) Dims() (c, r int)   { return g.nb, g.ns }
func (g heatGrid) X(c int) float64    { return float64(c) }
func (g heatGrid) Y(r int) float64    { return float64(r) }
func (g heatGrid) Z(c, r int) float64 { return g.z[r][c] }

// heatPalette runs from white (p = 1) through orange to a dark red (the
// top of the scale, at least −log10 0.01 = 2 when the data stop below it).
type heatPalette struct{}

func (heatPalette) Colors() []color.Color {
	stops := []color.NRGBA{{255, 255, 255, 255}, {250, 200, 120, 255}, {220, 100, 30, 255}, {120, 20, 10, 255}}
	var cs []color.Color
	const n = 64
	for i := range n {
		t := float64(i) / (n - 1) * float64(len(stops)-1)
		k := min(int(t), len(stops)-2)
		f := t - float64(k)
		mix := func(a, b uint8) uint8 { return uint8(float64(a) + f*(float64(b)-float64(a)) + 0.5) }
		a, b := stops[k], stops[k+1]
		cs = append(cs, color.NRGBA{mix(a.R, b.R), mix(a.G, b.G), mix(a.B, b.B), 255})
	}
	return cs
}

var heatNaN = color.Gray{215} // a pair not audited

func heatFigure(seqs []seqRow, bases []int) (Figure, error) {
	p := newPlot("−log10 of the smallest adjusted p, by sequence and base", "base", "")
	g := heatGrid{nb: len(bases), ns: len(seqs)}
	g.z = make([][]float64, len(seqs))
	hi := 2.0 // −log10 0.01: the usual alpha is mid-scale at least
	var labels plotter.XYLabels
	for ri, s := range seqs {
		row := len(seqs) - 1 - ri // the first sequence on top
		g.z[row] = make([]float64, len(bases))
		for ci, b := range bases {
			r := s.byBase[b]
			v := math.NaN()
			text := "–"
			if r != nil {
				if d := r.Decisive(); d.Index >= 0 {
					v = math.Max(0, -d.LogAdj/math.Ln10)
					text = strconv.FormatFloat(v, 'f', 1, 64)
					if d.Lower {
						text += " (too uniform)"
					}
				}
			}
			g.z[row][ci] = v
			if !math.IsNaN(v) {
				hi = math.Max(hi, v)
			}
			labels.XYs = append(labels.XYs, plotter.XY{X: float64(ci), Y: float64(row)})
			labels.Labels = append(labels.Labels, text)
		}
	}
	// The scale stops at p = 10^-10: past it every cell is the darkest
	// (the labels give the values), so one extreme audit does not wash out
	// the rest.
	hi = math.Min(hi, 10)
	hm := plotter.NewHeatMap(g, heatPalette{})
	hm.Min, hm.Max = 0, hi
	hm.Overflow = heatPalette{}.Colors()[63]
	hm.NaN = heatNaN
	hm.Rasterized = false
	p.Add(hm)
	lb, err := plotter.NewLabels(labels)
	if err != nil {
		return Figure{}, err
	}
	for i := range lb.TextStyle {
		lb.TextStyle[i].XAlign, lb.TextStyle[i].YAlign = draw.XCenter, draw.YCenter
		// white on the dark cells
		if xy := labels.XYs[i]; g.z[int(xy.Y)][int(xy.X)] > 0.6*hi {
			lb.TextStyle[i].Color = color.White
		}
	}
	p.Add(lb)
	var bt, st []plot.Tick
	for ci, b := range bases {
		bt = append(bt, plot.Tick{Value: float64(ci), Label: strconv.Itoa(b)})
	}
	for ri, s := range seqs {
		st = append(st, plot.Tick{Value: float64(len(seqs) - 1 - ri), Label: shortName(s.name)})
	}
	p.X.Tick.Marker = plot.ConstantTicks(bt)
	p.Y.Tick.Marker = plot.ConstantTicks(st)
	p.X.Min, p.X.Max = -0.5, float64(len(bases))-0.5
	p.Y.Min, p.Y.Max = -0.5, float64(len(seqs))-0.5
	p.Title.Text = fmt.Sprintf("−log10 of the smallest adjusted p (scale 0 to %g; 2 is p = 0.01)", hi)
	return Figure{Name: "bases-heatmap", Title: "Smallest adjusted p by sequence and base", plot: p}, nil
}

// shortName keeps a tick label short: the last 24 characters of a name.
func shortName(s string) string {
	r := []rune(s)
	if len(r) <= 24 {
		return s
	}
	return "…" + string(r[len(r)-23:])
}
