package reports

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/borel-audit/borel/stats"
	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

// The landscape: dim F(q) = H(q)/ln b over the simplex of frequency
// vectors, with the sequence's q̂ and its confidence region (the Pearson
// region of stats.FrequencyRegion). Base 2: a curve over q_0. Base 3: a
// ternary map with contour lines, the faces of the triangle being the
// restricted-digit sets with one digit excluded (the Cantor set's face
// tops out at log 2/log 3). Larger bases: the curve along the segment from
// the uniform vector through q̂.

var (
	regionFill = color.NRGBA{180, 60, 0, 70} // not premultiplied: RGBA with A < R is not a colour
	pointInk   = color.RGBA{180, 60, 0, 255}
	nullInk    = color.RGBA{0, 90, 160, 255}
)

// landscapeNearFigure draws, in bases 2 and 3, the landscape around q̂
// when the region is too small to see on the whole simplex (under 5% of
// it across): the region, the contour lines near it and the null's vector
// when it is in view.
func landscapeNearFigure(r *audit.Result) (Figure, bool, error) {
	pos := positionOf(r)
	if pos == nil {
		return Figure{}, false, nil
	}
	switch len(pos.Region.QHat) {
	case 2:
		if pos.Region.High[0]-pos.Region.Low[0] >= 0.05 {
			return Figure{}, false, nil
		}
		return binaryNear(r, pos)
	case 3:
		return ternaryNear(r, pos)
	}
	return Figure{}, false, nil
}

func binaryNear(r *audit.Result, pos *checks.Position) (Figure, bool, error) {
	q := pos.Region.QHat
	lo, hi := pos.Region.Low[0], pos.Region.High[0]
	w := hi - lo
	x0, x1 := math.Max(0, q[0]-2*w), math.Min(1, q[0]+2*w)
	p := newPlot(fmt.Sprintf("dim F(q) near q̂ (base 2, %g%% region)", 100*pos.Region.Confidence), "q_0, the frequency of digit 0", "dim F(q) = H(q)/ln 2")
	var pts plotter.XYs
	ylo, yhi := math.Inf(1), math.Inf(-1)
	for i := 0; i <= 400; i++ {
		x := x0 + (x1-x0)*float64(i)/400
		y := dimOf([]float64{x, 1 - x}, 2)
		pts = append(pts, plotter.XY{X: x, Y: y})
		ylo, yhi = math.Min(ylo, y), math.Max(yhi, y)
	}
	pad := 0.1*(yhi-ylo) + 1e-9
	p.X.Min, p.X.Max = x0, x1
	p.Y.Min, p.Y.Max = ylo-pad, math.Min(1+pad, yhi+pad)
	curve, err := plotter.NewLine(pts)
	if err != nil {
		return Figure{}, false, err
	}
	styleLine(curve, 0)
	curve.Dashes = nil
	band, err := plotter.NewPolygon(plotter.XYs{{X: lo, Y: p.Y.Min}, {X: hi, Y: p.Y.Min}, {X: hi, Y: p.Y.Max}, {X: lo, Y: p.Y.Max}})
	if err != nil {
		return Figure{}, false, err
	}
	band.Color, band.LineStyle.Width = regionFill, 0
	here, err := plotter.NewScatter(plotter.XYs{{X: q[0], Y: dimOf(q, 2)}})
	if err != nil {
		return Figure{}, false, err
	}
	here.GlyphStyle = draw.GlyphStyle{Color: pointInk, Radius: vg.Points(4), Shape: draw.CircleGlyph{}}
	p.Add(band, curve, here)
	p.Legend.Add("dim F(q)", curve)
	p.Legend.Add(fmt.Sprintf("q̂_0 = %.6f", q[0]), here)
	p.Legend.Add(fmt.Sprintf("region for q_0: [%.6f, %.6f]", lo, hi), band)
	if r.Null.Kind != checks.Fitted && r.Null.P[0] >= x0 && r.Null.P[0] <= x1 {
		if err := addNullPoint(p, r, []float64{r.Null.P[0]}); err != nil {
			return Figure{}, false, err
		}
	}
	p.X.Tick.Marker = preciseTicks{}
	return Figure{Name: "landscape-near", Title: "Landscape near the sequence's frequencies", plot: p, legendBelow: true}, true, nil
}

