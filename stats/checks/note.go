package checks

import "fmt"

// NoteKind says what a note is about, so that a program can act on a note
// (warn, fail a gate, retry with other options) without parsing its
// sentence. The sentences may change from release to release; the kinds
// are stable.
type NoteKind string

// Kinds of the notes a finding carries.
const (
	// NoteSparse: some expected counts are below the rule of thumb, so the
	// statistic's limit law is rough at this parameter.
	NoteSparse NoteKind = "sparse"
	// NotePooled: cells were pooled to meet the rule of thumb; the note
	// says how many digits would test every cell.
	NotePooled NoteKind = "pooled"
	// NoteFittedNull: the null vector was estimated from the digits, and
	// the note says how the law or the df account for it.
	NoteFittedNull NoteKind = "fitted-null"
	// NoteApproximation: a tail comes from an approximation the note names.
	NoteApproximation NoteKind = "approximation"
	// NoteTies: the data hold ties a continuous law assumes away.
	NoteTies NoteKind = "ties"
	// NoteWhere: where a deviating finding deviates most (Finding.Where,
	// measured as Finding.WhereHow says).
	NoteWhere NoteKind = "where"
)

// Kinds of the notes an audit carries.
const (
	// NoteBlockLimit: blocks stop below the length the rule of thumb would
	// allow (the input length was unknown, or the memory budget bound).
	NoteBlockLimit NoteKind = "block-limit"
	// NoteBlockBeyondRule: the block length was set beyond the rule of
	// thumb, so some findings carry NoteSparse.
	NoteBlockBeyondRule NoteKind = "block-beyond-rule"
	// NoteSingleDigit: the sequence uses one digit only.
	NoteSingleDigit NoteKind = "single-digit"
	// NoteChecksSubset: only the named checks ran.
	NoteChecksSubset NoteKind = "checks-subset"
	// NoteSecondLevel: the segments of the second level, and the seed of
	// their randomized p-values.
	NoteSecondLevel NoteKind = "second-level"
	// NoteIntegerPart: the input's integer part was dropped.
	NoteIntegerPart NoteKind = "integer-part"
	// NoteGapClasses: which digits form each class of the gap check.
	NoteGapClasses NoteKind = "gap-classes"
	// NoteWordNull: the word-level checks did not run under a non-uniform
	// null.
	NoteWordNull NoteKind = "word-null"
	// NoteWrongBase: the top digits never occur; the input is likely in a
	// smaller base.
	NoteWrongBase NoteKind = "wrong-base"
	// NoteMixed: the sequence deviates in some findings and fits too well
	// in others.
	NoteMixed NoteKind = "mixed"
	// NotePowerBases: audited bases that are powers of one base, whose
	// verdicts are one piece of evidence.
	NotePowerBases NoteKind = "power-bases"
	// NoteLive: a checkpoint of a live audit and its level.
	NoteLive NoteKind = "live"
	// NoteResumed: a live audit resumed from a saved tally.
	NoteResumed NoteKind = "resumed"
	// NoteInterrupted: the audit was interrupted and covers what was read.
	NoteInterrupted NoteKind = "interrupted"
)

// Note is a caveat or an account attached to a finding or an audit: its
// kind, for programs, and its sentence, for people.
type Note struct {
	Kind NoteKind
	Text string
}

// String returns the note's sentence, as the reports print it.
func (n Note) String() string { return n.Text }

// Notef makes a note of the given kind from a format.
func Notef(kind NoteKind, format string, args ...any) Note {
	return Note{Kind: kind, Text: fmt.Sprintf(format, args...)}
}

// NoteTexts returns the notes' sentences.
func NoteTexts(notes []Note) []string {
	out := make([]string, len(notes))
	for i, n := range notes {
		out[i] = n.Text
	}
	return out
}

// HasNote reports whether notes hold one of the given kind.
func HasNote(notes []Note, kind NoteKind) bool {
	for _, n := range notes {
		if n.Kind == kind {
			return true
		}
	}
	return false
}
