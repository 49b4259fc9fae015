package audit

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"strings"

	"github.com/borel-audit/borel/internal/tally"
	"github.com/borel-audit/borel/stats"
	"github.com/borel-audit/borel/stats/checks"
)

// MinSegmentDigits is the shortest segment the second level accepts.
const MinSegmentDigits = 1000

// segmenter cuts one pass into M consecutive segments without knowing the
// length in advance: it keeps between M and 2M equal sub-tallies, merging
// neighbours pairwise (exactly: tally.Merge) and doubling their length each
// time 2M have accumulated; Finish groups them into M segments.
type segmenter struct {
	spec   tally.Spec
	target int
	unit   int64
	subs   []*tally.Tally
	cur    *tally.Tally
}

func newSegmenter(spec tally.Spec, m int) (*segmenter, error) {
	cur, err := tally.New(spec, 0)
	if err != nil {
		return nil, err
	}
	return &segmenter{spec: spec, target: m, unit: 1, cur: cur}, nil
}

func (s *segmenter) Add(d []byte) {
	for len(d) > 0 {
		take := min(int64(len(d)), s.unit-s.cur.N)
		s.cur.Add(d[:take])
		d = d[take:]
		if s.cur.N < s.unit {
			continue
		}
		next := s.cur.Offset + s.cur.N
		s.subs = append(s.subs, s.cur)
		if len(s.subs) == 2*s.target {
			merged := make([]*tally.Tally, 0, s.target)
			for i := 0; i < len(s.subs); i += 2 {
				m, err := tally.Merge(s.subs[i], s.subs[i+1])
				if err != nil {
					panic("audit: segment merge: " + err.Error())
				}
				merged = append(merged, m)
			}
			s.subs = merged
			s.unit *= 2
		}
		s.cur, _ = tally.New(s.spec, next)
	}
}

// Segments returns the M segment tallies, as even as the sub-tallies allow.
func (s *segmenter) Segments() ([]*tally.Tally, error) {
	parts := append([]*tally.Tally(nil), s.subs...)
	if s.cur.N > 0 {
		parts = append(parts, s.cur)
	}
	if len(parts) < s.target {
		return nil, fmt.Errorf("too few digits for %d segments", s.target)
	}
	out := make([]*tally.Tally, s.target)
	c := len(parts)
	for i := range out {
		lo, hi := i*c/s.target, (i+1)*c/s.target
		seg := parts[lo]
		for _, p := range parts[lo+1 : hi] {
			var err error
			if seg, err = tally.Merge(seg, p); err != nil {
				return nil, err
			}
		}
		out[i] = seg
	}
	return out, nil
}

// segmentSpec is the tally of one segment: blocks up to 2 (1 above base
// 36) and the records of the checks the second level runs (Segmented),
// with the battery's parameters.
func segmentSpec(full tally.Spec) tally.Spec {
	s := tally.Spec{Base: full.Base, MaxBlock: 2, BlocksMax: full.BlocksMax}
	if s.Base > 36 {
		s.MaxBlock = 1
	}
	kinds := map[string]bool{}
	for _, c := range checks.All() {
		if _, ok := c.(checks.Segmented); ok {
			// The kinds only: a check's parameters are those of the
			// battery (its Needs at this base and null).
			for _, r := range c.Needs(checks.Setting{Base: full.Base}).Records {
				kinds[r.Kind()] = true
			}
		}
	}
	for _, r := range full.Records {
		if kinds[r.Kind()] {
			s.Records = append(s.Records, r)
		}
	}
	return s
}

// secondLevel runs the segment checks and tests each statistic's segment
// p-values for uniformity: Kolmogorov–Smirnov with its exact finite-M law
// (Marsaglia, Tsang & Wang 2003) and Anderson–Darling (Marsaglia &
// Marsaglia 2004). Discrete statistics enter with randomized p-values drawn
// from a generator seeded with seed. It returns the findings, and skips for
// statistics that could not be formed in every segment.
func secondLevel(segs []*tally.Tally, null checks.Null, opts Options) ([]checks.Finding, []checks.Skip, []SegmentSeries) {
	rng := rand.New(rand.NewPCG(opts.Seed, 0x5e9))
	perStat := map[string][]stats.LogPPair{}
	var order []string
	for _, seg := range segs {
		cyc, err := seg.Cyclic()
		if err != nil {
			continue
		}
		in := checks.Input{Tally: seg, Cyclic: cyc, Null: null,
			Opts: checks.Options{MinExpected: opts.MinExpected, Confidence: 1 - opts.Alpha, OptionName: opts.OptionName}}
		for _, c := range checks.All() {
			sc, ok := c.(checks.Segmented)
			if !ok || !opts.selected(c.Name()) {
				continue
			}
			var out checks.Result
			runCheck(c, in, &out)
			for _, f := range out.Findings {
				if !sc.SegmentStatistic(f) {
					continue
				}
				l := f.Label()
				if _, ok := perStat[l]; !ok {
					order = append(order, l)
				}
				perStat[l] = append(perStat[l], checks.RandomizedP(f, rng.Float64()))
			}
		}
	}
	sort.Strings(order)
	var fs []checks.Finding
	var skips []checks.Skip
	var series []SegmentSeries
	m := len(segs)
	for _, l := range order {
		ps := perStat[l]
		if len(ps) < m {
			skips = append(skips, checks.Skip{Check: "segments",
				Reason: fmt.Sprintf("%s could be formed in only %d of %d segments (too short); use fewer segments", l, len(ps), m)})
			continue
		}
		p := make([]float64, m)
		for i, v := range ps {
			p[i] = math.Exp(v.LogP)
		}
		series = append(series, SegmentSeries{Label: l, PValues: p})
		where, how := extremeSegments(p, 3)
		d := stats.KSStatistic(p)
		ksUp, ksLo := stats.KSLogTails(m, d)
		fs = append(fs, checks.Clamp(checks.Finding{Check: "segments", Statistic: "KS", Of: l, Value: d,
			LogPUpper: ksUp, LogPLower: ksLo, Detail: fmt.Sprintf("%d segment p-values of %s", m, l), Where: where, WhereHow: how}))
		a2 := stats.AndersonDarling(ps)
		adUp, adLo := stats.ADLogTails(m, a2)
		fs = append(fs, checks.Clamp(checks.Finding{Check: "segments", Statistic: "AD", Of: l, Value: a2,
			LogPUpper: adUp, LogPLower: adLo, Detail: fmt.Sprintf("%d segment p-values of %s", m, l), Where: where, WhereHow: how}))
	}
	return fs, skips, series
}

// extremeSegments names the k segments whose p-values pull the empirical
// law furthest from uniform: the smallest p-values when there are too
// many small ones (D+ = max i/m − p_(i) is the larger side of the KS
// distance), else the largest. Segments count from 1.
func extremeSegments(p []float64, k int) (where, how string) {
	m := len(p)
	idx := make([]int, m)
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return p[idx[a]] < p[idx[b]] })
	var dPlus, dMinus float64
	for r, i := range idx {
		dPlus = math.Max(dPlus, float64(r+1)/float64(m)-p[i])
		dMinus = math.Max(dMinus, p[i]-float64(r)/float64(m))
	}
	how = "in the segments' p-values (smallest first)"
	if dMinus > dPlus {
		slices.Reverse(idx)
		how = "in the segments' p-values (largest first)"
	}
	var parts []string
	for _, i := range idx[:min(k, m)] {
		parts = append(parts, fmt.Sprintf("segment %d: p = %.3g", i+1, p[i]))
	}
	return strings.Join(parts, "; "), how
}