// boxGrid is dim F(q) on a grid over a box of the ternary plane.
type boxGrid struct {
	nx, ny         int
	x0, x1, y0, y1 float64
	lo, hi         float64
}

func (g boxGrid) Dims() (c, r int) { return g.nx, g.ny }
func (g boxGrid) X(c int) float64  { return g.x0 + (g.x1-g.x0)*float64(c)/float64(g.nx-1) }
func (g boxGrid) Y(r int) float64  { return g.y0 + (g.y1-g.y0)*float64(r)/float64(g.ny-1) }
func (g boxGrid) Z(c, r int) float64 {
	return dimOf(fromTernary(g.X(c), g.Y(r)), 3)
}
func (g boxGrid) Min() float64 { return g.lo }
func (g boxGrid) Max() float64 { return g.hi }

// ternaryNear and landscapeTernary draw their heat maps as vector cells in
// the SVG (a raster image there is letterboxed to its pixels' aspect by
// browsers) and as a raster in the PNG (vector cells leave seams there).
func ternaryNear(r *audit.Result, pos *checks.Position) (Figure, bool, error) {
	return withRasterPNG(func(raster bool) (Figure, bool, error) { return ternaryNearPlot(r, pos, raster) })
}

func landscapeTernary(r *audit.Result, pos *checks.Position) (Figure, bool, error) {
	return withRasterPNG(func(raster bool) (Figure, bool, error) { return landscapeTernaryPlot(r, pos, raster) })
}

// withRasterPNG builds a figure for the SVG and again, rasterized, for the PNG.
func withRasterPNG(build func(raster bool) (Figure, bool, error)) (Figure, bool, error) {
	f, ok, err := build(false)
	if !ok || err != nil {
		return f, ok, err
	}
	g, _, err := build(true)
	f.pngPlot = g.plot
	return f, ok, err
}

