package checks

import (
	"fmt"
	"math"

	"borel/internal/tally"
	"borel/stats"
)

// driftCheck is the maximal excursion of the digit-sum walk. With the null's
// mean μ and standard deviation σ, S_k = Σ_{i≤k} (x_i - μ)/σ and
//
//	M = max_{k≤n} |S_k| / √n  →  sup_{0≤t≤1} |W_t|   (Erdős & Kac 1946),
//
// whose law P(sup|W| ≥ x) = 4 Σ_{k≥0} (-1)^k Φc((2k+1)x) is exact in the
// limit (stats.BrownianMaxLogSF). Under the uniform and vector nulls the
// exact law of the lattice walk is used instead wherever its dynamic
// program costs at most stats.WalkMaxCost = 10^7 cell updates (n·(2e+2)·b,
// a few tens of milliseconds: at a typical excursion about 2·10^4 bits or
// 3000 decimals): the limit is reached only at rate n^-1/2, and at n = 100
// bits its lower tail gave p ≤ 0.01 in 3.2% of null sequences. Beyond the
// switch, the limit, whose error of order n^-1/2 (under 1% of p there) is
// below what the calibration suite can see. Under a fitted null μ̂ is the sample mean,
// the walk is a bridge, and M follows Kolmogorov's law of sup|B|. The
// maximum is taken exactly: from integer extremes under the uniform null,
// from the walk's convex hulls otherwise. A small M (a walk held too close
// to its mean) is a fit that is too good. The iterated-logarithm envelope
// √(2n ln ln n) is shown in the detail as a description only: at a fixed n
// it is not a test: the iterated logarithm is an almost-sure limit
// (Khinchin, Fund. Math. 6 (1924) 9–20). Validity: n ≥ 100 (common practice).
type driftCheck struct{}

var _ Check = driftCheck{}

func (driftCheck) Name() string { return "drift" }

// SegmentStatistic: the largest excursion M.
func (driftCheck) SegmentStatistic(f Finding) bool { return f.Statistic == "M" }

// StatisticNames: the walk's largest excursion.
func (driftCheck) StatisticNames() map[string]StatName {
	return map[string]StatName{"M": {"max|S|/√n", `$\max|S|/\sqrt{n}$`}}
}

// Needs: the walk, with its hulls unless the null is uniform (the drift
// against an estimated or stated mean needs them).
func (driftCheck) Needs(s Setting) Needs {
	return Needs{Records: []tally.RecordSpec{&tally.WalkSpec{Hull: s.Null != Uniform}}}
}

func (driftCheck) Run(in Input, out *Result) {
	t := in.Tally
	n := float64(t.N)
	if t.N < 100 {
		out.Skips = append(out.Skips, Skip{Check: "drift", Reason: "fewer than 100 digits: the Brownian law of the excursion is not reached"})
		return
	}
	mu, m2 := 0.0, 0.0
	for j, p := range in.Null.P {
		mu += float64(j) * p
		m2 += float64(j*j) * p
	}
	sigma := math.Sqrt(m2 - mu*mu)
	var excursion float64 // max_k |T_k - kμ|
	w := t.Walk()
	if !w.Hull {
		excursion = float64(max(w.UMax, -w.UMin)) / 2
	} else {
		hi, lo := math.Inf(-1), math.Inf(1)
		for _, p := range w.Upper {
			hi = math.Max(hi, float64(p.T)-float64(p.K)*mu)
		}
		for _, p := range w.Lower {
			lo = math.Min(lo, float64(p.T)-float64(p.K)*mu)
		}
		excursion = math.Max(hi, -lo)
	}
	M := excursion / (sigma * math.Sqrt(n))
	f := Finding{Check: "drift", Statistic: "M", Value: M}
	if in.Null.Kind == Fitted {
		f.LogPUpper, f.LogPLower = stats.KolmogorovLogSF(M), stats.KolmogorovLogCDF(M)
		f.Detail = "fitted null: the walk is a bridge; Kolmogorov's law of sup|B|"
	} else {
		if up, lo, ok := stats.WalkMaxLogTails(t.N, in.Null.P, excursion); ok {
			f.setDiscrete(up, lo, atomFromTails(up, lo))
		} else {
			f.LogPUpper, f.LogPLower = stats.BrownianMaxLogSF(M), stats.BrownianMaxLogCDF(M)
		}
		if lil := math.Log(math.Log(n)); lil > 0 {
			f.Detail = fmt.Sprintf("max |S_k| is %.3g of the iterated-logarithm envelope √(2n ln ln n) (descriptive)", M/math.Sqrt(2*lil))
		}
	}
	out.Findings = append(out.Findings, f)
}
