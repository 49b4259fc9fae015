//go:build linux

package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
	"unsafe"
)

// openPTY returns the two ends of a new pseudo-terminal (Linux: /dev/ptmx,
// unlocked with TIOCSPTLCK, the follower named by TIOCGPTN), or skips.
func openPTY(t *testing.T) (leader, follower *os.File) {
	t.Helper()
	leader, err := os.OpenFile("/dev/ptmx", os.O_RDWR, 0)
	if err != nil {
		t.Skipf("no pseudo-terminal here: %v", err)
	}
	var unlock int32
	if _, _, e := syscall.Syscall(syscall.SYS_IOCTL, leader.Fd(), syscall.TIOCSPTLCK, uintptr(unsafe.Pointer(&unlock))); e != 0 {
		leader.Close()
		t.Skipf("pseudo-terminal unlock: %v", e)
	}
	var n uint32
	if _, _, e := syscall.Syscall(syscall.SYS_IOCTL, leader.Fd(), syscall.TIOCGPTN, uintptr(unsafe.Pointer(&n))); e != 0 {
		leader.Close()
		t.Skipf("pseudo-terminal number: %v", e)
	}
	follower, err = os.OpenFile("/dev/pts/"+itoa(int(n)), os.O_RDWR|syscall.O_NOCTTY, 0)
	if err != nil {
		leader.Close()
		t.Skipf("pseudo-terminal follower: %v", err)
	}
	return leader, follower
}

// readPTY collects what the terminal shows until its other end closes.
func readPTY(leader *os.File) (*bytes.Buffer, chan struct{}) {
	var got bytes.Buffer
	done := make(chan struct{})
	go func() {
		buf := make([]byte, 1<<16)
		for {
			n, err := leader.Read(buf)
			got.Write(buf[:n])
			if err != nil {
				close(done)
				return
			}
		}
	}()
	return &got, done
}

func itoa(n int) string {
	if n < 10 {
		return string(rune('0' + n))
	}
	return itoa(n/10) + string(rune('0'+n%10))
}

// A digit computation on a terminal shows its phases, with the fraction
// done, on standard error, and clears the line; with --quiet it shows
// nothing. (Before, `borel digits ln2 --count 2000000` was silent for 25 s.)
func TestComputationProgressOnTerminal(t *testing.T) {
	leader, follower := openPTY(t)
	defer leader.Close()
	got, done := readPTY(leader)
	out := filepath.Join(t.TempDir(), "pi.txt")
	var stdout bytes.Buffer
	code := run([]string{"digits", "pi", "--count", "3000000", "-o", out}, strings.NewReader(""), &stdout, follower)
	quietCode := run([]string{"digits", "e", "--count", "200000", "-q", "-o", out + "2"}, strings.NewReader(""), &stdout, follower)
	time.Sleep(100 * time.Millisecond)
	follower.Close()
	select {
	case <-done:
	case <-time.After(5 * time.Second):
	}
	text := got.String()
	if code != 0 || quietCode != 0 {
		t.Fatalf("exit %d / %d: %q", code, quietCode, text)
	}
	for _, want := range []string{"computing pi: 3.0 M digits in base 10: series", "%", "digits", "\r\x1b[K"} {
		if !strings.Contains(text, want) {
			t.Errorf("terminal output lacks %q:\n%q", want, text)
		}
	}
	if strings.Contains(text, "computing e") {
		t.Errorf("--quiet showed progress: %q", text)
	}
}
