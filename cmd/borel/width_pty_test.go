//go:build linux

package main

import (
	"bytes"
	"strings"
	"syscall"
	"testing"
	"time"
	"unsafe"
)

// On a terminal the report fits the terminal's width, and COLUMNS, when
// set, overrides it.
func TestTextFitsTerminal(t *testing.T) {
	in := widthInput(t)
	for _, c := range []struct {
		columns string
		size    uint16
		limit   int
	}{{"", 100, 100}, {"90", 130, 90}} {
		t.Setenv("COLUMNS", c.columns)
		leader, follower := openPTY(t)
		ws := struct{ row, col, x, y uint16 }{50, c.size, 0, 0}
		if _, _, e := syscall.Syscall(syscall.SYS_IOCTL, follower.Fd(), syscall.TIOCSWINSZ, uintptr(unsafe.Pointer(&ws))); e != 0 {
			t.Skipf("cannot set the terminal's size: %v", e)
		}
		got, done := readPTY(leader)
		var stderr bytes.Buffer
		code := run([]string{"audit", in, "-q"}, strings.NewReader(""), follower, &stderr)
		time.Sleep(100 * time.Millisecond)
		follower.Close()
		select {
		case <-done:
		case <-time.After(5 * time.Second):
		}
		leader.Close()
		out := strings.ReplaceAll(got.String(), "\r", "")
		if code != 0 || !strings.Contains(out, "Verdict for") {
			t.Fatalf("COLUMNS=%q: exit %d, %s\n%s", c.columns, code, stderr.String(), out)
		}
		if w, line := widest(out); w > c.limit {
			t.Errorf("COLUMNS=%q, terminal %d wide: a line of %d columns:\n%s", c.columns, c.size, w, line)
		}
	}
}