func ternaryNearPlot(r *audit.Result, pos *checks.Position, raster bool) (Figure, bool, error) {
	center := ternary(pos.Region.QHat)
	var ring plotter.XYs
	reach := 0.0
	for i := range 180 {
		t := 2 * math.Pi * float64(i) / 180
		u := []float64{math.Cos(t), math.Cos(t - 2*math.Pi/3), math.Cos(t + 2*math.Pi/3)}
		pt := ternary(pos.Region.Boundary(u))
		ring = append(ring, pt)
		reach = math.Max(reach, math.Hypot(pt.X-center.X, pt.Y-center.Y))
	}
	if reach >= 0.05 {
		return Figure{}, false, nil // the whole-simplex view shows it
	}
	half := 2.2 * math.Max(reach, 1e-9)
	g := boxGrid{nx: 81, ny: 61, x0: center.X - half*1.35, x1: center.X + half*1.35, y0: center.Y - half, y1: center.Y + half}
	g.lo, g.hi = math.Inf(1), math.Inf(-1)
	for c := range g.nx {
		for rr := range g.ny {
			z := g.Z(c, rr)
			g.lo, g.hi = math.Min(g.lo, z), math.Max(g.hi, z)
		}
	}
	p := newPlot(fmt.Sprintf("dim F(q) near q̂ (base 3, %g%% region; the view is %.2g wide in q_1)", 100*pos.Region.Confidence, g.x1-g.x0), "", "")
	hm := plotter.NewHeatMap(g, grayPalette{})
	hm.Min, hm.Max = g.lo, g.hi
	hm.Rasterized = raster
	var levels []float64
	for i := 1; i <= 4; i++ {
		levels = append(levels, g.lo+(g.hi-g.lo)*float64(i)/5)
	}
	ct := plotter.NewContour(g, levels, nil)
	ct.LineStyles = nil
	for i := range levels {
		ct.LineStyles = append(ct.LineStyles, draw.LineStyle{Color: color.Gray{uint8(30 + 25*i)}, Width: vg.Points(0.8), Dashes: dashes[i%len(dashes)]})
	}
	p.Add(hm, ct)
	for i, l := range levels {
		line, _ := plotter.NewLine(plotter.XYs{{}, {}})
		line.LineStyle = ct.LineStyles[i]
		p.Legend.Add(fmt.Sprintf("dim F(q) = %.6f", l), line)
	}
	region, err := plotter.NewPolygon(ring)
	if err != nil {
		return Figure{}, false, err
	}
	region.Color = regionFill
	region.LineStyle = draw.LineStyle{Color: pointInk, Width: vg.Points(0.8)}
	here, err := plotter.NewScatter(plotter.XYs{center})
	if err != nil {
		return Figure{}, false, err
	}
	here.GlyphStyle = draw.GlyphStyle{Color: pointInk, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}
	p.Add(region, here)
	p.Legend.Add("q̂ with its region", here)
	if r.Null.Kind != checks.Fitted {
		xy := ternary(r.Null.P)
		if xy.X >= g.x0 && xy.X <= g.x1 && xy.Y >= g.y0 && xy.Y <= g.y1 {
			if err := addNullPoint(p, r, []float64{xy.X, xy.Y}); err != nil {
				return Figure{}, false, err
			}
		} else {
			p.Legend.Add(fmt.Sprintf("(the null's vector is outside this view, at dim F(p) = %.6f)", r.Entropy.NullDimension))
		}
	}
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = g.x0, g.x1, g.y0, g.y1
	p.HideAxes()
	return Figure{Name: "landscape-near", Title: "Landscape near the sequence's frequencies", plot: p, legendBelow: true}, true, nil
}

// landscapeFigure draws the landscape for an audit with a position.
func landscapeFigure(r *audit.Result) (Figure, bool, error) {
	pos := positionOf(r)
	if pos == nil {
		return Figure{}, false, nil
	}
	switch len(pos.Region.QHat) {
	case 2:
		return landscapeBinary(r, pos)
	case 3:
		return landscapeTernary(r, pos)
	default:
		return landscapeSegment(r, pos)
	}
}

// positionOf returns the audit's position among the sets F(q), or nil
// when it has none (no digits, no entropy profile).
func positionOf(r *audit.Result) *checks.Position {
	if r.Entropy == nil || r.Entropy.Position == nil || r.Entropy.Position.Region.N == 0 {
		return nil
	}
	return r.Entropy.Position
}

func dimOf(q []float64, base int) float64 { return stats.BesicovitchEgglestonDimension(q, base) }

