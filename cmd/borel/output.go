package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"

	"borel/reports"
)

// render writes the document in the chosen format into a buffer, so that
// nothing reaches a file until the whole report exists.
func render(doc reports.Document, format string) ([]byte, error) {
	var buf bytes.Buffer
	var err error
	switch format {
	case "json":
		err = reports.JSON(&buf, doc)
	default:
		err = reports.Text(&buf, doc)
	}
	return buf.Bytes(), err
}

func checkFormat(f string) (string, error) {
	switch f {
	case "text", "json":
		return f, nil
	}
	return "", usagef("--format %q: borel writes text or json", f)
}

// deliver writes the report to stdout, or atomically to path: a temporary
// file in the same folder, synced, then renamed over the target, so an
// interrupted run leaves any earlier file whole.
func deliver(e env, data []byte, path string) error {
	if path == "" || path == "-" {
		_, err := e.stdout.Write(data)
		return err
	}
	return writeAtomic(path, data)
}

func writeAtomic(path string, data []byte) error {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, ".borel-*.tmp")
	if err != nil {
		return fmt.Errorf("cannot write the report to %s: %v", path, err)
	}
	name := tmp.Name()
	fail := func(err error) error {
		tmp.Close()
		os.Remove(name)
		return fmt.Errorf("cannot write the report to %s: %v; any earlier file there is unchanged", path, err)
	}
	if _, err := tmp.Write(data); err != nil {
		return fail(err)
	}
	if err := tmp.Sync(); err != nil {
		return fail(err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(name)
		return fmt.Errorf("cannot write the report to %s: %v", path, err)
	}
	if err := os.Chmod(name, 0o644); err != nil {
		os.Remove(name)
		return fmt.Errorf("cannot write the report to %s: %v", path, err)
	}
	if err := os.Rename(name, path); err != nil {
		os.Remove(name)
		return fmt.Errorf("cannot write the report to %s: %v", path, err)
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
