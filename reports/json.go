package reports

import (
	"encoding/json"
	"io"
	"math"
	"slices"
	"time"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

// SchemaName and SchemaVersion identify the JSON document. The version goes
// up when a field changes meaning or disappears; adding a field does not
// change it.
const (
	SchemaName    = "borel-audit"
	SchemaVersion = 1
)

// JSONDocument is the JSON report, field by field (README.md documents it).
type JSONDocument struct {
	Schema        string   `json:"schema"`
	SchemaVersion int      `json:"schema_version"`
	BorelVersion  string   `json:"borel_version"`
	Command       []string `json:"command"`
	Created       string   `json:"created"`
	// Inputs: for one input audited in several views or bases, its one
	// verdict (absent otherwise).
	Inputs  []JSONInput `json:"inputs,omitempty"`
	Audits  []JSONAudit `json:"audits"`
	Caution string      `json:"caution"`
}

// JSONInput is the one verdict of an input over its views (audit.Combine):
// the views are the audits at the given indices; p_deviation and
// p_too_uniform are the smallest p of each side after Holm across the
// views; decisive is the index of the audit the verdict rests on (-1: none).
type JSONInput struct {
	Input            string   `json:"input"`
	Verdict          string   `json:"verdict"`
	Rule             string   `json:"rule"`
	Views            []int    `json:"views"`
	PDeviation       float64  `json:"p_deviation"`
	Log10PDeviation  *float64 `json:"log10_p_deviation"`
	PTooUniform      float64  `json:"p_too_uniform"`
	Log10PTooUniform *float64 `json:"log10_p_too_uniform"`
	Decisive         int      `json:"decisive"`
}

// JSONAudit is one sequence in one base.
type JSONAudit struct {
	Source      JSONSource    `json:"source"`
	Base        int           `json:"base"`
	Digits      int64         `json:"digits"`
	Null        JSONNull      `json:"null"`
	Alpha       float64       `json:"alpha"`
	Adjustment  string        `json:"adjustment"`
	MaxBlock    int           `json:"max_block"`
	BlockChoice string        `json:"block_choice"`
	Segments    int           `json:"segments"`
	Seed        uint64        `json:"seed"`
	Verdict     string        `json:"verdict"`
	Findings    []JSONFinding `json:"findings"`
	Skipped     []JSONSkip    `json:"skipped"`
	Entropy     *JSONEntropy  `json:"entropy,omitempty"`
	Plots       JSONPlotData  `json:"plot_data"`
	Notes       []string      `json:"notes"`
}

// JSONSource says where the digits came from.
type JSONSource struct {
	Name        string   `json:"name"`
	Kind        string   `json:"kind"`
	Format      string   `json:"format,omitempty"`
	View        string   `json:"view,omitempty"`
	Bytes       *int64   `json:"bytes,omitempty"`
	Compressed  bool     `json:"compressed"`
	IntegerPart string   `json:"integer_part_dropped,omitempty"`
	SHA256      string   `json:"sha256,omitempty"`
	Parameters  string   `json:"parameters,omitempty"`
	Checks      []string `json:"checks,omitempty"`
}

// JSONNull is the null hypothesis with its digit probabilities.
type JSONNull struct {
	Kind string    `json:"kind"`
	P    []float64 `json:"p"`
}

// JSONFinding is one finding. Probabilities come twice: as numbers (which
// underflow to 0 below about 1e-308) and as log10 values (which do not);
// a log10 of null means the probability is exactly 0.
type JSONFinding struct {
	Check          string         `json:"check"`
	Statistic      string         `json:"statistic"`
	Params         map[string]int `json:"params"`
	Of             string         `json:"of,omitempty"`
	TwoSided       bool           `json:"two_sided"`
	Value          float64        `json:"value"`
	DF             float64        `json:"df"`
	PUpper         float64        `json:"p_upper"`
	PLower         float64        `json:"p_lower"`
	Log10PUpper    *float64       `json:"log10_p_upper"`
	Log10PLower    *float64       `json:"log10_p_lower"`
	AdjPUpper      float64        `json:"adjusted_p_upper"`
	AdjPLower      float64        `json:"adjusted_p_lower"`
	Log10AdjPUpper *float64       `json:"log10_adjusted_p_upper"`
	Log10AdjPLower *float64       `json:"log10_adjusted_p_lower"`
	Holm           JSONTails      `json:"holm"`
	BH             JSONTails      `json:"bh"`
	Mark           string         `json:"mark"`
	Where          string         `json:"where,omitempty"`
	WhereHow       string         `json:"where_how,omitempty"`
	Detail         string         `json:"detail,omitempty"`
	Notes          []string       `json:"notes"`
}

// JSONTails is a pair of adjusted p-values with their log10 values.
type JSONTails struct {
	Upper      float64  `json:"upper"`
	Lower      float64  `json:"lower"`
	Log10Upper *float64 `json:"log10_upper"`
	Log10Lower *float64 `json:"log10_lower"`
}

func tails(up, lo float64) JSONTails {
	return JSONTails{Upper: math.Exp(up), Lower: math.Exp(lo), Log10Upper: log10(up), Log10Lower: log10(lo)}
}

// JSONSkip is a check or parameter that was not run.
type JSONSkip struct {
	Check  string         `json:"check"`
	Params map[string]int `json:"params"`
	Reason string         `json:"reason"`
}

// JSONEntropy is the entropy profile; interval ends are null where none exists.
type JSONEntropy struct {
	Confidence    float64          `json:"confidence"`
	NullDimension float64          `json:"null_dimension"`
	Rows          []JSONEntropyRow `json:"rows"`
	Position      *JSONPosition    `json:"position,omitempty"`
}

// JSONPosition is where the sequence sits among the sets F(q): the digit
// frequencies q_hat with the simultaneous intervals q_low, q_high of the
// Pearson region n·Σ(q̂_j − q_j)²/q_j ≤ region_a (Quesenberry–Hurst, at the
// profile's confidence), whether the null's vector lies in the region, the
// dimension of F(q̂) with its interval, and under a stated vector the local
// dimension alpha of μ_p along the sequence with its interval (absent
// otherwise).
type JSONPosition struct {
	QHat       []float64 `json:"q_hat"`
	QLow       []float64 `json:"q_low"`
	QHigh      []float64 `json:"q_high"`
	RegionA    float64   `json:"region_a"`
	NullInside bool      `json:"null_inside"`
	Dimension  float64   `json:"dimension"`
	DimLow     *float64  `json:"dimension_low"`
	DimHigh    *float64  `json:"dimension_high"`
	Alpha      *float64  `json:"alpha,omitempty"`
	AlphaLow   *float64  `json:"alpha_low,omitempty"`
	AlphaHigh  *float64  `json:"alpha_high,omitempty"`
}

// JSONEntropyRow is one block length of the entropy profile (nats).
type JSONEntropyRow struct {
	K           int      `json:"k"`
	PlugIn      float64  `json:"h_plugin"`
	MillerMadow float64  `json:"h_miller_madow"`
	Conditional float64  `json:"h_conditional"`
	Dimension   float64  `json:"dimension"`
	DimLow      *float64 `json:"dimension_low"`
	DimHigh     *float64 `json:"dimension_high"`
	Deficit     float64  `json:"deficit"`
	// The likelihood-ratio test of Markov order k−2 against k−1 (null at k = 1).
	OrderG      *float64 `json:"order_g"`
	OrderDF     *float64 `json:"order_df"`
	OrderLog10P *float64 `json:"order_log10_p"`
}

// JSONPlotData is the data behind every plot of the report, so that a
// reader can draw any figure again: the digit counts and the null's band
// of relative frequencies (level band_level), the running trace (digit
// counts at each position, with each digit's standardized deviation and
// the iterated-logarithm envelope there), and each second-level
// statistic's segment p-values; the findings' p-values themselves are in
// findings[], and qq_band_low/high the simultaneous band of the Q–Q plot
// for them in increasing order (Kolmogorov–Smirnov, at band_level).
type JSONPlotData struct {
	DigitCounts []int64             `json:"digit_counts"`
	BandLevel   float64             `json:"band_level"`
	BandLow     []*float64          `json:"band_low"`
	BandHigh    []*float64          `json:"band_high"`
	Trace       []JSONTracePoint    `json:"trace"`
	Segments    []JSONSegmentSeries `json:"segment_p_values"`
	QQBandLow   []float64           `json:"qq_band_low"`
	QQBandHigh  []float64           `json:"qq_band_high"`
}

// JSONTracePoint is the trace at one position.
type JSONTracePoint struct {
	Pos       int64      `json:"pos"`
	Counts    []int64    `json:"counts"`
	Deviation []*float64 `json:"deviation"`
	Envelope  *float64   `json:"envelope"`
}

// JSONSegmentSeries is one statistic's p-values, segment by segment.
type JSONSegmentSeries struct {
	Statistic string    `json:"statistic"`
	P         []float64 `json:"p"`
}

func finites(v []float64) []*float64 {
	out := make([]*float64, len(v))
	for i, x := range v {
		out[i] = finite(x)
	}
	return out
}

func plotData(r *audit.Result) JSONPlotData {
	pd := JSONPlotData{DigitCounts: nonNilInts(r.DigitCounts), BandLevel: audit.BandLevel,
		BandLow: finites(r.Curves.BandLow), BandHigh: finites(r.Curves.BandHigh),
		Trace: []JSONTracePoint{}, Segments: []JSONSegmentSeries{},
		QQBandLow: append([]float64{}, r.Curves.QQLow...), QQBandHigh: append([]float64{}, r.Curves.QQHigh...)}
	for i, tp := range r.Trace {
		p := JSONTracePoint{Pos: tp.Pos, Counts: nonNilInts(tp.Counts), Deviation: []*float64{}}
		if i < len(r.Curves.Deviation) {
			p.Deviation = finites(r.Curves.Deviation[i])
		}
		if i < len(r.Curves.Envelope) {
			p.Envelope = finite(r.Curves.Envelope[i])
		}
		pd.Trace = append(pd.Trace, p)
	}
	for _, s := range r.SegmentPValues {
		pd.Segments = append(pd.Segments, JSONSegmentSeries{Statistic: s.Label, P: slices.Clone(s.PValues)})
	}
	return pd
}

func nonNilInts(v []int64) []int64 {
	if v == nil {
		return []int64{}
	}
	return slices.Clone(v)
}

// ToJSON converts a document to its JSON form.
func ToJSON(doc Document) JSONDocument {
	out := JSONDocument{Schema: SchemaName, SchemaVersion: SchemaVersion, BorelVersion: doc.Version,
		Command: doc.Command, Created: doc.Created.UTC().Format(time.RFC3339), Audits: []JSONAudit{}, Caution: Caution}
	for _, r := range doc.Results {
		out.Audits = append(out.Audits, jsonAudit(r))
	}
	for _, v := range doc.Inputs {
		in := JSONInput{Input: v.Input, Verdict: string(v.Verdict), Rule: "holm across views of each view's smallest adjusted p, both sides",
			Views: []int{}, PDeviation: math.Exp(v.LogPDeviation), Log10PDeviation: log10(v.LogPDeviation),
			PTooUniform: math.Exp(v.LogPTooUniform), Log10PTooUniform: log10(v.LogPTooUniform), Decisive: -1}
		for _, view := range v.Views {
			for i, r := range doc.Results {
				if r == view {
					in.Views = append(in.Views, i)
					if v.Decisive >= 0 && v.Views[v.Decisive] == r {
						in.Decisive = i
					}
				}
			}
		}
		out.Inputs = append(out.Inputs, in)
	}
	return out
}

// JSON writes the document as indented JSON.
func JSON(w io.Writer, doc Document) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(ToJSON(doc))
}

