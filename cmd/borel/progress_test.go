package main

import (
	"bytes"
	"strings"
	"testing"
	"time"
)

// The progress line: nothing for a writer that is not a terminal or with
// --quiet; after a second, digits, rate and time left; cleared at the end.
func TestProgress(t *testing.T) {
	var buf bytes.Buffer
	if p := newProgress(env{stderr: &buf}, false, 100); p != nil {
		t.Error("progress on a writer that is not a terminal")
	}
	p := &progress{w: &buf, start: time.Now().Add(-2 * time.Second), total: 1000}
	p.update(3_000_000, 250)
	line := buf.String()
	if !strings.Contains(line, "borel: 3.0 M digits read") || !strings.Contains(line, "digits/s") || !strings.Contains(line, "left") {
		t.Errorf("progress line %q", line)
	}
	p.done()
	if !strings.HasSuffix(buf.String(), "\r\033[K") {
		t.Errorf("line not cleared: %q", buf.String())
	}
	quiet := &progress{w: &buf, start: time.Now()}
	before := buf.Len()
	quiet.update(10, 10) // under a second: nothing
	if buf.Len() != before {
		t.Error("progress printed before a second had passed")
	}
}

// A run whose stderr is not a terminal writes nothing there.
func TestNoProgressInPipes(t *testing.T) {
	in := strings.Repeat("0123456789", 50_000)
	code, out, errs := borel(t, in, "audit", "-")
	if code != 0 || errs != "" || strings.Contains(out, "digits read") {
		t.Errorf("exit %d, stderr %q", code, errs)
	}
}
