package stats

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"
)

// mpmath 1.2.1 at 40 digits from the series of Erdős & Kac (1946) (upper tail
// 4 Σ (-1)^k Φc((2k+1)x), lower tail the theta series); the quantiles
// 1.95996, 2.24140, 2.80703 are the 10 %, 5 % and 1 % points (computed with scipy 1.10 / mpmath 1.2).
func TestBrownianMax(t *testing.T) {
	cases := []struct{ x, lnUp, lnLow float64 }{
		{0.5, -0.0091991732353616904, -4.6932377252741889},
		{1.0, -0.46327023717551756, -0.99215331607634846},
		{1.95996, -2.3025758600442351, -0.10536154154640079},
		{2.2414, -2.9957252133889855, -0.051293665976563172},
		{2.80703, -4.6051584877088173, -0.010050454018636695},
		{6.0, -19.350474588854815, -3.946350587937634e-9},
		{40.0, -803.2221476526339, 0},
	}
	for _, c := range cases {
		if got := BrownianMaxLogSF(c.x); !closeTo(got, c.lnUp, 1e-9) {
			t.Errorf("ln P(sup|W| ≥ %g) = %.15g, want %.15g", c.x, got, c.lnUp)
		}
		if got := BrownianMaxLogCDF(c.x); !closeTo(got, c.lnLow, 1e-9) {
			t.Errorf("ln P(sup|W| < %g) = %.15g, want %.15g", c.x, got, c.lnLow)
		}
	}
}

// mpmath 1.2.1 from the two Kolmogorov series (Kolmogorov 1933); K(1) =
// 0.7300003 and the points 1.2238, 1.3581, 1.6276 (10, 5, 1 %) are
// standard tables' values (e.g. Marsaglia, Tsang & Wang 2003).
func TestKolmogorov(t *testing.T) {
	cases := []struct{ x, lnUp, lnLow float64 }{
		{0.3, -9.3058446338044896e-6, -11.584872552871279},
		{1.0, -1.3093345359942997, -0.31471029508275278},
		{1.2238, -2.3023508420761564, -0.10538654692516768},
		{1.3581, -2.9957396649479592, -0.051292905368328701},
		{1.6276, -4.6050164644977675, -0.010051888716384716},
		{5.0, -49.306852819440055, -3.8574996959278356e-22},
		{30.0, -1799.3068528194401, 0},
	}
	for _, c := range cases {
		if got := KolmogorovLogSF(c.x); !closeTo(got, c.lnUp, 1e-9) {
			t.Errorf("ln P(sup|B| ≥ %g) = %.15g, want %.15g", c.x, got, c.lnUp)
		}
		if got := KolmogorovLogCDF(c.x); !closeTo(got, c.lnLow, 1e-9) {
			t.Errorf("ln K(%g) = %.15g, want %.15g", c.x, got, c.lnLow)
		}
	}
	if k := math.Exp(KolmogorovLogCDF(1)); !closeTo(k, 0.7300003, 1e-7) {
		t.Errorf("K(1) = %.7f", k)
	}
}

// Exact finite-m values, scipy 1.10 stats.kstwo.cdf:
// m=10, D=0.274 → 0.628480; m=100, D=0.1 → 0.747307; m=1000, D=0.04 → 0.920660.
func TestKSExact(t *testing.T) {
	cases := []struct {
		m       int
		d, want float64
	}{{10, 0.274, 0.628480}, {100, 0.1, 0.747307}, {1000, 0.04, 0.920660}}
	for _, c := range cases {
		if got := KSExactCDF(c.m, c.d); !closeTo(got, c.want, 2e-6) {
			t.Errorf("P(D_%d < %g) = %.6f, want %.6f", c.m, c.d, got, c.want)
		}
	}
}

