package tests

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// SIGINT stops a long pass promptly (well under a second) with status 130,
// leaves the earlier output file as it was and no temporary file: an audit
// and a tally.
func TestInterruptStopsPromptly(t *testing.T) {
	for _, c := range []struct{ name, out string }{{"audit", "report.txt"}, {"tally", "part.shard"}} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			in := filepath.Join(dir, "digits.txt")
			os.WriteFile(in, bytes.Repeat([]byte("31415926535897932384626433832795"), 3_000_000), 0o644) // 96 MB
			out := filepath.Join(dir, c.out)
			earlier := []byte("an earlier file the user keeps\n")
			os.WriteFile(out, earlier, 0o644)
			args := []string{"audit", in, "-o", out}
			if c.name == "tally" {
				args = []string{"tally", in, "--offset", "0", "--max-block", "5", "-o", out}
			}
			cmd := exec.Command(borelBin, args...)
			var errb bytes.Buffer
			cmd.Stderr = &errb
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			time.Sleep(300 * time.Millisecond)
			sent := time.Now()
			cmd.Process.Signal(syscall.SIGINT)
			err := cmd.Wait()
			took := time.Since(sent)
			ee, ok := err.(*exec.ExitError)
			if !ok || ee.ExitCode() != 130 {
				t.Fatalf("exit %v, want status 130 (%s)", err, errb.String())
			}
			if took > time.Second {
				t.Errorf("stopped %v after SIGINT, want under a second", took)
			}
			entries, _ := os.ReadDir(dir)
			for _, e := range entries {
				if e.Name() != "digits.txt" && e.Name() != c.out {
					t.Errorf("left behind: %s", e.Name())
				}
			}
			if now, _ := os.ReadFile(out); !bytes.Equal(now, earlier) {
				t.Errorf("the earlier file changed: %q", now)
			}
			if !strings.Contains(errb.String(), "interrupted") {
				t.Errorf("stderr %q", errb.String())
			}
		})
	}
}

// A run blocked on standard input is stopped too.
func TestInterruptWhileBlockedOnStdin(t *testing.T) {
	cmd := exec.Command(borelBin, "audit", "-")
	pr, pw, _ := os.Pipe()
	defer pw.Close()
	cmd.Stdin = pr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	pw.Write([]byte("0123456789"))
	time.Sleep(200 * time.Millisecond)
	cmd.Process.Signal(syscall.SIGTERM)
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	select {
	case err := <-done:
		if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != 130 {
			t.Errorf("exit %v, want 130", err)
		}
	case <-time.After(3 * time.Second):
		cmd.Process.Kill()
		t.Fatal("borel did not stop within 3 s of SIGTERM")
	}
}
