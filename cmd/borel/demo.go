package main

import (
	"bytes"
	"fmt"
	"math/rand/v2"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/reports"
	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
	"github.com/borel-audit/borel/stats/expand"
)

const demoHelp = `Usage: borel demo [--format text|md|csv|json|tex|html] [-o OUT] [--plots DIR]

Runs the built-in scenario end to end in a few seconds. The Wrenfield Institute's small
computing group audits two constants it computed itself (pi in bases 10, 2 and 3, sqrt 2 in
base 10, 30 000 digits each), two units of a hardware decimal-digit generator it bought (unit 2
has a sticky output stage that repeats the last digit too often), the vendor's "certified
sample" file that came in the box, and its own ternary noise sensor against the frequencies its
datasheet states. The sequences are made by borel (the constants exactly, the hardware and the
sample as seeded simulations), so the run is the same everywhere.

Example:
  $ borel demo
  ...
  ┌──────────────────────────────────┬──────┬────────┬────────────────┬ ...
  │ sequence                         │ base │ digits │ verdict        │ ...
`

const demoIntro = `borel demo — the Wrenfield Institute audits its digits

The group computed pi and sqrt 2 itself and wants to know whether the digits look like a ` +
	`normal sequence (pi in bases 10, 2 and 3). It also bought a hardware decimal-digit generator (two units) ` +
	`and received a "certified sample" file with it: these are audited against the uniform null, ` +
	`i.i.d. digits with each k-block at probability b^-k. Its ternary noise sensor is audited against ` +
	`the digit frequencies its datasheet states, (0.5, 0.3, 0.2).`

type demoSequence struct {
	name, params string
	base         int
	null         []float64                        // a stated vector, or nil for the uniform null
	digits       func() ([]byte, []string, error) // the digits, and how a computed constant was checked
}

func demoSequences() []demoSequence {
	const constDigits, unitDigits = 30_000, 200_000
	return []demoSequence{
		{"pi (computed)", "exact decimals by Chudnovsky's series (borel stats/expand)", 10, nil,
			func() ([]byte, []string, error) { return constantDigits("pi", constDigits, 10) }},
		{"pi (computed)", "exact binary digits by Chudnovsky's series (borel stats/expand)", 2, nil,
			func() ([]byte, []string, error) { return constantDigits("pi", constDigits, 2) }},
		{"pi (computed)", "exact ternary digits by Chudnovsky's series (borel stats/expand)", 3, nil,
			func() ([]byte, []string, error) { return constantDigits("pi", constDigits, 3) }},
		{"sqrt 2 (computed)", "exact decimals by integer square root (borel stats/expand)", 10, nil,
			func() ([]byte, []string, error) { return constantDigits("sqrt2", constDigits, 10) }},
		{"generator unit 1", "simulated: ChaCha8 keyed \"wrenfield unit 1\", uniform decimal digits", 10, nil, func() ([]byte, []string, error) {
			var seed [32]byte
			copy(seed[:], "wrenfield unit 1")
			return expand.IID(unitDigits, uniform(10), rand.New(rand.NewChaCha8(seed))), nil, nil
		}},
		{"generator unit 2 (sticky output)", "simulated: PCG(2, 2026), repeats the previous digit with probability 0.02, else uniform", 10, nil, func() ([]byte, []string, error) {
			return expand.Sticky(unitDigits, 10, 0.02, rand.New(rand.NewPCG(2, 2026))), nil, nil
		}},
		{"vendor's certified sample", "simulated: random de Bruijn sequence B(10, 4), PCG(7, 7)", 10, nil, func() ([]byte, []string, error) {
			return expand.RandomDeBruijn(10, 4, rand.New(rand.NewPCG(7, 7))), nil, nil
		}},
		{"ternary noise sensor", "simulated: PCG(3, 2026), i.i.d. trits with frequencies (0.48, 0.32, 0.2); the datasheet states (0.5, 0.3, 0.2)", 3,
			[]float64{0.5, 0.3, 0.2}, func() ([]byte, []string, error) {
				return expand.IID(unitDigits, []float64{0.48, 0.32, 0.2}, rand.New(rand.NewPCG(3, 2026))), nil, nil
			}},
	}
}

// constantDigits returns n decimals of a built-in constant and how they
// were checked.
func constantDigits(name string, n, base int) ([]byte, []string, error) {
	src, err := expand.ParseSource(name)
	if err != nil {
		return nil, nil, err
	}
	return src.CheckedDigits(n, 0, base)
}

func uniform(b int) []float64 {
	p := make([]float64, b)
	for i := range p {
		p[i] = 1 / float64(b)
	}
	return p
}

func runDemo(e env, args []string) (int, error) {
	fs := pflag.NewFlagSet("demo", pflag.ContinueOnError)
	var out output
	out.register(fs)
	if done, err := parseFlags(fs, args, demoHelp, e.stdout); done || err != nil {
		return exitOK, err
	}
	if fs.NArg() != 0 {
		return 0, usagef("demo takes no arguments (got %q); see borel demo --help", fs.Args())
	}
	if err := out.check(""); err != nil {
		return 0, err
	}
	doc := reports.Document{Version: version, Command: append([]string{"borel"}, e.args...), Created: reportTime(), Width: out.textWidth(e)}
	for _, s := range demoSequences() {
		d, how, err := s.digits()
		if err != nil {
			return 0, fmt.Errorf("demo sequence %s: %v", s.name, err)
		}
		opts := auditDefaults()
		if s.null != nil {
			opts.Null = audit.NullSpec{Kind: checks.Vector, P: s.null}
		}
		res, err := audit.Digits(d, s.base, audit.Source{Name: s.name, Kind: "built-in", Bytes: -1, Parameters: s.params, Checks: how}, opts)
		if err != nil {
			return 0, err
		}
		doc.Results = append(doc.Results, res)
	}
	var data []byte
	if out.format == "text" {
		var buf bytes.Buffer
		buf.WriteString(reports.WrapText(demoIntro, introWidth(doc.Width)) + "\n\n")
		if err := reports.Text(&buf, doc); err != nil {
			return 0, err
		}
		data = buf.Bytes()
	} else {
		var err error
		if data, err = render(doc, out.format); err != nil {
			return 0, err
		}
	}
	return exitOK, out.publish(e, doc, data)
}

// introWidth is the column the demo's story wraps at: 90, or the
// terminal's width when narrower.
func introWidth(width int) int {
	if width > 0 && width < 90 {
		return width
	}
	return 90
}