func landscapeBinary(r *audit.Result, pos *checks.Position) (Figure, bool, error) {
	p := newPlot(fmt.Sprintf("Where the sequence sits: dim F(q) over q_0 (base 2, %g%% region)", 100*pos.Region.Confidence),
		"q_0, the frequency of digit 0", "dim F(q) = H(q)/ln 2")
	var pts plotter.XYs
	for i := 0; i <= 400; i++ {
		q0 := float64(i) / 400
		pts = append(pts, plotter.XY{X: q0, Y: dimOf([]float64{q0, 1 - q0}, 2)})
	}
	curve, err := plotter.NewLine(pts)
	if err != nil {
		return Figure{}, false, err
	}
	styleLine(curve, 0)
	curve.Dashes = nil
	lo, hi := pos.Region.Low[0], pos.Region.High[0]
	band, err := plotter.NewPolygon(plotter.XYs{{X: lo, Y: 0}, {X: hi, Y: 0}, {X: hi, Y: 1.02}, {X: lo, Y: 1.02}})
	if err != nil {
		return Figure{}, false, err
	}
	band.Color, band.LineStyle.Width = regionFill, 0
	q := pos.Region.QHat
	here, err := plotter.NewScatter(plotter.XYs{{X: q[0], Y: dimOf(q, 2)}})
	if err != nil {
		return Figure{}, false, err
	}
	here.GlyphStyle = draw.GlyphStyle{Color: pointInk, Radius: vg.Points(4), Shape: draw.CircleGlyph{}}
	p.Add(band, curve, here)
	p.Legend.Add("dim F(q)", curve)
	p.Legend.Add(fmt.Sprintf("q̂_0 = %.6f, dim F(q̂) = %.6f", q[0], dimOf(q, 2)), here)
	p.Legend.Add(fmt.Sprintf("region for q_0: [%.6f, %.6f]", lo, hi), band)
	if err := addNullPoint(p, r, []float64{r.Null.P[0]}); err != nil {
		return Figure{}, false, err
	}
	p.X.Min, p.X.Max = 0, 1
	p.Y.Min, p.Y.Max = 0, 1.02
	return Figure{Name: "landscape", Title: "Landscape: dim F(q) with the sequence's frequencies and their region", plot: p, legendBelow: true}, true, nil
}

// addNullPoint marks the null's vector at x (its coordinates on the
// figure's axes) with its dimension.
func addNullPoint(p *plot.Plot, r *audit.Result, x []float64) error {
	if r.Null.Kind == checks.Fitted {
		return nil
	}
	xy := plotter.XY{X: x[0], Y: r.Entropy.NullDimension}
	if len(x) == 2 {
		xy = plotter.XY{X: x[0], Y: x[1]}
	}
	sc, err := plotter.NewScatter(plotter.XYs{xy})
	if err != nil {
		return err
	}
	sc.GlyphStyle = draw.GlyphStyle{Color: nullInk, Radius: vg.Points(4), Shape: draw.PlusGlyph{}}
	p.Add(sc)
	p.Legend.Add(fmt.Sprintf("the null's vector (dim F(p) = %.6f)", r.Entropy.NullDimension), sc)
	return nil
}

// ternary maps a frequency vector of base 3 to the plane: digit 0 at
// (0, 0), digit 1 at (1, 0), digit 2 at (1/2, √3/2).
func ternary(q []float64) plotter.XY {
	return plotter.XY{X: q[1] + q[2]/2, Y: q[2] * math.Sqrt(3) / 2}
}

// fromTernary inverts ternary, with negative coordinates clamped and the
// rest renormalized (points outside the triangle take the value of the
// nearest face, so that contour lines meet the faces cleanly).
func fromTernary(x, y float64) []float64 {
	q2 := y * 2 / math.Sqrt(3)
	q1 := x - q2/2
	q := []float64{1 - q1 - q2, q1, q2}
	s := 0.0
	for i := range q {
		q[i] = math.Max(q[i], 0)
		s += q[i]
	}
	for i := range q {
		q[i] /= s
	}
	return q
}

// dimGrid is dim F(q) on a grid over the triangle's bounding box.
type dimGrid struct{ nx, ny int }

func (g dimGrid) Dims() (c, r int)   { return g.nx, g.ny }
func (g dimGrid) X(c int) float64    { return float64(c) / float64(g.nx-1) }
func (g dimGrid) Y(r int) float64    { return float64(r) / float64(g.ny-1) * math.Sqrt(3) / 2 }
func (g dimGrid) Z(c, r int) float64 { return dimOf(fromTernary(g.X(c), g.Y(r)), 3) }
func (g dimGrid) Min() float64       { return 0 }
func (g dimGrid) Max() float64       { return 1 }

// grayPalette runs from white (dimension 0) to a mid gray (1), so that
// the marks on it stay legible.
type grayPalette struct{}

func (grayPalette) Colors() []color.Color {
	var cs []color.Color
	for i := range 64 {
		v := uint8(255 - i*100/63)
		cs = append(cs, color.Gray{v})
	}
	return cs
}

