package audit

import "github.com/borel-audit/borel/stats"

// BandLevel is the level of the frequency band drawn with the digit
// frequencies.
const BandLevel = 0.99

// Curves are the reference curves a report draws beside the data,
// computed with the result so that rendering computes no statistic.
type Curves struct {
	// BandLow, BandHigh: per digit, the BandLevel band of its relative
	// frequency under the null (stats.FrequencyBand).
	BandLow, BandHigh []float64
	// Deviation: per trace point (Result.Trace), per digit, the
	// standardized deviation of its count (stats.StandardizedDeviation).
	Deviation [][]float64
	// Envelope: per trace point, √(2 ln ln n) (stats.IteratedLogEnvelope;
	// NaN for n ≤ e).
	Envelope []float64
	// QQLow, QQHigh: for the findings' upper-tail p-values in increasing
	// order, the simultaneous BandLevel band of m ordered independent
	// uniforms (stats.KSBand, m the number of findings).
	QQLow, QQHigh []float64
}

// curves computes the reference curves of a result whose null is resolved.
func curves(r *Result) Curves {
	var c Curves
	c.BandLow, c.BandHigh = stats.FrequencyBand(r.Null.P, r.Digits, BandLevel)
	for _, tp := range r.Trace {
		dev := make([]float64, len(tp.Counts))
		for d, n := range tp.Counts {
			dev[d] = stats.StandardizedDeviation(n, tp.Pos, r.Null.P[d])
		}
		c.Deviation = append(c.Deviation, dev)
		c.Envelope = append(c.Envelope, stats.IteratedLogEnvelope(float64(tp.Pos)))
	}
	return c
}

// qqBand sets the Q–Q band for the result's findings (once they exist).
func qqBand(r *Result) {
	r.Curves.QQLow, r.Curves.QQHigh = nil, nil
	if m := len(r.Findings); m > 0 {
		r.Curves.QQLow, r.Curves.QQHigh = stats.KSBand(m, BandLevel)
	}
}