func jsonAudit(r *audit.Result) JSONAudit {
	a := JSONAudit{
		Source: JSONSource{Name: r.Source.Name, Kind: r.Source.Kind, Format: r.Source.Format, View: r.Source.View,
			Compressed: r.Source.Compressed, IntegerPart: r.Source.IntegerPart,
			SHA256: r.Source.SHA256, Parameters: r.Source.Parameters, Checks: slices.Clone(r.Source.Checks)},
		Segments: r.Segments, Seed: r.Seed,
		Base: r.Base, Digits: r.Digits, Null: JSONNull{Kind: r.Null.Kind.String(), P: slices.Clone(r.Null.P)},
		Alpha: r.Alpha, Adjustment: string(r.Adjustment), MaxBlock: r.MaxBlock, BlockChoice: r.BlockChoice,
		Verdict: string(r.Verdict), Findings: []JSONFinding{}, Skipped: []JSONSkip{}, Notes: checks.NoteTexts(r.Notes),
		Plots: plotData(r),
	}
	if r.Source.Bytes >= 0 {
		b := r.Source.Bytes
		a.Source.Bytes = &b
	}
	for _, f := range r.Findings {
		a.Findings = append(a.Findings, JSONFinding{
			Check: f.Check, Statistic: string(f.Statistic), Params: f.Params, Of: f.Of, TwoSided: f.TwoSided, Value: f.Value, DF: f.DF,
			PUpper: math.Exp(f.LogPUpper), PLower: math.Exp(f.LogPLower),
			Log10PUpper: log10(f.LogPUpper), Log10PLower: log10(f.LogPLower),
			AdjPUpper: math.Exp(f.LogAdjUpper), AdjPLower: math.Exp(f.LogAdjLower),
			Log10AdjPUpper: log10(f.LogAdjUpper), Log10AdjPLower: log10(f.LogAdjLower),
			Holm: tails(f.LogHolmUpper, f.LogHolmLower), BH: tails(f.LogBHUpper, f.LogBHLower),
			Mark: string(f.Mark), Where: f.Where, WhereHow: f.WhereHow, Detail: f.Detail, Notes: checks.NoteTexts(f.Notes),
		})
	}
	for _, s := range r.Skips {
		a.Skipped = append(a.Skipped, JSONSkip{Check: s.Check, Params: s.Params, Reason: s.Reason})
	}
	if e := r.Entropy; e != nil {
		je := &JSONEntropy{Confidence: e.Confidence, NullDimension: e.NullDimension, Rows: []JSONEntropyRow{}}
		for _, row := range e.Rows {
			je.Rows = append(je.Rows, JSONEntropyRow{K: row.K, PlugIn: row.PlugIn, MillerMadow: row.MillerMadow,
				Conditional: row.Conditional, Dimension: row.Dimension, DimLow: finite(row.DimLow),
				DimHigh: finite(row.DimHigh), Deficit: row.Deficit,
				OrderG: finite(row.OrderG), OrderDF: finite(row.OrderDF), OrderLog10P: finite(row.OrderLogP / math.Ln10)})
		}
		if p := e.Position; p != nil {
			jp := &JSONPosition{QHat: p.Region.QHat, QLow: p.Region.Low, QHigh: p.Region.High, RegionA: p.Region.A,
				NullInside: p.NullInside, Dimension: e.Rows[0].Dimension, DimLow: finite(e.Rows[0].DimLow), DimHigh: finite(e.Rows[0].DimHigh)}
			if p.HasAlpha {
				jp.Alpha, jp.AlphaLow, jp.AlphaHigh = finite(p.Alpha), finite(p.AlphaLow), finite(p.AlphaHigh)
			}
			je.Position = jp
		}
		a.Entropy = je
	}
	return a
}

// log10 converts a natural log to log10, with null for an exact zero.
func log10(lnP float64) *float64 {
	if math.IsInf(lnP, -1) {
		return nil
	}
	v := lnP / math.Ln10
	return &v
}

func finite(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}
