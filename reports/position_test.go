package reports

import "testing"

// The digits a local dimension cannot tell apart: those of equal p_j.
func TestTiedDigits(t *testing.T) {
	for _, c := range []struct {
		p    []float64
		base int
		want string
	}{
		{[]float64{0.5, 0.3, 0.2}, 3, ""},
		{[]float64{0.25, 0.25, 0.5}, 3, "0 and 1"},
		{[]float64{0.2, 0.3, 0.2, 0.3}, 4, "0 and 2; 1 and 3"},
		{[]float64{0, 0, 0.5, 0.5}, 4, "2 and 3"}, // unused digits are not tied
		{[]float64{0.1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0.45, 0.45}, 12, "a and b"},
	} {
		if got := tiedDigits(c.p, c.base); got != c.want {
			t.Errorf("%v: %q, want %q", c.p, got, c.want)
		}
	}
}
