package main

import (
	"errors"
	"fmt"
	"io"
	"sort"
	"strings"

	"github.com/spf13/pflag"
)

// version is borel's version, printed in every report.
const version = "0.1.0"

// Exit statuses.
const (
	exitOK      = 0
	exitError   = 1 // run-time error: input that cannot be read or is not a sequence of the base
	exitUsage   = 2 // an invalid option or argument, found before any work
	exitVerdict = 3 // --strict and a verdict other than consistent
)

// usageError marks an error in what the user asked for (exit status 2).
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return usageError{fmt.Sprintf(format, a...)} }

// env is what a subcommand may touch.
type env struct {
	args   []string // the whole command line after "borel", for provenance
	stdin  io.Reader
	stdout io.Writer
	stderr io.Writer
}

type subcommand struct {
	name, summary string
	run           func(e env, args []string) (int, error)
}

func subcommands() []subcommand {
	return []subcommand{
		{"audit", "run the battery on a digit sequence and give a verdict", runAudit},
		{"demo", "run the built-in scenario: a whole audit in seconds", runDemo},
		{"digits", "write digits of a constant or a reference generator in any base", runDigits},
		{"rebase", "re-expand a digit string exactly into another base", runRebase},
		{"tally", "tally one stretch of a long sequence into a shard (for merge)", runTally},
		{"merge", "join shards in offset order and audit the whole", runMerge},
		{"watch", "audit a stream that need not end, at checkpoints of doubling length", runWatch},
		{"compare", "audit several sequences and put them side by side", runCompare},
		{"verify", "check that a file holds the digits of a constant, at random spots or in full", runVerify},
		{"dimension", "print the Besicovitch–Eggleston dimension of a frequency vector", runDimension},
	}
}

const mainHelp = `borel tells whether a digit sequence is statistically consistent with a normal
sequence (every k-block in base b with frequency b^-k), or with a stated digit-frequency
vector, and shows the evidence.

Usage: borel COMMAND [options]

Commands:
%s
Run "borel COMMAND --help" for a command's options and a worked example.

Examples:
  $ borel demo
  $ borel audit digits.txt --base 7
  $ borel audit - --raw < generator.bin
  $ some-generator | borel watch - --raw --word 32
  $ borel verify pi-hex.txt --source pi --base 16

Exit status: 0 success; 1 the input could not be read or is not a sequence of the base;
2 invalid options or arguments; 3 with --strict, a verdict other than consistent (watch: a
failing checkpoint; verify: a digit that differs); 130 stopped by SIGINT or SIGTERM (nothing written; watch writes the
report of what it read, marked as interrupted).
`

func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	e := env{args: args, stdin: stdin, stdout: stdout, stderr: stderr}
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" || args[0] == "help" {
		var list strings.Builder
		for _, c := range subcommands() {
			fmt.Fprintf(&list, "  %-10s %s\n", c.name, c.summary)
		}
		fmt.Fprintf(stdout, mainHelp, list.String())
		if len(args) == 0 {
			return exitUsage
		}
		return exitOK
	}
	if args[0] == "--version" || args[0] == "version" {
		fmt.Fprintf(stdout, "borel %s\n", version)
		return exitOK
	}
	for _, c := range subcommands() {
		if c.name == args[0] {
			code, err := c.run(e, args[1:])
			if interrupted.Load() && !writesAfterSignal.Load() {
				fmt.Fprintln(stderr, "borel: interrupted; nothing was written")
				return exitInterrupted
			}
			if err != nil {
				fmt.Fprintf(stderr, "borel: %s\n", oneLine(err.Error()))
				var ue usageError
				if errors.As(err, &ue) {
					return exitUsage
				}
				return exitError
			}
			return code
		}
	}
	var names []string
	for _, c := range subcommands() {
		names = append(names, c.name)
	}
	sort.Strings(names)
	fmt.Fprintf(stderr, "borel: unknown command %q; the commands are %s and %s (borel --help)\n", args[0], strings.Join(names[:len(names)-1], ", "), names[len(names)-1])
	return exitUsage
}

// oneLine keeps an error message on one line.
func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// parseFlags parses a subcommand's flags; --help prints help and returns
// done = true. pflag's own messages are kept but marked as usage errors.
func parseFlags(fs *pflag.FlagSet, args []string, help string, stdout io.Writer) (done bool, err error) {
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			fmt.Fprint(stdout, help)
			fmt.Fprintln(stdout, "\nOptions:")
			fmt.Fprint(stdout, flagUsages(fs, 100))
			return true, nil
		}
		return false, usagef("%s: %v (see borel %s --help)", fs.Name(), err, fs.Name())
	}
	return false, nil
}

// valueNames are the placeholders the help shows for option values (pflag
// would show the Go type: "string" for --alpha, a number).
var valueNames = map[string]string{
	"alpha": "A", "adjust": "METHOD", "append": "DOC", "base": "B", "width": "N", "start": "SIZE", "until": "SIZE", "save": "PATH", "resume": "PATH", "word": "W", "endian": "ORDER", "bases": "LIST", "checks": "LIST",
	"count": "N", "format": "FORMAT", "from": "B", "from-base": "B", "max-block": "K", "memory": "SIZE",
	"null": "NULL", "offset": "N", "output": "FILE", "plots": "DIR", "section": "NAME", "seed": "N",
	"segments": "M", "source": "NAME", "to": "B", "workers": "N", "wrap": "W", "gzip": "MODE",
}

// flagUsages lists a flag set's options for --help: the option, its value
// placeholder (none for a switch), the usage wrapped to cols, the default.
func flagUsages(fs *pflag.FlagSet, cols int) string {
	type row struct{ left, right string }
	var rows []row
	width := 0
	fs.VisitAll(func(f *pflag.Flag) {
		if f.Hidden {
			return
		}
		left := "      --" + f.Name
		if f.Shorthand != "" {
			left = "  -" + f.Shorthand + ", --" + f.Name
		}
		name, usage := pflag.UnquoteUsage(f)
		if f.Value.Type() != "bool" {
			if v, ok := valueNames[f.Name]; ok && !strings.Contains(f.Usage, "`") {
				name = v
			} else if name == "string" || name == "" {
				name = "VALUE"
			} else if name == "int" || name == "uint" || name == "uint64" || name == "int64" {
				name = "N"
			}
			left += " " + name
		}
		switch def := f.DefValue; {
		case f.Value.Type() == "bool" || def == "" || def == "0" || def == "[]":
		default:
			usage += fmt.Sprintf(" (default %s)", def)
		}
		rows = append(rows, row{left, usage})
		width = max(width, len([]rune(left)))
	})
	var b strings.Builder
	for _, r := range rows {
		pad := width + 3
		lines := strings.Split(wrap(r.right, max(20, cols-pad)), "\n")
		fmt.Fprintf(&b, "%-*s%s\n", pad+len(r.left)-len([]rune(r.left)), r.left, lines[0])
		for _, l := range lines[1:] {
			fmt.Fprintf(&b, "%s%s\n", strings.Repeat(" ", pad), l)
		}
	}
	return b.String()
}
