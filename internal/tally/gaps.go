package tally

import (
	"encoding/json"
	"fmt"
	"slices"
)

// DefaultGapCap is the gap length from which gaps are tallied together in
// one tail cell. A gap check never needs classes beyond it: at q = 1/36 and
// 10^9 digits the validity rule G(1-q)^t ≥ 5 stops at t ≈ 550.
const DefaultGapCap = 2048

const maxGapCap = 1 << 20 // beyond it a decoded shard is damaged

// GapSpec asks for the gap record: Class maps each digit to its gap class
// (len Base; nil: one class per digit); gaps of Cap or more other digits
// share the last cell (0: DefaultGapCap).
type GapSpec struct {
	Class []int `json:"class,omitempty"`
	Cap   int   `json:"cap"`
}

func init() { registerKind("gaps", func() RecordSpec { return new(GapSpec) }) }

func (s *GapSpec) Kind() string { return "gaps" }

func (s *GapSpec) gapCap() int {
	if s.Cap <= 0 {
		return DefaultGapCap
	}
	return s.Cap
}

// ClassOf returns the gap class of digit d.
func (s *GapSpec) ClassOf(d int) int {
	if s.Class == nil {
		return d
	}
	return s.Class[d]
}

func (s *GapSpec) classes(b int) int {
	if s.Class == nil {
		return b
	}
	return slices.Max(s.Class) + 1
}

func (s *GapSpec) validate(b int) error {
	if s.Cap < 0 || s.Cap > maxGapCap {
		return fmt.Errorf("gap cap %d is out of range", s.Cap)
	}
	if s.Class != nil {
		if len(s.Class) != b {
			return fmt.Errorf("%d gap classes given for base %d", len(s.Class), b)
		}
		for _, c := range s.Class {
			if c < 0 || c >= b {
				return fmt.Errorf("gap class %d is out of range", c)
			}
		}
	}
	return nil
}

func (s *GapSpec) span() int { return 1 }

func (s *GapSpec) cells(b int) float64 { return float64(s.classes(b) * (s.gapCap() + 1)) }

func (s *GapSpec) newRecord(sp *Spec, _ int64) record {
	r := &Gaps{GapSpec: *s, Classes: make([]GapTally, s.classes(sp.Base))}
	for i := range r.Classes {
		r.Classes[i].Hist = make([]int64, s.gapCap()+1)
	}
	return r
}

// Gaps is the gap record: one GapTally per digit class.
type Gaps struct {
	GapSpec
	Classes []GapTally

	table         *[256]gapByte // addPacked's byte table
	joined, spare []int64       // add's flat tables (flat): the histograms' backing, and a second copy folded in by settle
}

// GapTally is the gap record of one digit class: Hist[r] counts complete gaps
// of r other digits between consecutive occurrences (r < cap) and Hist[cap]
// the gaps of cap or more. First and Last are the local positions of the
// first and last occurrence (valid when Seen).
type GapTally struct {
	Hist        []int64
	Seen        bool
	First, Last int64
}

// Gaps returns the gap record, or nil when the tally has none.
func (t *Tally) Gaps() *Gaps { t.settle(); r, _ := t.find("gaps").(*Gaps); return r }

// CapLength returns the gap length from which gaps share the last cell.
func (r *Gaps) CapLength() int { return r.gapCap() }

func (r *Gaps) kind() string { return "gaps" }

func (r *Gaps) kernels(t *Tally) []kernel {
	k := kernel{name: "gaps", cost: 2, run: func(d []byte) { r.add(d, t.N) }}
	if packWidth(t.Base) > 0 {
		k.packed = func(p []byte) { r.addPacked(p, t.N, packWidth(t.Base)) }
	}
	return []kernel{k}
}

// gapByte is what a byte of packed digits holds for the gap record: the
// classes present (n of them), each with the index of its first and last
// digit in the byte, and the gaps inside the byte (gaps[:ng], class and
// length).
type gapByte struct {
	n, ng            uint8
	cls, first, last [8]uint8
	gapCls, gapLen   [7]uint8
}

// byteTable returns the gap record's table of the 256 bytes of s-bit
// digits, made on first use.
func (r *Gaps) byteTable(s int) *[256]gapByte {
	if r.table != nil {
		return r.table
	}
	m := 8 / s
	tab := new([256]gapByte)
	for v := range 256 {
		e := &tab[v]
		at := map[int]int{} // class → index of its last digit so far
		for j := range m {
			c := r.ClassOf(v >> (8 - s*(j+1)) & (1<<s - 1))
			if l, ok := at[c]; ok {
				e.gapCls[e.ng], e.gapLen[e.ng] = uint8(c), uint8(j-l-1)
				e.ng++
				for i := range e.n {
					if int(e.cls[i]) == c {
						e.last[i] = uint8(j)
					}
				}
			} else {
				e.cls[e.n], e.first[e.n], e.last[e.n] = uint8(c), uint8(j), uint8(j)
				e.n++
			}
			at[c] = j
		}
	}
	r.table = tab
	return tab
}

