package stats

import (
	"math"
	"testing"
)

// τ(q), α(q) and f(α(q)) against Debian's python3-mpmath 1.2.1 (30 digits:
// τ from its definition, α by mpmath.diff, f = qα − τ), at a three-digit
// vector, a two-digit one and a base-10 vector with six digits unused.
func TestSpectrumAgainstMpmath(t *testing.T) {
	cases := []struct {
		p    []float64
		base int
		rows [][4]float64 // q, τ, α, f
	}{
		{[]float64{0.5, 0.3, 0.2}, 3, [][4]float64{
			{-3, -4.675003485052479, 1.3453430044617346, 0.6389744716672753},
			{-1, -2.1257498572570148, 1.1844907766158548, 0.94125908064116007},
			{0, -1, 1.0639355161929231, 1},
			{0.5, -0.48409185028078745, 0.99970552605089772, 0.98394461330623631},
			{1, 0, 0.93723056321612954, 0.93723056321612954},
			{2, 0.88073293576093643, 0.82884914186217385, 0.77696534796341126},
			{3.5, 2.0364080058476095, 0.72329330516954417, 0.4951185622457951},
			{10, 6.3037153734036331, 0.63381100254149813, 0.034394652011348183},
		}},
		{[]float64{0.3, 0.7}, 2, [][4]float64{
			{-3, -5.3202134768421185, 1.6477639850416546, 0.37692152171715464},
			{-1, -2.2515387669959645, 1.3702478677652718, 0.88129089923069263},
			{0.5, -0.46924269718067342, 0.99820530675607859, 0.96834535055871272},
			{2, 0.78587519464715275, 0.70425475545093129, 0.62263431625470983},
			{10, 5.145430176933604, 0.51482864995447717, 0.0028563226111677703},
		}},
		{[]float64{0.1, 0.2, 0.3, 0.4, 0, 0, 0, 0, 0, 0}, 10, [][4]float64{
			{-3, -3.0710206754183643, 0.94505461467747746, 0.23585683138593192},
			{0, -0.60205999132796239, 0.65494718957209848, 0.60205999132796239},
			{1, 0, 0.55583362792012006, 0.55583362792012007},
			{3.5, 1.2279747737868621, 0.45059491838189093, 0.34910744054975618},
		}},
	}
	for _, c := range cases {
		s, err := NewSpectrum(c.p, c.base)
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range c.rows {
			a, f := s.At(r[0])
			if tau := s.Tau(r[0]); math.Abs(tau-r[1]) > 1e-12 || math.Abs(a-r[2]) > 1e-12 || math.Abs(f-r[3]) > 1e-12 {
				t.Errorf("%v at q=%g: τ %.15g α %.15g f %.15g, mpmath %v", c.p, r[0], tau, a, f, r[1:])
			}
			// f as a function of α inverts α(q).
			if f2, q, ok := s.F(r[2]); !ok || math.Abs(f2-r[3]) > 1e-9 || math.Abs(q-r[0]) > 1e-6*max(1, math.Abs(r[0])) {
				t.Errorf("%v: f(%g) = %g at q %g, want %g at q %g", c.p, r[2], f2, q, r[3], r[0])
			}
		}
	}
	// mpmath.findroot of α(q) = 0.9 for (0.5, 0.3, 0.2): q = 1.316612949118667, f = 0.8941663379851626.
	s, _ := NewSpectrum([]float64{0.5, 0.3, 0.2}, 3)
	if f, q, _ := s.F(0.9); math.Abs(f-0.8941663379851626) > 1e-10 || math.Abs(q-1.316612949118667) > 1e-8 {
		t.Errorf("f(0.9) = %.15g at q %.15g", f, q)
	}
}

