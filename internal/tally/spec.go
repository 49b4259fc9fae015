package tally

import (
	"encoding/json"
	"fmt"
	"reflect"
)

// Spec fixes what a Tally records: the base, the order K of the overlapping
// windows, the aligned block lengths, and the optional records, one
// parameter value each (GapSpec, HandSpec, …), in the order the plan asked
// for them. The digit counts (with their trace), the windows and the
// aligned blocks are always recorded. Tallies merge only when their Specs
// are equal.
type Spec struct {
	Base     int // 2..256
	MaxBlock int // K ≥ 1: overlapping counts at order K, blocks k = 2..K
	// BlocksMax, when in 1..K−1, is the largest k whose non-overlapping
	// blocks are counted (the plan leaves out lengths too long for the
	// blocks check at the known input length); 0 means K.
	BlocksMax int
	// Records are the optional records, at most one of each kind.
	Records []RecordSpec
}

// RecordSpec is the parameter value of one optional record. Each record's
// file defines its own (GapSpec, HandSpec, UpDownSpec, LagSpec, RunSpec,
// WalkSpec, CouponSpec); the methods are the record's part in the tally's
// plan, its merges and its shard entry.
type RecordSpec interface {
	// Kind is the record's name, unique among records: its entry in a shard.
	Kind() string
	// validate reports whether the parameters are usable in base b and
	// within the bounds beyond which a decoded shard is taken as damaged.
	validate(b int) error
	// span is the number of consecutive digits the record reads at once:
	// the tally keeps span−1 digits at each end for the seams.
	span() int
	// cells is the number of 64-bit counters the record holds in base b.
	cells(b int) float64
	// newRecord returns the empty record of a stretch starting at offset.
	newRecord(s *Spec, offset int64) record
}

// recordKinds makes the zero parameter value of each optional record kind,
// for decoding a shard's record list. A record file adds itself here.
var recordKinds = map[string]func() RecordSpec{}

func registerKind(kind string, zero func() RecordSpec) {
	if _, dup := recordKinds[kind]; dup {
		panic("tally: record kind " + kind + " registered twice")
	}
	recordKinds[kind] = zero
}

// Record returns the parameters of the optional record of the given kind,
// or nil when it is not recorded.
func (s Spec) Record(kind string) RecordSpec {
	for _, r := range s.Records {
		if r.Kind() == kind {
			return r
		}
	}
	return nil
}

// Without returns a copy of s without the record of the given kind.
func (s Spec) Without(kind string) Spec {
	out := s
	out.Records = nil
	for _, r := range s.Records {
		if r.Kind() != kind {
			out.Records = append(out.Records, r)
		}
	}
	return out
}

// With returns a copy of s whose record of r's kind is r (added last if
// there was none).
func (s Spec) With(r RecordSpec) Spec {
	out := s
	out.Records = nil
	done := false
	for _, q := range s.Records {
		if q.Kind() == r.Kind() {
			q, done = r, true
		}
		out.Records = append(out.Records, q)
	}
	if !done {
		out.Records = append(out.Records, r)
	}
	return out
}

// Cells returns the number of int64 counters a Tally of this Spec holds,
// including the cyclic tables a check derives at the end (k = 1..K): the
// measure the memory budget is checked against.
func (s Spec) Cells() float64 {
	b := float64(s.Base)
	cells := 0.0
	pow := 1.0
	for k := 1; k <= s.MaxBlock; k++ {
		pow *= b
		cells += pow // cyclic table of order k
		if s.HasBlocks(k) {
			cells += pow // non-overlapping blocks
		}
	}
	cells += pow // overlapping linear counts at K
	for _, r := range s.Records {
		cells += r.cells(s.Base)
	}
	return cells
}

// blocksMax returns the largest k of the non-overlapping block counts.
func (s Spec) blocksMax() int {
	if s.BlocksMax > 0 && s.BlocksMax < s.MaxBlock {
		return s.BlocksMax
	}
	return s.MaxBlock
}

// HasBlocks reports whether the non-overlapping k-blocks are counted.
func (s Spec) HasBlocks(k int) bool { return k >= 2 && k <= s.blocksMax() }

// span returns the longest run of consecutive digits any record reads.
func (s Spec) span() int {
	m := max(2, s.MaxBlock)
	for _, r := range s.Records {
		m = max(m, r.span())
	}
	return m
}

// Validate reports whether the Spec is usable.
func (s Spec) Validate() error {
	if s.Base < 2 || s.Base > 256 {
		return fmt.Errorf("tally: base %d outside 2..256", s.Base)
	}
	if s.BlocksMax < 0 {
		return fmt.Errorf("tally: largest counted block length %d is negative", s.BlocksMax)
	}
	if s.MaxBlock < 1 {
		return fmt.Errorf("tally: block length %d, need at least 1", s.MaxBlock)
	}
	seen := map[string]bool{}
	for _, r := range s.Records {
		if r == nil || reflect.ValueOf(r).IsNil() {
			return fmt.Errorf("tally: a record without parameters")
		}
		if seen[r.Kind()] {
			return fmt.Errorf("tally: record %s listed twice", r.Kind())
		}
		seen[r.Kind()] = true
		if err := r.validate(s.Base); err != nil {
			return fmt.Errorf("tally: %s record: %v", r.Kind(), err)
		}
	}
	return nil
}

// Equal reports whether two Specs record the same things with the same
// parameters (BlocksMax compared by its effect).
func (s Spec) Equal(o Spec) bool {
	if s.Base != o.Base || s.MaxBlock != o.MaxBlock || s.blocksMax() != o.blocksMax() || len(s.Records) != len(o.Records) {
		return false
	}
	for i := range s.Records {
		if !reflect.DeepEqual(s.Records[i], o.Records[i]) {
			return false
		}
	}
	return true
}

// specJSON is a Spec in a shard header: the record list names each record
// and carries its parameters.
type specJSON struct {
	Base      int          `json:"base"`
	MaxBlock  int          `json:"windows"`
	BlocksMax int          `json:"blocks_max"`
	Records   []recordJSON `json:"records"`
}

type recordJSON struct {
	Kind   string          `json:"record"`
	Params json.RawMessage `json:"params"`
}

// MarshalJSON writes the spec with its record list.
func (s Spec) MarshalJSON() ([]byte, error) {
	out := specJSON{Base: s.Base, MaxBlock: s.MaxBlock, BlocksMax: s.blocksMax(), Records: []recordJSON{}}
	for _, r := range s.Records {
		p, err := json.Marshal(r)
		if err != nil {
			return nil, err
		}
		out.Records = append(out.Records, recordJSON{Kind: r.Kind(), Params: p})
	}
	return json.Marshal(out)
}

// UnmarshalJSON reads a spec written by MarshalJSON; an unknown record is
// an error that names it.
func (s *Spec) UnmarshalJSON(data []byte) error {
	var in specJSON
	if err := json.Unmarshal(data, &in); err != nil {
		return err
	}
	*s = Spec{Base: in.Base, MaxBlock: in.MaxBlock, BlocksMax: in.BlocksMax}
	if s.BlocksMax == s.MaxBlock {
		s.BlocksMax = 0
	}
	for _, r := range in.Records {
		zero, ok := recordKinds[r.Kind]
		if !ok {
			return fmt.Errorf("record %q is unknown to this borel", r.Kind)
		}
		p := zero()
		if err := json.Unmarshal(r.Params, p); err != nil {
			return fmt.Errorf("record %s: %v", r.Kind, err)
		}
		s.Records = append(s.Records, p)
	}
	return nil
}
