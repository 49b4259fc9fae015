package main

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/seq"
)

// parseBase reads --base: an integer in lo..hi.
func parseBase(s string, lo, hi int, what string) (int, error) {
	b, err := strconv.Atoi(strings.TrimSpace(s))
	if err != nil {
		return 0, usagef("--base %q is not a number; give an integer from %d to %d (%s)", s, lo, hi, what)
	}
	if b < lo || b > hi {
		return 0, usagef("--base %d is outside %d..%d (%s)", b, lo, hi, what)
	}
	return b, nil
}

// parseVector reads a comma-separated list of probabilities.
func parseVector(s string) ([]float64, error) {
	parts := strings.Split(s, ",")
	p := make([]float64, len(parts))
	for i, part := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(part), 64)
		if err != nil {
			return nil, fmt.Errorf("entry %d %q is not a number", i+1, strings.TrimSpace(part))
		}
		p[i] = v
	}
	return p, nil
}

// parseNull reads --null: uniform, fitted, or a vector p0,p1,… for the base.
func parseNull(s string, base int) (audit.NullSpec, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "uniform", "":
		return audit.NullSpec{Kind: checks.Uniform}, nil
	case "fitted":
		return audit.NullSpec{Kind: checks.Fitted}, nil
	}
	p, err := parseVector(s)
	if err != nil {
		return audit.NullSpec{}, usagef("--null %q: %v; give uniform, fitted or %d probabilities p0,p1,… summing to 1", s, err, base)
	}
	if _, err := checks.VectorNull(p, base); err != nil {
		return audit.NullSpec{}, usagef("--null: %v", err)
	}
	return audit.NullSpec{Kind: checks.Vector, P: p}, nil
}

// parseAlpha reads --alpha: a number strictly between 0 and 1.
func parseAlpha(s string) (float64, error) {
	a, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(a) {
		return 0, usagef("--alpha %q is not a number; give a level such as 0.01", s)
	}
	if !(a > 0 && a < 1) {
		return 0, usagef("--alpha %v is outside (0, 1); give a level such as 0.01", a)
	}
	return a, nil
}

// parseMaxBlock reads --max-block: "auto" (0) or a positive integer.
func parseMaxBlock(s string) (int, error) {
	if strings.EqualFold(strings.TrimSpace(s), "auto") {
		return 0, nil
	}
	k, err := strconv.Atoi(strings.TrimSpace(s))
	if err != nil || k < 1 {
		return 0, usagef("--max-block %q: give a block length of 1 or more, or auto", s)
	}
	return k, nil
}

// parseSize reads a memory size: bytes, or a number with KiB, MiB, GiB
// (or K, M, G, taken as the same powers of two).
//
// Suffixes, in either case: IEC KiB, MiB, GiB, TiB (powers of 1024); SI kB,
// MB, GB, TB (powers of 1000); a bare K, M, G or T is IEC, as memory sizes
// usually are; B or none is bytes.
func parseSize(s string) (int64, error) {
	t := strings.TrimSpace(s)
	mult := 1.0
	for _, u := range []struct {
		suffix string
		m      float64
	}{{"TiB", 1 << 40}, {"GiB", 1 << 30}, {"MiB", 1 << 20}, {"KiB", 1 << 10},
		{"TB", 1e12}, {"GB", 1e9}, {"MB", 1e6}, {"KB", 1e3},
		{"T", 1 << 40}, {"G", 1 << 30}, {"M", 1 << 20}, {"K", 1 << 10}, {"B", 1}} {
		if strings.HasSuffix(strings.ToUpper(t), strings.ToUpper(u.suffix)) {
			t = strings.TrimSpace(t[:len(t)-len(u.suffix)])
			mult = u.m
			break
		}
	}
	v, err := strconv.ParseFloat(t, 64)
	bytes := v * mult
	if err != nil || !(bytes >= 1) || bytes > 1<<60 {
		return 0, usagef("--memory %q: give a size from 1 byte to 1 EiB, such as 256MiB or 2GiB (KiB, MiB, GiB, TiB are powers of 1024; kB, MB, GB, TB powers of 1000)", s)
	}
	return int64(bytes), nil
}

// gzipUsage is the help of --gzip.
const gzipUsage = "whether the input is gzip-compressed: auto (a valid gzip header, not just its first two bytes), yes or no (bytes 1f 8b are data)"

// parseGzip reads --gzip: auto, yes or no.
func parseGzip(s string) (seq.Gzip, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "auto", "":
		return seq.GzipAuto, nil
	case "yes":
		return seq.GzipYes, nil
	case "no":
		return seq.GzipNo, nil
	}
	return 0, usagef("--gzip %q: give auto, yes or no", s)
}

// parseAdjust reads --adjust.
func parseAdjust(s string) (audit.Adjustment, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "holm":
		return audit.Holm, nil
	case "bh":
		return audit.BH, nil
	}
	return "", usagef("--adjust %q: use holm (family-wise, the default) or bh (false discovery rate)", s)
}
