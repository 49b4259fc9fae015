package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/pflag"

	"github.com/borel-audit/borel/reports"
	"github.com/borel-audit/borel/stats/audit"
)

// formats are the report formats borel writes (the reports registry).
var formats = reports.FormatNames()

// output holds the options every reporting subcommand shares.
type output struct {
	format, path, plots, appendTo, section string
	quiet                                  bool
	width                                  int
}

func (o *output) register(fs *pflag.FlagSet) {
	fs.StringVar(&o.format, "format", "text", "report format: "+strings.Join(formats, ", "))
	fs.StringVarP(&o.path, "output", "o", "", "write the report to this file (atomically) instead of standard output")
	fs.StringVar(&o.plots, "plots", "", "also write every plot to this folder, as SVG and PNG")
	fs.StringVar(&o.appendTo, "append", "", "add the report to an existing .md, .tex or .html document, in the section named by --section")
	fs.StringVar(&o.section, "section", "borel", "name of the section --append writes (running again replaces only that section)")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no progress line on standard error")
	fs.IntVar(&o.width, "width", 0, "fit text tables to this many columns (default: the terminal's width, or COLUMNS, when the report goes to a terminal; whole tables otherwise)")
}

// textWidth is the number of columns a text report fits: --width when
// given; else, when the report goes to standard output and that is a
// terminal, COLUMNS if it is set to a number, else the terminal's width;
// else 0, no limit (a pipe or a file gets whole tables).
func (o *output) textWidth(e env) int {
	if o.width > 0 {
		return o.width
	}
	if (o.path != "" && o.path != "-") || o.appendTo != "" {
		return 0
	}
	f, ok := e.stdout.(*os.File)
	if !ok {
		return 0
	}
	if st, err := f.Stat(); err != nil || st.Mode()&os.ModeCharDevice == 0 {
		return 0
	}
	if c, err := strconv.Atoi(strings.TrimSpace(os.Getenv("COLUMNS"))); err == nil && c > 0 {
		return c
	}
	return terminalColumns(f)
}

// check validates the output options before any work.
func (o *output) check(input string) error {
	if !slicesContains(formats, o.format) {
		return usagef("--format %q: borel writes %s", o.format, strings.Join(formats, ", "))
	}
	if o.width < 0 || (o.width > 0 && o.width < 40) {
		return usagef("--width %d: give at least 40 columns (or leave it out to fit the terminal)", o.width)
	}
	if o.appendTo != "" {
		if o.path != "" {
			return usagef("--append and -o exclude each other: the report goes into one file")
		}
		if reports.KindForPath(o.appendTo) == "" {
			return usagef("--append %s: borel appends to .md, .tex or .html documents (chosen by extension)", o.appendTo)
		}
		if !reports.ValidSectionName(o.section) {
			return usagef("--section %q: use letters, digits, '.', '_' or '-'", o.section)
		}
		if st, err := os.Stat(o.appendTo); err != nil || !st.Mode().IsRegular() {
			return usagef("--append %s: no such document; create it first (borel adds to an existing file)", o.appendTo)
		}
		if sameFile(input, o.appendTo) {
			return usagef("--append %s is the input file; choose another document", o.appendTo)
		}
	}
	if sameFile(input, o.path) {
		return usagef("-o %s is the input file; choose another name so the input is not overwritten", o.path)
	}
	if o.path != "" && o.path != "-" {
		if err := checkWritable(o.path, "-o"); err != nil {
			return err
		}
	}
	if o.appendTo != "" {
		if err := checkWritable(o.appendTo, "--append"); err != nil {
			return err
		}
	}
	if o.plots != "" {
		if err := checkPlotFolder(o.plots); err != nil {
			return err
		}
	}
	return nil
}

func slicesContains(s []string, v string) bool {
	for _, x := range s {
		if x == v {
			return true
		}
	}
	return false
}

// reportTime is the date a report states: SOURCE_DATE_EPOCH (seconds since
// 1970, the reproducible-builds convention) when set, else now.
func reportTime() time.Time {
	if s := os.Getenv("SOURCE_DATE_EPOCH"); s != "" {
		if sec, err := strconv.ParseInt(s, 10, 64); err == nil {
			return time.Unix(sec, 0).UTC()
		}
	}
	return time.Now().UTC()
}

// render writes the document in the chosen format into a buffer, so that
// nothing reaches a file until the whole report exists.
func render(doc reports.Document, format string) ([]byte, error) {
	f, ok := reports.Renderer(format)
	if !ok {
		return nil, usagef("--format %q: borel writes %s", format, strings.Join(formats, ", "))
	}
	var buf bytes.Buffer
	err := f.Report(&buf, doc)
	return buf.Bytes(), err
}

// renderComparison writes the side-by-side table of several results in
// the chosen format (the full report where the format has none).
func renderComparison(doc reports.Document, format string) ([]byte, error) {
	var buf bytes.Buffer
	err := reports.Comparison(&buf, doc, format)
	return buf.Bytes(), err
}

// publish writes the report where the options say: appended to a document,
// to a file, or to standard output; and the plots, if asked.
func (o *output) publish(e env, doc reports.Document, main []byte) error {
	if o.plots != "" {
		if err := writePlots(o.plots, doc); err != nil {
			return err
		}
	}
	if o.appendTo != "" {
		kind := reports.KindForPath(o.appendTo)
		var frag bytes.Buffer
		f, _ := reports.Renderer(kind)
		if err := f.Fragment(&frag, doc); err != nil {
			return err
		}
		old, err := os.ReadFile(o.appendTo)
		if err != nil {
			return fmt.Errorf("cannot read %s: %v", o.appendTo, unwrapPathError(err))
		}
		updated, err := reports.AppendSection(old, kind, o.section, o.appendTo, frag.Bytes())
		if err != nil {
			return err
		}
		return writeAtomic(o.appendTo, updated)
	}
	if o.path == "" || o.path == "-" {
		_, err := e.stdout.Write(main)
		return err
	}
	return writeAtomic(o.path, main)
}