var _ palette.Palette = grayPalette{}

func landscapeTernaryPlot(r *audit.Result, pos *checks.Position, raster bool) (Figure, bool, error) {
	p := newPlot(fmt.Sprintf("Where the sequence sits: dim F(q) over the simplex (base 3, %g%% region)", 100*pos.Region.Confidence), "", "")
	grid := dimGrid{nx: 121, ny: 105}
	hm := plotter.NewHeatMap(grid, grayPalette{})
	hm.Min, hm.Max = 0, 1
	hm.Rasterized = raster
	levels := []float64{0.5, 0.8, 0.9, 0.95, 0.99}
	ct := plotter.NewContour(grid, levels, nil)
	ct.LineStyles = nil
	for i := range levels {
		ct.LineStyles = append(ct.LineStyles, draw.LineStyle{Color: color.Gray{uint8(40 + 20*i)}, Width: vg.Points(0.8), Dashes: dashes[i%len(dashes)]})
	}
	// Outside the triangle: white.
	h := math.Sqrt(3) / 2
	left, err := plotter.NewPolygon(plotter.XYs{{X: -0.01, Y: -0.01}, {X: 0.5, Y: h + 0.01}, {X: -0.01, Y: h + 0.01}})
	if err != nil {
		return Figure{}, false, err
	}
	right, err := plotter.NewPolygon(plotter.XYs{{X: 1.01, Y: -0.01}, {X: 1.01, Y: h + 0.01}, {X: 0.5, Y: h + 0.01}})
	if err != nil {
		return Figure{}, false, err
	}
	for _, m := range []*plotter.Polygon{left, right} {
		m.Color, m.LineStyle.Width = color.White, 0
	}
	edge, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}, {X: 0.5, Y: h}, {X: 0, Y: 0}})
	if err != nil {
		return Figure{}, false, err
	}
	edge.Color, edge.Width = color.Black, vg.Points(1)
	p.Add(hm, ct, left, right, edge)
	// The vertices and the faces' tops: the Cantor-type sets.
	names := []string{checks.DigitName(0, 3), checks.DigitName(1, 3), checks.DigitName(2, 3)}
	labels, err := plotter.NewLabels(plotter.XYLabels{
		XYs:    []plotter.XY{{X: -0.04, Y: -0.04}, {X: 1.01, Y: -0.04}, {X: 0.5, Y: h + 0.02}},
		Labels: []string{"only " + names[0], "only " + names[1], "only " + names[2]},
	})
	if err != nil {
		return Figure{}, false, err
	}
	p.Add(labels)
	faces, err := plotter.NewScatter(plotter.XYs{ternary([]float64{0.5, 0, 0.5}), ternary([]float64{0.5, 0.5, 0}), ternary([]float64{0, 0.5, 0.5})})
	if err != nil {
		return Figure{}, false, err
	}
	faces.GlyphStyle = draw.GlyphStyle{Color: color.Black, Radius: vg.Points(2.5), Shape: draw.SquareGlyph{}}
	p.Add(faces)
	p.Legend.Add(fmt.Sprintf("two digits only (a face): dim ≤ log 2/log 3 = %.4f", stats.RestrictedDimension(2, 3)), faces)
	for i, l := range levels {
		line, _ := plotter.NewLine(plotter.XYs{{}, {}})
		line.LineStyle = ct.LineStyles[i]
		p.Legend.Add(fmt.Sprintf("dim F(q) = %g", l), line)
	}
	// The region's boundary and q̂.
	var ring plotter.XYs
	for i := range 180 {
		t := 2 * math.Pi * float64(i) / 180
		// a direction in the plane of the simplex (Σ u = 0)
		u := []float64{math.Cos(t), math.Cos(t - 2*math.Pi/3), math.Cos(t + 2*math.Pi/3)}
		ring = append(ring, ternary(pos.Region.Boundary(u)))
	}
	region, err := plotter.NewPolygon(ring)
	if err != nil {
		return Figure{}, false, err
	}
	region.Color = regionFill
	region.LineStyle = draw.LineStyle{Color: pointInk, Width: vg.Points(0.8)}
	here, err := plotter.NewScatter(plotter.XYs{ternary(pos.Region.QHat)})
	if err != nil {
		return Figure{}, false, err
	}
	here.GlyphStyle = draw.GlyphStyle{Color: pointInk, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}
	p.Add(region, here)
	q := pos.Region.QHat
	p.Legend.Add(fmt.Sprintf("q̂ = (%.4f, %.4f, %.4f), dim F(q̂) = %.6f, with its region", q[0], q[1], q[2], dimOf(q, 3)), here)
	if r.Null.Kind != checks.Fitted {
		xy := ternary(r.Null.P)
		if err := addNullPoint(p, r, []float64{xy.X, xy.Y}); err != nil {
			return Figure{}, false, err
		}
	}
	p.X.Min, p.X.Max = -0.08, 1.08
	p.Y.Min, p.Y.Max = -0.08, h+0.08
	p.HideAxes()
	return Figure{Name: "landscape", Title: "Landscape: dim F(q) over the frequency simplex, with the sequence's frequencies and their region", plot: p, legendBelow: true}, true, nil
}

