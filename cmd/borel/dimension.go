package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/reports"
	"github.com/borel-audit/borel/stats"
)

const dimensionHelp = `Usage: borel dimension p0,p1,... [--base B] [--alpha A] [--format F] [-o OUT] [--plots DIR]
       borel dimension --only DIGITS --base B [...]

Prints the Hausdorff dimension of the set F(p) of numbers whose base-B digit frequencies are
p0, p1, ... (Besicovitch–Eggleston): dim F(p) = -Σ p_j ln p_j / ln B, and the multifractal
spectrum of the product measure μ_p that draws digits independently with those probabilities:
f(α), the dimension of the set where μ_p has local dimension α, as the Legendre transform of
τ(q) = -log_B Σ p_j^q. f ends at α_min = -log_B max p and α_max = -log_B min p, peaks at the
dimension of the digits used (1 when every digit is), and touches the diagonal f(α) = α at
α = dim F(p), where μ_p lives. --alpha evaluates f at a given α.

--only lists the allowed digits of a restricted-digit set (numbers whose base-B digits all lie
in the list): its dimension is log m / log B for m digits, the spectrum of the uniform vector on
them collapsed to one point.

The vector has one entry per digit, 0 allowed; missing trailing digits count as 0 when --base is
larger. The base defaults to the number of entries. Formats: text, md, csv, json, tex, html (the
page draws the spectrum); --plots also writes it as SVG and PNG.

Example: the middle-third Cantor set (base 3, digit 1 never used):
  $ borel dimension 0.5,0,0.5
  dim F(p) = 0.630930 in base 3 (H(p) = 0.693147 nats = 1 bit per digit)

Example: the spectrum of a biased ternary source, and f at α = 0.9:
  $ borel dimension 0.5,0.3,0.2 --alpha 0.9
  ...
  f(0.9) = 0.894166 (at q = 1.31661)
`

