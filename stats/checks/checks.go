// Package checks holds borel's statistical checks. Each check is a pure
// function of a finished tally and a null hypothesis that returns findings
// (a statistic, its degrees of freedom and both tail p-values in log space),
// skips (a check or parameter that cannot be run validly, with the reason and
// what would make it valid) and, for the entropy check, estimates. No check
// does I/O or formats numbers for people.
package checks

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
)

// Statistic identifies a statistic within its check ("X2", "G", "dpsi2",
// "Lmin", …); StatisticName gives its printed name.
type Statistic string

// String returns the printed name of the statistic (X², ∇ψ², …), or the
// identifier when none is declared.
func (s Statistic) String() string {
	if n, ok := StatisticName(string(s)); ok {
		return n.Text
	}
	return string(s)
}

// Finding is one row of results: one statistic of one check at one parameter.
// LogPUpper is ln P(T ≥ t) under the null (small when the data deviate);
// LogPLower is ln P(T ≤ t) (small when the data fit too well). Both are
// computed directly, never one from the other.
type Finding struct {
	Check     string    // check identifier, e.g. "serial"
	Statistic Statistic // statistic identifier, e.g. "X2", "G", "dpsi2", "d2psi2"
	Params    Params    // e.g. {"k": 3} or {"digit": 7}
	Value     float64
	DF        float64
	LogPUpper float64
	LogPLower float64
	Detail    string // information on how the statistic was formed
	Notes     []Note // caveats: validity rules that bite, and how to fix them
	// TwoSided marks a statistic whose both tails are deviations (a z
	// score); for the others a small lower tail means "fits too well".
	TwoSided bool
	// Of names, for a second-level finding, the first-level statistic whose
	// segment p-values it tests (e.g. "freq X2 k=1").
	Of string
	// Discrete marks tails taken from the statistic's own discrete law
	// (exact, or a lattice approximation said so in Detail): LogPUpper is
	// ln P(T ≥ t), LogPLower ln P(T ≤ t) and LogPAtom ln P(T = t). A
	// statistic whose p-values come from a continuous limit law leaves it
	// false (and LogPAtom unused).
	Discrete bool
	LogPAtom float64
	// Where names the cells that deviate most, by standardized residual
	// (O − E)/√E, e.g. "digit 0: +6.3σ; digit 7: −3.1σ": what a reader of a
	// failing finding asks first. Empty for statistics without cells.
	Where string
	// WhereHow says how Where measures its deviations when they are not
	// standardized residuals of counts (a lag's z score, a segment's
	// p-value); empty for "(O − E)/√E".
	WhereHow string
}

// WhereNote is the note a deviating finding carries: how its largest
// deviations are measured, and where they are.
func (f Finding) WhereNote() string {
	how := f.WhereHow
	if how == "" {
		how = "(O − E)/√E"
	}
	return "largest deviations " + how + ": " + f.Where
}

// topResiduals writes the k cells of largest |(O − E)/√E|, named by name,
// largest first: "name: +6.3σ; …". Cells of zero expectation are skipped.
func topResiduals(obs []int64, exp []float64, k int, name func(i int) string) string {
	return topResidualsOf(obs, func(i int) float64 { return exp[i] }, k, name)
}

// topResidualsOf is topResiduals with the expectations as a function (a
// constant for the uniform null: no table of 10^7 of them).
func topResidualsOf(obs []int64, expOf func(i int) float64, k int, name func(i int) string) string {
	type cell struct {
		i      int
		d, sq2 float64 // O − E, and (O − E)²/E, compared without a root
	}
	var top []cell // the k largest so far, largest first
	for i := range obs {
		e := expOf(i)
		if e <= 0 {
			continue
		}
		d := float64(obs[i]) - e
		c := cell{i, d, d * d / e}
		if len(top) == k && c.sq2 <= top[k-1].sq2 {
			continue
		}
		if len(top) < k {
			top = append(top, c)
		} else {
			top[k-1] = c
		}
		for j := len(top) - 1; j > 0 && top[j].sq2 > top[j-1].sq2; j-- {
			top[j], top[j-1] = top[j-1], top[j]
		}
	}
	parts := make([]string, len(top))
	for n, c := range top {
		parts[n] = fmt.Sprintf("%s: %+.1fσ", name(c.i), math.Copysign(math.Sqrt(c.sq2), c.d))
	}
	return strings.Join(parts, "; ")
}

// DigitName names digit d of base b as inputs write it: 0-9 then a-z up to
// base 36, a byte as 0xNN in base 256, the value otherwise.
func DigitName(d, b int) string {
	switch {
	case b == 256:
		return fmt.Sprintf("0x%02x", d)
	case d < 10:
		return strconv.Itoa(d)
	case b <= 36:
		return string(rune('a' + d - 10))
	}
	return strconv.Itoa(d)
}