// addPacked is add for a packed chunk (packed.go; p[0]'s first digit at
// local position n). Per byte only the gaps that reach into it from an
// earlier byte are counted one by one: the gaps inside bytes follow from
// how often each byte value occurs.
func (r *Gaps) addPacked(p []byte, n int64, s int) {
	if s > 1 {
		// Bit pairs and nibbles: most bytes hold several classes, each one
		// a gap that reaches in; digit by digit is as cheap, without the
		// byte loop's unpredictable count.
		r.addPairs(p, n, s)
		return
	}
	m := int64(8 / s)
	cap64 := int64(r.gapCap())
	tab := r.byteTable(s)
	var last [256]int64
	hists := make([][]int64, len(r.Classes))
	for c := range r.Classes {
		last[c] = -1
		if r.Classes[c].Seen {
			last[c] = r.Classes[c].Last
		}
		hists[c] = r.Classes[c].Hist
	}
	var often [256]int64
	for q, v := range p {
		often[v]++
		e := &tab[v]
		at := n + int64(q)*m
		for i := range e.n {
			c := e.cls[i]
			pos := at + int64(e.first[i])
			if l := last[c]; l >= 0 {
				hists[c][min(pos-l-1, cap64)]++
			} else {
				r.Classes[c].Seen, r.Classes[c].First = true, pos
			}
			last[c] = at + int64(e.last[i])
		}
	}
	for v, k := range often {
		e := &tab[v]
		for i := range e.ng {
			hists[e.gapCls[i]][min(int64(e.gapLen[i]), cap64)] += k
		}
	}
	for c := range r.Classes {
		if last[c] >= 0 {
			r.Classes[c].Last = last[c]
		}
	}
}

// add extends each class's gap record over d (d[0] at local position n),
// with the positions of the last occurrences in a local array (−1: not
// seen yet). Consecutive digits count into two copies of the histograms
// (the record's and a spare one folded in when it settles): the common
// short gaps hit the same few cells, and each increment would otherwise
// wait for the one before.
func (r *Gaps) add(d []byte, n int64) {
	cap64 := int64(r.gapCap())
	W := cap64 + 1
	var last [256]int64
	hist, spare := r.flat()
	for c := range r.Classes {
		last[c] = -1
		if r.Classes[c].Seen {
			last[c] = r.Classes[c].Last
		}
	}
	var class [256]int64 // the digit's class; past the last class for a byte that is no digit
	for x := range 256 {
		switch {
		case x < len(r.Class):
			class[x] = int64(r.Class[x])
		case r.Class == nil:
			class[x] = int64(x)
		default:
			class[x] = int64(len(r.Classes)) // its histogram index is out of range: Add panics
		}
	}
	i := 0
	pos := n
	// While every class has been seen, no first occurrence can come.
	seenAll := true
	for c := range r.Classes {
		seenAll = seenAll && last[c] >= 0
	}
	if seenAll {
		for ; i+2 <= len(d); i += 2 {
			c0, c1 := class[d[i]], class[d[i+1]]
			l0 := last[c0]
			last[c0] = pos
			l1 := last[c1]
			last[c1] = pos + 1
			hist[c0*W+min(pos-l0-1, cap64)]++
			spare[c1*W+min(pos-l1, cap64)]++
			pos += 2
		}
	}
	for ; i < len(d); i++ {
		c := class[d[i]]
		if l := last[c]; l >= 0 {
			hist[c*W+min(pos-l-1, cap64)]++
		} else {
			r.Classes[c].Seen, r.Classes[c].First = true, pos
		}
		last[c] = pos
		pos++
	}
	for c := range r.Classes {
		if last[c] >= 0 {
			r.Classes[c].Last = last[c]
		}
	}
}

// addPairs is add for packed bit pairs or nibbles, the digits read from
// the bytes two at a time.
func (r *Gaps) addPairs(p []byte, n int64, s int) {
	seenAll := true
	for c := range r.Classes {
		seenAll = seenAll && r.Classes[c].Seen
	}
	if !seenAll || len(p) < 2 {
		r.add(unpack(nil, p, s), n)
		return
	}
	cap64 := int64(r.gapCap())
	W := cap64 + 1
	var last [256]int64
	for c := range r.Classes {
		last[c] = r.Classes[c].Last
	}
	var class [16]int // the digit's class
	for x := range 1 << s {
		class[x] = r.ClassOf(x)
	}
	hist, spare := r.flat()
	mask := byte(1<<s - 1)
	pos := n
	for _, v := range p {
		for sh := 8 - 2*s; sh >= 0; sh -= 2 * s {
			c0, c1 := class[v>>(sh+s)&mask], class[v>>sh&mask]
			l0 := last[c0]
			last[c0] = pos
			l1 := last[c1]
			last[c1] = pos + 1
			hist[int64(c0)*W+min(pos-l0-1, cap64)]++
			spare[int64(c1)*W+min(pos-l1, cap64)]++
			pos += 2
		}
	}
	for c := range r.Classes {
		r.Classes[c].Last = last[c]
	}
}

