package tally

import (
	"encoding/json"
	"fmt"
)

// RunSpec asks for the longest-run record: of any digit, and of Digit.
type RunSpec struct {
	Digit int `json:"digit"`
}

func init() { registerKind("runs", func() RecordSpec { return new(RunSpec) }) }

func (s *RunSpec) Kind() string { return "runs" }

func (s *RunSpec) validate(b int) error {
	if s.Digit < 0 || s.Digit >= b {
		return fmt.Errorf("run digit %d is not a digit of base %d", s.Digit, b)
	}
	return nil
}

func (s *RunSpec) span() int                     { return 1 }
func (s *RunSpec) cells(int) float64             { return 0 }
func (s *RunSpec) newRecord(*Spec, int64) record { return &Runs{RunSpec: *s} }

// Runs is the longest-run record: runs of identical digits (Any) and runs
// of the digit Digit (Digit's).
type Runs struct {
	RunSpec
	Any, Dig RunTally

	table *[256]runByte // addPacked's byte table
}

// RunTally records the runs of one kind in a stretch: the longest, and the
// lengths of the runs touching its start and its end (equal to N when the
// whole stretch is one run).
type RunTally struct {
	Max, Lead, Trail int64
}

// Runs returns the longest-run record, or nil when the tally has none.
func (t *Tally) Runs() *Runs { t.settle(); r, _ := t.find("runs").(*Runs); return r }

func (r *Runs) kind() string { return "runs" }

func (r *Runs) kernels(t *Tally) []kernel {
	k := kernel{name: "runs", cost: 2.5, run: func(d []byte) { r.add(t, d) }}
	if packWidth(t.Base) > 0 {
		k.packed = func(p []byte) { r.addPacked(t, p) }
	}
	return []kernel{k}
}

// runByte is what a byte of packed digits holds for the run record: its
// first and last digit; the run of the first digit it starts with (lead),
// the run of the last one it ends with (trail) and its longest run (top);
// the same three for runs of the record's digit (0 where the byte does not
// start or end with it).
type runByte struct {
	first, last, lead, trail, top uint8
	dLead, dTrail, dTop           uint8
}

// byteTable returns the run record's table of the 256 bytes of s-bit
// digits, made on first use.
func (r *Runs) byteTable(s int) *[256]runByte {
	if r.table != nil {
		return r.table
	}
	m := 8 / s
	tab := new([256]runByte)
	for v := range 256 {
		d := unpack(nil, []byte{byte(v)}, s)
		e := &tab[v]
		e.first, e.last = d[0], d[m-1]
		run, drun := 0, 0
		for j, x := range d {
			if j > 0 && x == d[j-1] {
				run++
			} else {
				run = 1
			}
			if x == byte(r.Digit) {
				drun++
			} else {
				drun = 0
			}
			if run == j+1 {
				e.lead = uint8(run)
			}
			if drun == j+1 {
				e.dLead = uint8(drun)
			}
			e.top, e.dTop = max(e.top, uint8(run)), max(e.dTop, uint8(drun))
		}
		e.trail, e.dTrail = uint8(run), uint8(drun)
	}
	r.table = tab
	return tab
}

// addPacked is add for a packed chunk (packed.go), a byte at a time. While
// the stretch so far is one run (its first chunk, mostly), add reads the
// digits spread out.
func (r *Runs) addPacked(t *Tally, p []byte) {
	if len(p) == 0 {
		return
	}
	s := packWidth(t.Base)
	n := t.N
	if n == 0 || r.Any.Lead == n || r.Dig.Lead == n {
		r.add(t, unpack(nil, p, s))
		return
	}
	m := int64(8 / s)
	tab := r.byteTable(s)
	prev := t.Tail[len(t.Tail)-1]
	aTrail, aMax := r.Any.Trail, r.Any.Max
	dTrail, dMax := r.Dig.Trail, r.Dig.Max
	for _, v := range p {
		e := &tab[v]
		// The run of any digit: the byte's lead continues the open run
		// when its first digit equals the previous one. A byte that is one
		// run through is rare (a branch the processor predicts): otherwise
		// the open run is the byte's trail, whatever came before, and the
		// only chain from byte to byte is the maximum.
		cand := aTrail&-b2i(e.first == prev) + int64(e.lead)
		aMax = max(aMax, cand, int64(e.top))
		if int64(e.lead) == m {
			aTrail = cand
		} else {
			aTrail = int64(e.trail)
		}
		prev = e.last
		// The runs of the digit: dLead is 0 when the byte starts with another.
		dCand := dTrail + int64(e.dLead)
		dMax = max(dMax, dCand, int64(e.dTop))
		if int64(e.dLead) == m {
			dTrail = dCand
		} else {
			dTrail = int64(e.dTrail)
		}
	}
	r.Any.Trail, r.Any.Max = aTrail, aMax
	r.Dig.Trail, r.Dig.Max = dTrail, dMax
}