// blockName writes block w of k digits of base b, first digit first.
func blockName(w, k, b int) string {
	ds := make([]string, k)
	for i := k - 1; i >= 0; i-- {
		ds[i] = DigitName(w%b, b)
		w /= b
	}
	if b <= 36 {
		return strings.Join(ds, "")
	}
	return strings.Join(ds, " ")
}

// setDiscrete sets a finding's tails from its discrete law.
func (f *Finding) setDiscrete(up, lo, atom float64) {
	f.LogPUpper, f.LogPLower, f.LogPAtom, f.Discrete = up, lo, atom, true
}

// atomFromTails returns ln P(T = t) = ln(P(T ≥ t) + P(T ≤ t) − 1) for exact
// tails of an integer-valued statistic (−∞ when rounding leaves nothing).
func atomFromTails(up, lo float64) float64 {
	switch {
	case lo == 0: // P(T ≤ t) = 1: the atom is the whole upper tail
		return up
	case up == 0:
		return lo
	}
	v := math.Exp(up) + math.Exp(lo) - 1
	if !(v > 0) {
		return math.Inf(-1)
	}
	return math.Log(v)
}

// Label identifies a finding's statistic: check, statistic and parameters,
// e.g. "serial dpsi2 k=2".
func (f Finding) Label() string {
	s := f.Check + " " + string(f.Statistic)
	if len(f.Params) > 0 {
		s += " " + f.Params.String()
	}
	return s
}

// Params are a finding's or a skip's parameters by name. The names in use:
// k (block length), digit, digits, class, classes, lag, lags, bit, bits,
// pairs, size, hand and t, each documented with the check that sets it.
type Params map[string]int

// String writes the parameters in name order, "digit=7 k=3"; empty when
// there are none.
func (p Params) String() string {
	var b strings.Builder
	for i, k := range ParamNames(p) {
		if i > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(k + "=" + strconv.Itoa(p[k]))
	}
	return b.String()
}

