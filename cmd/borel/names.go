package main

import (
	"io"
	"strconv"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/seq"
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

// plural writes "1 shard", "2 shards".
func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return strconv.Itoa(n) + " " + noun + "s"
}