func runDimension(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("dimension", pflag.ContinueOnError)
	base := fs.String("base", "", "base (default: the number of entries)")
	only := fs.String("only", "", "allowed digits of a restricted-digit set, e.g. 0,2 (with --base)")
	alphaFlag := fs.Float64("alpha", math.NaN(), "evaluate the spectrum f at this local dimension")
	format := fs.String("format", "text", "text, md, csv, json, tex or html")
	outPath := fs.StringP("output", "o", "", "write to this file (atomically) instead of standard output")
	plots := fs.String("plots", "", "also write the spectrum to this folder, as SVG and PNG")
	if done, err := parseFlags(fs, args, dimensionHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if !slicesContains([]string{"text", "md", "csv", "json", "tex", "html"}, *format) {
		return 0, usagef("--format %q: dimension writes text, md, csv, json, tex or html", *format)
	}
	if *outPath != "" && *outPath != "-" {
		if err := checkWritable(*outPath, "-o"); err != nil {
			return 0, err
		}
	}
	if *plots != "" {
		if err := checkPlotFolder(*plots); err != nil {
			return 0, err
		}
	}
	var p []float64
	var allowed []int
	b := 0
	if *base != "" {
		var err error
		if b, err = parseBase(*base, 2, 1<<16, "2 or more"); err != nil {
			return 0, err
		}
	}
	switch {
	case *only != "":
		if fs.NArg() != 0 {
			return 0, usagef("--only replaces the frequency vector; give one or the other")
		}
		if b == 0 {
			return 0, usagef("--only needs --base, the base the digits are written in")
		}
		seen := map[int]bool{}
		for _, part := range strings.Split(*only, ",") {
			d, err := strconv.ParseInt(strings.TrimSpace(part), 36, 32)
			if err != nil || d < 0 || int(d) >= b {
				return 0, usagef("--only %q: %q is not a digit of base %d", *only, strings.TrimSpace(part), b)
			}
			if seen[int(d)] {
				return 0, usagef("--only %q: digit %s is listed twice", *only, strings.TrimSpace(part))
			}
			seen[int(d)] = true
			allowed = append(allowed, int(d))
		}
		p = make([]float64, b)
		for _, d := range allowed {
			p[d] = 1 / float64(len(allowed))
		}
	case fs.NArg() != 1:
		return 0, usagef("dimension needs one frequency vector p0,p1,... (got %d arguments), or --only; see borel dimension --help", fs.NArg())
	default:
		var err error
		p, err = parseVector(fs.Arg(0))
		if err != nil {
			return 0, usagef("dimension %q: %v; give probabilities p0,p1,... summing to 1", fs.Arg(0), err)
		}
		if b == 0 {
			b = len(p)
		}
		if b < len(p) {
			return 0, usagef("--base %d is smaller than the vector's %d entries", b, len(p))
		}
	}
	if b < 2 {
		return 0, usagef("a frequency vector needs at least 2 digits (got %d)", b)
	}
	sum := 0.0
	for i, v := range p {
		if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 || v > 1 {
			return 0, usagef("entry %d is %v; every entry must lie in [0, 1]", i+1, v)
		}
		sum += v
	}
	if math.Abs(sum-1) > 1e-9 {
		return 0, usagef("the vector sums to %.12g, not 1 (tolerance 1e-9)", sum)
	}
	full := make([]float64, b)
	copy(full, p)
	s, err := stats.NewSpectrum(full, b)
	if err != nil {
		return 0, usageError{err.Error()}
	}
	d := dimensionSheet(s, allowed, *alphaFlag)
	var buf bytes.Buffer
	if *format == "json" {
		enc := json.NewEncoder(&buf)
		enc.SetIndent("", "  ")
		if err := enc.Encode(dimensionJSON(s, allowed, *alphaFlag)); err != nil {
			return 0, err
		}
	} else {
		if err := reports.WriteSheet(&buf, *format, d); err != nil {
			return 0, err
		}
	}
	if *plots != "" {
		if err := writeFigures(*plots, "dimension", d.Figures); err != nil {
			return 0, err
		}
	}
	if *outPath == "" || *outPath == "-" {
		_, err := e.stdout.Write(buf.Bytes())
		return exitOK, err
	}
	return exitOK, writeAtomic(*outPath, buf.Bytes())
}

// num6 writes a number with 6 decimals (no "-0.000000"), ∞ as such.
func num6(v float64) string {
	switch {
	case math.IsInf(v, 1):
		return "+∞"
	case math.IsInf(v, -1):
		return "-∞"
	case math.Abs(v) < 5e-7:
		return "0.000000"
	}
	return strconv.FormatFloat(v, 'f', 6, 64)
}

// spectrumQs are the q of the spectrum's table.
var spectrumQs = []float64{math.Inf(-1), -10, -5, -2, -1, -0.5, 0, 0.5, 1, 2, 5, 10, math.Inf(1)}

// dimensionSheet is the dimension and the spectrum as lines and a table.
func dimensionSheet(s *stats.Spectrum, allowed []int, alpha float64) reports.Sheet {
	b := s.Base
	h := stats.VectorEntropy(s.P)
	bitsWord := "bits"
	if math.Abs(h/math.Ln2-1) < 1e-12 {
		bitsWord = "bit"
	}
	sh := reports.Sheet{Title: fmt.Sprintf("borel dimension: p = %s in base %d", reports.VectorLabel(s.P), b)}
	sh.Lines = append(sh.Lines, fmt.Sprintf("dim F(p) = %s in base %d (H(p) = %s nats = %s %s per digit)",
		num6(s.AlphaH), b, num6(h), strconv.FormatFloat(h/math.Ln2, 'g', 6, 64), bitsWord))
	if allowed != nil {
		names := make([]string, len(allowed))
		for i, d := range allowed {
			names[i] = strconv.FormatInt(int64(d), 36)
		}
		sh.Lines = append(sh.Lines, fmt.Sprintf("restricted digits {%s} in base %d: dimension log %d / log %d = %s (the uniform vector on them attains it; the spectrum is that one point)",
			strings.Join(names, ", "), b, len(allowed), b, num6(stats.RestrictedDimension(len(allowed), b))))
	}
	if s.AlphaMax-s.AlphaMin < 1e-12 {
		sh.Lines = append(sh.Lines, fmt.Sprintf("spectrum of μ_p: the single point α = f(α) = %s, since p is uniform on the %d digits it uses", num6(s.AlphaH), support(s.P)))
	} else {
		sh.Lines = append(sh.Lines,
			fmt.Sprintf("spectrum of μ_p: α from α_min = −log_%d max p = %s (f = %s) to α_max = −log_%d min p = %s (f = %s)", b, num6(s.AlphaMin), num6(s.FMin), b, num6(s.AlphaMax), num6(s.FMax)),
			fmt.Sprintf("peak f = %s at α = %s (q = 0: log_%d of the %d digits used)", num6(s.Peak), num6(s.AlphaPk), b, support(s.P)),
			fmt.Sprintf("f(α) = α = %s at q = 1: μ_p lives on F(p), of that dimension", num6(s.AlphaH)))
	}
	if !math.IsNaN(alpha) {
		if f, q, ok := s.F(alpha); ok {
			sh.Lines = append(sh.Lines, fmt.Sprintf("f(%g) = %s (at q = %s)", alpha, num6(f), strconv.FormatFloat(q, 'g', 6, 64)))
		} else {
			sh.Lines = append(sh.Lines, fmt.Sprintf("f(%g) = −∞: no number has local dimension %g under μ_p (the spectrum spans [%s, %s])", alpha, alpha, num6(s.AlphaMin), num6(s.AlphaMax)))
		}
	}
	t := reports.SheetTable{Caption: fmt.Sprintf("The spectrum by q: τ(q) = −log_%d Σ p_j^q, α(q) = τ'(q), f(α(q)) = q·α(q) − τ(q)", b),
		Header: []string{"q", "τ(q)", "α(q)", "f(α)"}, Right: []bool{true, true, true, true}}
	for _, q := range spectrumQs {
		a, f := s.At(q)
		tau := "–"
		if !math.IsInf(q, 0) {
			tau = num6(s.Tau(q))
		}
		qs := num6(q)
		if !math.IsInf(q, 0) {
			qs = strconv.FormatFloat(q, 'g', -1, 64)
		}
		t.Rows = append(t.Rows, []string{qs, tau, num6(a), num6(f)})
	}
	sh.Tables = []reports.SheetTable{t}
	sh.Notes = []string{"Besicovitch (1934) and Eggleston (1949) for dim F(p); the spectrum as the Legendre transform of τ for self-similar measures (Cawley & Mauldin 1992)."}
	if fig, err := reports.SpectrumFigure(s, "spectrum"); err == nil {
		sh.Figures = []reports.Figure{fig}
	}
	return sh
}

func support(p []float64) int {
	n := 0
	for _, v := range p {
		if v > 0 {
			n++
		}
	}
	return n
}

// dimensionJSON is the dimension and the spectrum with their numbers.
func dimensionJSON(s *stats.Spectrum, allowed []int, alpha float64) any {
	type row struct {
		Q     *float64 `json:"q"` // null at ±∞ (the end points, by q_end)
		QEnd  string   `json:"q_end,omitempty"`
		Tau   *float64 `json:"tau"`
		Alpha float64  `json:"alpha"`
		F     float64  `json:"f"`
	}
	out := struct {
		Base          int       `json:"base"`
		P             []float64 `json:"p"`
		Dimension     float64   `json:"dimension"`
		EntropyNats   float64   `json:"entropy_nats"`
		Allowed       []int     `json:"allowed_digits,omitempty"`
		Restricted    *float64  `json:"restricted_dimension,omitempty"`
		AlphaMin      float64   `json:"alpha_min"`
		AlphaMax      float64   `json:"alpha_max"`
		FAtAlphaMin   float64   `json:"f_at_alpha_min"`
		FAtAlphaMax   float64   `json:"f_at_alpha_max"`
		Peak          float64   `json:"peak_f"`
		AlphaAtPeak   float64   `json:"alpha_at_peak"`
		Spectrum      []row     `json:"spectrum"`
		AskedAlpha    *float64  `json:"asked_alpha,omitempty"`
		FAtAskedAlpha *float64  `json:"f_at_asked_alpha,omitempty"`
	}{Base: s.Base, P: s.P, Dimension: s.AlphaH, EntropyNats: stats.VectorEntropy(s.P), Allowed: allowed,
		AlphaMin: s.AlphaMin, AlphaMax: s.AlphaMax, FAtAlphaMin: s.FMin, FAtAlphaMax: s.FMax, Peak: s.Peak, AlphaAtPeak: s.AlphaPk}
	if allowed != nil {
		r := stats.RestrictedDimension(len(allowed), s.Base)
		out.Restricted = &r
	}
	for _, q := range spectrumQs {
		a, f := s.At(q)
		r := row{Alpha: a, F: f}
		if math.IsInf(q, 0) {
			r.QEnd = "+inf"
			if q < 0 {
				r.QEnd = "-inf"
			}
		} else {
			qq, tau := q, s.Tau(q)
			r.Q, r.Tau = &qq, &tau
		}
		out.Spectrum = append(out.Spectrum, r)
	}
	if !math.IsNaN(alpha) {
		out.AskedAlpha = &alpha
		if f, _, ok := s.F(alpha); ok {
			out.FAtAskedAlpha = &f
		}
	}
	return out
}

// writeFigures writes figures as SVG and PNG into dir, named stem-NAME.
func writeFigures(dir, stem string, figs []reports.Figure) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("cannot create the plot folder %s: %v", dir, unwrapPathError(err))
	}
	for _, f := range figs {
		for _, kind := range []string{"svg", "png"} {
			var data []byte
			var err error
			if kind == "svg" {
				data, err = f.SVG()
			} else {
				data, err = f.PNG()
			}
			if err != nil {
				return err
			}
			if err := writeAtomic(filepath.Join(dir, stem+"-"+f.Name+"."+kind), data); err != nil {
				return err
			}
		}
	}
	return nil
}