// ParamNames returns the names of a finding's parameters in sorted order.
func ParamNames(p Params) []string {
	keys := make([]string, 0, len(p))
	for k := range p {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// Clamp returns the finding with both tail p-values in [0, 1]: a log above
// 0 (rounding in a tail computed as a sum, e.g. 1.0000000000000002) becomes
// 0, and NaN, which no check should produce, becomes 0 too (p = 1: no
// evidence) rather than poisoning the adjustment. The audit applies it to
// every finding as it leaves its check: the one place p-values are bounded.
func Clamp(f Finding) Finding {
	for _, lp := range []*float64{&f.LogPUpper, &f.LogPLower} {
		if !(*lp <= 0) {
			*lp = 0
		}
	}
	return f
}

// RandomizedP returns the randomized upper-tail p-value
// P(T > t) + u·P(T = t) of a finding, u uniform on [0, 1): uniform under the
// null when P(T = t) is the statistic's true atom (the randomized test of
// Tocher, Biometrika 37 (1950) 130–144, citation from memory). The atom is
// the finding's LogPAtom from its discrete law; it is never inferred from
// the two tails, whose lower one may carry a continuity shift. A statistic
// with a continuous law gives its upper-tail p-value. The pair carries ln p
// and ln(1 − p).
func RandomizedP(f Finding, u float64) stats.LogPPair {
	if !f.Discrete {
		return stats.LogPPair{LogP: f.LogPUpper, LogQ: math.Log(-math.Expm1(f.LogPUpper))}
	}
	// ln p = ln P(T ≥ t) + ln(1 − (1−u)·P(T = t)/P(T ≥ t)), in logs so that
	// a far tail keeps its digits.
	r := math.Min(1, math.Exp(f.LogPAtom-f.LogPUpper))
	lp := math.Min(0, f.LogPUpper+math.Log1p(-(1-u)*r))
	return stats.LogPPair{LogP: lp, LogQ: math.Log(-math.Expm1(lp))}
}

// Skip records a check, or one parameter of it, that was not run, and why.
type Skip struct {
	Check  string
	Params Params
	Reason string
}

// String writes the skip as the reports list it: "blocks k=5: reason".
func (s Skip) String() string {
	label := s.Check
	if len(s.Params) > 0 {
		label += " " + s.Params.String()
	}
	return label + ": " + s.Reason
}

// Result gathers what checks produce for one sequence and base.
type Result struct {
	Findings []Finding
	Skips    []Skip
	Entropy  *EntropyProfile
}

// Input is what every check reads: the tally of the whole sequence, its
// cyclic overlapping counts for k = 1..MaxBlock (computed once), the null
// and the options.
type Input struct {
	Tally  *tally.Tally
	Cyclic [][]int64 // Cyclic[k], k = 1..len-1
	Null   Null
	Opts   Options
}

// MaxBlock is the largest block length the checks may use.
func (in Input) MaxBlock() int { return len(in.Cyclic) - 1 }

// Options are the tunables shared by all checks.
type Options struct {
	// MinExpected is the smallest expected count per cell for the
	// chi-square approximation: 5, the usual rule of thumb (Knuth, TAOCP
	// vol. 2 §3.3.1; Cochran 1954). Common practice, not a theorem.
	MinExpected float64
	// Confidence is the level of the entropy intervals (1 - alpha).
	Confidence float64
	// OptionName, when set, names an audit option in messages (a
	// program's own name for "Null", …); by default the option's name.
	OptionName func(option string) string
}

// name returns how messages name an audit option.
func (o Options) name(opt string) string {
	if o.OptionName != nil {
		return o.OptionName(opt)
	}
	return opt
}

// DefaultOptions returns MinExpected 5 and Confidence 0.99.
func DefaultOptions() Options { return Options{MinExpected: 5, Confidence: 0.99} }

// Check is one statistical test: it names itself, declares what it reads
// from the tally, and runs on a finished tally.
type Check interface {
	Name() string
	Needs(s Setting) Needs
	Run(in Input, out *Result)
}

// Segmented is implemented by a check whose statistics the second level
// also forms in each segment (audit.Options.Segments): SegmentStatistic
// tells which of its findings are tested for uniform segment p-values.
// A segment's tally has blocks up to 2 only, and the records of the
// segmented checks.
type Segmented interface {
	Check
	SegmentStatistic(f Finding) bool
}

// Named is implemented by a check that introduces statistic identifiers of
// its own: their printed names, as text and as LaTeX (StatisticName).
type Named interface {
	StatisticNames() map[string]StatName
}

// Described is implemented by a check whose identifier does not say what
// it measures in words: the words (for a verdict's reason).
type Described interface {
	Description() string
}

// Description returns what a check measures in words, or "" for a check
// whose identifier says it.
func Description(check string) string {
	for _, c := range All() {
		if d, ok := c.(Described); ok && c.Name() == check {
			return d.Description()
		}
	}
	return ""
}

// StatName is the printed name of a statistic identifier.
type StatName struct{ Text, TeX string }

// commonNames are the identifiers several checks share.
var commonNames = map[string]StatName{
	"X2": {"X²", `$X^2$`},
	"G":  {"G", `$G$`},
	"z":  {"z", `$z$`},
	"Q":  {"Q", `$Q$`},
	"KS": {"KS", `$D$ (KS)`},
	"AD": {"AD", `$A^2$ (AD)`},
}

// StatisticName returns the printed name of a statistic identifier, from
// the shared names and those the checks declare (Named); ok is false for
// an identifier nobody names (it is then printed as it is).
func StatisticName(id string) (StatName, bool) {
	if n, ok := commonNames[id]; ok {
		return n, true
	}
	for _, c := range All() {
		if nc, ok := c.(Named); ok {
			if n, ok := nc.StatisticNames()[id]; ok {
				return n, true
			}
		}
	}
	return StatName{}, false
}

// Setting is what a check's records may depend on before the data are
// seen: the base and the null as the user gave it (P only for a stated
// vector).
type Setting struct {
	Base int
	Null NullKind
	P    []float64
	// Word, when not 0, is the word size in bits of a raw byte stream
	// (base 256) that the word-level checks read, little-endian unless
	// BigEndian.
	Word      int
	BigEndian bool
}

// Needs is what a check reads from the tally besides the digit counts,
// which every tally has: the overlapping windows up to the planned block
// length (and their cyclic tables), the aligned blocks, and optional
// records with their parameters. The audit's plan collects the needs of
// the checks it runs; a record no check needs is not tallied.
type Needs struct {
	Windows bool
	Blocks  bool
	Records []tally.RecordSpec
}

// All returns the checks of the audit, in report order.
func All() []Check {
	return []Check{freqCheck{}, blocksCheck{}, serialCheck{}, gapCheck{}, pokerCheck{}, couponCheck{},
		updownCheck{}, lagcorrCheck{}, maxrunCheck{}, driftCheck{}, entropyCheck{},
		lincompCheck{}, rankCheck{}, rowrankCheck{}, birthdayCheck{}, wordcollCheck{}, hammingCheck{}, permCheck{}}
}

// chiSquareFinding fills both tails of a chi-square statistic formed from
// counts whose smallest expected cell count is minExp (0: not a count
// statistic). The upper tail is the χ² law's. The lower tail gets a
// half-lattice continuity correction: moving one count between cells
// changes Σ(N-E)²/E by at least 2/E, so the statistic lives on a lattice of
// that spacing and is evaluated at x + 1/minExp. Without it a statistic that
// lands exactly on 0 — ∇²ψ²_2 of bits does so with probability of order
// 1/√n — would get a lower-tail p of exactly 0 and a false "too uniform"
// verdict (the calibration suite caught this: 10 of 300 random bit
// sequences). For bits' freq at X² = 0 the corrected value is
// P(χ²_1 ≤ 2/n), against an exact P(N_1 = n/2) ≈ 0.8/√n: conservative, as a
// claim of "too uniform" should be.
func chiSquareFinding(check string, stat Statistic, params map[string]int, value, df, minExp float64) Finding {
	f := Finding{Check: check, Statistic: stat, Params: params, Value: value, DF: df}
	f.LogPUpper = chiSquareLogSF(value, df)
	half := 0.0
	if minExp > 0 {
		half = 1 / minExp
	}
	f.LogPLower = chiSquareLogCDF(value+half, df)
	return f
}

// cellStat accumulates Pearson's X² = Σ (N-E)²/E and the G statistic
// 2 Σ N ln(N/E) over cells with positive expectation; cells of zero null
// probability are skipped (they hold no counts when p̂ comes from the data,
// and a user vector has no zero entries).
type cellStat struct {
	x2, g  float64
	minExp float64
	cells  int
}

func newCellStat() cellStat { return cellStat{minExp: math.Inf(1)} }

func (c *cellStat) add(count int64, expected float64) {
	if expected <= 0 {
		return
	}
	d := float64(count) - expected
	c.x2 += d * d / expected
	if count > 0 {
		c.g += 2 * float64(count) * math.Log(float64(count)/expected)
	}
	c.minExp = math.Min(c.minExp, expected)
	c.cells++
}

// normalFinding fills both tails of a standard normal z score.
func normalFinding(check string, stat Statistic, params map[string]int, z float64) Finding {
	return Finding{Check: check, Statistic: stat, Params: params, Value: z,
		LogPUpper: stats.NormalLogSF(z), LogPLower: stats.NormalLogSF(-z), TwoSided: true}
}

// poolClasses merges adjacent classes, left to right, until each pooled
// class has an expected count of at least minExp; a short last group joins
// the one before it. It returns the pooled observed and expected counts.
func poolClasses(obs []int64, exp []float64, minExp float64) ([]int64, []float64) {
	return poolClassesBy(obs, exp, exp, minExp)
}

// poolClassesBy pools as poolClasses does, but by the reference
// expectations ref (fixed in advance, so that the pooling does not depend
// on the data), summing obs and exp over each pooled class.
func poolClassesBy(obs []int64, exp, ref []float64, minExp float64) ([]int64, []float64) {
	group, groups := poolIndex(ref, minExp)
	po, pe := make([]int64, groups), make([]float64, groups)
	for i, g := range group {
		po[g] += obs[i]
		pe[g] += exp[i]
	}
	return po, pe
}

// poolIndex returns the pooled class of each class and the number of
// pooled classes: adjacent classes merge, left to right, until the pooled
// ref reaches minExp; a short last group joins the one before it.
func poolIndex(ref []float64, minExp float64) (group []int, groups int) {
	group = make([]int, len(ref))
	r := 0.0
	for i, v := range ref {
		group[i] = groups
		r += v
		if r >= minExp {
			groups++
			r = 0
		}
	}
	if groups == 0 {
		return group, min(1, len(ref))
	}
	for i := len(ref) - 1; i >= 0 && group[i] == groups; i-- { // the short last group
		group[i] = groups - 1
	}
	return group, groups
}

// poolGroups returns how many classes poolClasses leaves for expectations
// ref.
func poolGroups(ref []float64, minExp float64) int {
	_, groups := poolIndex(ref, minExp)
	return groups
}

// pooledChiSquareBy pools the classes by ref (poolClassesBy) and returns
// X² of obs against exp, the number of classes and the smallest pooled exp.
func pooledChiSquareBy(obs []int64, exp, ref []float64, minExp float64) (x2 float64, classes int, smallest float64) {
	po, pe := poolClassesBy(obs, exp, ref, minExp)
	cs := newCellStat()
	for i := range po {
		cs.add(po[i], pe[i])
	}
	return cs.x2, len(po), cs.minExp
}

// pooledChiSquare pools the classes and returns X², the number of classes
// and the smallest pooled expectation.
func pooledChiSquare(obs []int64, exp []float64, minExp float64) (x2 float64, classes int, smallest float64) {
	return pooledChiSquareBy(obs, exp, exp, minExp)
}
