package checks

import (
	"fmt"
	"math"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
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
// switch, the limit, with Siegmund's corrected diffusion: the discrete
// maximum stays below the continuous one by about ρσ (ρ = 0.5826), so the
// barrier is raised by ρσ (siegmundShift). For 400 raw bytes that takes
// the limit's lower tail from 11% to 2% off the exact value at P ≈ 0.2
// (TestSiegmundCorrectedLimit). The plain limit gave p lower ≤ 0.01 in 54
// of 3000 null inputs of 200 bytes, before the exact law reached them
// (box sums for equal probabilities: stats.walkMaxCost); now 28, and 22
// and 32 at 1000 and 5000 bytes, where the corrected limit is used. Under a fitted null μ̂ is the sample mean,
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

// siegmundRho is −ζ(1/2)/√(2π) (mpmath 1.2: 0.582597157939010670), the
// mean overshoot constant of a Gaussian random walk over a barrier
// (Chernoff 1965; Siegmund 1979).
const siegmundRho = 0.5825971579390107

// siegmundShift is the amount, in digit-sum units, by which the Brownian
// limit's barrier is raised for the discrete maximum of the walk with
// increments of standard deviation sigma: ρσ. (For lattice walks the
// theory subtracts half the span; against the exact law, whose tails both
// hold the atom at the observed excursion, ρσ alone is closer for decimals
// and as close for bytes, and bits reach the limit only past 2·10^4 steps,
// where the shift is 0.004 of M.) Siegmund, Sequential Analysis (1985),
// §X.3.
func siegmundShift(sigma float64) float64 { return siegmundRho * sigma }

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
			Mc := (excursion + siegmundShift(sigma)) / (sigma * math.Sqrt(n))
			f.LogPUpper, f.LogPLower = stats.BrownianMaxLogSF(Mc), stats.BrownianMaxLogCDF(Mc)
		}
		if lil := math.Log(math.Log(n)); lil > 0 {
			f.Detail = fmt.Sprintf("max |S_k| is %.3g of the iterated-logarithm envelope √(2n ln ln n) (descriptive)", M/math.Sqrt(2*lil))
		}
	}
	out.Findings = append(out.Findings, f)
}
