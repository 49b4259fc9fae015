package main

import (
	"fmt"
	"io"
	"os"
	"time"
)

// progress prints one line on standard error, rewritten in place, while a
// pass runs longer than a second: digits read, rate and (when the input
// size is known) the time left. It prints nothing when standard error is
// not a terminal or with --quiet, and never enters a report.
type progress struct {
	w          io.Writer
	start      time.Time
	total      int64 // input bytes, or -1
	shown      bool
	lastUpdate time.Time
}

func newProgress(e env, quiet bool, totalBytes int64) *progress {
	f, ok := e.stderr.(*os.File)
	if quiet || !ok {
		return nil
	}
	if st, err := f.Stat(); err != nil || st.Mode()&os.ModeCharDevice == 0 {
		return nil
	}
	return &progress{w: e.stderr, start: time.Now(), total: totalBytes}
}

// update is called after each chunk with the digits and input bytes so far.
func (p *progress) update(digits, bytesRead int64) {
	if p == nil {
		return
	}
	now := time.Now()
	elapsed := now.Sub(p.start)
	if elapsed < time.Second || now.Sub(p.lastUpdate) < 250*time.Millisecond {
		return
	}
	p.lastUpdate = now
	rate := float64(digits) / elapsed.Seconds()
	line := fmt.Sprintf("borel: %s digits read, %s digits/s", human(float64(digits)), human(rate))
	if p.total > 0 && bytesRead > 0 {
		left := time.Duration(float64(elapsed) * float64(p.total-bytesRead) / float64(bytesRead))
		line += fmt.Sprintf(", about %s left", left.Round(time.Second))
	}
	fmt.Fprintf(p.w, "\r%s\033[K", line)
	p.shown = true
}

// phase shows a digit computation's phase, the fraction done when it is
// measured, and the time so far (from the start, without the one-second
// wait of a pass: a computation's phases are its only sign of life).
func (p *progress) phase(what, phase string, done float64) {
	if p == nil {
		return
	}
	line := fmt.Sprintf("borel: %s: %s", what, phase)
	if done > 0 {
		line += fmt.Sprintf(" %.0f%%", 100*done)
	}
	line += fmt.Sprintf(", %s", time.Since(p.start).Round(time.Second))
	fmt.Fprintf(p.w, "\r%s\033[K", line)
	p.shown = true
}

// done clears the line.
func (p *progress) done() {
	if p != nil && p.shown {
		fmt.Fprint(p.w, "\r\033[K")
	}
}

func human(v float64) string {
	switch {
	case v >= 1e9:
		return fmt.Sprintf("%.2f G", v/1e9)
	case v >= 1e6:
		return fmt.Sprintf("%.1f M", v/1e6)
	case v >= 1e3:
		return fmt.Sprintf("%.1f k", v/1e3)
	}
	return fmt.Sprintf("%.0f", v)
}
