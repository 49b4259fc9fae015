package stats

import (
	"math"
	"testing"
)

// Check values: z_{0.995} = 2.5758293035489 (scipy.stats.norm.ppf(0.995),
// python3-scipy); p = 0.1, n = 10^4: half-width 2.5758·0.003 = 0.0077275.
// √(2 ln ln 10^6) = 2.29163344122746 (python3-mpmath: sqrt(2*log(log(10**6)))).
func TestDeviationCurves(t *testing.T) {
	lo, hi := FrequencyBand([]float64{0.1, 0.5}, 10000, 0.99)
	if math.Abs(hi[0]-0.1-2.5758293035489*0.003) > 1e-12 || math.Abs(lo[0]-(0.1-2.5758293035489*0.003)) > 1e-12 {
		t.Errorf("band at p = 0.1: [%v, %v]", lo[0], hi[0])
	}
	if math.Abs(hi[1]-0.5-2.5758293035489*0.005) > 1e-12 {
		t.Errorf("band at p = 0.5: %v", hi[1])
	}
	if z := StandardizedDeviation(1030, 10000, 0.1); math.Abs(z-1) > 1e-12 {
		t.Errorf("deviation of 1030 in 10^4 at p = 0.1: %v, want 1", z)
	}
	if StandardizedDeviation(5, 10, 0) != 0 || StandardizedDeviation(5, 10, 1) != 0 {
		t.Error("deviation of a digit of probability 0 or 1 is not 0")
	}
	if e := IteratedLogEnvelope(1e6); math.Abs(e-2.29163344122746) > 1e-12 {
		t.Errorf("envelope at 10^6: %v, want 2.29163344122746", e)
	}
	if !math.IsNaN(IteratedLogEnvelope(2)) {
		t.Error("envelope below e is not NaN")
	}
}