// Closed forms. The binomial measure (p, 1−p) in base 2: with w the tilted
// weight of digit 0, α = −w log2 p − (1−w) log2(1−p) and f = H2(w), the
// binary entropy (Falconer, Fractal Geometry, ch. 17, from memory; it is
// also a two-line calculation). The end points, the peak 1 at q = 0, and
// the diagonal f(α) = α = H(p)/log b at q = 1 (Besicovitch–Eggleston). The
// uniform vector on m digits (a restricted-digit set) collapses the
// spectrum to the point α = f = log m/log b: the middle-third Cantor set
// has dimension log 2/log 3 = 0.63092975357145744 (mpmath).
func TestSpectrumClosedForms(t *testing.T) {
	for _, p := range []float64{0.1, 0.3, 0.45} {
		s, _ := NewSpectrum([]float64{p, 1 - p}, 2)
		for _, w := range []float64{0.01, 0.2, 0.5, 0.77, 0.99} {
			alpha := -w*math.Log2(p) - (1-w)*math.Log2(1-p)
			h2 := -w*math.Log2(w) - (1-w)*math.Log2(1-w)
			if f, _, ok := s.F(alpha); !ok || math.Abs(f-h2) > 1e-9 {
				t.Errorf("binomial %g at w %g: f(%g) = %g, H2 = %g", p, w, alpha, f, h2)
			}
		}
		if math.Abs(s.AlphaMin+math.Log2(1-p)) > 1e-15 || math.Abs(s.AlphaMax+math.Log2(p)) > 1e-15 || s.FMin != 0 || s.FMax != 0 || s.Peak != 1 {
			t.Errorf("binomial %g: ends %g %g (f %g %g), peak %g", p, s.AlphaMin, s.AlphaMax, s.FMin, s.FMax, s.Peak)
		}
		a, f := s.At(1)
		if h := -(p*math.Log2(p) + (1-p)*math.Log2(1-p)); math.Abs(a-h) > 1e-15 || math.Abs(f-h) > 1e-15 || math.Abs(s.AlphaH-h) > 1e-15 {
			t.Errorf("binomial %g: at q=1 α %g f %g, H %g", p, a, f, h)
		}
		if _, f := s.At(0); math.Abs(f-1) > 1e-15 {
			t.Errorf("binomial %g: peak %g", p, f)
		}
	}
	cantor, _ := NewSpectrum([]float64{0.5, 0, 0.5}, 3)
	const log3of2 = 0.63092975357145744
	for _, q := range []float64{-5, 0, 1, 7} {
		if a, f := cantor.At(q); math.Abs(a-log3of2) > 1e-15 || math.Abs(f-log3of2) > 1e-15 {
			t.Errorf("Cantor at q=%g: α %g f %g", q, a, f)
		}
	}
	if f, _, ok := cantor.F(log3of2); !ok || math.Abs(f-log3of2) > 1e-15 {
		t.Errorf("Cantor f(log3 2) = %g", f)
	}
	if _, _, ok := cantor.F(0.7); ok {
		t.Error("Cantor: f(0.7) should be outside the spectrum")
	}
	if d := RestrictedDimension(2, 3); math.Abs(d-log3of2) > 1e-15 {
		t.Errorf("Cantor set: %g", d)
	}
	if d := RestrictedDimension(9, 10); math.Abs(d-0.95424250943932487) > 1e-15 { // mpmath: log 9/log 10
		t.Errorf("decimals without a 9: %g", d)
	}
	// Ties at the ends: (0.4, 0.4, 0.2) has two digits at max p, so f(α_min) = log3 2.
	s, _ := NewSpectrum([]float64{0.4, 0.4, 0.2}, 3)
	if math.Abs(s.FMin-log3of2) > 1e-15 || s.FMax != 0 {
		t.Errorf("ties: f at the ends %g %g", s.FMin, s.FMax)
	}
	if a, f := s.At(60); math.Abs(a-s.AlphaMin) > 1e-9 || math.Abs(f-s.FMin) > 1e-9 {
		t.Errorf("ties: q=60 gives α %g f %g", a, f)
	}
}
