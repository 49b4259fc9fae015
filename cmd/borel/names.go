package main

import (
	"io"

	"borel/stats/audit"
	"borel/stats/seq"
)

// flagName is the command's name for an option that the libraries'
// messages mention by its Go name (audit.OptMaxBlock, …, and seq's "Base",
// "Raw", "Bits"): their advice then names this command's options.
func flagName(option string) string {
	switch option {
	case audit.OptMaxBlock:
		return "--max-block"
	case audit.OptMemory:
		return "--memory"
	case audit.OptSegments:
		return "--segments"
	case audit.OptChecks:
		return "--checks"
	case audit.OptNull:
		return "--null"
	case "Base":
		return "--base"
	case "Raw":
		return "--raw"
	case "Bits":
		return "--bits"
	}
	return option
}

// auditDefaults is audit.DefaultOptions with messages that name this
// command's options.
func auditDefaults() audit.Options {
	o := audit.DefaultOptions()
	o.OptionName = flagName
	return o
}

// newReader is seq.NewReader with messages that name this command's options.
func newReader(in io.Reader, opt seq.Options) (*seq.Reader, error) {
	opt.OptionName = flagName
	return seq.NewReader(in, opt)
}