// A worked example (computed with scipy 1.10 / mpmath 1.2): π, first 10^7 decimals in 10
// segments of 10^6, digit X² p-values → KS D = 0.2498 (exact p 0.485),
// A² = 0.3937 (adinf 0.145035; with errfix p = 0.852). Also adinf(3.857) =
// 0.989756 and adinf(2.492) = 0.949986 (Marsaglia & Marsaglia's
// approximation; Marsaglia & Marsaglia 2004).
func TestSecondLevelWorkedExample(t *testing.T) {
	p := []float64{0.7879, 0.3126, 0.9204, 0.1431, 0.6605, 0.7319, 0.6498, 0.7785, 0.0825, 0.2604}
	d := KSStatistic(p)
	if !closeTo(d, 0.2498, 1e-4) {
		t.Errorf("D = %.4f, want 0.2498", d)
	}
	if up, _ := KSLogTails(10, d); !closeTo(math.Exp(up), 0.485, 2e-3) {
		t.Errorf("KS p = %.4f, want 0.485", math.Exp(up))
	}
	pairs := make([]LogPPair, len(p))
	for i, v := range p {
		pairs[i] = LogPPair{math.Log(v), math.Log1p(-v)}
	}
	a2 := AndersonDarling(pairs)
	if !closeTo(a2, 0.3937, 1e-4) {
		t.Errorf("A² = %.4f, want 0.3937", a2)
	}
	// The p-values above are rounded to 4 digits, which moves adinf in the
	// 5th decimal (0.144985 from these, 0.145035 from the full values).
	if x := adinf(a2); !closeTo(x, 0.145035, 1e-4) {
		t.Errorf("adinf(A²) = %.6f, want 0.145035", x)
	}
	if up, _ := ADLogTails(10, a2); !closeTo(math.Exp(up), 0.852, 1e-3) {
		t.Errorf("AD p = %.4f, want 0.852", math.Exp(up))
	}
	for _, c := range []struct{ z, want float64 }{{3.857, 0.989756}, {2.492, 0.949986}} {
		if got := adinf(c.z); !closeTo(got, c.want, 1e-6) {
			t.Errorf("adinf(%g) = %.6f, want %.6f", c.z, got, c.want)
		}
	}
	// The far tail keeps its magnitude.
	if up, _ := ADLogTails(100, 40); !(up < math.Log(1e-15) && !math.IsInf(up, 0)) {
		t.Errorf("ln P(A² ≥ 40) = %g", up)
	}
}

// The Kolmogorov–Smirnov critical values match scipy.stats.kstwo.ppf
// (Debian's python3-scipy 1.10.1), e.g. m = 10 at 99%: 0.48893 (Massey's
// table, JASA 46 (1951), gives 0.49); and the band holds all m ordered
// uniforms in a fraction level of seeded draws.
func TestKSBand(t *testing.T) {
	for _, c := range []struct {
		m           int
		level, want float64
	}{
		{1, 0.99, 0.995}, {5, 0.99, 0.6685311015147539}, {10, 0.99, 0.48893165941109124}, {30, 0.99, 0.2898639065419554},
		{100, 0.99, 0.16080868092855588}, {400, 0.99, 0.08092853743274622}, {10, 0.95, 0.40924608477750496}, {100, 0.95, 0.13402791648569568},
	} {
		if got := KSCritical(c.m, c.level); math.Abs(got-c.want) > 1e-6 {
			t.Errorf("KSCritical(%d, %g) = %.9f, scipy %.9f", c.m, c.level, got, c.want)
		}
	}
	const m, runs = 30, 4000
	lo, hi := KSBand(m, 0.95)
	rng := rand.New(rand.NewPCG(3, 30))
	inside := 0
	for r := 0; r < runs; r++ {
		p := make([]float64, m)
		for i := range p {
			p[i] = rng.Float64()
		}
		sort.Float64s(p)
		ok := true
		for i, v := range p {
			if v <= lo[i] || v >= hi[i] {
				ok = false
			}
		}
		if ok {
			inside++
		}
	}
	// 95% of 4000: binomial sd 13.8, so ±4 sd is ±55.
	if inside < 3800-55 || inside > 3800+55 {
		t.Errorf("%d of %d draws inside the 95%% band", inside, runs)
	}
}