// b2i is 1 for true, 0 for false.
func b2i(v bool) int64 {
	if v {
		return 1
	}
	return 0
}

// add extends the run records over d: the longest run of any digit and of
// Digit, the runs that reach back to the stretch's first digit (Lead) and
// the current runs (Trail). Leads can only grow while every digit so far
// belongs to them, which is checked once per call; the main loop keeps its
// state in locals.
func (r *Runs) add(t *Tally, d []byte) {
	if len(d) == 0 {
		return
	}
	n := t.N
	c := byte(r.Digit)
	any, dig := &r.Any, &r.Dig
	var prev byte
	if n > 0 {
		prev = t.Tail[len(t.Tail)-1]
	}
	// Leads: while the stretch so far is one run, it grows with equal digits.
	if any.Lead == n {
		i := 0
		for i < len(d) && (n+int64(i) == 0 || d[i] == d[0] && (n == 0 || d[i] == prev)) {
			i++
		}
		any.Lead = n + int64(i)
	}
	if dig.Lead == n {
		i := 0
		for i < len(d) && d[i] == c {
			i++
		}
		dig.Lead = n + int64(i)
	}
	aTrail, aMax := any.Trail, any.Max
	dTrail, dMax := dig.Trail, dig.Max
	if n == 0 {
		aTrail = 0 // the first digit starts a run of 1 below
		prev = d[0] + 1
	}
	// Branch-free: runs of random digits end at unpredictable places.
	for _, x := range d {
		aTrail = aTrail*b2i(x == prev) + 1
		aMax = max(aMax, aTrail)
		dTrail = (dTrail + 1) * b2i(x == c)
		dMax = max(dMax, dTrail)
		prev = x
	}
	any.Trail, any.Max = aTrail, aMax
	dig.Trail, dig.Max = dTrail, dMax
}

func (r *Runs) merge(next record, sm *seam) {
	n := next.(*Runs)
	a, b := sm.a, sm.b
	joined := a.Tail[len(a.Tail)-1] == b.Head[0]
	r.Any = mergeRuns(r.Any, n.Any, a.N, b.N, joined)
	r.Dig = mergeRuns(r.Dig, n.Dig, a.N, b.N, true)
}

// mergeRuns joins run records; joined says whether a's last run and b's
// first run are of the same kind (for runs of one digit the lengths are 0
// when they are not, so joining is always right).
func mergeRuns(a, b RunTally, na, nb int64, joined bool) RunTally {
	r := RunTally{Max: max(a.Max, b.Max), Lead: a.Lead, Trail: b.Trail}
	if joined {
		r.Max = max(r.Max, a.Trail+b.Lead)
		if a.Lead == na {
			r.Lead = na + b.Lead
		}
		if b.Trail == nb {
			r.Trail = nb + a.Trail
		}
	}
	return r
}

func (r *Runs) clone() record { u := *r; u.table = nil; return &u }
func (r *Runs) settle(*Tally) {}

type runsEntry struct {
	Any [3]int64 `json:"any"` // longest, lead, trail
	Dig [3]int64 `json:"digit"`
}

func (r *Runs) entry(*blobs) any {
	return runsEntry{[3]int64{r.Any.Max, r.Any.Lead, r.Any.Trail}, [3]int64{r.Dig.Max, r.Dig.Lead, r.Dig.Trail}}
}

func (r *Runs) decode(data json.RawMessage, _ *blobs) error {
	var e runsEntry
	if err := json.Unmarshal(data, &e); err != nil {
		return err
	}
	r.Any = RunTally{e.Any[0], e.Any[1], e.Any[2]}
	r.Dig = RunTally{e.Dig[0], e.Dig[1], e.Dig[2]}
	return nil
}

// check: every length within the stretch; lead and trail within the
// longest; a run of the digit only where the digit occurs.
func (r *Runs) check(t *Tally) error {
	N := t.N
	for _, x := range []RunTally{r.Any, r.Dig} {
		if x.Max < 0 || x.Lead < 0 || x.Trail < 0 || x.Max > N || x.Lead > x.Max || x.Trail > x.Max {
			return fmt.Errorf("run record (%d, %d, %d) does not fit %d digits", x.Max, x.Lead, x.Trail, N)
		}
	}
	if N > 0 && r.Any.Max < 1 || r.Dig.Max > t.dig.Counts[r.Digit] {
		return fmt.Errorf("run record does not fit the digit counts")
	}
	return nil
}