var unsafeName = regexp.MustCompile(`[^A-Za-z0-9._-]+`)

// writePlots writes every figure of every audit as SVG and PNG.
func writePlots(dir string, doc reports.Document) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("cannot create the plot folder %s: %v", dir, unwrapPathError(err))
	}
	docFigs, err := reports.DocumentFigures(doc)
	if err != nil {
		return err
	}
	if err := writeFigures(dir, "all", docFigs); err != nil {
		return err
	}
	for i, r := range doc.Results {
		figs, err := reports.Figures(r)
		if err != nil {
			return err
		}
		// The input's base name, never a leading dot or dash (a hidden
		// file): ../pi-decimals.txt gives pi-decimals.txt-base10-….
		stem := strings.TrimLeft(strings.Trim(unsafeName.ReplaceAllString(filepath.Base(r.Source.Name), "-"), "-"), ".-")
		if stem == "" {
			stem = "input"
		}
		if len(doc.Results) > 1 {
			stem = fmt.Sprintf("%d-%s", i+1, stem)
		}
		if err := writeFigures(dir, fmt.Sprintf("%s-base%d", stem, r.Base), figs); err != nil {
			return err
		}
	}
	return nil
}

// writeHook, when set (by tests), wraps the temporary file's writer, to
// simulate a write that fails part way (a full disk).
var writeHook func(io.Writer) io.Writer

// writeAtomic writes data to path through a temporary file in the same
// folder, synced and renamed over the target, so an interrupted or failed
// run leaves any earlier file whole and no temporary file behind.
func writeAtomic(path string, data []byte) error {
	return writeAtomicFunc(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// writeAtomicFunc is writeAtomic for output made as it is written (digits
// streamed from a generator): write gets the temporary file, and only a
// write that returns no error replaces the target.
func writeAtomicFunc(path string, write func(io.Writer) error) error {
	shown := path
	target, st, err := resolveTarget(path)
	if err != nil {
		return fmt.Errorf("cannot write %s: %v", shown, err)
	}
	if st != nil && st.IsDir() {
		return fmt.Errorf("cannot write %s: it is a folder", shown)
	}
	if st != nil && !st.Mode().IsRegular() {
		return writeInPlaceFunc(target, write)
	}
	path = target
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, ".borel-*.tmp")
	if err != nil {
		return fmt.Errorf("cannot write %s: %v", path, unwrapPathError(err))
	}
	name := tmp.Name()
	tempFiles.Store(name, true)
	defer tempFiles.Delete(name)
	fail := func(err error) error {
		tmp.Close()
		os.Remove(name)
		return fmt.Errorf("cannot write %s: %v; any earlier file there is unchanged", path, err)
	}
	var w io.Writer = tmp
	if writeHook != nil {
		w = writeHook(tmp)
	}
	if err := write(w); err != nil {
		return fail(err)
	}
	if err := tmp.Sync(); err != nil {
		return fail(err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(name)
		return fmt.Errorf("cannot write %s: %v", path, err)
	}
	mode := os.FileMode(0o644)
	if st, err := os.Stat(path); err == nil {
		mode = st.Mode().Perm() // keep an existing document's permissions
	}
	if err := os.Chmod(name, mode); err != nil {
		os.Remove(name)
		return fmt.Errorf("cannot write %s: %v", path, err)
	}
	if interrupted.Load() && !writesAfterSignal.Load() {
		return fail(errInterrupted{})
	}
	if err := os.Rename(name, path); err != nil {
		os.Remove(name)
		return fmt.Errorf("cannot write %s: %v", path, err)
	}
	return nil
}

// sameFile reports whether the output path names the input file.
func sameFile(in, out string) bool {
	if in == "" || in == "-" || out == "" || out == "-" {
		return false
	}
	a, err1 := os.Stat(in)
	b, err2 := os.Stat(out)
	return err1 == nil && err2 == nil && os.SameFile(a, b)
}

// report renders the audit results, publishes them as the options say and
// returns the exit status: 3 under --strict when any verdict is not
// consistent.
func (o *output) report(e env, results []*audit.Result, strict bool) (int, error) {
	return o.reportInputs(e, results, nil, strict)
}

// reportInputs is report for one input audited in several views or bases:
// inputs holds its one verdict, which --strict gates on (the views'
// verdicts are detail).
func (o *output) reportInputs(e env, results []*audit.Result, inputs []audit.InputVerdict, strict bool) (int, error) {
	doc := reports.Document{Version: version, Command: append([]string{"borel"}, e.args...), Created: reportTime(),
		Results: results, Inputs: inputs, Width: o.textWidth(e)}
	data, err := render(doc, o.format)
	if err != nil {
		return 0, err
	}
	if err := o.publish(e, doc, data); err != nil {
		return 0, err
	}
	if strict {
		if len(inputs) > 0 {
			for _, in := range inputs {
				if in.Verdict != audit.Consistent {
					return exitVerdict, nil
				}
			}
			return exitOK, nil
		}
		for _, r := range results {
			if r.Verdict != audit.Consistent {
				return exitVerdict, nil
			}
		}
	}
	return exitOK, nil
}

// emit writes plain output (digits) to a file atomically, or to stdout.
func emit(e env, path string, data []byte) error {
	if path != "" && path != "-" {
		return writeAtomic(path, data)
	}
	_, err := e.stdout.Write(data)
	return err
}
