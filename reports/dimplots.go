package reports

import (
	"fmt"
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/borel-audit/borel/stats"
)

// SpectrumMark is a point to mark on the spectrum: a local dimension α
// (an estimate from data, with its interval when Low < High).
type SpectrumMark struct {
	Label         string
	Alpha, Lo, Hi float64
	HasInterval   bool
	// Dim, with HasDim, also places the point (α̂, dim F(q̂)).
	Dim    float64
	HasDim bool
}

// spectrumCurve samples (α(q), f(α(q))) densely along the curve: q =
// tan(t) for t across (−π/2, π/2), which reaches the flat ends, plus the
// end points themselves.
func spectrumCurve(s *stats.Spectrum) plotter.XYs {
	pts := plotter.XYs{{X: s.AlphaMax, Y: s.FMax}}
	const n = 400
	for i := 1; i < n; i++ {
		t := -math.Pi/2 + math.Pi*float64(i)/n
		a, f := s.At(math.Tan(t))
		pts = append(pts, plotter.XY{X: a, Y: f})
	}
	return append(pts, plotter.XY{X: s.AlphaMin, Y: s.FMin})
}

// SpectrumFigure draws f(α) of μ_p with the diagonal f = α, the point
// where they touch (α = H(p)/log b: the dimension of F(p), where μ_p
// lives), the peak at q = 0, and the marks (an estimate α̂ of the local
// dimension along a sequence, with its interval).
func SpectrumFigure(s *stats.Spectrum, name string, marks ...SpectrumMark) (Figure, error) {
	p := newPlot(fmt.Sprintf("Multifractal spectrum of μ_p, p = %s (base %d)", VectorLabel(s.P), s.Base),
		"local dimension α", "f(α) = dim of the set where μ_p has local dimension α")
	curve, err := plotter.NewLine(spectrumCurve(s))
	if err != nil {
		return Figure{}, err
	}
	styleLine(curve, 0)
	curve.Dashes = nil
	curve.Width = vg.Points(1.6)
	lo := math.Min(s.AlphaMin, 0)
	hi := s.AlphaMax
	for _, m := range marks {
		hi = math.Max(hi, m.Alpha)
		if m.HasInterval {
			hi = math.Max(hi, m.Hi)
		}
	}
	hi = math.Max(hi, 1) + 0.05
	diag, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: math.Min(hi, 1.05), Y: math.Min(hi, 1.05)}})
	if err != nil {
		return Figure{}, err
	}
	styleLine(diag, 1)
	touch, err := plotter.NewScatter(plotter.XYs{{X: s.AlphaH, Y: s.AlphaH}})
	if err != nil {
		return Figure{}, err
	}
	touch.GlyphStyle = draw.GlyphStyle{Color: ink[0], Radius: vg.Points(3.5), Shape: draw.CircleGlyph{}}
	peak, err := plotter.NewScatter(plotter.XYs{{X: s.AlphaPk, Y: s.Peak}})
	if err != nil {
		return Figure{}, err
	}
	peak.GlyphStyle = draw.GlyphStyle{Color: ink[2%len(ink)], Radius: vg.Points(3), Shape: draw.SquareGlyph{}}
	p.Add(curve, diag, touch, peak)
	p.Legend.Add("f(α)", curve)
	p.Legend.Add("f(α) = α", diag)
	p.Legend.Add(fmt.Sprintf("α = f = H(p)/ln %d = %.4f (q = 1): dim F(p)", s.Base, s.AlphaH), touch)
	p.Legend.Add(fmt.Sprintf("peak f = %.4g at α = %.4f (q = 0)", s.Peak, s.AlphaPk), peak)
	for i, m := range marks {
		top := 1.02 * math.Max(s.Peak, 0.05)
		v, err := plotter.NewLine(plotter.XYs{{X: m.Alpha, Y: 0}, {X: m.Alpha, Y: top}})
		if err != nil {
			return Figure{}, err
		}
		styleLine(v, 3+i)
		p.Add(v)
		label := fmt.Sprintf("%s: α̂ = %.4f", m.Label, m.Alpha)
		if m.HasInterval {
			band, err := plotter.NewPolygon(plotter.XYs{{X: m.Lo, Y: 0}, {X: m.Hi, Y: 0}, {X: m.Hi, Y: top}, {X: m.Lo, Y: top}})
			if err != nil {
				return Figure{}, err
			}
			band.Color = color.NRGBA{180, 60, 0, 50}
			band.LineStyle.Width = 0
			p.Add(band)
			label += fmt.Sprintf(" [%.4f, %.4f]", m.Lo, m.Hi)
		}
		p.Legend.Add(label, v)
		if m.HasDim {
			pt, err := plotter.NewScatter(plotter.XYs{{X: m.Alpha, Y: m.Dim}})
			if err != nil {
				return Figure{}, err
			}
			pt.GlyphStyle = draw.GlyphStyle{Color: color.RGBA{180, 60, 0, 255}, Radius: vg.Points(4), Shape: draw.TriangleGlyph{}}
			p.Add(pt)
			p.Legend.Add(fmt.Sprintf("%s at (α̂, dim F(q̂)) = (%.4f, %.4f)", m.Label, m.Alpha, m.Dim), pt)
		}
	}
	p.X.Min, p.X.Max = lo, hi
	p.Y.Min, p.Y.Max = 0, 1.05*math.Max(s.Peak, 0.05)
	p.X.Tick.Marker = preciseTicks{}
	return Figure{Name: name, Title: "Multifractal spectrum f(α)", plot: p, legendBelow: true}, nil
}

// VectorLabel writes a frequency vector as (0.5, 0.3, 0.2), with six
// significant digits an entry, shortened past 12 entries.
func VectorLabel(p []float64) string {
	parts := make([]string, 0, len(p))
	for i, v := range p {
		if i == 12 && len(p) > 14 {
			parts = append(parts, fmt.Sprintf("… (%d entries)", len(p)))
			break
		}
		parts = append(parts, strconv.FormatFloat(v, 'g', 6, 64))
	}
	return "(" + strings.Join(parts, ", ") + ")"
}
