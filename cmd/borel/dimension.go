package main

import (
	"fmt"
	"math"
	"strconv"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/stats"
)

const dimensionHelp = `Usage: borel dimension p0,p1,... [--base B]

Prints the Hausdorff dimension of the set of numbers whose base-B digit frequencies are
p0, p1, ... (Besicovitch–Eggleston): dim F(p) = -Σ p_j ln p_j / ln B. The vector has one
entry per digit, 0 allowed; missing trailing digits count as 0 when --base is larger.
The base defaults to the number of entries.

Example: the middle-third Cantor set (base 3, digit 1 never used):
  $ borel dimension 0.5,0,0.5
  dim F(p) = 0.630930 in base 3 (H(p) = 0.693147 nats = 1 bit per digit)
`

func runDimension(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("dimension", pflag.ContinueOnError)
	base := fs.String("base", "", "base (default: the number of entries)")
	if done, err := parseFlags(fs, args, dimensionHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if fs.NArg() != 1 {
		return 0, usagef("dimension needs one frequency vector p0,p1,... (got %d arguments); see borel dimension --help", fs.NArg())
	}
	p, err := parseVector(fs.Arg(0))
	if err != nil {
		return 0, usagef("dimension %q: %v; give probabilities p0,p1,... summing to 1", fs.Arg(0), err)
	}
	b := len(p)
	if *base != "" {
		if b, err = parseBase(*base, 2, 1<<16, "the vector's length or more"); err != nil {
			return 0, err
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
	h := stats.VectorEntropy(full)
	bitsWord := "bits"
	if math.Abs(h/math.Ln2-1) < 1e-12 {
		bitsWord = "bit"
	}
	fmt.Fprintf(e.stdout, "dim F(p) = %s in base %d (H(p) = %s nats = %s %s per digit)\n",
		strconv.FormatFloat(stats.BesicovitchEgglestonDimension(full, b), 'f', 6, 64), b,
		strconv.FormatFloat(h, 'f', 6, 64), strconv.FormatFloat(h/math.Ln2, 'g', 6, 64), bitsWord)
	return exitOK, nil
}
