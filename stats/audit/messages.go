package audit

import "fmt"

// Options as messages name them. A library message names an option by its
// field in Options (MaxBlock, MemoryBytes, Segments, Checks, Null), never
// by a command-line flag; a program sets Options.OptionName to name them
// in its own terms (borel's command: --max-block, --memory, …).
const (
	OptMaxBlock = "MaxBlock"
	OptMemory   = "MemoryBytes"
	OptSegments = "Segments"
	OptChecks   = "Checks"
	OptNull     = "Null"
	OptBase     = "Base" // the base the digits are read in (a reader's option)
)

// name returns how messages name an option.
func (o Options) name(opt string) string {
	if o.OptionName != nil {
		return o.OptionName(opt)
	}
	return opt
}

// OptionError is an option value an audit cannot use, with the values a
// program needs to give its own advice: which option (OptMaxBlock, …), the
// value, and the limit it broke (Need: what the value needs; Have: what
// there is — digits of input, bytes of budget; 0 when not a limit).
type OptionError struct {
	Option     string
	Value      int64
	Need, Have int64
	msg        string
}

// Error is the message, with the option named as Options.OptionName says.
func (e *OptionError) Error() string { return e.msg }

func optionErrorf(opt string, value, need, have int64, format string, args ...any) error {
	return &OptionError{Option: opt, Value: value, Need: need, Have: have, msg: fmt.Sprintf(format, args...)}
}