func landscapeSegment(r *audit.Result, pos *checks.Position) (Figure, bool, error) {
	b := len(pos.Region.QHat)
	q := pos.Region.QHat
	u := make([]float64, b)
	dir := make([]float64, b)
	moved := false
	for j := range u {
		u[j] = 1 / float64(b)
		dir[j] = q[j] - u[j]
		moved = moved || math.Abs(dir[j]) > 1e-15
	}
	if !moved {
		dir[0], dir[1] = 1.0/float64(b), -1.0/float64(b) // q̂ uniform: any direction will do
	}
	// t runs from the uniform vector (0) through q̂ (1) to the simplex's face.
	tMax := math.Inf(1)
	for j := range dir {
		if dir[j] < 0 {
			tMax = math.Min(tMax, u[j]/-dir[j])
		}
	}
	at := func(t float64) []float64 {
		v := make([]float64, b)
		for j := range v {
			v[j] = math.Max(0, u[j]+t*dir[j])
		}
		return v
	}
	p := newPlot(fmt.Sprintf("dim F(q) from the uniform vector through q̂ (base %d)", r.Base),
		"t (0: the uniform vector; 1: q̂; the end: a face of the simplex)", fmt.Sprintf("dim F(q) = H(q)/ln %d", r.Base))
	var pts plotter.XYs
	for i := 0; i <= 400; i++ {
		t := tMax * float64(i) / 400
		pts = append(pts, plotter.XY{X: t, Y: dimOf(at(t), r.Base)})
	}
	curve, err := plotter.NewLine(pts)
	if err != nil {
		return Figure{}, false, err
	}
	styleLine(curve, 0)
	curve.Dashes = nil
	// The region's extent along the line through q̂.
	neg := make([]float64, b)
	for j := range neg {
		neg[j] = -dir[j]
	}
	tOf := func(v []float64) float64 {
		num, den := 0.0, 0.0
		for j := range v {
			num += (v[j] - u[j]) * dir[j]
			den += dir[j] * dir[j]
		}
		return num / den
	}
	lo, hi := tOf(pos.Region.Boundary(neg)), tOf(pos.Region.Boundary(dir))
	if !moved {
		lo, hi = 0, tOf(pos.Region.Boundary(dir))
	}
	top := 1.02
	tq := 1.0
	if !moved {
		tq = 0
	}
	here, err := plotter.NewScatter(plotter.XYs{{X: tq, Y: dimOf(q, r.Base)}})
	if err != nil {
		return Figure{}, false, err
	}
	here.GlyphStyle = draw.GlyphStyle{Color: pointInk, Radius: vg.Points(4), Shape: draw.CircleGlyph{}}
	p.Legend.Add("dim F(q) along the segment", curve)
	p.Legend.Add(fmt.Sprintf("q̂: dim F(q̂) = %.6f", dimOf(q, r.Base)), here)
	// A view of the whole segment hides a region of width 10^-3; the axis
	// zooms to a few region widths around q̂ when it is that narrow.
	span := math.Max(hi-lo, 1e-12)
	if span < 0.05*tMax {
		p.X.Min, p.X.Max = math.Max(0, tq-4*span-0.05), math.Min(tMax, tq+4*span+0.05)
		yl, yh := math.Inf(1), math.Inf(-1)
		for _, pt := range pts {
			if pt.X >= p.X.Min && pt.X <= p.X.Max {
				yl, yh = math.Min(yl, pt.Y), math.Max(yh, pt.Y)
			}
		}
		p.Y.Min, p.Y.Max = math.Max(0, yl-0.1*(yh-yl+1e-4)), math.Min(1.0001, yh+0.1*(yh-yl+1e-4))
		p.Title.Text = fmt.Sprintf("dim F(q) near q̂, on the line from the uniform vector (base %d)", r.Base)
	} else {
		p.X.Min, p.X.Max = 0, tMax
		p.Y.Min, p.Y.Max = 0, top
	}
	// The band spans the y range shown, and the curve is clipped to it.
	band, err := plotter.NewPolygon(plotter.XYs{{X: math.Max(lo, p.X.Min), Y: p.Y.Min}, {X: math.Min(hi, p.X.Max), Y: p.Y.Min},
		{X: math.Min(hi, p.X.Max), Y: p.Y.Max}, {X: math.Max(lo, p.X.Min), Y: p.Y.Max}})
	if err != nil {
		return Figure{}, false, err
	}
	band.Color, band.LineStyle.Width = regionFill, 0
	var shown plotter.XYs
	for _, pt := range pts {
		if pt.X >= p.X.Min && pt.X <= p.X.Max {
			shown = append(shown, pt)
		}
	}
	if len(shown) < 50 { // zoomed in: draw the curve anew, densely, over the view
		shown = nil
		for i := 0; i <= 400; i++ {
			t := p.X.Min + (p.X.Max-p.X.Min)*float64(i)/400
			shown = append(shown, plotter.XY{X: t, Y: dimOf(at(t), r.Base)})
		}
	}
	curve.XYs = shown
	p.Add(band, curve, here)
	p.Legend.Add(fmt.Sprintf("the region along the segment: t in [%.4g, %.4g]", lo, hi), band)
	p.X.Tick.Marker = preciseTicks{}
	return Figure{Name: "landscape", Title: "Landscape: dim F(q) along the segment from the uniform vector through the sequence's frequencies", plot: p, legendBelow: true}, true, nil
}

// auditSpectrumFigure draws the spectrum of μ_p for an audit against a
// stated vector, with the sequence's local dimension α̂ and its interval,
// and its point (α̂, dim F(q̂)): on the diagonal's touching point for a
// sequence generic for μ_p.
func auditSpectrumFigure(r *audit.Result) (Figure, bool, error) {
	if r.Entropy == nil || r.Entropy.Position == nil || !r.Entropy.Position.HasAlpha || math.IsInf(r.Entropy.Position.Alpha, 0) {
		return Figure{}, false, nil
	}
	pos := r.Entropy.Position
	s, err := stats.NewSpectrum(r.Null.P, r.Base)
	if err != nil {
		return Figure{}, false, nil
	}
	f, err := SpectrumFigure(s, "spectrum", SpectrumMark{Label: "the sequence", Alpha: pos.Alpha, Lo: pos.AlphaLow, Hi: pos.AlphaHigh,
		HasInterval: true, Dim: r.Entropy.Rows[0].Dimension, HasDim: true})
	return f, err == nil, err
}