// flat returns the histograms as one table, class c's at c·(cap+1), and
// the spare copy (made on first use). The first call moves the histograms
// into the table and leaves each class's Hist a view of its part, so later
// calls copy nothing.
func (r *Gaps) flat() (hist, spare []int64) {
	W := r.gapCap() + 1
	joined := r.joined != nil
	for c := range r.Classes {
		joined = joined && &r.Classes[c].Hist[0] == &r.joined[c*W]
	}
	if !joined {
		r.joined = make([]int64, len(r.Classes)*W)
		for c := range r.Classes {
			part := r.joined[c*W : (c+1)*W : (c+1)*W]
			copy(part, r.Classes[c].Hist)
			r.Classes[c].Hist = part
		}
	}
	if r.spare == nil {
		r.spare = make([]int64, len(r.Classes)*W)
	}
	return r.joined, r.spare
}

// merge joins each class's records: the gap between a's last and b's first
// occurrence is the one that crosses the cut.
func (r *Gaps) merge(next record, sm *seam) {
	n := next.(*Gaps)
	capIdx, na := int64(r.gapCap()), sm.a.N
	for c := range r.Classes {
		ga, gb := &r.Classes[c], &n.Classes[c]
		addInto(ga.Hist, gb.Hist)
		if !gb.Seen {
			continue
		}
		if ga.Seen {
			gap := (na - 1 - ga.Last) + gb.First
			ga.Hist[min(gap, capIdx)]++
		} else {
			ga.Seen, ga.First = true, na+gb.First
		}
		ga.Last = na + gb.Last
	}
}

func (r *Gaps) clone() record {
	u := &Gaps{GapSpec: r.GapSpec, Classes: make([]GapTally, len(r.Classes))}
	for i, g := range r.Classes {
		u.Classes[i] = g
		u.Classes[i].Hist = slices.Clone(g.Hist)
	}
	return u
}

// settle folds the spare histograms into the record's.
func (r *Gaps) settle(*Tally) {
	if r.spare == nil {
		return
	}
	W := r.gapCap() + 1
	for c := range r.Classes {
		addInto(r.Classes[c].Hist, r.spare[c*W:(c+1)*W])
	}
	clear(r.spare)
}

type gapEntry struct {
	Hist  table `json:"hist"`
	Seen  bool  `json:"seen"`
	First int64 `json:"first"`
	Last  int64 `json:"last"`
}

func (r *Gaps) entry(*blobs) any {
	e := []gapEntry{}
	for _, g := range r.Classes {
		e = append(e, gapEntry{g.Hist, g.Seen, g.First, g.Last})
	}
	return e
}

func (r *Gaps) decode(data json.RawMessage, _ *blobs) error {
	var e []gapEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Classes = nil
	for _, g := range e {
		r.Classes = append(r.Classes, GapTally{g.Hist, g.Seen, g.First, g.Last})
	}
	return nil
}

// check: per class, a histogram of cap+1 cells holding one gap fewer than
// the class's occurrences, and first ≤ last inside the stretch.
func (r *Gaps) check(t *Tally) error {
	classes := r.classes(t.Base)
	if len(r.Classes) != classes {
		return fmt.Errorf("%d gap records for %d classes", len(r.Classes), classes)
	}
	occ := make([]int64, classes)
	for d, n := range t.dig.Counts {
		occ[r.ClassOf(d)] += n
	}
	for c, g := range r.Classes {
		if len(g.Hist) != r.gapCap()+1 {
			return fmt.Errorf("gap histogram of %d cells, want %d", len(g.Hist), r.gapCap()+1)
		}
		sum, err := nonNegative("a gap histogram", g.Hist)
		if err != nil {
			return err
		}
		if g.Seen != (occ[c] > 0) {
			return fmt.Errorf("gap class %d is marked %v with %d occurrences", c, g.Seen, occ[c])
		}
		if !g.Seen {
			if sum != 0 {
				return fmt.Errorf("gap class %d has gaps but no occurrence", c)
			}
			continue
		}
		if sum != occ[c]-1 || g.First < 0 || g.First > g.Last || g.Last >= t.N {
			return fmt.Errorf("gap record of class %d does not fit its %d occurrences", c, occ[c])
		}
	}
	return nil
}
